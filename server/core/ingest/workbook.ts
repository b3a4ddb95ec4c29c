/**
 * Workbooks (.xlsx) as logs: one sheet (the first, or the one named) becomes tab-separated text,
 * which then goes through exactly the same column, unit and time detection as any text log.
 * Read with read-excel-file (maintained, MIT; not the `xlsx` registry package, which has
 * published advisories). Its reader is asynchronous, so the shells expand a workbook before the
 * (synchronous) analysis: `expandWorkbook` below; the stored raw bytes stay the workbook's own.
 *
 * Cells: numbers as JavaScript writes them (shortest round trip), dates formatted as dates in the
 * sheet as "YYYY-MM-DD hh:mm:ss.sss" wall-clock time (a workbook stores no zone: read as UTC
 * unless --tz says otherwise), numbers that are serial day counts without a date format stay
 * numbers (the reader recognises serial dates by their header and range), text as it is.
 */
import readXlsxFile from 'read-excel-file/universal';
import { InputError } from '../errors.js';
import { DEFAULT_MAX_BYTES } from './options.js';

const ZIP_MAGIC = [0x50, 0x4b, 0x03, 0x04];

/** A zip archive (the container of .xlsx files) by its first bytes. */
export function isZip(bytes: Uint8Array): boolean {
  return bytes.length >= 4 && ZIP_MAGIC.every((b, i) => bytes[i] === b);
}

function hasEntry(bytes: Uint8Array, name: string): boolean {
  // zip entry names are stored uncompressed in the local headers and the central directory
  const first = name.charCodeAt(0);
  for (
    let i = bytes.indexOf(first);
    i >= 0 && i + name.length <= bytes.length;
    i = bytes.indexOf(first, i + 1)
  ) {
    let k = 1;
    while (k < name.length && bytes[i + k] === name.charCodeAt(k)) k++;
    if (k === name.length) return true;
  }
  return false;
}

function cellText(v: unknown): string {
  if (v === null || v === undefined) return '';
  if (v instanceof Date) {
    if (Number.isNaN(v.getTime())) return '';
    return v.toISOString().replace('T', ' ').replace('Z', '');
  }
  if (typeof v === 'number') return Number.isFinite(v) ? String(v) : '';
  if (typeof v === 'boolean') return v ? 'TRUE' : 'FALSE';
  // tabs and line ends inside a cell would split it: spaces instead
  return String(v).replace(/[\t\r\n]+/g, ' ');
}

export interface WorkbookText {
  bytes: Uint8Array;
  sheet: string;
  sheets: string[];
}

/** The named (or first) sheet of an .xlsx workbook as tab-separated UTF-8 text. */
export async function workbookAsText(
  bytes: Uint8Array,
  fileName: string,
  sheet?: string,
  maxBytes = DEFAULT_MAX_BYTES,
): Promise<WorkbookText> {
  if (bytes.length > maxBytes)
    throw new InputError(`file is ${bytes.length} bytes, more than the ${maxBytes} allowed`, {
      file: fileName,
    });
  if (!hasEntry(bytes, 'xl/workbook.xml')) {
    throw new InputError(
      'a zip archive that is not an .xlsx workbook (no xl/workbook.xml): export the sheet as CSV, or give the .xlsx file',
      { file: fileName },
    );
  }
  let sheets: { sheet: string; data: unknown[][] }[];
  try {
    const ab = bytes.buffer.slice(
      bytes.byteOffset,
      bytes.byteOffset + bytes.byteLength,
    ) as ArrayBuffer;
    sheets = (await readXlsxFile(ab)) as unknown as { sheet: string; data: unknown[][] }[];
  } catch (e) {
    const why = e instanceof Error ? e.message.split('\n')[0].slice(0, 120) : 'unreadable';
    throw new InputError(
      `the workbook cannot be read (${why}): the file is damaged or not an .xlsx workbook`,
      { file: fileName },
    );
  }
  const names = sheets.map((s) => s.sheet);
  if (names.length === 0) throw new InputError('the workbook has no sheets', { file: fileName });
  const chosen =
    sheet === undefined
      ? sheets[0]
      : sheets.find((s) => s.sheet.trim().toLowerCase() === sheet.trim().toLowerCase());
  if (!chosen)
    throw new InputError(
      `no sheet named "${sheet}" (sheets: ${names.map((n) => `"${n}"`).join(', ')})`,
      { file: fileName, field: 'sheet' },
    );
  const lines: string[] = [];
  let size = 0;
  for (const row of chosen.data) {
    const line = row.map(cellText).join('\t');
    size += line.length + 1;
    if (size > maxBytes) {
      throw new InputError(
        `sheet "${chosen.sheet}" holds more than ${maxBytes} bytes of data, more than allowed`,
        { file: fileName, field: 'sheet' },
      );
    }
    lines.push(line);
  }
  if (lines.every((l) => l.trim() === ''))
    throw new InputError(`sheet "${chosen.sheet}" is empty`, { file: fileName, field: 'sheet' });
  return {
    bytes: new TextEncoder().encode(lines.join('\n') + '\n'),
    sheet: chosen.sheet,
    sheets: names,
  };
}
