import tQuantileStdlib from '@stdlib/stats-base-dists-t-quantile';
import fCdfStdlib from '@stdlib/stats-base-dists-f-cdf';
import { InputError } from '../errors.js';

// The @stdlib packages are CommonJS with their own typings (`export =`); under NodeNext the
// default import is module.exports, so no local declaration file is needed.

function positiveDof(v: number, name: string): void {
  if (!(v > 0) || Number.isNaN(v)) throw new InputError(`${name} must be positive (got ${v})`);
}

/** The p-quantile of Student's t with `dof` degrees of freedom (dof may be fractional, e.g. Welch–Satterthwaite). */
export function tQuantile(p: number, dof: number): number {
  if (!(p > 0 && p < 1))
    throw new InputError(`probability must be strictly between 0 and 1 (got ${p})`);
  positiveDof(dof, 'degrees of freedom');
  return tQuantileStdlib(p, dof);
}

/** P(F ≤ x) for the F distribution with d1 and d2 degrees of freedom; 0 for x ≤ 0. */
export function fCdf(x: number, d1: number, d2: number): number {
  if (Number.isNaN(x)) throw new InputError('F statistic is not a number');
  positiveDof(d1, 'numerator degrees of freedom');
  positiveDof(d2, 'denominator degrees of freedom');
  return fCdfStdlib(x, d1, d2);
}
