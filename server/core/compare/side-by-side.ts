/**
 * Several drain tests of one outlet side by side (issue 19 scope 5): each test's readings and
 * fitted curve against the head above the outlet rather than clock time, the table of Cd·a and Cd
 * with their expanded uncertainties, and every pair's difference, U_diff and E_n (en.ts, table.ts).
 *
 * Head above the outlet = reading + sensor zero elevation − outlet elevation, with the fit's own
 * sensor zero (stated or fitted) and the outlet it used. Time runs from the moment each fitted curve
 * passes the reference head, the highest head every test's fitted curve reaches, so two drains of
 * the same Cd·a lie on one line whatever level each started from. Pure: fits in, numbers out.
 */
import { comparedFit, comparePairs, type ComparedFit, type ComparedPair } from './table.js';

export interface SideBySideFit {
  testId: number;
  fitId: number;
  /** The fit's review status (draft, approved, rejected). */
  fitStatus: string;
  /** The test's date (ISO 8601), or null when it has none. */
  testedAt: string | null;
  /** The stored fit result (FitResult JSON). */
  result: Record<string, unknown>;
}

export interface HeadCurve {
  /** Readings in the fit window (thinned as stored for drawing): head above the outlet, m. */
  headM: number[];
  /** Seconds from the fitted curve's passing of the reference head (negative above it). */
  elapsedS: number[];
  /** The fitted curve at the same instants, as head above the outlet, m. */
  fittedHeadM: number[];
}

export interface SideBySideTest extends ComparedFit {
  testId: number;
  fitId: number;
  fitStatus: string;
  testedAt: string | null;
  /** Added to a reading to give the head above the outlet (sensor zero − outlet elevation), m. */
  headOffsetM: number | null;
  curve: HeadCurve | null;
}

export interface SideBySide {
  /** The head every curve's time is counted from, m above the outlet; null when the curves do not overlap. */
  referenceHeadM: number | null;
  tests: SideBySideTest[];
  pairs: ComparedPair[];
  notes: string[];
}

type WindowPlot = { offsetS: number; timeS: number[]; observedM: number[]; fittedM: number[] };

const finite = (x: unknown): x is number => typeof x === 'number' && Number.isFinite(x);

function windowPlot(result: Record<string, unknown>): WindowPlot | null {
  const w = (result.plot as { window?: Partial<WindowPlot> } | undefined)?.window;
  if (!w || !Array.isArray(w.timeS) || !Array.isArray(w.observedM) || !Array.isArray(w.fittedM))
    return null;
  if (w.timeS.length < 2 || w.observedM.length !== w.timeS.length) return null;
  if (w.fittedM.length !== w.timeS.length) return null;
  return { ...(w as WindowPlot), offsetS: finite(w.offsetS) ? w.offsetS : 0 };
}

/** Sensor zero − outlet elevation from the fit's parameters and outlet, or null when either is missing. */
export function headOffsetOf(result: Record<string, unknown>): number | null {
  const params = Array.isArray(result.parameters)
    ? (result.parameters as { name?: unknown; value?: unknown }[])
    : [];
  const zero = params.find((p) => p.name === 'sensorZeroElevationM')?.value;
  const outlet = (result.outlet as { elevationM?: unknown } | null | undefined)?.elevationM;
  return finite(zero) && finite(outlet) ? zero - outlet : null;
}

/** The time (s, log clock) a falling curve passes `head`, by linear interpolation; null if it never does. */
export function timeAtHead(timeS: number[], headM: number[], head: number): number | null {
  for (let i = 1; i < timeS.length; i++) {
    const a = headM[i - 1];
    const b = headM[i];
    if (!finite(a) || !finite(b)) continue;
    if ((a >= head && b <= head) || (a <= head && b >= head)) {
      if (a === b) return timeS[i - 1];
      return timeS[i - 1] + ((a - head) / (a - b)) * (timeS[i] - timeS[i - 1]);
    }
  }
  return null;
}

const labelOf = (f: SideBySideFit) =>
  `test ${f.testId}${f.testedAt ? ` (${f.testedAt.slice(0, 10)})` : ''}`;

export function sideBySide(fits: readonly SideBySideFit[]): SideBySide {
  const notes: string[] = [];
  const prepared = fits.map((f) => {
    const w = windowPlot(f.result);
    const offset = headOffsetOf(f.result);
    const timeS = w ? w.timeS.map((t) => t + w.offsetS) : [];
    const headM = w && offset !== null ? w.observedM.map((y) => y + offset) : [];
    const fittedHeadM = w && offset !== null ? w.fittedM.map((y) => y + offset) : [];
    if (!w) notes.push(`${labelOf(f)}: the fit keeps no readings to draw`);
    else if (offset === null)
      notes.push(`${labelOf(f)}: the sensor zero or the outlet height is not known, so no head`);
    return { f, offset, timeS, headM, fittedHeadM };
  });
  const drawn = prepared.filter((p) => p.fittedHeadM.length >= 2);
  // the highest head every fitted curve reaches, if it is within every curve's span
  const tops = drawn.map((p) => Math.max(...p.fittedHeadM.filter(finite)));
  const bottoms = drawn.map((p) => Math.min(...p.fittedHeadM.filter(finite)));
  let reference: number | null = drawn.length ? Math.min(...tops) : null;
  if (reference !== null && bottoms.some((b) => b > reference!)) {
    notes.push(
      'the tests cover heads that do not overlap: each is timed from the start of its own window',
    );
    reference = null;
  }
  const tests = prepared.map(({ f, offset, timeS, headM, fittedHeadM }): SideBySideTest => {
    const base = comparedFit(labelOf(f), f.result);
    let curve: HeadCurve | null = null;
    if (fittedHeadM.length >= 2) {
      const t0 =
        (reference === null ? null : timeAtHead(timeS, fittedHeadM, reference)) ?? timeS[0];
      curve = { headM, elapsedS: timeS.map((t) => t - t0), fittedHeadM };
    }
    return {
      ...base,
      testId: f.testId,
      fitId: f.fitId,
      fitStatus: f.fitStatus,
      testedAt: f.testedAt,
      headOffsetM: offset,
      curve,
    };
  });
  return { referenceHeadM: reference, tests, pairs: comparePairs(tests), notes };
}
