/**
 * The one seeded generator of the project (mulberry32) and normal deviates (Box–Muller), so
 * simulated logs, fouling histories and Monte Carlo checks are reproducible without Math.random.
 * Hand-written on purpose: a few lines whose exact sequence the committed sample data depends on.
 */
export interface Random {
  /** Uniform on [0, 1). */
  uniform(): number;
  /** Standard normal. */
  normal(): number;
}

/**
 * How Box–Muller keeps ln(u) finite: 'reject-zero' draws again on u = 0 (drain and system
 * simulators), 'complement' uses 1 − u (the trend simulator). Both are kept so the committed demo
 * data and the seeded tests keep their draws.
 */
export type NormalForm = 'reject-zero' | 'complement';

export function seededRandom(seed: number, form: NormalForm = 'reject-zero'): Random {
  let state = seed >>> 0;
  let spare: number | null = null;
  const uniform = (): number => {
    state = (state + 0x6d2b79f5) >>> 0;
    let t = state;
    t = Math.imul(t ^ (t >>> 15), t | 1);
    t ^= t + Math.imul(t ^ (t >>> 7), t | 61);
    return ((t ^ (t >>> 14)) >>> 0) / 4294967296;
  };
  const normal = (): number => {
    if (spare !== null) {
      const s = spare;
      spare = null;
      return s;
    }
    let u = 0;
    if (form === 'complement') u = 1 - uniform();
    else while (u === 0) u = uniform();
    const v = uniform();
    const r = Math.sqrt(-2 * Math.log(u));
    spare = r * Math.sin(2 * Math.PI * v);
    return r * Math.cos(2 * Math.PI * v);
  };
  return { uniform, normal };
}
