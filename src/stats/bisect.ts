/**
 * Safeguard for the quantile solvers: a point strictly inside the bracket (lo, hi) known to hold
 * the root, used whenever a Newton or Halley step would leave the bracket. The midpoint is
 * geometric when the bracket spans more than a factor of 4, so that roots near zero are reached in
 * a few steps; with lo = 0 the upper end is divided by 8.
 */
export function bisect(lo: number, hi: number): number {
  if (lo <= 0) return hi / 8;
  return hi > 4 * lo ? Math.sqrt(lo * hi) : lo + (hi - lo) / 2;
}
