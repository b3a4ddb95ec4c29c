/**
 * Reader for NIST StRD nonlinear-regression files (fixed-line format): the header says on which
 * lines the starting/certified values and the data sit; parameter lines read
 * `bK = start1 start2 certified certifiedSd`; the summary gives the certified residual sum of
 * squares. Malformed files are refused with InputError naming file and line.
 */
import { InputError } from '../../core/errors.js';
import { parseDecimal } from './double-double.js';
import type { Dd } from './double-double.js';

export interface StrdParameter {
  name: string;
  start1: number;
  start2: number;
  certified: number;
  certifiedSd: number;
  /** Significant digits given for the certified value and its sd (caps the LRE). */
  certifiedDigits: number;
  certifiedSdDigits: number;
}

export interface StrdDataset {
  name: string;
  parameters: StrdParameter[];
  residualSumOfSquares: number;
  residualSumOfSquaresDigits: number;
  degreesOfFreedom: number;
  /** Response values. */
  y: Float64Array;
  /** Predictor columns (one for all but Nelson, which has two). */
  x: Float64Array[];
  /** The same data as double-double, read from the decimal text (not from the rounded doubles). */
  yExact: Dd[];
  xExact: Dd[][];
}

/** Significant digits of a number as written, e.g. "1.9280693458E-01" → 11. */
export function significantDigits(token: string): number {
  const mantissa = token.replace(/^[+-]/, '').split(/[eE]/)[0];
  const digits = mantissa.replace('.', '').replace(/^0+/, '');
  return digits.length;
}

function num(token: string | undefined, file: string, line: number, field: string): number {
  const v = token === undefined ? NaN : Number(token);
  if (!Number.isFinite(v))
    throw new InputError(`not a number: ${token ?? '(missing)'}`, { file, line, field });
  return v;
}

function exact(token: string, file: string, line: number, field: string): Dd {
  const v = parseDecimal(token);
  if (!v || !Number.isFinite(v.hi))
    throw new InputError(`not a number: ${token}`, { file, line, field });
  return v;
}

function lineRange(text: string, label: string, file: string): [number, number] {
  const re = new RegExp(`${label}\\s*\\(lines\\s+(\\d+)\\s+to\\s+(\\d+)\\)`);
  const m = re.exec(text);
  if (!m)
    throw new InputError(`header does not say where the ${label.toLowerCase()} are`, { file });
  return [Number(m[1]), Number(m[2])];
}

export function parseStrdFile(
  text: string,
  file: string,
  name = file.replace(/^.*[\\/]/, '').replace(/\.dat$/i, ''),
): StrdDataset {
  const lines = text.split(/\r?\n/);
  const head = lines.slice(0, 12).join('\n');
  const [ps, pe] = lineRange(head, 'Starting Values', file);
  const [ds, de] = lineRange(head, 'Data', file);

  const parameters: StrdParameter[] = [];
  for (let ln = ps; ln <= pe; ln++) {
    const t = lines[ln - 1]?.trim() ?? '';
    const m = /^(b\d+)\s*=\s*(\S+)\s+(\S+)\s+(\S+)\s+(\S+)$/.exec(t);
    if (!m) throw new InputError('expected "bK = start1 start2 certified sd"', { file, line: ln });
    parameters.push({
      name: m[1],
      start1: num(m[2], file, ln, `${m[1]} start 1`),
      start2: num(m[3], file, ln, `${m[1]} start 2`),
      certified: num(m[4], file, ln, `${m[1]} certified`),
      certifiedSd: num(m[5], file, ln, `${m[1]} sd`),
      certifiedDigits: significantDigits(m[4]),
      certifiedSdDigits: significantDigits(m[5]),
    });
  }

  let rss = NaN;
  let rssDigits = 0;
  let dof = NaN;
  for (let ln = pe + 1; ln < ds; ln++) {
    const t = lines[ln - 1] ?? '';
    const r = /^\s*Residual Sum of Squares:\s*(\S+)/.exec(t);
    if (r) {
      rss = num(r[1], file, ln, 'residual sum of squares');
      rssDigits = significantDigits(r[1]);
    }
    const d = /^\s*Degrees of Freedom:\s*(\S+)/.exec(t);
    if (d) dof = num(d[1], file, ln, 'degrees of freedom');
  }
  if (!Number.isFinite(rss)) throw new InputError('no certified residual sum of squares', { file });

  const count = de - ds + 1;
  const y = new Float64Array(count);
  const yExact: Dd[] = [];
  let x: Float64Array[] = [];
  let xExact: Dd[][] = [];
  for (let k = 0; k < count; k++) {
    const ln = ds + k;
    const cells = (lines[ln - 1] ?? '').trim().split(/\s+/);
    if (k === 0) {
      x = Array.from({ length: Math.max(1, cells.length - 1) }, () => new Float64Array(count));
      xExact = x.map(() => []);
    }
    if (cells.length !== x.length + 1)
      throw new InputError(`expected ${x.length + 1} numbers`, { file, line: ln });
    y[k] = num(cells[0], file, ln, 'y');
    yExact.push(exact(cells[0], file, ln, 'y'));
    for (let c = 0; c < x.length; c++) {
      x[c][k] = num(cells[c + 1], file, ln, `x${c + 1}`);
      xExact[c].push(exact(cells[c + 1], file, ln, `x${c + 1}`));
    }
  }
  return {
    name,
    parameters,
    residualSumOfSquares: rss,
    residualSumOfSquaresDigits: rssDigits,
    degreesOfFreedom: dof,
    y,
    x,
    yExact,
    xExact,
  };
}
