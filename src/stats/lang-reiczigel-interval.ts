import { roganGladen } from "./rogan-gladen.js";
import { twoSidedZ } from "./two-sided-z.js";
import { assertLevel, assertPositive } from "./validate.js";

/** Options of `langReiczigelInterval`. */
export interface LangReiczigelOptions {
  /** Apparent prevalence AP: the share called positive by the classifier. */
  readonly apparent: number;
  /** Number of cases AP is based on (may be an effective sample size, so need not be whole). */
  readonly sampleSize: number;
  /** Sensitivity estimated in the validation study. */
  readonly sensitivity: number;
  /** Number of truly positive validation cases the sensitivity is based on. */
  readonly sensitivitySampleSize: number;
  /** Specificity estimated in the validation study. */
  readonly specificity: number;
  /** Number of truly negative validation cases the specificity is based on. */
  readonly specificitySampleSize: number;
  /** Two-sided confidence level; default 0.95. */
  readonly level?: number;
}

/** Corrected prevalence with the Lang–Reiczigel interval. */
export interface LangReiczigelInterval {
  /** Rogan–Gladen estimate from the unadjusted figures, clamped to [0, 1]. */
  readonly estimate: number;
  /** The Rogan–Gladen estimate before clamping. */
  readonly unclampedEstimate: number;
  /** Lower limit, clamped to [0, 1]. */
  readonly lower: number;
  /** Upper limit, clamped to [0, 1]. */
  readonly upper: number;
  /** True when the estimate or a limit was moved into [0, 1]. */
  readonly clamped: boolean;
  readonly level: number;
}

/**
 * Lang–Reiczigel confidence interval for a prevalence corrected for a classifier whose sensitivity
 * and specificity were themselves estimated from finite validation samples.
 *
 * Definition: an adjusted-Wald interval around the Rogan–Gladen estimate that carries three
 * sources of uncertainty: the sampling of AP (n cases), of Se (n_Se validation positives) and of
 * Sp (n_Sp validation negatives). With z = Φ⁻¹((1 + level)/2):
 *   AP′ = (n·AP + z²/2)/(n + z²),  Se′ = (n_Se·Se + 1)/(n_Se + 2),  Sp′ = (n_Sp·Sp + 1)/(n_Sp + 2),
 *   TP′ = (AP′ + Sp′ − 1)/(Se′ + Sp′ − 1),
 *   SE = √(AP′(1 − AP′)/(n + z²) + TP′²·Se′(1 − Se′)/(n_Se + 2) + (1 − TP′)²·Sp′(1 − Sp′)/(n_Sp + 2))
 *        / |Se′ + Sp′ − 1|,
 *   shift d = 2z²·(TP′·Se′(1 − Se′)/(n_Se + 2) − (1 − TP′)·Sp′(1 − Sp′)/(n_Sp + 2)),
 *   limits = TP′ + d ∓ z·SE.
 * The point estimate is the plain Rogan–Gladen value (AP + Sp − 1)/(Se + Sp − 1); the interval
 * is centred on the adjusted TP′ + d, not on it.
 *
 * Variant: the adjusted-Wald interval of Lang & Reiczigel (2014), as in the authors' published
 * script (Agresti–Coull style z²/2 added to AP, one success and one failure added to Se and Sp,
 * then the shift d). Counts may be fractional (for example an effective sample size after a design
 * effect). Clamping rule: the estimate and both limits are clamped to [0, 1] and `clamped` says so;
 * the unclamped estimate is kept.
 *
 * Fails when: a share is outside [0, 1], a sample size is not positive, the level is not in
 * (0, 1), or Se + Sp ≤ 1 before or after the adjustment (a classifier no better than chance
 * cannot correct a prevalence) (RangeError). With Se + Sp close to 1 the interval is very wide,
 * which is the honest answer.
 *
 * Example: AP 0.30 of 500, Se 0.80 from 50, Sp 0.90 from 200: estimate 0.285714, 95% interval
 * 0.206436 to 0.380000:
 * `langReiczigelInterval({ apparent: 0.3, sampleSize: 500, sensitivity: 0.8, sensitivitySampleSize: 50, specificity: 0.9, specificitySampleSize: 200 })`.
 *
 * Source: Zs. Lang & J. Reiczigel (2014), "Confidence limits for prevalence of disease adjusted for
 * estimated sensitivity and specificity", Preventive Veterinary Medicine 113:13–22.
 */
export function langReiczigelInterval(options: LangReiczigelOptions): LangReiczigelInterval {
  const { apparent, sampleSize: n, sensitivity, specificity } = options;
  const { sensitivitySampleSize: nSe, specificitySampleSize: nSp } = options;
  const level = options.level ?? 0.95;
  assertPositive("sampleSize", n);
  assertPositive("sensitivitySampleSize", nSe);
  assertPositive("specificitySampleSize", nSp);
  assertLevel("level", level);
  // Also checks the shares and that Se + Sp > 1.
  const point = roganGladen({ apparent, sensitivity, specificity });
  const z = twoSidedZ(level);
  const z2 = z * z;
  const nAp = n + z2;
  const ap = (n * apparent + z2 / 2) / nAp;
  const nSeAdjusted = nSe + 2;
  const se = (nSe * sensitivity + 1) / nSeAdjusted;
  const nSpAdjusted = nSp + 2;
  const sp = (nSp * specificity + 1) / nSpAdjusted;
  const youden = se + sp - 1;
  if (youden <= 0) {
    throw new RangeError(
      `the adjusted sensitivity + specificity must exceed 1, got ${se} + ${sp} (too few validation cases)`,
    );
  }
  const tp = (ap + sp - 1) / youden;
  const seTerm = (se * (1 - se)) / nSeAdjusted;
  const spTerm = (sp * (1 - sp)) / nSpAdjusted;
  const standardError = Math.sqrt((ap * (1 - ap)) / nAp + tp * tp * seTerm + (1 - tp) ** 2 * spTerm) / youden;
  const shift = 2 * z2 * (tp * seTerm - (1 - tp) * spTerm);
  const rawLower = tp + shift - z * standardError;
  const rawUpper = tp + shift + z * standardError;
  const lower = clamp01(rawLower);
  const upper = clamp01(rawUpper);
  return {
    estimate: point.estimate,
    unclampedEstimate: point.unclamped,
    lower,
    upper,
    clamped: point.clamped || lower !== rawLower || upper !== rawUpper,
    level,
  };
}

function clamp01(value: number): number {
  return Math.min(1, Math.max(0, value));
}
