import {
  type MultipleTestingOptions,
  type MultipleTestingResult,
  readMultipleTestingOptions,
  withRejections,
} from "./multiple-testing-input.js";

/**
 * Bonferroni adjustment of p-values for a family of m tests.
 *
 * Definition: each p-value is multiplied by m and capped at 1; rejecting where the adjusted value
 * is ≤ α keeps the chance of any false rejection (family-wise error rate) at most α, under any
 * dependence. Much more conservative than Benjamini–Hochberg when many tests are run.
 *
 * Variant: single-step, adjusted = min(1, m·p) (not Holm's step-down refinement).
 *
 * Fails when: a p-value is outside [0, 1] or not a number, or level is not in (0, 1)
 * (RangeError/TypeError). An empty family gives empty results.
 *
 * Example: the 15 p-values of Benjamini & Hochberg (1995) reject 3 at α = 0.05 (cutoff
 * 0.05/15 ≈ 0.0033): `bonferroni({ pValues: [0.0001, 0.0004, 0.0019, 0.0095, …] }).rejectedCount`.
 *
 * Source: C. E. Bonferroni (1936), "Teoria statistica delle classi e calcolo delle probabilità";
 * O. J. Dunn (1961), "Multiple comparisons among means", JASA 56:52–64.
 */
export function bonferroni(options: MultipleTestingOptions): MultipleTestingResult {
  const { pValues, level } = readMultipleTestingOptions(options);
  const m = pValues.length;
  return withRejections(
    pValues.map((p) => Math.min(1, m * p)),
    level,
  );
}
