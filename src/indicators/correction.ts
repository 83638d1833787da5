import type { ConstructCard } from "../config/types.js";
import type { CorrectionMode } from "./types.js";

/**
 * The misclassification correction of one construct, from the detector card's validation figures.
 *
 * A window's detector signal x (its probability, or 1 when it is at or above the threshold) has
 * mean μ₁ when the student is in state and μ₀ when not. Over a student's windows the mean signal
 * is then m = μ₀ + π(μ₁ − μ₀), where π is the share of time in state, so
 *   π̂ = (m − μ₀)/(μ₁ − μ₀)
 * (Rogan and Gladen 1978, who wrote it for sensitivity and specificity: μ₁ = Se, μ₀ = 1 − Sp).
 * μ₀ and μ₁ come from a finite validation sample, so they carry variances v₀ and v₁ that widen every
 * interval (the delta method; Lang and Reiczigel 2014 take the same three sources of error for
 * prevalence with estimated Se and Sp): Var(π̂) = [Var(m) + (1 − π)²v₀ + π²v₁]/(μ₁ − μ₀)².
 *
 * Which figures are used, in order of preference:
 * 1. mean probabilities in and out of state (`mean_p_in_state`, `mean_p_not_in_state`): every
 *    window's probability counts, which keeps more information than a cut at the threshold;
 *    v = sd²/n with the card's standard deviations, or the largest possible sd for a mean m on
 *    [0, 1], √(m(1 − m)), when they are absent (DATA-CONTRACT.md);
 * 2. sensitivity and specificity at the threshold: the signal is "at or above the threshold";
 *    v = Se(1 − Se)/n₁ and Sp(1 − Sp)/n₀ (binomial);
 * 3. neither: relative mode. No absolute share is printed; comparisons with peers use the raw
 *    mean probability, whose ratios are squashed toward 1 and so understate real differences.
 * The validation means are taken to be on the scale the tool uses, after the card's calibration.
 */
export interface Correction {
  readonly mode: CorrectionMode;
  /** μ₀: mean signal out of state (0 in relative mode). */
  readonly offset: number;
  /** μ₁ − μ₀ (1 in relative mode). */
  readonly scale: number;
  /** Variance of μ̂₀ and of μ̂₁ (0 in relative mode). */
  readonly offsetVariance: number;
  readonly inStateVariance: number;
  /** True when the signal is the count of windows at or above the threshold. */
  readonly usesThreshold: boolean;
  /**
   * Variance of one window's signal in state and out of state (the detector's noise): the card's
   * standard deviations squared (or the largest possible, m(1 − m)), or Se(1 − Se) and Sp(1 − Sp)
   * for the threshold signal. Null in relative mode, where the data's own spread is used.
   */
  readonly noise: { readonly inState: number; readonly notInState: number } | null;
}

const RELATIVE: Correction = {
  mode: "relative",
  offset: 0,
  scale: 1,
  offsetVariance: 0,
  inStateVariance: 0,
  usesThreshold: false,
  noise: null,
};

export function correctionFor(c: ConstructCard): Correction {
  const m1 = c.meanPInState;
  const m0 = c.meanPNotInState;
  if (m1 !== undefined && m0 !== undefined && m1 > m0) {
    const sd1 = c.sdPInState ?? Math.sqrt(m1 * (1 - m1));
    const sd0 = c.sdPNotInState ?? Math.sqrt(m0 * (1 - m0));
    return {
      mode: "mean-probability",
      offset: m0,
      scale: m1 - m0,
      offsetVariance: (sd0 * sd0) / c.aucNegatives,
      inStateVariance: (sd1 * sd1) / c.aucPositives,
      usesThreshold: false,
      noise: { inState: sd1 * sd1, notInState: sd0 * sd0 },
    };
  }
  const se = c.sensitivity;
  const sp = c.specificity;
  if (se !== undefined && sp !== undefined && se + sp > 1) {
    return {
      mode: "threshold",
      offset: 1 - sp,
      scale: se + sp - 1,
      offsetVariance: (sp * (1 - sp)) / c.aucNegatives,
      inStateVariance: (se * (1 - se)) / c.aucPositives,
      usesThreshold: true,
      noise: { inState: se * (1 - se), notInState: sp * (1 - sp) },
    };
  }
  return RELATIVE;
}

/**
 * Variance of one window's signal given the states, at share π (clamped): πσ₁² + (1 − π)σ₀².
 * Null in relative mode.
 */
export function windowNoiseVariance(correction: Correction, share: number): number | null {
  if (correction.noise === null) return null;
  const p = Math.min(1, Math.max(0, share));
  return p * correction.noise.inState + (1 - p) * correction.noise.notInState;
}

/** Corrected share from a mean signal, not clamped (callers clamp and say so). */
export function correctedShare(correction: Correction, meanSignal: number): number {
  return (meanSignal - correction.offset) / correction.scale;
}

/**
 * Variance of the corrected share: the mean signal's own variance plus the validation sample's,
 * by the delta method. `share` is clamped to [0, 1] before it weights v₀ and v₁.
 */
export function correctedShareVariance(correction: Correction, meanVariance: number, share: number): number {
  const p = Math.min(1, Math.max(0, share));
  const s = correction.scale;
  return (
    (meanVariance + (1 - p) * (1 - p) * correction.offsetVariance + p * p * correction.inStateVariance) /
    (s * s)
  );
}
