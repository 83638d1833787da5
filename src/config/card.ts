/**
 * The detector card: YAML as written → schema check → rules between keys → `Card` as used.
 */
import { SettingsError } from "../errors.js";
import { msg } from "../messages.js";
import { CARD_DEFAULTS } from "./defaults.js";
import type { Calibration, Card, ConstructCard } from "./types.js";
import { type LoadedYaml, loadYaml, validateWithSchema } from "./yaml-schema.js";

interface ConstructInput {
  label: string;
  kind: "affect" | "behaviour";
  higher_is: "concern" | "good";
  auc: number;
  auc_positives: number;
  auc_negatives: number;
  kappa?: number;
  threshold: number;
  sensitivity?: number;
  specificity?: number;
  mean_p_in_state?: number;
  mean_p_not_in_state?: number;
  sd_p_in_state?: number;
  sd_p_not_in_state?: number;
  sustained_min_windows?: number;
  calibration?: "none" | { platt: { a: number; b: number } } | { bins: [number, number][] };
}

/** The card as written, after the schema check. */
export interface CardInput {
  window_seconds: number;
  validated_settings?: string[];
  auc_floor?: number;
  constructs: Record<string, ConstructInput>;
}

function calibrationOf(input: ConstructInput["calibration"], where: () => string, key: string): Calibration {
  if (input === undefined || input === "none") return { kind: "none" };
  if ("platt" in input) return { kind: "platt", a: input.platt.a, b: input.platt.b };
  const bins = input.bins.map(([upper, rate]) => [upper, rate] as const);
  for (let i = 1; i < bins.length; i++) {
    if (bins[i]![0] <= bins[i - 1]![0]) throw new SettingsError(`${where()}: ${msg.binsNotIncreasing(key)}`);
  }
  if (bins[bins.length - 1]![0] !== 1) throw new SettingsError(`${where()}: ${msg.binsNotToOne(key)}`);
  return { kind: "bins", bins };
}

function pairCheck(
  c: ConstructInput,
  a: keyof ConstructInput,
  b: keyof ConstructInput,
  key: string,
  loaded: LoadedYaml,
): void {
  if ((c[a] === undefined) !== (c[b] === undefined)) {
    const present = c[a] === undefined ? b : a;
    const missing = c[a] === undefined ? a : b;
    throw new SettingsError(
      `${loaded.locate(["constructs", key, present], true)}: ${msg.pairIncomplete(key, present, missing)}`,
    );
  }
}

/** Builds the card as used from a schema-valid input; checks the rules the schema cannot express. */
export function cardFromInput(input: CardInput, loaded: LoadedYaml): Card {
  const constructs: ConstructCard[] = Object.entries(input.constructs).map(([key, c]) => {
    pairCheck(c, "sensitivity", "specificity", key, loaded);
    pairCheck(c, "mean_p_in_state", "mean_p_not_in_state", key, loaded);
    const defaultRun = Math.max(2, Math.ceil((CARD_DEFAULTS.sustainedMinutes * 60) / input.window_seconds));
    return {
      key,
      label: c.label,
      kind: c.kind,
      higherIs: c.higher_is,
      auc: c.auc,
      aucPositives: c.auc_positives,
      aucNegatives: c.auc_negatives,
      kappa: c.kappa,
      threshold: c.threshold,
      sensitivity: c.sensitivity,
      specificity: c.specificity,
      meanPInState: c.mean_p_in_state,
      meanPNotInState: c.mean_p_not_in_state,
      sdPInState: c.sd_p_in_state,
      sdPNotInState: c.sd_p_not_in_state,
      sustainedMinWindows: c.sustained_min_windows ?? defaultRun,
      calibration: calibrationOf(c.calibration, () => loaded.locate(["constructs", key, "calibration"]), key),
    };
  });
  return {
    windowSeconds: input.window_seconds,
    validatedSettings: input.validated_settings ?? [],
    aucFloor: input.auc_floor ?? CARD_DEFAULTS.aucFloor,
    constructs,
  };
}

export function loadCard(path: string): Card {
  const loaded = loadYaml(path, "detector card");
  if (loaded.data === null || loaded.data === undefined)
    throw new SettingsError(msg.emptyYaml(path, "detector card"));
  validateWithSchema(loaded, "card.schema.json", "the card");
  return cardFromInput(loaded.data as CardInput, loaded);
}

/** The card as used, written back in the card's own key names (for the manifest). */
export function cardAsUsed(card: Card): Record<string, unknown> {
  const constructs: Record<string, unknown> = {};
  for (const c of card.constructs) {
    const calibration =
      c.calibration.kind === "none"
        ? "none"
        : c.calibration.kind === "platt"
          ? { platt: { a: c.calibration.a, b: c.calibration.b } }
          : { bins: c.calibration.bins.map(([u, r]) => [u, r]) };
    constructs[c.key] = {
      label: c.label,
      kind: c.kind,
      higher_is: c.higherIs,
      auc: c.auc,
      auc_positives: c.aucPositives,
      auc_negatives: c.aucNegatives,
      kappa: c.kappa ?? null,
      threshold: c.threshold,
      sensitivity: c.sensitivity ?? null,
      specificity: c.specificity ?? null,
      mean_p_in_state: c.meanPInState ?? null,
      mean_p_not_in_state: c.meanPNotInState ?? null,
      sd_p_in_state: c.sdPInState ?? null,
      sd_p_not_in_state: c.sdPNotInState ?? null,
      sustained_min_windows: c.sustainedMinWindows,
      calibration,
    };
  }
  return {
    window_seconds: card.windowSeconds,
    validated_settings: [...card.validatedSettings],
    auc_floor: card.aucFloor,
    constructs,
  };
}

/**
 * The calibrated probability for a raw detector probability. Platt: sigmoid(a·logit(p) + b), the
 * logistic recalibration of Platt (1999) applied on the logit of the detector's output. Bins: the
 * rate of the first bin whose upper bound is at least p (a step function, as in histogram binning,
 * Zadrozny & Elkan 2001). The threshold always applies to the raw probability, the scale on which
 * the card's sensitivity and specificity were measured.
 */
export function calibrator(calibration: Calibration): ((p: number) => number) | null {
  if (calibration.kind === "none") return null;
  if (calibration.kind === "platt") {
    const { a, b } = calibration;
    return (p) => {
      const q = Math.min(Math.max(p, 1e-12), 1 - 1e-12);
      return 1 / (1 + Math.exp(-(a * Math.log(q / (1 - q)) + b)));
    };
  }
  const uppers = calibration.bins.map((bin) => bin[0]);
  const rates = calibration.bins.map((bin) => bin[1]);
  return (p) => {
    for (let i = 0; i < uppers.length; i++) if (p <= uppers[i]!) return rates[i]!;
    return rates[rates.length - 1]!;
  };
}
