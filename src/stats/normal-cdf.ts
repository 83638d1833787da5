import { erfc } from "./erfc.js";
import { assertFinite } from "./validate.js";

/**
 * Standard normal cumulative distribution function, Φ(x) = P(Z ≤ x) for Z ~ N(0, 1).
 *
 * Definition: the share of a standard normal population at or below x. The upper tail
 * P(Z > x) is `normalCdf(-x)`, which keeps full relative precision (never compute it as
 * 1 − Φ(x)); a two-sided p-value for a z statistic is `2 * normalCdf(-Math.abs(z))`.
 *
 * Variant: Φ(x) = ½·erfc(−x/√2), with erfc from W. J. Cody's rational Chebyshev approximations
 * (see `erfc.ts`). Relative error is about 1e-15 for x ≥ −5; in the far lower tail the rounding of
 * x/√2 adds a relative error of roughly x²·1e-16 (about 1e-14 at x = −10).
 *
 * Fails when: never for finite x; Φ(x) underflows to 0 below about −37.5. Throws a RangeError for
 * NaN or ±Infinity.
 *
 * Example: `normalCdf(1.959963984540054)` ≈ 0.975; `normalCdf(-1)` ≈ 0.15865525393145707.
 *
 * Source: W. J. Cody (1969), "Rational Chebyshev approximations for the error function",
 * Mathematics of Computation 23:631–637; Abramowitz & Stegun (1964), Handbook of Mathematical
 * Functions, ch. 7 and 26 (Φ(x) = ½·erfc(−x/√2)).
 */
export function normalCdf(x: number): number {
  assertFinite("x", x);
  return 0.5 * erfc(-x / Math.SQRT2);
}
