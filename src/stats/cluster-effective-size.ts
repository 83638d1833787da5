import { assertFiniteArray, assertProbability } from "./validate.js";

/** Options of `clusterEffectiveSize`. */
export interface ClusterEffectiveSizeOptions {
  /** Number of observations in each cluster (each ≥ 1; at least one cluster). */
  readonly clusterSizes: readonly number[];
  /** Intraclass correlation ρ within clusters, in [0, 1]. */
  readonly icc: number;
}

/** Design effect and effective size for unequal clusters. */
export interface ClusterEffectiveSize {
  /** Total observations n = Σmᵢ. */
  readonly n: number;
  /** Size-weighted mean cluster size m̄* = Σmᵢ²/Σmᵢ. */
  readonly meanClusterSize: number;
  /** deff = 1 + (m̄* − 1)ρ. */
  readonly designEffect: number;
  /** n / deff. */
  readonly effectiveN: number;
}

/**
 * Kish effective sample size for clusters of unequal size with a common intraclass correlation.
 *
 * Definition: for the mean of all observations, with clusters of sizes mᵢ and within-cluster
 * correlation ρ, the variance is inflated by deff = 1 + (m̄* − 1)ρ, where m̄* = Σmᵢ²/Σmᵢ is the
 * mean cluster size seen by a randomly chosen observation (large clusters count more). Then
 * n_eff = Σmᵢ / deff. With equal sizes m̄* = m and this is `designEffect`.
 *
 * Variant: equal weights per observation, exchangeable correlation (Kish 1987). Not the weighting
 * design effect 1 + CV² of unequal survey weights.
 *
 * Fails when: the list is empty, a size is below 1 or not finite, or ρ is outside [0, 1]
 * (RangeError/TypeError).
 *
 * Example: 20 clusters of 25 with ρ = 0.2: deff 5.8, n_eff 86.2069; clusters of sizes 10 and 30
 * with ρ = 0.1: m̄* = 25, deff 3.4, n_eff 11.7647:
 * `clusterEffectiveSize({ clusterSizes: [10, 30], icc: 0.1 })`.
 *
 * Source: L. Kish (1965), Survey Sampling, Wiley; L. Kish (1987), Statistical Design for
 * Research, Wiley (unequal cluster sizes).
 */
export function clusterEffectiveSize(options: ClusterEffectiveSizeOptions): ClusterEffectiveSize {
  const { clusterSizes, icc } = options;
  assertFiniteArray("clusterSizes", clusterSizes);
  assertProbability("icc", icc);
  if (clusterSizes.length === 0) throw new RangeError("clusterSizes must list at least one cluster");
  let n = 0;
  let sumSquares = 0;
  clusterSizes.forEach((m, i) => {
    if (m < 1) throw new RangeError(`clusterSizes[${i}] must be at least 1, got ${m}`);
    n += m;
    sumSquares += m * m;
  });
  const meanClusterSize = sumSquares / n;
  const deff = 1 + (meanClusterSize - 1) * icc;
  return { n, meanClusterSize, designEffect: deff, effectiveN: n / deff };
}
