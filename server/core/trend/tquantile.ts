import quantile from '@stdlib/stats-base-dists-t-quantile';

/**
 * Student t quantile. server/core/stats/ was empty when this was written, so the @stdlib package
 * is used directly; this one file is the place to swap in stats' tQuantile(p, dof).
 */
export function tQuantile(p: number, dof: number): number {
  return quantile(p, dof);
}
