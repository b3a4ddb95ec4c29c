import { InputError } from '../errors.js';

/**
 * Chi-square distribution for the lack-of-fit test. No chi-square package of the @stdlib family is
 * installed, so this is the regularised incomplete gamma P(a, x) with a = dof/2, by its power series
 * below x = a + 1 and by the continued fraction for Q = 1 − P above (modified Lentz), each where it
 * converges fast and without cancellation. dof is a whole number here, so ln Γ(dof/2) is exact
 * by the recurrence Γ(a+1) = a·Γ(a) from Γ(1) = 1 and Γ(1/2) = √π: no approximation constants.
 */

const EPS = 1e-16;
const TINY = 1e-300;

function lnGammaHalf(dof: number): number {
  // ln Γ(dof/2) for a whole dof ≥ 1.
  let s = dof % 2 === 0 ? 0 : 0.5 * Math.log(Math.PI);
  for (let a = dof % 2 === 0 ? 1 : 0.5; a < dof / 2 - 0.25; a += 1) s += Math.log(a);
  return s;
}

function checkDof(dof: number): void {
  if (!Number.isInteger(dof) || dof < 1) throw new InputError(`degrees of freedom must be a whole number ≥ 1, got ${dof}`, { field: 'dof' });
}

/** Returns [P, Q] for a = dof/2 at x ≥ 0, each computed directly where it is the small one. */
function gammaPQ(x: number, dof: number): [number, number] {
  const a = dof / 2;
  if (x <= 0) return [0, 1];
  if (x === Infinity) return [1, 0];
  const lnPre = a * Math.log(x) - x - lnGammaHalf(dof);
  const maxIter = 1000 + Math.ceil(20 * Math.sqrt(a));
  if (x < a + 1) {
    // P = e^{-x} x^a / Γ(a+1) · Σ_n x^n / ((a+1)…(a+n))
    let term = 1 / a;
    let sum = term;
    for (let n = 1; n < maxIter; n++) {
      term *= x / (a + n);
      sum += term;
      if (Math.abs(term) < Math.abs(sum) * EPS) break;
    }
    const p = Math.exp(lnPre) * sum;
    return [p, 1 - p];
  }
  // Q = e^{-x} x^a / Γ(a) · 1/(x+1−a− 1·(1−a)/(x+3−a− 2·(2−a)/(x+5−a− …)))
  let b = x + 1 - a;
  let c = 1 / TINY;
  let d = 1 / b;
  let h = d;
  for (let i = 1; i < maxIter; i++) {
    const an = -i * (i - a);
    b += 2;
    d = an * d + b;
    if (Math.abs(d) < TINY) d = TINY;
    c = b + an / c;
    if (Math.abs(c) < TINY) c = TINY;
    d = 1 / d;
    const delta = d * c;
    h *= delta;
    if (Math.abs(delta - 1) < EPS) break;
  }
  const q = Math.exp(lnPre) * h;
  return [1 - q, q];
}

/** P(X ≤ x) for X ~ χ²(dof). */
export function chiSquareCdf(x: number, dof: number): number {
  checkDof(dof);
  if (Number.isNaN(x)) return NaN;
  return gammaPQ(x / 2, dof)[0];
}

/** P(X > x) for X ~ χ²(dof): the p-value of a lack-of-fit test, accurate far into the tail. */
export function chiSquareSf(x: number, dof: number): number {
  checkDof(dof);
  if (Number.isNaN(x)) return NaN;
  return gammaPQ(x / 2, dof)[1];
}
