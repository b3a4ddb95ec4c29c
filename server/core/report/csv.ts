/**
 * One CSV cell (RFC 4180) that a spreadsheet will not run as a formula. Text starting with
 * =, +, -, @, a tab or a carriage return gets a leading apostrophe and is quoted, as the OWASP
 * "CSV Injection" guidance recommends; quotes are doubled. Numbers efflux writes from finite
 * JavaScript numbers (e.g. -3.2, 1e-5) stay as they are: a spreadsheet reads them as numbers, and
 * prefixing them would break every negative change in a history.
 */
const FORMULA_START = /^[=+\-@\t\r]/;

export function csvCell(v: string | number | boolean | null | undefined): string {
  if (v === null || v === undefined) return '';
  if (typeof v === 'number') return Number.isFinite(v) ? String(v) : '';
  if (typeof v === 'boolean') return String(v);
  if (FORMULA_START.test(v)) return `"'${v.replace(/"/g, '""')}"`;
  return /[",\r\n]/.test(v) ? `"${v.replace(/"/g, '""')}"` : v;
}

/** Rows of cells as CSV text with CRLF line ends (RFC 4180). */
export function csvText(
  rows: readonly (readonly (string | number | boolean | null | undefined)[])[],
): string {
  return rows.map((r) => r.map(csvCell).join(',')).join('\r\n') + '\r\n';
}
