import { gammaQuantile } from "./gamma-quantile.js";
import { assertPositive, assertProbability } from "./validate.js";

/**
 * Chi-square distribution quantile: the x with P(χ²_k ≤ x) = p for k degrees of freedom.
 *
 * Definition: the value below which a chi-square variable with k degrees of freedom (a sum of k
 * squared standard normals, k may be fractional) falls with probability p.
 *
 * Variant: χ²_k is a gamma variable with shape k/2 and scale 2, so the quantile is
 * 2·gammaQuantile(p, k/2) (Halley's method on the regularized incomplete gamma function, about
 * 1e-14 relative accuracy).
 *
 * Fails when: p is outside [0, 1] or k is not a positive finite number (RangeError). p = 0 gives 0
 * and p = 1 gives +Infinity.
 *
 * Example: `chiSquareQuantile(0.95, 1)` ≈ 3.841458820694124 (= 1.959963984540054²);
 * `chiSquareQuantile(0.975, 2)` = −2 ln 0.025 ≈ 7.377758908227873.
 *
 * Source: Abramowitz & Stegun (1964), Handbook of Mathematical Functions, 26.4.1 and 26.4.19
 * (chi-square as a gamma distribution).
 */
export function chiSquareQuantile(p: number, degreesOfFreedom: number): number {
  assertProbability("p", p);
  assertPositive("degreesOfFreedom", degreesOfFreedom);
  return 2 * gammaQuantile(p, degreesOfFreedom / 2);
}
