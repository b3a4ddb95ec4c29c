import { describe, expect, it } from 'vitest';
import fc from 'fast-check';
import { makeShape, type ShapeSpec } from '../../../server/core/geometry/index.js';

const dim = fc.double({ min: 0.1, max: 20, noNaN: true });

/** A shape spec with its total volume from the textbook formula and the heights where A has a kink. */
interface Case {
  spec: ShapeSpec;
  total: number;
  top: number;
  kinks: number[];
}

const cases: fc.Arbitrary<Case> = fc.oneof(
  fc.tuple(dim, dim).map(([d, h]) => ({
    spec: { kind: 'vertical-cylinder', diameterM: d, heightM: h } as ShapeSpec,
    total: (Math.PI * d * d * h) / 4,
    top: h,
    kinks: [],
  })),
  fc.tuple(dim, dim, dim).map(([l, w, h]) => ({
    spec: { kind: 'rectangular', lengthM: l, widthM: w, heightM: h } as ShapeSpec,
    total: l * w * h,
    top: h,
    kinks: [],
  })),
  fc.tuple(dim, dim).map(([d, l]) => ({
    spec: { kind: 'horizontal-cylinder', diameterM: d, lengthM: l } as ShapeSpec,
    total: (Math.PI * d * d * l) / 4,
    top: d,
    kinks: [],
  })),
  dim.map((d) => ({
    spec: { kind: 'sphere', diameterM: d } as ShapeSpec,
    total: (Math.PI * d ** 3) / 6,
    top: d,
    kinks: [],
  })),
  fc.tuple(dim, dim, dim).map(([d, hc, extra]) => ({
    spec: { kind: 'cone-bottom', diameterM: d, coneHeightM: hc, heightM: hc + extra } as ShapeSpec,
    total: ((Math.PI * d * d) / 4) * (hc / 3 + extra),
    top: hc + extra,
    kinks: [hc],
  })),
  fc.tuple(dim, dim).map(([d, extra]) => ({
    spec: { kind: 'elliptical-head-cylinder', diameterM: d, heightM: d / 4 + extra } as ShapeSpec,
    total: ((Math.PI * d * d) / 4) * ((2 / 3) * (d / 4) + extra),
    top: d / 4 + extra,
    kinks: [d / 4],
  })),
  fc
    .array(
      fc.tuple(
        fc.double({ min: 0.05, max: 3, noNaN: true }),
        fc.double({ min: 0.1, max: 500, noNaN: true }),
      ),
      {
        minLength: 2,
        maxLength: 8,
      },
    )
    .map((steps) => {
      let h = 0;
      const points: Array<[number, number]> = steps.map(([dh, a], i) => {
        if (i > 0) h += dh;
        return [h, a];
      });
      let total = 0;
      for (let i = 1; i < points.length; i++)
        total += ((points[i - 1][1] + points[i][1]) / 2) * (points[i][0] - points[i - 1][0]);
      return {
        spec: { kind: 'table', points } as ShapeSpec,
        total,
        top: h,
        kinks: points.map((p) => p[0]),
      };
    }),
);

describe('every shape', () => {
  it('V(heightM) is the total volume of the ordinary formula', () => {
    fc.assert(
      fc.property(cases, (c) => {
        const s = makeShape(c.spec);
        expect(s.heightM).toBeCloseTo(c.top, 12);
        expect(Math.abs(s.volumeM3(s.heightM) - c.total)).toBeLessThanOrEqual(1e-12 * c.total);
        expect(s.volumeM3(0)).toBe(0);
      }),
    );
  });

  it('V is increasing and A ≥ 0 across the height', () => {
    fc.assert(
      fc.property(
        cases,
        fc.double({ min: 0, max: 1, noNaN: true }),
        fc.double({ min: 0, max: 1, noNaN: true }),
        (c, f1, f2) => {
          const s = makeShape(c.spec);
          const [a, b] = f1 < f2 ? [f1, f2] : [f2, f1];
          const ya = a * s.heightM;
          const yb = b * s.heightM;
          expect(s.areaM2(ya)).toBeGreaterThanOrEqual(0);
          expect(s.volumeM3(yb)).toBeGreaterThanOrEqual(s.volumeM3(ya));
        },
      ),
    );
  });

  it('A equals dV/dy (central difference, away from the kinks where A bends)', () => {
    fc.assert(
      fc.property(cases, fc.double({ min: 0.001, max: 0.999, noNaN: true }), (c, f) => {
        const s = makeShape(c.spec);
        const y = f * s.heightM;
        // Step small against every length that shapes A here: the depth, the room to the top and
        // to the nearest kink (where A bends and a difference straddling it is not a derivative).
        const room = Math.min(y, s.heightM - y, ...c.kinks.map((k) => Math.abs(y - k)));
        fc.pre(room > 1e-9 * s.heightM);
        const h = 1e-4 * room;
        const numeric = (s.volumeM3(y + h) - s.volumeM3(y - h)) / (2 * h);
        // Truncation of a central difference is O((h/room)²) relative, about 1e-8 here; rounding
        // is a few ε·V/h. The bound allows 100 times the first plus 8 ε·V/h.
        const tol = 1e-6 * s.areaM2(y) + (8 * Number.EPSILON * s.volumeM3(y + h)) / h;
        expect(Math.abs(numeric - s.areaM2(y))).toBeLessThanOrEqual(tol);
      }),
    );
  });

  it('clamps: empty below the bottom, full above the top', () => {
    fc.assert(
      fc.property(cases, fc.double({ min: 0.001, max: 100, noNaN: true }), (c, dy) => {
        const s = makeShape(c.spec);
        expect(s.volumeM3(-dy)).toBe(0);
        expect(s.volumeM3(s.heightM + dy)).toBe(s.volumeM3(s.heightM));
        expect(s.areaM2(s.heightM + dy)).toBe(s.areaM2(s.heightM));
      }),
    );
  });
});
