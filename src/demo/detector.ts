import { normalQuantile } from "../stats/normal-quantile.js";

/**
 * The demo's detector: a binormal score model with a chosen AUC, and the probability it writes.
 *
 * Score: N(d, 1) for a window in state, N(0, 1) for one not in state. Under this equal-variance
 * binormal model AUC = Φ(d/√2) (Swets 1986; Hanley 1988, Medical Decision Making 8:197–203),
 * so d = √2·Φ⁻¹(AUC).
 *
 * Probability written: logistic(logit(base rate) + SLOPE·(score − d/2)). The midpoint score d/2,
 * where the two score densities cross, maps to the base rate; the slope (1.5, steeper than the
 * calibrated slope d) spreads probabilities over (0, 1) as real, somewhat over-confident detectors
 * do, while a student's mean probability stays close to the population's: for boredom (AUC .68) a
 * window in state averages about .29 and one not in state about .16, so a student bored 45% of the
 * time and one bored 15% differ by about .04 in mean probability.
 *
 * Threshold: the base rate. A probability at or above it means a score at or above d/2, the cut at
 * which sensitivity equals specificity (both Φ(d/2)) and Youden's J is largest for this model.
 */
export const DETECTOR_SLOPE = 1.5;

export interface DetectorModel {
  /** Mean score of a window in state (d). */
  readonly separation: number;
  readonly intercept: number;
  readonly slope: number;
  readonly threshold: number;
}

export function detectorModel(options: { auc: number; baseRate: number }): DetectorModel {
  const separation = Math.SQRT2 * normalQuantile(options.auc);
  const logitBase = Math.log(options.baseRate / (1 - options.baseRate));
  return {
    separation,
    intercept: logitBase - (DETECTOR_SLOPE * separation) / 2,
    slope: DETECTOR_SLOPE,
    threshold: options.baseRate,
  };
}

/** The written probability for a score, rounded to 4 decimals as in the windows file. */
export function probabilityFromScore(model: DetectorModel, score: number): number {
  const p = 1 / (1 + Math.exp(-(model.intercept + model.slope * score)));
  return Math.round(p * 10000) / 10000;
}
