import type { TwoSampleScores } from "./mann-whitney-auc.js";
import { type RocPoint, rocCurve } from "./roc-curve.js";

/** Options of `abroca`: the scores of each group, split by true class. */
export interface AbrocaOptions {
  /** Scores of the first group (for example one setting or demographic group). */
  readonly first: TwoSampleScores;
  /** Scores of the second group. */
  readonly second: TwoSampleScores;
}

/**
 * ABROCA: absolute area between the ROC curves of two groups, a measure of how unequally a
 * detector performs across groups.
 *
 * Definition: ABROCA = ∫₀¹ |ROC₁(t) − ROC₂(t)| dt over the false-positive rate t. 0 means the
 * detector trades sensitivity against false alarms identically in both groups; unlike a difference
 * of AUCs, crossing curves do not cancel out.
 *
 * Variant: empirical ROC curves joined by straight lines (ties ½, see `rocCurve`), integrated
 * exactly: between consecutive false-positive rates of either curve both are linear, and where the
 * difference changes sign the interval is split at the crossing. (Gardner et al. interpolated on a
 * fine grid; the exact integral is the limit of that.)
 *
 * Fails when: a group has no positive or no negative scores, or a score is not finite
 * (RangeError/TypeError). With few cases per group the value is noisy and biased upward; report
 * it with a resampling interval.
 *
 * Example: labels 1,1,1,1,0,0,0,0; group A scores 0.9,0.8,0.7,0.4,0.6,0.5,0.3,0.2 (AUC 0.875) and
 * group B 0.9,0.6,0.4,0.3,0.8,0.7,0.5,0.2 (AUC 0.5) give ABROCA 0.375.
 *
 * Source: J. Gardner, C. Brooks & R. Baker (2019), "Evaluating the fairness of predictive student
 * models through slicing analysis", Proceedings of LAK 2019, 225–234.
 */
export function abroca(options: AbrocaOptions): number {
  const a = segments(rocCurve(options.first));
  const b = segments(rocCurve(options.second));
  const breaks = [...new Set([...a.map((s) => s.x0), ...b.map((s) => s.x0), 1])].sort((x, y) => x - y);
  let area = 0;
  for (let i = 0; i + 1 < breaks.length; i++) {
    const x0 = breaks[i]!;
    const x1 = breaks[i + 1]!;
    const segmentA = covering(a, x0);
    const segmentB = covering(b, x0);
    const d0 = at(segmentA, x0) - at(segmentB, x0);
    const d1 = at(segmentA, x1) - at(segmentB, x1);
    const width = x1 - x0;
    if (d0 * d1 >= 0) area += ((Math.abs(d0) + Math.abs(d1)) / 2) * width;
    else area += ((d0 * d0 + d1 * d1) / (2 * (Math.abs(d0) + Math.abs(d1)))) * width;
  }
  return area;
}

interface Segment {
  readonly x0: number;
  readonly y0: number;
  readonly x1: number;
  readonly y1: number;
}

/** The non-vertical pieces of a curve (vertical jumps have zero width). */
function segments(points: readonly RocPoint[]): Segment[] {
  const pieces: Segment[] = [];
  for (let i = 0; i + 1 < points.length; i++) {
    const p = points[i]!;
    const q = points[i + 1]!;
    if (q.fpr > p.fpr) pieces.push({ x0: p.fpr, y0: p.tpr, x1: q.fpr, y1: q.tpr });
  }
  return pieces;
}

/** The piece covering the interval that starts at x. */
function covering(pieces: readonly Segment[], x: number): Segment {
  for (const piece of pieces) if (piece.x0 <= x && x < piece.x1) return piece;
  return pieces[pieces.length - 1]!;
}

function at(piece: Segment, x: number): number {
  return piece.y0 + ((piece.y1 - piece.y0) * (x - piece.x0)) / (piece.x1 - piece.x0);
}
