import chiSquareCdfStdlib from '@stdlib/stats-base-dists-chisquare-cdf';
import gammainc from '@stdlib/math-base-special-gammainc';
import { InputError } from '../errors.js';

/**
 * Chi-square distribution for the lack-of-fit test, through stdlib-js: the CDF from its
 * chi-square package, the upper tail straight from the regularised upper incomplete gamma
 * Q(dof/2, x/2), so a small p-value keeps its digits (1 − CDF would cancel).
 */
function checkDof(dof: number): void {
  if (!Number.isInteger(dof) || dof < 1)
    throw new InputError(`degrees of freedom must be a whole number ≥ 1, got ${dof}`, {
      field: 'dof',
    });
}

/** P(X ≤ x) for X ~ χ²(dof). */
export function chiSquareCdf(x: number, dof: number): number {
  checkDof(dof);
  return chiSquareCdfStdlib(x, dof);
}

/** P(X > x) for X ~ χ²(dof): the p-value of a lack-of-fit test, accurate far into the tail. */
export function chiSquareSf(x: number, dof: number): number {
  checkDof(dof);
  if (Number.isNaN(x)) return NaN;
  return x <= 0 ? 1 : gammainc(x / 2, dof / 2, true, true);
}
