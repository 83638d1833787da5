import { readTwoSamples, type TwoSampleScores } from "./mann-whitney-auc.js";
import { placementValues } from "./placement-values.js";
import { twoSidedZ } from "./two-sided-z.js";
import { assertLevel } from "./validate.js";

/** Options of `delongAuc`: the two samples of scores and the confidence level. */
export interface DelongOptions extends TwoSampleScores {
  /** Two-sided confidence level; default 0.95. */
  readonly level?: number;
}

/** AUC with DeLong's variance and a Wald interval. */
export interface DelongAuc {
  readonly auc: number;
  readonly variance: number;
  readonly standardError: number;
  /** AUC − z·SE, floored at 0. */
  readonly lower: number;
  /** AUC + z·SE, capped at 1. */
  readonly upper: number;
  readonly level: number;
  /** True when a limit was cut back to [0, 1]. */
  readonly clipped: boolean;
}

/**
 * DeLong's nonparametric variance and confidence interval for one AUC.
 *
 * Definition: the Mann–Whitney AUC with the variance of DeLong, DeLong & Clarke-Pearson (1988):
 * with placement values V10ᵢ (share of negatives below positive i, ties ½) and V01ⱼ (share of
 * positives above negative j, ties ½),
 *   Var(AUC) = S10/m + S01/n,
 * where S10 and S01 are the sample variances (denominators m − 1 and n − 1) of the V10 and V01.
 * It needs no distributional assumption, unlike the Hanley–McNeil formula.
 *
 * Variant: one detector (no comparison of correlated AUCs); Wald interval AUC ± z·SE on the AUC
 * scale with z = Φ⁻¹((1 + level)/2), clipped to [0, 1] (`clipped` reports it). Near 0 or 1 a
 * logit-scale interval would behave better; this one is kept for comparability with published
 * figures.
 *
 * Fails when: either sample has fewer than 2 scores (the sample variances are undefined), a score
 * is not finite, or level is not in (0, 1) (RangeError/TypeError). With perfect separation the
 * variance is 0 and the interval collapses to a point.
 *
 * Example: positives {0.8, 0.7, 0.4}, negatives {0.5, 0.3, 0.2}: AUC 8/9, variance 2/81:
 * `delongAuc({ positives: [0.8, 0.7, 0.4], negatives: [0.5, 0.3, 0.2] })`.
 *
 * Source: E. R. DeLong, D. M. DeLong & D. L. Clarke-Pearson (1988), "Comparing the areas under two
 * or more correlated receiver operating characteristic curves: a nonparametric approach",
 * Biometrics 44:837–845.
 */
export function delongAuc(options: DelongOptions): DelongAuc {
  const { positives, negatives } = readTwoSamples(options, 2);
  const level = options.level ?? 0.95;
  assertLevel("level", level);
  const { positive, negative } = placementValues(positives, negatives);
  const meanPositive = mean(positive);
  const variance =
    sampleVariance(positive, meanPositive) / positives.length +
    sampleVariance(negative, mean(negative)) / negatives.length;
  const standardError = Math.sqrt(variance);
  const z = twoSidedZ(level);
  const rawLower = meanPositive - z * standardError;
  const rawUpper = meanPositive + z * standardError;
  return {
    auc: meanPositive,
    variance,
    standardError,
    lower: Math.max(0, rawLower),
    upper: Math.min(1, rawUpper),
    level,
    clipped: rawLower < 0 || rawUpper > 1,
  };
}

function mean(values: Float64Array): number {
  let sum = 0;
  for (const v of values) sum += v;
  return sum / values.length;
}

function sampleVariance(values: Float64Array, centre: number): number {
  let sum = 0;
  for (const v of values) sum += (v - centre) ** 2;
  return sum / (values.length - 1);
}
