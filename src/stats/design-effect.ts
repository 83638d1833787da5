import { assertPositive, assertProbability } from "./validate.js";

/** Options of `designEffect`. */
export interface DesignEffectOptions {
  /** Observations per cluster m (for example windows per session); at least 1, need not be whole. */
  readonly clusterSize: number;
  /** Intraclass correlation ρ of the observations within a cluster, in [0, 1]. */
  readonly icc: number;
}

/**
 * Kish design effect of cluster sampling with equal cluster sizes.
 *
 * Definition: deff = 1 + (m − 1)ρ, the factor by which the variance of a mean from m correlated
 * observations per cluster exceeds that of the same number of independent observations. n
 * correlated observations are worth n/deff independent ones (see `effectiveSampleSize`).
 *
 * Variant: equal cluster sizes, exchangeable correlation ρ ≥ 0 (negative ICCs are not accepted).
 * For unequal sizes use `clusterEffectiveSize`.
 *
 * Fails when: clusterSize < 1 or not finite, or icc is outside [0, 1] (RangeError).
 *
 * Example: 25 observations per cluster with ρ = 0.2 gives deff = 5.8:
 * `designEffect({ clusterSize: 25, icc: 0.2 })`.
 *
 * Source: L. Kish (1965), Survey Sampling, Wiley (deff = 1 + (m − 1)·roh for equal clusters).
 */
export function designEffect(options: DesignEffectOptions): number {
  const { clusterSize, icc } = options;
  assertPositive("clusterSize", clusterSize);
  if (clusterSize < 1) throw new RangeError(`clusterSize must be at least 1, got ${clusterSize}`);
  assertProbability("icc", icc);
  return 1 + (clusterSize - 1) * icc;
}
