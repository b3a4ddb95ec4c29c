/**
 * Several fits of one outlet side by side: Cd·a and Cd with their expanded uncertainties, and for
 * each pair the difference, U_diff and E_n (en.ts). Pure; the CLI prints it after fitting several
 * files (`efflux fit a.csv b.csv …`), and the web's side-by-side page can use the same rows.
 */
import { countText } from '../format/words.js';
import { measurementText } from '../format/uncertainty.js';
import { displayUnit, type UnitSystem } from '../format/unit-system.js';
import { fixedText } from '../format/digits.js';
import { compareEn, type EnComparison } from './en.js';

export interface ComparedFit {
  label: string;
  /** Cd·a, m², with its expanded uncertainty (m²). */
  effectiveAreaM2: { value: number; expandedUncertainty: number } | null;
  dischargeCoefficient: { value: number; expandedUncertainty: number } | null;
}

export interface ComparedPair {
  first: string;
  second: string;
  effectiveArea: EnComparison | null;
  dischargeCoefficient: EnComparison | null;
}

/** The measured values of a fit JSON, or null members when it has none (unconverged, no bore). */
export function comparedFit(label: string, fit: Record<string, unknown>): ComparedFit {
  type Estimate = { value?: unknown; expandedUncertainty?: unknown } | null | undefined;
  const pick = (q: Estimate) =>
    fit.converged !== false &&
    q &&
    typeof q.value === 'number' &&
    typeof q.expandedUncertainty === 'number' &&
    Number.isFinite(q.value) &&
    Number.isFinite(q.expandedUncertainty)
      ? { value: q.value, expandedUncertainty: q.expandedUncertainty }
      : null;
  return {
    label,
    effectiveAreaM2: pick(fit.effectiveAreaM2 as Estimate),
    dischargeCoefficient: pick(fit.dischargeCoefficient as Estimate),
  };
}

/** Every pair (i < j), in order. */
export function comparePairs(fits: readonly ComparedFit[]): ComparedPair[] {
  const pairs: ComparedPair[] = [];
  for (let i = 0; i < fits.length; i++)
    for (let j = i + 1; j < fits.length; j++) {
      const a = fits[i];
      const b = fits[j];
      pairs.push({
        first: a.label,
        second: b.label,
        effectiveArea:
          a.effectiveAreaM2 && b.effectiveAreaM2
            ? compareEn(a.effectiveAreaM2, b.effectiveAreaM2)
            : null,
        dischargeCoefficient:
          a.dischargeCoefficient && b.dischargeCoefficient
            ? compareEn(a.dischargeCoefficient, b.dischargeCoefficient)
            : null,
      });
    }
  return pairs;
}

const padEnd = (s: string, w: number) => s + ' '.repeat(Math.max(0, w - [...s].length));

/** Columns padded to their widest cell, two spaces apart. */
export function alignedRows(rows: string[][], indent = '  '): string[] {
  const widths = rows[0].map((_, j) => Math.max(...rows.map((r) => [...(r[j] ?? '')].length)));
  return rows.map((r) =>
    (
      indent + r.map((c, j) => (j === r.length - 1 ? c : padEnd(c, widths[j] + 2))).join('')
    ).trimEnd(),
  );
}

const enText = (c: EnComparison | null) =>
  c ? `${fixedText(c.en, 2)} (${Math.abs(c.en) <= 1 ? 'agree' : 'differ'})` : '—';

/** The comparison as text lines, Cd·a in the person's units. */
export function comparisonLines(fits: readonly ComparedFit[], units: UnitSystem): string[] {
  const area = displayUnit('area', units);
  const lines = [
    `Comparison of ${countText(fits.length, 'test')} (expanded uncertainties U, about 95 %)`,
    ...alignedRows([
      ['test', `Cd·a ± U (${area.symbol})`, 'Cd ± U'],
      ...fits.map((f) => [
        f.label,
        f.effectiveAreaM2
          ? measurementText(
              f.effectiveAreaM2.value * area.perSi,
              f.effectiveAreaM2.expandedUncertainty * area.perSi,
            )
          : '—',
        f.dischargeCoefficient
          ? measurementText(
              f.dischargeCoefficient.value,
              f.dischargeCoefficient.expandedUncertainty,
            )
          : '—',
      ]),
    ]),
  ];
  const pairs = comparePairs(fits);
  if (!pairs.length) return lines;
  const diff = (c: EnComparison | null, scale: number) =>
    c ? measurementText(c.difference * scale, c.expandedUncertaintyOfDifference * scale) : '—';
  lines.push(
    '',
    'Differences (first − second; U_diff = √(U₁² + U₂²) for independent tests; E_n = difference / U_diff, |E_n| ≤ 1 agree; ISO/IEC 17043 Annex B)',
    ...alignedRows([
      ['pair', `Δ Cd·a ± U_diff (${area.symbol})`, 'E_n', 'Δ Cd ± U_diff', 'E_n'],
      ...pairs.map((p) => [
        `${p.first} − ${p.second}`,
        diff(p.effectiveArea, area.perSi),
        enText(p.effectiveArea),
        diff(p.dischargeCoefficient, 1),
        enText(p.dischargeCoefficient),
      ]),
    ]),
    "  Cd's E_n counts the bore tolerance twice although both tests share the bore: for one outlet, Cd·a's E_n is the sharper test.",
  );
  return lines;
}
