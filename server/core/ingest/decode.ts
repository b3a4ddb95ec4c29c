/**
 * Bytes to text. Logger software writes UTF-8 (with or without a byte-order mark), UTF-16
 * (spreadsheet "Unicode text" exports) or a legacy 8-bit code page. We decode ourselves, in
 * bounded chunks, so a 30 MB file never becomes one 60 MB string.
 */
import { InputError } from '../errors.js';

export type Encoding = 'utf-8' | 'utf-16le' | 'utf-16be' | 'windows-1252';

export interface EncodingGuess {
  encoding: Encoding;
  /** Bytes of byte-order mark to skip. */
  bomBytes: number;
  reason: string;
}

export function detectEncoding(bytes: Uint8Array): EncodingGuess {
  const b0 = bytes[0],
    b1 = bytes[1],
    b2 = bytes[2];
  if (b0 === 0xef && b1 === 0xbb && b2 === 0xbf)
    return { encoding: 'utf-8', bomBytes: 3, reason: 'UTF-8 byte-order mark' };
  if (b0 === 0xff && b1 === 0xfe)
    return { encoding: 'utf-16le', bomBytes: 2, reason: 'UTF-16 little-endian byte-order mark' };
  if (b0 === 0xfe && b1 === 0xff)
    return { encoding: 'utf-16be', bomBytes: 2, reason: 'UTF-16 big-endian byte-order mark' };
  // Without a mark, UTF-16 text of mostly ASCII shows a NUL in every other byte.
  const n = Math.min(bytes.length & ~1, 4096);
  let evenNul = 0,
    oddNul = 0;
  for (let i = 0; i < n; i += 2) {
    if (bytes[i] === 0) evenNul++;
    if (bytes[i + 1] === 0) oddNul++;
  }
  const pairs = n / 2;
  if (pairs >= 4) {
    if (oddNul > 0.4 * pairs && evenNul < 0.05 * pairs)
      return {
        encoding: 'utf-16le',
        bomBytes: 0,
        reason: 'NUL in every second byte (UTF-16 little-endian without mark)',
      };
    if (evenNul > 0.4 * pairs && oddNul < 0.05 * pairs)
      return {
        encoding: 'utf-16be',
        bomBytes: 0,
        reason: 'NUL in every first byte (UTF-16 big-endian without mark)',
      };
  }
  return { encoding: 'utf-8', bomBytes: 0, reason: 'no byte-order mark; read as UTF-8' };
}

/** Thrown inside a pass when UTF-8 turns out invalid, so the caller can re-read as 8-bit. */
export class NotUtf8 extends Error {}

// C0 controls other than tab, LF, CR; DEL; C1 controls. None belongs in a text log.
const CONTROL = /[\x00-\x08\x0b-\x0c\x0e-\x1f\x7f-\x9f]/;

/**
 * The text of `bytes` from `start`, in pieces of about `chunkBytes`, each checked for
 * binary content. `lineAt(index, piece)` lets the caller name the line of a bad byte.
 */
export function* textChunks(
  bytes: Uint8Array,
  guess: EncodingGuess,
  fileName: string,
  chunkBytes = 1 << 20,
  lineAt: (offsetInChunk: number, chunk: string) => number = () => 0,
): Generator<string> {
  const dec = new TextDecoder(guess.encoding, {
    fatal: guess.encoding === 'utf-8',
    ignoreBOM: true,
  });
  // In UTF-8 and 8-bit text a 0x0A byte is always a line feed: pieces that end just after one
  // need no text carried over to the next, so the caller scans flat strings, not joined ones
  // (reading characters of a joined string is several times slower).
  const lfAligned = guess.encoding === 'utf-8' || guess.encoding === 'windows-1252';
  for (let pos = guess.bomBytes, end = pos; pos < bytes.length; pos = end) {
    end = Math.min(bytes.length, pos + chunkBytes);
    // A piece that ends at a line feed holds whole characters: decoded without streaming, which
    // takes half the time of a streaming decode (measured on Node 20).
    let whole = end === bytes.length;
    if (lfAligned && !whole) {
      const lf = bytes.lastIndexOf(10, end - 1);
      if (lf >= pos) {
        end = lf + 1;
        whole = true;
      }
    }
    let text: string;
    try {
      text = dec.decode(bytes.subarray(pos, end), { stream: !whole });
    } catch {
      throw new NotUtf8();
    }
    const m = CONTROL.exec(text);
    if (m) {
      const line = lineAt(m.index, text);
      const code = text.charCodeAt(m.index).toString(16).padStart(4, '0');
      throw new InputError(
        `binary content (character U+${code}): this does not look like a text log`,
        {
          file: fileName,
          ...(line > 0 ? { line } : {}),
        },
      );
    }
    yield text;
  }
}

/** The first `maxBytes` of the file as text (an incomplete last character held back). */
export function decodeHead(
  bytes: Uint8Array,
  guess: EncodingGuess,
  maxBytes: number,
  fileName: string,
): string {
  const end = Math.min(bytes.length, guess.bomBytes + maxBytes);
  let text: string;
  try {
    const dec = new TextDecoder(guess.encoding, {
      fatal: guess.encoding === 'utf-8',
      ignoreBOM: true,
    });
    text = dec.decode(bytes.subarray(guess.bomBytes, end), { stream: end < bytes.length });
  } catch {
    throw new NotUtf8();
  }
  const m = CONTROL.exec(text);
  if (m) {
    let line = 1;
    for (let i = text.indexOf('\n'); i >= 0 && i < m.index; i = text.indexOf('\n', i + 1)) line++;
    const code = text.charCodeAt(m.index).toString(16).padStart(4, '0');
    throw new InputError(
      `binary content (character U+${code}): this does not look like a text log`,
      { file: fileName, line },
    );
  }
  return text.replace(/^\uFEFF/, '');
}
