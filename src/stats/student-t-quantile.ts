import { betaQuantile } from "./beta-quantile.js";
import { normalQuantile } from "./normal-quantile.js";
import { assertPositive, assertProbability } from "./validate.js";

/**
 * Student t quantile: the t with P(T ≤ t) = p for T with ν degrees of freedom.
 *
 * Definition: the multiplier of a t-based interval; for example a 95% interval for a mean of
 * n = 10 observations uses studentTQuantile(0.975, 9) ≈ 2.262157.
 *
 * Variant: through the beta distribution. With s = 2·min(p, 1 − p) the two-sided tail,
 * w = t²/(ν + t²) has upper-tail probability s under Beta(½, ν/2), so t² = νw/(1 − w); when
 * w > ½ the complementary y = 1 − w = ν/(ν + t²), the lower s-quantile of Beta(ν/2, ½), is used
 * instead (t² = ν(1 − y)/y), so that neither 1 − w nor 1 − y loses precision. The sign follows
 * p − ½. ν = Infinity gives the normal quantile. Accuracy follows `betaQuantile`
 * (about 1e-14 relative).
 *
 * Fails when: p is outside [0, 1] or ν is not positive (RangeError). p = 0 and p = 1 give ∓Infinity.
 *
 * Example: `studentTQuantile(0.975, 1)` = tan(0.475π) ≈ 12.706204736174698.
 *
 * Source: Abramowitz & Stegun (1964), Handbook of Mathematical Functions, 26.7.1 and 26.5.27
 * (Student's t in terms of the incomplete beta function).
 */
export function studentTQuantile(p: number, degreesOfFreedom: number): number {
  assertProbability("p", p);
  if (degreesOfFreedom !== Number.POSITIVE_INFINITY) assertPositive("degreesOfFreedom", degreesOfFreedom);
  if (p === 0) return Number.NEGATIVE_INFINITY;
  if (p === 1) return Number.POSITIVE_INFINITY;
  if (p === 0.5) return 0;
  if (degreesOfFreedom === Number.POSITIVE_INFINITY) return normalQuantile(p);
  const nu = degreesOfFreedom;
  const twoSided = 2 * Math.min(p, 1 - p);
  const w = betaQuantile(twoSided, 0.5, nu / 2, { upperTail: true });
  let magnitude: number;
  if (w <= 0.5) {
    magnitude = Math.sqrt((nu * w) / (1 - w));
  } else {
    const y = betaQuantile(twoSided, nu / 2, 0.5);
    magnitude = Math.sqrt((nu * (1 - y)) / y);
  }
  return p < 0.5 ? -magnitude : magnitude;
}
