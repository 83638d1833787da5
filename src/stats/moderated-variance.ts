import { assertFinite, assertNonNegative, assertPositive } from "./validate.js";

/** Options of `moderatedVariance`. */
export interface ModeratedVarianceOptions {
  /** The unit's own variance estimate s² (≥ 0). */
  readonly variance: number;
  /** Its degrees of freedom d (≥ 0; 0 means no own estimate). */
  readonly degreesOfFreedom: number;
  /** The prior (pooled or model-based) variance s₀² (> 0). */
  readonly priorVariance: number;
  /** The prior's weight in degrees of freedom d₀ (> 0). */
  readonly priorDegreesOfFreedom: number;
}

/** A moderated variance and the degrees of freedom to use with it. */
export interface ModeratedVariance {
  /** s̃² = (d₀s₀² + d·s²)/(d₀ + d). */
  readonly variance: number;
  /** d₀ + d, for a Student t quantile. */
  readonly degreesOfFreedom: number;
}

/**
 * Moderated (empirical-Bayes) variance: a unit's own variance estimate pooled with a prior value,
 * each weighted by its degrees of freedom.
 *
 * Definition: with s² on d degrees of freedom and a prior s₀² worth d₀ degrees of freedom, the
 * posterior mean of 1/σ² under the scaled inverse-χ² prior gives s̃² = (d₀s₀² + d·s²)/(d₀ + d); the
 * moderated t statistic then has d₀ + d degrees of freedom. A unit with few clusters (small d)
 * borrows stability from the prior; one with many is governed by its own data.
 * Variant: d₀ and s₀² are given by the caller (here: a model-based variance and a fixed prior
 * weight), not estimated from the spread of many s² as in Smyth's full method.
 * Fails when: a value is not finite, a variance or d is negative, or s₀² or d₀ is not positive.
 * Example: s² = 4 on 2 df with s₀² = 1 on 6 df gives s̃² = (6 + 8)/8 = 1.75 on 8 df.
 * Source: G. K. Smyth (2004), "Linear models and empirical Bayes methods for assessing
 * differential expression in microarray experiments", Statistical Applications in Genetics and
 * Molecular Biology 3(1), article 3, equation (3).
 */
export function moderatedVariance(options: ModeratedVarianceOptions): ModeratedVariance {
  const { variance, degreesOfFreedom, priorVariance, priorDegreesOfFreedom } = options;
  assertNonNegative("variance", variance);
  assertNonNegative("degreesOfFreedom", degreesOfFreedom);
  assertPositive("priorVariance", priorVariance);
  assertPositive("priorDegreesOfFreedom", priorDegreesOfFreedom);
  assertFinite("variance", variance);
  const df = priorDegreesOfFreedom + degreesOfFreedom;
  return {
    variance: (priorDegreesOfFreedom * priorVariance + degreesOfFreedom * variance) / df,
    degreesOfFreedom: df,
  };
}
