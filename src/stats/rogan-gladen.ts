import { assertProbability } from "./validate.js";

/** Options of `roganGladen`. */
export interface RoganGladenOptions {
  /** Apparent prevalence: the share of cases the imperfect classifier calls positive. */
  readonly apparent: number;
  /** Sensitivity of the classifier, P(called positive | truly positive). */
  readonly sensitivity: number;
  /** Specificity of the classifier, P(called negative | truly negative). */
  readonly specificity: number;
}

/** A prevalence corrected for misclassification. */
export interface CorrectedPrevalence {
  /** The corrected prevalence, clamped to [0, 1]. */
  readonly estimate: number;
  /** The corrected prevalence before clamping (may lie outside [0, 1]). */
  readonly unclamped: number;
  /** True when the estimate was moved to 0 or 1. */
  readonly clamped: boolean;
}

/**
 * Rogan–Gladen correction of a prevalence measured with an imperfect classifier.
 *
 * Definition: if a classifier with sensitivity Se and specificity Sp calls a share AP of cases
 * positive, then AP = TP·Se + (1 − TP)(1 − Sp), so the true prevalence is
 *   TP = (AP + Sp − 1)/(Se + Sp − 1).
 * The denominator is Youden's J; a weak classifier (J near 0) makes the correction unstable.
 *
 * Variant: Se and Sp taken as known. Clamping rule (used throughout this project): when the
 * formula leaves [0, 1] (AP below the false-positive rate 1 − Sp, or above Se), the estimate is
 * set to the nearer end, the unclamped value is kept, and `clamped` is true, so a report can say
 * the data are at the edge of what the classifier can resolve.
 *
 * Fails when: an input is outside [0, 1], or Se + Sp ≤ 1 (the classifier is no better than
 * chance, so prevalence cannot be recovered) (RangeError).
 *
 * Example: 23 positive of 150 with Se 0.96, Sp 0.89: AP 0.1533333, TP 0.0509804:
 * `roganGladen({ apparent: 23 / 150, sensitivity: 0.96, specificity: 0.89 })`.
 *
 * Source: W. J. Rogan & B. Gladen (1978), "Estimating prevalence from the results of a screening
 * test", American Journal of Epidemiology 107:71–76.
 */
export function roganGladen(options: RoganGladenOptions): CorrectedPrevalence {
  const { apparent, sensitivity, specificity } = options;
  assertProbability("apparent", apparent);
  assertProbability("sensitivity", sensitivity);
  assertProbability("specificity", specificity);
  const youden = sensitivity + specificity - 1;
  if (youden <= 0) {
    throw new RangeError(
      `sensitivity + specificity must exceed 1 for a prevalence correction, got ${sensitivity} + ${specificity}`,
    );
  }
  const unclamped = (apparent + specificity - 1) / youden;
  const estimate = Math.min(1, Math.max(0, unclamped));
  return { estimate, unclamped, clamped: estimate !== unclamped };
}
