import {
  type MultipleTestingOptions,
  type MultipleTestingResult,
  readMultipleTestingOptions,
  withRejections,
} from "./multiple-testing-input.js";

/**
 * Benjamini–Hochberg false discovery rate adjustment (q-values) and the rejections at a level.
 *
 * Definition: with the m p-values sorted, p₍₁₎ ≤ … ≤ p₍ₘ₎, the step-up procedure rejects the k
 * smallest, where k is the largest i with p₍ᵢ₎ ≤ i·q/m; on average at most a share q of the
 * rejections are false (for independent or positively dependent tests). The adjusted value of the
 * i-th smallest p-value is
 *   q₍ᵢ₎ = min over j ≥ i of min(1, m·p₍ⱼ₎/j),
 * and a hypothesis is rejected at level q exactly when its adjusted value is ≤ q.
 *
 * Variant: step-up, made monotone by the running minimum from the largest p-value down, capped at
 * 1; ties share the same adjusted value (as R's `p.adjust(method = "BH")`). Returned in the input
 * order; the input is not reordered.
 *
 * Fails when: a p-value is outside [0, 1] or not a number, or level is not in (0, 1)
 * (RangeError/TypeError). An empty family gives empty results. Under strong negative dependence
 * the FDR guarantee does not hold (use Benjamini–Yekutieli).
 *
 * Example: the 15 p-values of Benjamini & Hochberg (1995) reject 4 at q = 0.05:
 * `benjaminiHochberg({ pValues: [0.0001, 0.0004, 0.0019, 0.0095, 0.0201, …], level: 0.05 }).rejectedCount`.
 *
 * Source: Y. Benjamini & Y. Hochberg (1995), "Controlling the false discovery rate: a practical
 * and powerful approach to multiple testing", JRSS B 57:289–300; adjusted values as in
 * S. P. Wright (1992), "Adjusted p-values for simultaneous inference", Biometrics 48:1005–1013.
 */
export function benjaminiHochberg(options: MultipleTestingOptions): MultipleTestingResult {
  const { pValues, level } = readMultipleTestingOptions(options);
  const m = pValues.length;
  const order = pValues.map((_, i) => i).sort((i, j) => pValues[i]! - pValues[j]!);
  const adjusted = new Array<number>(m);
  let running = 1;
  for (let rank = m; rank >= 1; rank--) {
    const index = order[rank - 1]!;
    running = Math.min(running, (m * pValues[index]!) / rank);
    adjusted[index] = running;
  }
  return withRejections(adjusted, level);
}
