import { describe, expect, it } from 'vitest';
import { InputError } from '../../../server/core/errors.js';
import { makeShape, type ShapeSpec } from '../../../server/core/geometry/index.js';

function refusal(spec: unknown): InputError {
  try {
    makeShape(spec as ShapeSpec);
  } catch (e) {
    expect(e).toBeInstanceOf(InputError);
    return e as InputError;
  }
  throw new Error('expected a refusal');
}

describe('makeShape refuses bad dimensions, naming the field', () => {
  it.each([
    [{ kind: 'vertical-cylinder', diameterM: -2 }, 'shape.diameterM'],
    [{ kind: 'vertical-cylinder', diameterM: 2, heightM: 0 }, 'shape.heightM'],
    [{ kind: 'rectangular', lengthM: 2, widthM: Number.NaN }, 'shape.widthM'],
    [{ kind: 'horizontal-cylinder', diameterM: 2, lengthM: Infinity }, 'shape.lengthM'],
    [{ kind: 'sphere', diameterM: 0 }, 'shape.diameterM'],
    [{ kind: 'cone-bottom', diameterM: 2, coneHeightM: 1.5, heightM: 1 }, 'shape.heightM'],
    [{ kind: 'cone-bottom', diameterM: 2, coneHeightM: -1 }, 'shape.coneHeightM'],
    [{ kind: 'elliptical-head-cylinder', diameterM: 2, heightM: 0.4 }, 'shape.heightM'],
    [{ kind: 'table', points: [[0, 1]] }, 'shape.points'],
    [
      {
        kind: 'table',
        points: [
          [0, 1],
          [0, 2],
        ],
      },
      'shape.points.1.0',
    ],
    [
      {
        kind: 'table',
        points: [
          [-1, 1],
          [1, 2],
        ],
      },
      'shape.points.0.0',
    ],
    [
      {
        kind: 'table',
        points: [
          [0, 1],
          [1, 0],
        ],
      },
      'shape.points.1.1',
    ],
    [{ kind: 'table', points: [[0, 1], [1]] }, 'shape.points.1'],
    [{ kind: 'pyramid', diameterM: 1 }, 'shape.kind'],
  ])('%j → %s', (spec, field) => {
    expect(refusal(spec).field).toBe(field);
  });
  it('says what it got', () => {
    expect(refusal({ kind: 'sphere', diameterM: -2 }).message).toBe(
      'must be a positive number (got -2)',
    );
  });
});
