import { describe, expect, it } from 'vitest';
import { makeShape } from '../../../server/core/geometry/index.js';

/*
 * Volumes against closed forms of ordinary geometry, written here in a different (textbook)
 * form from the one the code uses, so a slip in either shows.
 */
const close = (a: number, b: number) =>
  expect(Math.abs(a - b)).toBeLessThanOrEqual(1e-12 * Math.max(1, Math.abs(b)));
const depths = (h: number) => [0, 0.01, 0.1, 0.25, 0.5, 0.73, 0.9, 0.99, 1].map((f) => f * h);

describe('vertical cylinder and rectangular prism', () => {
  it('V = π·r²·y and V = L·W·y (prism: base times height)', () => {
    const c = makeShape({ kind: 'vertical-cylinder', diameterM: 3, heightM: 5 });
    const p = makeShape({ kind: 'rectangular', lengthM: 4, widthM: 2.5, heightM: 3 });
    for (const y of depths(5)) close(c.volumeM3(y), Math.PI * 1.5 ** 2 * y);
    for (const y of depths(3)) close(p.volumeM3(y), 4 * 2.5 * y);
    expect(c.constantArea && p.constantArea).toBe(true);
    close(c.areaM2(1.234), Math.PI * 2.25);
  });
  it('an open top has infinite height and keeps its area at any level', () => {
    const c = makeShape({ kind: 'vertical-cylinder', diameterM: 2 });
    expect(c.heightM).toBe(Infinity);
    close(c.volumeM3(100), Math.PI * 100);
  });
});

describe('sphere', () => {
  it('cap volume V = (π·y/6)·(3a² + y²), a the cap base radius', () => {
    const d = 2.6;
    const r = d / 2;
    const s = makeShape({ kind: 'sphere', diameterM: d });
    for (const y of depths(d)) {
      const a2 = y * (2 * r - y);
      close(s.volumeM3(y), ((Math.PI * y) / 6) * (3 * a2 + y * y));
    }
    close(s.volumeM3(d), (4 / 3) * Math.PI * r ** 3);
  });
});

describe('horizontal cylinder', () => {
  it('segment area (R²/2)·(θ − sin θ), θ = 2·acos((R − y)/R), times the length', () => {
    const d = 2.4;
    const l = 6;
    const r = d / 2;
    const s = makeShape({ kind: 'horizontal-cylinder', diameterM: d, lengthM: l });
    for (const y of depths(d)) {
      const theta = 2 * Math.acos((r - y) / r);
      close(s.volumeM3(y), l * ((r * r) / 2) * (theta - Math.sin(theta)));
    }
    close(s.volumeM3(d), Math.PI * r * r * l);
    close(s.volumeM3(r), (Math.PI * r * r * l) / 2);
  });
});

describe('cone bottom', () => {
  it('cone V = (1/3)·base·height with the base at the surface; then a cylinder', () => {
    const d = 2;
    const hc = 1.5;
    const s = makeShape({ kind: 'cone-bottom', diameterM: d, coneHeightM: hc, heightM: 4 });
    for (const y of depths(hc)) {
      const ry = (d / 2) * (y / hc);
      close(s.volumeM3(y), (Math.PI * ry * ry * y) / 3);
    }
    const cone = (Math.PI * 1 * hc) / 3;
    for (const y of [1.5, 2, 3.7, 4]) close(s.volumeM3(y), cone + Math.PI * (y - hc));
    close(s.areaM2(0), 0);
    close(s.areaM2(3), Math.PI);
  });
});

describe('2:1 elliptical head under a cylinder', () => {
  it('head is half an oblate spheroid, (1/2)·(4/3)·π·R²·b with b = D/4', () => {
    const d = 2;
    const r = 1;
    const b = 0.5;
    const s = makeShape({ kind: 'elliptical-head-cylinder', diameterM: d, heightM: 3 });
    close(s.volumeM3(b), 0.5 * (4 / 3) * Math.PI * r * r * b);
    // Partial head: a spherical cap of radius b, y²·π·(3b − y)/3, stretched sideways by (R/b)².
    for (const y of depths(b))
      close(s.volumeM3(y), ((r / b) ** 2 * Math.PI * y * y * (3 * b - y)) / 3);
    for (const y of [0.5, 1, 2.2, 3])
      close(s.volumeM3(y), (2 / 3) * Math.PI * r * r * b + Math.PI * (y - b));
  });
});

describe('stage–area table', () => {
  it('integrates a linearly widening trough exactly: A = L·(w0 + 2m·y), V = L·(w0·y + m·y²)', () => {
    const L = 10;
    const w0 = 2;
    const m = 1.5;
    const pts: Array<[number, number]> = [0, 0.4, 1, 1.7, 2].map((y) => [y, L * (w0 + 2 * m * y)]);
    const s = makeShape({ kind: 'table', points: pts });
    for (const y of depths(2)) close(s.volumeM3(y), L * (w0 * y + m * y * y));
    for (const y of depths(2)) close(s.areaM2(y), L * (w0 + 2 * m * y));
  });
  it('piecewise areas integrate segment by segment (trapezoids)', () => {
    const s = makeShape({
      kind: 'table',
      points: [
        [0, 1],
        [1, 3],
        [2, 3],
        [4, 1],
      ],
    });
    // Trapezoids: (1+3)/2·1 + 3·1 + (3+1)/2·2 = 2 + 3 + 4.
    close(s.volumeM3(4), 9);
    close(s.volumeM3(1.5), 2 + 1.5);
    expect(s.heightM).toBe(4);
    expect(s.constantArea).toBe(false);
  });
  it('holds the first area below a table that starts above zero, and is full above the last point', () => {
    const s = makeShape({
      kind: 'table',
      points: [
        [0.5, 2],
        [1.5, 2],
      ],
    });
    close(s.volumeM3(0.25), 0.5);
    close(s.volumeM3(1.5), 3);
    close(s.volumeM3(9), 3);
    close(s.areaM2(0.1), 2);
    expect(s.constantArea).toBe(true);
  });
});

describe('clamping outside [0, heightM]', () => {
  it('below the bottom is empty and above the top is full, with the end area', () => {
    const s = makeShape({ kind: 'sphere', diameterM: 2 });
    expect(s.volumeM3(-0.5)).toBe(0);
    expect(s.areaM2(-0.5)).toBe(0);
    expect(s.volumeM3(2.5)).toBe(s.volumeM3(2));
    expect(s.areaM2(2.5)).toBe(s.areaM2(2));
    const h = makeShape({ kind: 'horizontal-cylinder', diameterM: 1, lengthM: 1 });
    expect(Number.isNaN(h.volumeM3(1 + 1e-12))).toBe(false);
  });
});
