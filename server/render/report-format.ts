/** Number formatting for reports: the value formats come from core so the CLI and the PDF agree. */
export { sig, toU } from '../core/analysis/format.js';

export const bytesText = (n: number) =>
  n < 1024
    ? `${n} B`
    : n < 1048576
      ? `${(n / 1024).toFixed(1)} KiB`
      : `${(n / 1048576).toFixed(2)} MiB`;

export const dateText = (iso: string | null | undefined) =>
  iso ? iso.replace('T', ' ').replace(/\.000Z$|Z$/, ' UTC') : '—';
