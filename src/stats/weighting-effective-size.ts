import { assertFiniteArray } from "./validate.js";

/** Design effect and effective size of unequal weights. */
export interface WeightingEffectiveSize {
  /** Number of weights n. */
  readonly n: number;
  /** deff_w = n·Σw²/(Σw)² = 1 + CV² (CV with denominator n). */
  readonly designEffect: number;
  /** (Σw)²/Σw². */
  readonly effectiveN: number;
}

/**
 * Kish effective sample size of a weighted mean (the design effect of unequal weighting).
 *
 * Definition: a weighted mean with weights wᵢ has the variance of an unweighted mean of
 * n_eff = (Σwᵢ)²/Σwᵢ² observations (for equal unit variances); deff = n/n_eff = 1 + CV²(w).
 *
 * Variant: Kish's approximation, which ignores any correlation between weights and outcomes.
 *
 * Fails when: the list is empty, a weight is negative or not finite, or all weights are 0
 * (RangeError/TypeError).
 *
 * Example: weights 1, 1, 2, 2: n_eff = 36/10 = 3.6, deff = 10/9:
 * `weightingEffectiveSize({ weights: [1, 1, 2, 2] })`.
 *
 * Source: L. Kish (1965), Survey Sampling, Wiley; L. Kish (1992), "Weighting for unequal
 * Pᵢ", Journal of Official Statistics 8:183–200.
 */
export function weightingEffectiveSize(options: {
  readonly weights: readonly number[];
}): WeightingEffectiveSize {
  const { weights } = options;
  assertFiniteArray("weights", weights);
  let sum = 0;
  let sumSquares = 0;
  weights.forEach((w, i) => {
    if (w < 0) throw new RangeError(`weights[${i}] must be 0 or more, got ${w}`);
    sum += w;
    sumSquares += w * w;
  });
  if (sum <= 0) throw new RangeError("weights must include at least one positive weight");
  const effectiveN = (sum * sum) / sumSquares;
  return { n: weights.length, designEffect: weights.length / effectiveN, effectiveN };
}
