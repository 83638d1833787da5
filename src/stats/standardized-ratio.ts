import { poissonByarInterval } from "./poisson-byar-interval.js";
import { poissonExactInterval } from "./poisson-exact-interval.js";
import { assertInteger, assertLevel, assertPositive } from "./validate.js";

/** Options of `standardizedRatio`. */
export interface StandardizedRatioOptions {
  /** Observed count O (a whole number, 0 or more). */
  readonly observed: number;
  /** Expected count E under the reference rates (positive; need not be whole). */
  readonly expected: number;
  /** Two-sided confidence level; default 0.95. */
  readonly level?: number;
  /** Limits for O: "exact" (Garwood, default) or "byar" (Byar's approximation). */
  readonly method?: "exact" | "byar";
}

/** A standardised ratio O/E with its interval. */
export interface StandardizedRatio {
  readonly ratio: number;
  readonly lower: number;
  readonly upper: number;
  readonly observed: number;
  readonly expected: number;
  readonly level: number;
  readonly method: "exact" | "byar";
}

/**
 * Standardised ratio (observed over expected, as in a standardised mortality or incidence ratio)
 * with a confidence interval.
 *
 * Definition: R = O/E, where O is an observed count and E the count expected if the reference
 * rates applied (indirect standardisation). R = 1 means "as expected"; R = 2, twice as many.
 *
 * Variant: E is treated as fixed (known without error) and O as Poisson, so the limits are the
 * Poisson limits for O divided by E: exact Garwood limits (default) or Byar's approximation.
 *
 * Fails when: observed is not a whole number ≥ 0, expected is not positive, or level is not in
 * (0, 1) (RangeError). When E itself is estimated from a small reference group the interval is too
 * narrow.
 *
 * Example: 53 observed, 48.62 expected: R = 1.090086, exact 95% limits 0.816550 to 1.425860:
 * `standardizedRatio({ observed: 53, expected: 48.62 })`.
 *
 * Source: N. E. Breslow & N. E. Day (1987), Statistical Methods in Cancer Research, vol. II, IARC,
 * ch. 2 (SMR with exact and Byar limits).
 */
export function standardizedRatio(options: StandardizedRatioOptions): StandardizedRatio {
  const { observed, expected } = options;
  const level = options.level ?? 0.95;
  const method = options.method ?? "exact";
  assertInteger("observed", observed, 0);
  assertPositive("expected", expected);
  assertLevel("level", level);
  if (method !== "exact" && method !== "byar") {
    throw new RangeError(`method must be "exact" or "byar", got ${JSON.stringify(method)}`);
  }
  const limits =
    method === "exact" ? poissonExactInterval({ observed, level }) : poissonByarInterval({ observed, level });
  return {
    ratio: observed / expected,
    lower: limits.lower / expected,
    upper: limits.upper / expected,
    observed,
    expected,
    level,
    method,
  };
}
