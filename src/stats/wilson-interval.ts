import { type BinomialIntervalOptions, readBinomialOptions } from "./binomial-input.js";
import { twoSidedZ } from "./two-sided-z.js";
import type { Interval } from "./types.js";

/**
 * Wilson score interval for a binomial proportion.
 *
 * Definition: the set of proportions π for which the score test of H₀: p = π does not reject at
 * the chosen level. Its limits are the two roots of (p̂ − π)² = z²π(1 − π)/n:
 *   (2np̂ + z² ± z√(z² + 4np̂(1 − p̂))) / (2(n + z²)).
 * Unlike the Wald interval it never leaves [0, 1] and stays sensible for x = 0 or x = n.
 *
 * Variant: without continuity correction (Newcombe 1998, method 3); z = Φ⁻¹((1 + level)/2). The
 * limits are set exactly to 0 when x = 0 and to 1 when x = n (where the formula gives them up to
 * rounding).
 *
 * Fails when: trials is not a whole number ≥ 1, successes is not a whole number in [0, trials],
 * or level is not in (0, 1) (RangeError). Coverage dips below nominal for some n·p near 0 or n.
 *
 * Example: 81 of 263 at 95% gives 0.2552885 to 0.3662096 (Newcombe 1998, Table I):
 * `wilsonInterval({ successes: 81, trials: 263 })`.
 *
 * Source: E. B. Wilson (1927), "Probable inference, the law of succession, and statistical
 * inference", JASA 22:209–212; R. G. Newcombe (1998), "Two-sided confidence intervals for the
 * single proportion: comparison of seven methods", Statistics in Medicine 17:857–872.
 */
export function wilsonInterval(options: BinomialIntervalOptions): Interval {
  const { successes: x, trials: n, level } = readBinomialOptions(options);
  const z = twoSidedZ(level);
  const p = x / n;
  const z2 = z * z;
  const centre = 2 * n * p + z2;
  const spread = z * Math.sqrt(z2 + 4 * n * p * (1 - p));
  const denominator = 2 * (n + z2);
  return {
    estimate: p,
    lower: x === 0 ? 0 : (centre - spread) / denominator,
    upper: x === n ? 1 : (centre + spread) / denominator,
    level,
  };
}
