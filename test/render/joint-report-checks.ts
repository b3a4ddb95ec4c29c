/**
 * Text and position checks for the connected-vessel (joint fit) report PDF, shared by the HTTP
 * and browser tests: pdftotext per page (pages split at form feeds), no JSON and no internal field
 * names anywhere, the status mark on every page of a report that is not approved, and each figure
 * kept whole on one page (its caption, both charts' axis titles and its note on the same page).
 */
import { spawnSync } from 'node:child_process';
import { mkdtempSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';

/** Names of the system file, the fit JSON and the settings that a reader must never see. */
export const INTERNAL_NAMES = [
  'effectiveAreaM2',
  'initialReadingM',
  'sensorZeroElevationM',
  'leakInflowM3S',
  'zeroElevationM',
  'dischargesTo',
  'baseElevationM',
  'boreToleranceM',
  'boreM',
  'diameterM',
  'heightM',
  'elevationM',
  'vertical-cylinder',
  'fitDatum',
  'fitInflow',
  'dateOrder',
  'stopReason',
  'inflowLogs',
  'meanM3S',
];

export function pdfPages(pdf: Uint8Array): string[] {
  const dir = mkdtempSync(join(tmpdir(), 'efflux-joint-pdf-'));
  const file = join(dir, 'report.pdf');
  writeFileSync(file, pdf);
  const r = spawnSync('pdftotext', ['-layout', file, '-'], { encoding: 'utf8' });
  if (r.status !== 0) throw new Error(`pdftotext failed: ${r.stderr}`);
  const pages = r.stdout.split('\f');
  if (pages.at(-1)!.trim() === '') pages.pop();
  return pages;
}

/** Problems found in the report's pages; an empty list when every check holds. */
export function jointReportProblems(
  pages: string[],
  expect: { status: 'draft' | 'approved' | 'rejected'; figures: number },
): string[] {
  const problems: string[] = [];
  const all = pages.join('\n');
  if (all.includes('{"')) problems.push('JSON ({") printed');
  for (const name of INTERNAL_NAMES)
    if (all.includes(name)) problems.push(`internal name "${name}" printed`);
  pages.forEach((p, i) => {
    const mark =
      expect.status === 'draft' ? 'DRAFT' : expect.status === 'rejected' ? 'REJECTED' : null;
    if (mark && !p.includes(mark)) problems.push(`page ${i + 1} has no ${mark} mark`);
    if (!mark && /\bDRAFT\b|\bREJECTED\b/.test(p))
      problems.push(`page ${i + 1} of an approved report is marked`);
    const count = (re: RegExp) => (p.match(re) ?? []).length;
    const captions = count(/Figure \d+\./g);
    const notes = count(/Residual = reading − joint model/g);
    const levelAxes = count(/reading, m\b/g);
    const residualAxes = count(/residual, mm/g);
    if (captions !== notes || captions !== residualAxes || levelAxes < captions)
      problems.push(
        `page ${i + 1}: a figure split from its caption (captions ${captions}, notes ${notes}, level axes ${levelAxes}, residual axes ${residualAxes})`,
      );
  });
  const figures = (all.match(/Figure \d+\./g) ?? []).length;
  if (figures !== expect.figures) problems.push(`${figures} figures, expected ${expect.figures}`);
  return problems;
}
