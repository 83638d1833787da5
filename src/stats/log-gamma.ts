import { assertPositive } from "./validate.js";

/**
 * Natural logarithm of the gamma function, ln Γ(x), for x > 0.
 *
 * Definition: Γ(x) = ∫₀^∞ t^(x−1) e^(−t) dt extends the factorial (Γ(n) = (n − 1)!); its
 * logarithm stays finite where Γ itself overflows (x > 171.6), which the beta and gamma
 * distribution functions need.
 *
 * Variant: for x ≥ 10 the Stirling series
 *   ln Γ(x) = (x − ½) ln x − x + ½ ln 2π + δ(x),  δ(x) = Σₖ B₂ₖ / (2k(2k − 1) x^(2k−1)), k = 1..8,
 * with the Bernoulli numbers B₂ … B₁₆ (truncation error below 3e-17 at x = 10); for 0 < x < 10 the
 * recurrence ln Γ(x) = ln Γ(x + m) − ln(x(x + 1)…(x + m − 1)) first shifts x to at least 10.
 * For x < 10 the absolute error is below 1e-14 (about 5e-15 at worst), so relative accuracy is
 * lost only next to the zeros of ln Γ at x = 1 and 2, which does not matter when the value is
 * exponentiated, as in every use here; for x ≥ 10 the relative error is about 1e-15.
 * `stirlingCorrection` exposes δ(x) so that differences of log-gamma values (log-beta, gamma
 * densities) can be formed without cancelling large terms.
 *
 * Fails when: x ≤ 0, NaN or infinite (RangeError); the function is only needed for positive
 * arguments here.
 *
 * Example: `logGamma(0.5)` = ln √π ≈ 0.5723649429247001; `logGamma(10)` = ln 9! ≈ 12.801827480081469.
 *
 * Source: Abramowitz & Stegun (1964), Handbook of Mathematical Functions, 6.1.40 (Stirling's
 * series) and 6.1.15 (recurrence); Bernoulli numbers from Table 23.2.
 */
export function logGamma(x: number): number {
  assertPositive("x", x);
  if (x >= 10) return stirlingMain(x) + stirlingCorrection(x);
  let shifted = x;
  let product = 1;
  while (shifted < 10) {
    product *= shifted;
    shifted += 1;
  }
  return stirlingMain(shifted) + stirlingCorrection(shifted) - Math.log(product);
}

/** ½ ln 2π. */
export const HALF_LOG_TWO_PI = 0.9189385332046728;

// B₂ₖ / (2k(2k − 1)) for k = 1..8: 1/12, −1/360, 1/1260, −1/1680, 1/1188, −691/360360, 1/156, −3617/122400.
const SERIES = [1 / 12, -1 / 360, 1 / 1260, -1 / 1680, 1 / 1188, -691 / 360360, 1 / 156, -3617 / 122400];

/**
 * δ(x) = ln Γ(x) − [(x − ½) ln x − x + ½ ln 2π], the remainder of Stirling's formula, for x ≥ 10
 * (about 1/(12x)).
 */
export function stirlingCorrection(x: number): number {
  if (!(x >= 10)) throw new RangeError(`stirlingCorrection needs x of at least 10, got ${x}`);
  const inverseSquare = 1 / (x * x);
  let sum = 0;
  for (let k = SERIES.length - 1; k >= 0; k--) sum = sum * inverseSquare + SERIES[k]!;
  return sum / x;
}

function stirlingMain(x: number): number {
  return (x - 0.5) * Math.log(x) - x + HALF_LOG_TWO_PI;
}
