import { readTwoSamples, type TwoSampleScores } from "./mann-whitney-auc.js";

/** One point of an ROC curve. */
export interface RocPoint {
  /** False-positive rate 1 − specificity at the threshold. */
  readonly fpr: number;
  /** True-positive rate (sensitivity) at the threshold. */
  readonly tpr: number;
}

/**
 * Empirical ROC curve: true-positive against false-positive rate over all thresholds.
 *
 * Definition: for each threshold t, calling scores ≥ t positive gives a sensitivity (share of
 * positives at or above t) and a false-positive rate (share of negatives at or above t). Lowering
 * t from above the largest score to the smallest traces the curve from (0, 0) to (1, 1).
 *
 * Variant: one point per distinct score, in order of decreasing threshold, starting at (0, 0);
 * points are joined by straight lines, so tied positive and negative scores give a diagonal
 * segment and the area under the joined points equals the Mann–Whitney AUC with ties ½.
 *
 * Fails when: either sample is empty or a score is not finite (RangeError/TypeError).
 *
 * Example: positives {0.9, 0.4}, negatives {0.6}: (0, 0), (0, 0.5), (1, 0.5), (1, 1):
 * `rocCurve({ positives: [0.9, 0.4], negatives: [0.6] })`.
 *
 * Source: T. Fawcett (2006), "An introduction to ROC analysis", Pattern Recognition Letters
 * 27:861–874 (Algorithm 1).
 */
export function rocCurve(scores: TwoSampleScores): readonly RocPoint[] {
  const { positives, negatives } = readTwoSamples(scores, 1);
  const labelled = [
    ...positives.map((score) => ({ score, positive: true })),
    ...negatives.map((score) => ({ score, positive: false })),
  ].sort((a, b) => b.score - a.score);
  const points: RocPoint[] = [{ fpr: 0, tpr: 0 }];
  let truePositives = 0;
  let falsePositives = 0;
  for (let i = 0; i < labelled.length; i++) {
    const item = labelled[i]!;
    if (item.positive) truePositives++;
    else falsePositives++;
    const next = labelled[i + 1];
    if (next === undefined || next.score !== item.score) {
      points.push({ fpr: falsePositives / negatives.length, tpr: truePositives / positives.length });
    }
  }
  return points;
}
