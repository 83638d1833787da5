import { bisect } from "./bisect.js";
import { HALF_LOG_TWO_PI, logGamma, stirlingCorrection } from "./log-gamma.js";
import { log1pMinusX } from "./log1p-minus-x.js";
import { normalQuantile } from "./normal-quantile.js";
import { regularizedGammaP } from "./regularized-gamma.js";
import { assertPositive, assertProbability } from "./validate.js";

/**
 * Gamma distribution quantile (shape a, scale 1): the x ≥ 0 with P(a, x) = p, the inverse of the
 * regularized lower incomplete gamma function.
 *
 * Definition: the value below which a gamma variable with shape a and unit scale falls with
 * probability p. Chi-square quantiles are 2·gammaQuantile(p, k/2); the exact (Garwood) Poisson
 * limits for a count x are gammaQuantile(α/2, x) and gammaQuantile(1 − α/2, x + 1).
 *
 * Variant: a Wilson–Hilferty cube-root normal start (A&S 26.4.17) for a > 1, or the small-shape
 * start of Numerical Recipes §6.2, then Halley's method inside a shrinking bracket with bisection
 * as a safeguard. For p > ½ the equation Q(a, x) = 1 − p is solved instead, so the upper tail keeps
 * full precision. Converged when a step is below 1e-15 relative; accuracy then follows
 * `regularizedGammaP` (typically 1e-14 relative; about 2e-12 in tails beyond 1e-12 for shapes near
 * 1e5, where the prefactor's exponent is large).
 *
 * Fails when: p is outside [0, 1] or the shape is not a positive finite number (RangeError). p = 0
 * gives 0 and p = 1 gives +Infinity.
 *
 * Example: `gammaQuantile(0.975, 1)` = −ln 0.025 ≈ 3.6888794541139363 (the exact upper 95% limit
 * for a Poisson count of 0).
 *
 * Source: Abramowitz & Stegun (1964), Handbook of Mathematical Functions, 26.4.17 (start);
 * Press, Teukolsky, Vetterling & Flannery (2007), Numerical Recipes, 3rd ed., §6.2 (Halley
 * iteration for the inverse incomplete gamma function).
 */
export function gammaQuantile(p: number, shape: number): number {
  assertProbability("p", p);
  assertPositive("shape", shape);
  if (p === 0) return 0;
  if (p === 1) return Number.POSITIVE_INFINITY;
  const a = shape;
  const upperTail = p > 0.5;
  const target = upperTail ? 1 - p : p;
  // f(x) increases with x in both cases: P(a, x) − p, or (1 − p) − Q(a, x).
  const f = (x: number): number =>
    upperTail ? target - regularizedGammaP(a, x, { complement: true }) : regularizedGammaP(a, x) - target;
  const logGammaA = logGamma(a);
  let lo = 0;
  let hi = Number.POSITIVE_INFINITY;
  let x = start(p, a, logGammaA);
  for (let iteration = 0; iteration < 300; iteration++) {
    const value = f(x);
    if (value === 0) return x;
    if (value < 0) lo = x;
    else hi = x;
    const u = value / gammaDensity(a, x, logGammaA);
    const curvature = (a - 1) / x - 1;
    const halley = 1 - 0.5 * Math.min(1, Math.max(-1, u * curvature));
    let next = x - (Number.isFinite(u) ? u / halley : Number.NaN);
    if (!(next > lo && next < hi)) next = Number.isFinite(hi) ? bisect(lo, hi) : 2 * x;
    const bracketClosed = Number.isFinite(hi) && hi - lo <= 1e-16 * hi;
    if (Math.abs(next - x) <= 1e-15 * Math.max(x, next) || bracketClosed) return next;
    x = next;
  }
  return x;
}

/** Gamma(a, 1) density at x, with the cancellation-free prefactor for a ≥ 10. */
function gammaDensity(a: number, x: number, logGammaA: number): number {
  if (a < 10) return Math.exp((a - 1) * Math.log(x) - x - logGammaA);
  const t = (x - a) / a;
  return Math.exp(a * log1pMinusX(t) + 0.5 * Math.log(a) - HALF_LOG_TWO_PI - stirlingCorrection(a)) / x;
}

function start(p: number, a: number, logGammaA: number): number {
  // Small-x power law P(a, x) ≈ xᵃ / Γ(a + 1).
  const powerLaw = Math.exp((Math.log(p) + logGammaA + Math.log(a)) / a);
  if (a > 1) {
    const z = normalQuantile(p);
    const cube = 1 - 1 / (9 * a) + z / (3 * Math.sqrt(a));
    const wilsonHilferty = a * cube * cube * cube;
    return wilsonHilferty > 0 ? wilsonHilferty : Math.max(powerLaw, Number.MIN_VALUE);
  }
  const t = 1 - a * (0.253 + a * 0.12);
  const x = p < t ? (p / t) ** (1 / a) : 1 - Math.log(1 - (p - t) / (1 - t));
  return Math.max(x, Number.MIN_VALUE);
}
