import type { PoissonIntervalOptions } from "./poisson-exact-interval.js";
import { twoSidedZ } from "./two-sided-z.js";
import type { Interval } from "./types.js";
import { assertInteger, assertLevel } from "./validate.js";

/**
 * Byar's approximation to the exact confidence interval for the mean of a Poisson count.
 *
 * Definition: the Wilson–Hilferty cube-root normal approximation to the Garwood limits:
 *   L = x(1 − 1/(9x) − z/(3√x))³,  U = (x + 1)(1 − 1/(9(x + 1)) + z/(3√(x + 1)))³,
 * with z = Φ⁻¹((1 + level)/2) and L = 0 when x = 0. Within 0.1% of the exact limits for
 * x ≥ 10 and still close for x as small as 1.
 *
 * Variant: as printed by Breslow & Day (1987, vol. II, ch. 2) (no continuity correction beyond the
 * x + 1 in the upper limit). At very high levels with a small count the bracket of the lower
 * limit can turn negative; the lower limit is then 0.
 *
 * Fails when: observed is not a whole number ≥ 0 or level is not in (0, 1) (RangeError).
 *
 * Example: 10 observed at 95% gives 4.787450 to 18.391459:
 * `poissonByarInterval({ observed: 10 })`.
 *
 * Source: N. E. Breslow & N. E. Day (1987), Statistical Methods in Cancer Research, vol. II: The
 * Design and Analysis of Cohort Studies, IARC Scientific Publications 82, ch. 2 (attributed to
 * D. P. Byar).
 */
export function poissonByarInterval(options: PoissonIntervalOptions): Interval {
  const { observed: x } = options;
  const level = options.level ?? 0.95;
  assertInteger("observed", x, 0);
  assertLevel("level", level);
  const z = twoSidedZ(level);
  const lowerBase = x === 0 ? 0 : 1 - 1 / (9 * x) - z / (3 * Math.sqrt(x));
  const next = x + 1;
  const upperBase = 1 - 1 / (9 * next) + z / (3 * Math.sqrt(next));
  return {
    estimate: x,
    lower: x === 0 ? 0 : x * Math.max(0, lowerBase) ** 3,
    upper: next * upperBase ** 3,
    level,
  };
}
