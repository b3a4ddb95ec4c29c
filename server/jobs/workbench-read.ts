/**
 * What the workbench's `inspect` and `series` answer, computed where it is run (a task thread in
 * the service): the same pure reader as a fit (prepareDrainTest), and the answer's JSON written
 * here as bytes, so the HTTP thread neither parses a million-row log nor serialises its series.
 */
import type { AnalysisRequest, RawFile } from '../core/analysis-contract.js';
import {
  detectedSummary,
  expandWorkbook,
  prepareDrainTest,
  type PreparedTest,
} from '../core/analyze.js';
import { decodeHead, detectEncoding, NotUtf8 } from '../core/ingest/decode.js';
import { readStoredRaw } from '../store/raw-reader.js';

const HEAD_LINES = 25;
const HEAD_BYTES = 16 * 1024;

/** The first lines of the file as text, for the preview table (never used for reading). */
export function headLines(
  bytes: Uint8Array,
  fileName: string,
): { encoding: string; lines: string[] } {
  let guess = detectEncoding(bytes);
  let text: string;
  try {
    text = decodeHead(bytes, guess, HEAD_BYTES, fileName);
  } catch (e) {
    if (!(e instanceof NotUtf8)) throw e;
    guess = { encoding: 'windows-1252', bomBytes: 0, reason: 'not valid UTF-8' };
    text = decodeHead(bytes, guess, HEAD_BYTES, fileName);
  }
  const lines = text.replace(/\r\n?/g, '\n').split('\n').slice(0, HEAD_LINES);
  if (bytes.length > HEAD_BYTES && lines.length === HEAD_LINES)
    return { encoding: guess.encoding, lines };
  return {
    encoding: guess.encoding,
    lines: lines.filter((l, i) => l !== '' || i < lines.length - 1),
  };
}

/** A Float64Array as a JSON array (non-finite values as null, as JSON.stringify would). */
function numbers(a: ArrayLike<number>): string {
  const parts = new Array<string>(a.length);
  for (let i = 0; i < a.length; i++) parts[i] = Number.isFinite(a[i]) ? String(a[i]) : 'null';
  return `[${parts.join(',')}]`;
}

function seriesJson(p: PreparedTest): string {
  const s = p.series;
  const t0 = s.t0EpochMs === null ? null : new Date(s.t0EpochMs).toISOString();
  return `{"t0":${JSON.stringify(t0)},"timeS":${numbers(s.timeS)},"levelM":${numbers(s.levelM)},"keep":${numbers(p.choice.keep)}}`;
}

const utf8 = (s: string) => new TextEncoder().encode(s);

/** POST /api/vessels/:id/inspect: first lines, what was detected, the series, the settings used. */
export async function inspectAnswer(request: AnalysisRequest): Promise<Uint8Array> {
  // a workbook is read as its sheet's text (its first lines are those of the sheet)
  const req = await expandWorkbook(request);
  const head = headLines(req.log.bytes, req.log.fileName);
  const p = prepareDrainTest(req);
  return utf8(
    `{"head":${JSON.stringify(head)},"detected":${JSON.stringify(detectedSummary(p))},"series":${seriesJson(p)},"settings":${JSON.stringify(req.settings ?? {})}}`,
  );
}

/** A raw file given as bytes, or by its hash in the database file (read in this thread). */
export type RawSource = RawFile | { fileName: string; dbPath: string; sha256: string };

export interface SeriesRequest extends Omit<AnalysisRequest, 'log' | 'baro'> {
  log: RawSource;
  baro?: RawSource;
}

const bytesOf = async (r: RawSource): Promise<RawFile> =>
  'bytes' in r ? r : { bytes: await readStoredRaw(r.dbPath, r.sha256), fileName: r.fileName };

/** GET /api/tests/:id/series: the stored log's series at full resolution and what was detected. */
export async function seriesAnswer(req: SeriesRequest): Promise<Uint8Array> {
  const p = prepareDrainTest(
    await expandWorkbook({
      ...req,
      log: await bytesOf(req.log),
      baro: req.baro ? await bytesOf(req.baro) : undefined,
    }),
  );
  return utf8(`{"series":${seriesJson(p)},"detected":${JSON.stringify(detectedSummary(p))}}`);
}
