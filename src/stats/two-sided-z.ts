import { normalQuantile } from "./normal-quantile.js";
import { assertLevel } from "./validate.js";

/**
 * The normal multiplier of a two-sided confidence interval: z = Φ⁻¹((1 + level)/2).
 *
 * Definition: an interval estimate ± z·SE covers the true value with probability `level` when the
 * estimate is normal with standard error SE.
 *
 * Variant: computed with Wichura's AS 241 normal quantile, at (1 + level)/2.
 *
 * Fails when: level is not strictly between 0 and 1 (RangeError).
 *
 * Example: `twoSidedZ(0.95)` ≈ 1.959963984540054; `twoSidedZ(0.9)` ≈ 1.6448536269514722.
 *
 * Source: M. J. Wichura (1988), Applied Statistics 37:477–484 (the quantile).
 */
export function twoSidedZ(level: number): number {
  assertLevel("level", level);
  return normalQuantile((1 + level) / 2);
}
