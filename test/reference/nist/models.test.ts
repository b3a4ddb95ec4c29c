import { describe, expect, it } from 'vitest';
import { finiteDifferenceJacobian } from '../../../server/core/lsq/index.js';
import { toNumber } from '../../../server/reference/nist/double-double.js';
import { STRD_MODELS } from '../../../server/reference/nist/models.js';
import { loadStrdDirectory, strdProblem } from '../../../server/reference/nist/run.js';
import { STRD_DIR } from '../strd-dir.js';

// Source of the model forms and the points checked: NIST StRD nonlinear regression files
// (committed in test/reference/nist-strd).
const datasets = loadStrdDirectory(STRD_DIR);

describe('StRD model Jacobians against central differences', () => {
  it('covers all 27 datasets', () => {
    expect(datasets.length).toBe(27);
    for (const ds of datasets) expect(STRD_MODELS[ds.name]?.n).toBe(ds.parameters.length);
  });
  for (const ds of datasets) {
    it(ds.name, () => {
      const problem = strdProblem(ds, STRD_MODELS[ds.name]);
      // At start 2 and at the certified values: two different points of each model.
      for (const pick of ['start2', 'certified'] as const) {
        const p = Float64Array.from(ds.parameters, (q) => q[pick]);
        const J = new Float64Array(problem.m * problem.n);
        problem.evaluate(p, new Float64Array(problem.m), J);
        const fd = finiteDifferenceJacobian(problem, p);
        for (let k = 0; k < problem.n; k++) {
          let scale = 0;
          for (let i = 0; i < problem.m; i++)
            scale = Math.max(scale, Math.abs(J[i * problem.n + k]));
          for (let i = 0; i < problem.m; i++) {
            // Central differences with a relative step of 6e-6 carry errors of order 1e-9 of the column scale.
            expect(Math.abs(fd[i * problem.n + k] - J[i * problem.n + k])).toBeLessThanOrEqual(
              1e-6 * scale + 1e-300,
            );
          }
        }
      }
    });
  }
});

describe('StRD models: the double-double form is the same model as the double form', () => {
  for (const ds of datasets) {
    it(ds.name, () => {
      const model = STRD_MODELS[ds.name];
      const x2 = ds.x[1] ?? ds.x[0];
      const x2Dd = ds.xExact[1] ?? ds.xExact[0];
      for (const pick of ['start1', 'start2', 'certified'] as const) {
        const p = Float64Array.from(ds.parameters, (q) => q[pick]);
        let scale = 0;
        const f = ds.y.map((_, i) => model.f(p, ds.x[0][i], x2[i], null));
        for (const v of f) scale = Math.max(scale, Math.abs(v));
        for (let i = 0; i < ds.y.length; i++) {
          const fDd = toNumber(model.fDd(p, ds.xExact[0][i], x2Dd[i]));
          // Double evaluation of these short formulas is good to some 1e-14 of the model's scale.
          expect(Math.abs(fDd - f[i])).toBeLessThanOrEqual(1e-12 * scale);
        }
        if (model.response && model.responseDd) {
          for (let i = 0; i < ds.y.length; i++) {
            expect(toNumber(model.responseDd(ds.yExact[i]))).toBeCloseTo(
              model.response(ds.y[i]),
              13,
            );
          }
        }
      }
    });
  }
});
