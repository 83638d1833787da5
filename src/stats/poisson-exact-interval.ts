import { gammaQuantile } from "./gamma-quantile.js";
import type { Interval } from "./types.js";
import { assertInteger, assertLevel } from "./validate.js";

/** Options of the Poisson count intervals. */
export interface PoissonIntervalOptions {
  /** Observed count (a whole number, 0 or more). */
  readonly observed: number;
  /** Two-sided confidence level; default 0.95. */
  readonly level?: number;
}

/**
 * Exact (Garwood) confidence interval for the mean of a Poisson count.
 *
 * Definition: the means μ for which neither one-sided Poisson test of the observed count x rejects
 * at α/2. In chi-square form L = χ²(α/2; 2x)/2 and U = χ²(1 − α/2; 2x + 2)/2, computed here as
 * the equal gamma quantiles L = G⁻¹(α/2; x) and U = G⁻¹(1 − α/2; x + 1), with L = 0 when x = 0.
 *
 * Variant: equal-tailed, inverting two one-sided exact tests; coverage at least nominal
 * (conservative).
 *
 * Fails when: observed is not a whole number ≥ 0 or level is not in (0, 1) (RangeError).
 *
 * Example: 10 observed at 95% gives 4.795389 to 18.390356:
 * `poissonExactInterval({ observed: 10 })`.
 *
 * Source: F. Garwood (1936), "Fiducial limits for the Poisson distribution", Biometrika
 * 28:437–442; N. E. Breslow & N. E. Day (1987), Statistical Methods in Cancer Research, vol. II,
 * IARC, ch. 2.
 */
export function poissonExactInterval(options: PoissonIntervalOptions): Interval {
  const { observed: x } = options;
  const level = options.level ?? 0.95;
  assertInteger("observed", x, 0);
  assertLevel("level", level);
  const alpha = 1 - level;
  return {
    estimate: x,
    lower: x === 0 ? 0 : gammaQuantile(alpha / 2, x),
    upper: gammaQuantile(1 - alpha / 2, x + 1),
    level,
  };
}
