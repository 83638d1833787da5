import { assertInteger, assertProbability } from "./validate.js";

/** Options of `hanleyMcNeilStandardError`. */
export interface HanleyMcNeilOptions {
  /** The AUC (A′), in [0, 1]. */
  readonly auc: number;
  /** Number of positive cases (in the state) behind it, at least 1. */
  readonly positiveCount: number;
  /** Number of negative cases (not in the state) behind it, at least 1. */
  readonly negativeCount: number;
}

/**
 * Hanley–McNeil standard error of an AUC from the AUC and the two sample sizes alone.
 *
 * Definition: the standard error of the Mann–Whitney AUC when only the AUC and the counts are known
 * (as in a published validation study), assuming the exponential-model approximations
 * Q₁ = A/(2 − A) (two positives vs one negative) and Q₂ = 2A²/(1 + A) (one positive vs two
 * negatives):
 *   SE² = [A(1 − A) + (m − 1)(Q₁ − A²) + (n − 1)(Q₂ − A²)] / (m·n),
 * with m positives and n negatives.
 *
 * Variant: Hanley & McNeil (1982) with their exponential approximations for Q₁, Q₂
 * (not the data-based DeLong variance; use `delongAuc` when the scores are at hand).
 *
 * Fails when: auc is outside [0, 1] or a count is not a whole number ≥ 1 (RangeError). The
 * approximation is rough for A near 1 with small samples; it is 0 at A = 0 or 1.
 *
 * Example: A = 2642/2958 ≈ 0.8931711 from 51 positives and 58 negatives gives SE ≈ 0.0324866
 * (published 0.032): `hanleyMcNeilStandardError({ auc: 0.8931711, positiveCount: 51, negativeCount: 58 })`.
 *
 * Source: J. A. Hanley & B. J. McNeil (1982), "The meaning and use of the area under a receiver
 * operating characteristic (ROC) curve", Radiology 143:29–36.
 */
export function hanleyMcNeilStandardError(options: HanleyMcNeilOptions): number {
  const { auc: a, positiveCount: m, negativeCount: n } = options;
  assertProbability("auc", a);
  assertInteger("positiveCount", m, 1);
  assertInteger("negativeCount", n, 1);
  const q1 = a / (2 - a);
  const q2 = (2 * a * a) / (1 + a);
  const variance = (a * (1 - a) + (m - 1) * (q1 - a * a) + (n - 1) * (q2 - a * a)) / (m * n);
  return Math.sqrt(Math.max(0, variance));
}
