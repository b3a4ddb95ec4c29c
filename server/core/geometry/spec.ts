/**
 * A vessel's shape as written in a vessel file. Lengths in metres, areas in m²; y = 0 is the
 * lowest interior point. heightM, where optional, is the interior height (omitted: no top).
 */
export type ShapeSpec =
  | { kind: 'vertical-cylinder'; diameterM: number; heightM?: number; diameterToleranceM?: number }
  | {
      kind: 'rectangular';
      lengthM: number;
      widthM: number;
      heightM?: number;
      lengthToleranceM?: number;
      widthToleranceM?: number;
    }
  | {
      kind: 'horizontal-cylinder';
      diameterM: number;
      lengthM: number;
      diameterToleranceM?: number;
      lengthToleranceM?: number;
    }
  | { kind: 'sphere'; diameterM: number; diameterToleranceM?: number }
  /** An apex-down cone of coneHeightM under a cylinder of diameterM; y = 0 at the apex. */
  | {
      kind: 'cone-bottom';
      diameterM: number;
      coneHeightM: number;
      heightM?: number;
      diameterToleranceM?: number;
      coneHeightToleranceM?: number;
    }
  /**
   * Stage–area table from a survey: [heightM, areaM2] pairs, area linear between them;
   * pointTolerances: ± limits [heightM, areaM2] of each point, in the same order.
   */
  | { kind: 'table'; points: Array<[number, number]>; pointTolerances?: Array<[number, number]> }
  /** A vertical cylinder on a 2:1 elliptical bottom head of depth D/4; y = 0 at the head's bottom. */
  | {
      kind: 'elliptical-head-cylinder';
      diameterM: number;
      heightM?: number;
      diameterToleranceM?: number;
    };

/**
 * Every "…ToleranceM" (and the other stated uncertainties of a vessel file) is read as ± limits
 * of a rectangular distribution, u = T/√3 (JCGM 100:2008, 4.3.7); server/core/budget uses them.
 */

export type ShapeKind = ShapeSpec['kind'];

export const SHAPE_KINDS: readonly ShapeKind[] = [
  'vertical-cylinder',
  'rectangular',
  'horizontal-cylinder',
  'sphere',
  'cone-bottom',
  'table',
  'elliptical-head-cylinder',
];
