import { InputError } from '../errors.js';
import { chiSquareSf } from './chisquare.js';
import { tQuantile } from '../stats/index.js';

export interface LineUncertainty {
  uIntercept: number;
  uSlope: number;
  covInterceptSlope: number;
}

/**
 * y = a + b·t fitted by weighted least squares with weights 1/u².
 * The uncertainties at top level are the ones to use: the stated-uncertainty ones ("internal"),
 * multiplied by the Birge ratio R = sqrt(χ²/dof) when R > 1. The choice: when the tests scatter
 * more than their stated uncertainties allow, the data say the u's are too small, so we widen;
 * when they scatter less we do not shrink below what each test claims (common practice).
 * Intervals use Student t on dof either way, which is the conservative side when R ≤ 1.
 */
export interface WeightedLine extends LineUncertainty {
  n: number;
  intercept: number;
  slope: number;
  /** From the stated u's alone, before any Birge scaling. */
  internal: LineUncertainty;
  chi2: number;
  dof: number;
  reducedChi2: number;
  /** P(χ²_dof ≥ chi2): small means the straight line with these u's does not explain the scatter. */
  lackOfFitP: number;
  birgeRatio: number;
  /** Factor applied to the internal uncertainties: max(1, birgeRatio). */
  scale: number;
  scaled: boolean;
  /** t_{0.975, dof}, the coverage factor of the 95 % intervals. */
  tQuantile95: number;
  slopeInterval95: { lower: number; upper: number };
  /** Weighted mean of t: where the band is narrowest. */
  meanT: number;
  /** Uncertainty of the line's value at meanT (scaled like the others). */
  uAtMeanT: number;
  /**
   * A typical single test's stated standard uncertainty, sqrt(n / Σ(1/u²)) (the harmonic mean of
   * the variances): what a new test of the same kind is expected to carry.
   */
  typicalTestU: number;
}

export function weightedLine(tYears: Float64Array, y: Float64Array, u: Float64Array): WeightedLine {
  const n = tYears.length;
  if (y.length !== n || u.length !== n)
    throw new InputError(`t, y and u differ in length (${n}, ${y.length}, ${u.length})`, {
      field: 'y',
    });
  if (n < 3) throw new InputError(`a trend line needs at least 3 tests, got ${n}`, { field: 'y' });
  // Centre on the weighted means first: the normal equations then decouple and lose no digits.
  let sw = 0,
    swt = 0,
    swy = 0;
  for (let i = 0; i < n; i++) {
    const ui = u[i];
    if (!(ui > 0) || !Number.isFinite(ui))
      throw new InputError(`uncertainty must be positive, got ${ui}`, { field: `u[${i}]` });
    if (!Number.isFinite(tYears[i]) || !Number.isFinite(y[i]))
      throw new InputError('not a finite number', { field: `y[${i}]` });
    const w = 1 / (ui * ui);
    sw += w;
    swt += w * tYears[i];
    swy += w * y[i];
  }
  const tm = swt / sw;
  const ym = swy / sw;
  let stt = 0,
    sty = 0;
  for (let i = 0; i < n; i++) {
    const w = 1 / (u[i] * u[i]);
    const dt = tYears[i] - tm;
    stt += w * dt * dt;
    sty += w * dt * (y[i] - ym);
  }
  if (!(stt > 0))
    throw new InputError('all tests at the same time: no slope can be fitted', { field: 't' });
  const slope = sty / stt;
  const intercept = ym - slope * tm;
  let chi2 = 0;
  for (let i = 0; i < n; i++) {
    const r = (y[i] - intercept - slope * tYears[i]) / u[i];
    chi2 += r * r;
  }
  const dof = n - 2;
  const reducedChi2 = chi2 / dof;
  const birgeRatio = Math.sqrt(reducedChi2);
  const scale = Math.max(1, birgeRatio);
  const varB = 1 / stt;
  const internal: LineUncertainty = {
    uIntercept: Math.sqrt(1 / sw + tm * tm * varB),
    uSlope: Math.sqrt(varB),
    covInterceptSlope: -tm * varB,
  };
  const uSlope = internal.uSlope * scale;
  const tq = tQuantile(0.975, dof);
  return {
    n,
    intercept,
    slope,
    uIntercept: internal.uIntercept * scale,
    uSlope,
    covInterceptSlope: internal.covInterceptSlope * scale * scale,
    internal,
    chi2,
    dof,
    reducedChi2,
    lackOfFitP: chiSquareSf(chi2, dof),
    birgeRatio,
    scale,
    scaled: birgeRatio > 1,
    tQuantile95: tq,
    slopeInterval95: { lower: slope - tq * uSlope, upper: slope + tq * uSlope },
    meanT: tm,
    uAtMeanT: scale / Math.sqrt(sw),
    typicalTestU: Math.sqrt(n / sw),
  };
}

/** The line's value at t. */
export function lineAt(line: WeightedLine, t: number): number {
  return line.intercept + line.slope * t;
}

/** Standard uncertainty of the line's value (the mean response) at t. */
export function lineUAt(line: WeightedLine, t: number): number {
  // Value and slope are uncorrelated about meanT, so this form has no cancellation far out.
  const d = t - line.meanT;
  return Math.sqrt(line.uAtMeanT ** 2 + d * d * line.uSlope ** 2);
}

/**
 * Standard uncertainty of a NEW single test's value about the line at t (the prediction
 * interval's u, not the mean band's): the line's own u at t and the test's scatter about the line,
 * scale·uTest, added in quadrature. With equal u's and scatter beyond them (Birge ratio > 1) this
 * is the textbook s²(1 + 1/n + (t − t̄)²/Sxx) of ordinary least squares, s² = Σr²/(n − 2).
 * uTest defaults to the line's typicalTestU.
 */
export function newTestUAt(line: WeightedLine, t: number, uTest = line.typicalTestU): number {
  const single = line.scale * uTest;
  return Math.sqrt(lineUAt(line, t) ** 2 + single * single);
}
