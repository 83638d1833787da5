import { cohenKappa } from "../stats/cohen-kappa.js";
import { mannWhitneyAuc } from "../stats/mann-whitney-auc.js";
import { normalQuantile } from "../stats/normal-quantile.js";
import type { Random } from "../stats/random.js";
import {
  AUC_FLOOR,
  CONSTRUCTS,
  type ConstructKey,
  type ConstructModel,
  VALIDATED_SETTINGS,
  WINDOW_SECONDS,
} from "./constructs.js";
import { type DetectorModel, detectorModel, probabilityFromScore } from "./detector.js";

/** One construct's entry of the detector card (DATA-CONTRACT.md), keys in the contract's order. */
export interface DemoCardConstruct {
  label: string;
  kind: "affect" | "behaviour";
  higher_is: "concern" | "good";
  auc: number;
  auc_positives: number;
  auc_negatives: number;
  kappa: number;
  threshold: number;
  sensitivity: number;
  specificity: number;
  mean_p_in_state: number;
  mean_p_not_in_state: number;
  sd_p_in_state: number;
  sd_p_not_in_state: number;
  sustained_min_windows: number;
  calibration: "none";
}

export interface DemoCard {
  window_seconds: number;
  validated_settings: string[];
  auc_floor: number;
  constructs: Record<ConstructKey, DemoCardConstruct>;
}

/**
 * The demo's detector card, from a simulated validation sample per construct: 150 to 300 windows
 * in state and 1000 to 2000 not, scored by the same model as the district's windows (detector.ts)
 * and rounded to 4 decimals as written. Every figure is what that sample shows: AUC by
 * Mann–Whitney with ties ½, kappa / sensitivity / specificity at the threshold, means and sample
 * standard deviations (n − 1) of the probabilities.
 *
 * The sample is stratified (one normal draw inside each of n equal-probability strata, as in Latin
 * hypercube sampling; McKay, Beckman & Conover 1979), so the card's figures sit close to the model's
 * for every seed. In particular frustration's detector (true AUC .58) validates below the card's
 * floor of .60 whatever the seed, which an independent sample of this size would not guarantee.
 */
export function buildCard(random: Random): DemoCard {
  const constructs = {} as Record<ConstructKey, DemoCardConstruct>;
  for (const construct of CONSTRUCTS) {
    constructs[construct.key] = cardConstruct(construct, random);
  }
  return {
    window_seconds: WINDOW_SECONDS,
    validated_settings: [...VALIDATED_SETTINGS],
    auc_floor: AUC_FLOOR,
    constructs,
  };
}

function cardConstruct(construct: ConstructModel, random: Random): DemoCardConstruct {
  const detector = detectorModel({ auc: construct.auc, baseRate: construct.baseRate });
  const positives = validationProbabilities(detector, true, 150 + random.int(151), random);
  const negatives = validationProbabilities(detector, false, 1000 + random.int(1001), random);
  const threshold = detector.threshold;
  const truePositives = positives.filter((p) => p >= threshold).length;
  const falsePositives = negatives.filter((p) => p >= threshold).length;
  const table = [
    [truePositives, positives.length - truePositives],
    [falsePositives, negatives.length - falsePositives],
  ] as const;
  return {
    label: construct.label,
    kind: construct.kind,
    higher_is: construct.higherIs,
    auc: round4(mannWhitneyAuc({ positives, negatives })),
    auc_positives: positives.length,
    auc_negatives: negatives.length,
    kappa: round4(cohenKappa({ table }).kappa),
    threshold,
    sensitivity: round4(truePositives / positives.length),
    specificity: round4(1 - falsePositives / negatives.length),
    mean_p_in_state: round4(mean(positives)),
    mean_p_not_in_state: round4(mean(negatives)),
    sd_p_in_state: round4(sampleSd(positives)),
    sd_p_not_in_state: round4(sampleSd(negatives)),
    sustained_min_windows: construct.sustainedMinWindows,
    calibration: "none",
  };
}

function validationProbabilities(
  detector: DetectorModel,
  inState: boolean,
  n: number,
  random: Random,
): number[] {
  const shift = inState ? detector.separation : 0;
  return Array.from({ length: n }, (_, i) => {
    let u = random.uniform();
    while (u === 0) u = random.uniform();
    return probabilityFromScore(detector, shift + normalQuantile((i + u) / n));
  });
}

function mean(values: readonly number[]): number {
  return values.reduce((a, b) => a + b, 0) / values.length;
}

function sampleSd(values: readonly number[]): number {
  const m = mean(values);
  return Math.sqrt(values.reduce((sum, v) => sum + (v - m) ** 2, 0) / (values.length - 1));
}

function round4(x: number): number {
  return Math.round(x * 1e4) / 1e4;
}
