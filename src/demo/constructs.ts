/**
 * The demo district's constructs and the constants of its generating model, in one place so that
 * the simulator, the detector card and the tests read the same numbers.
 *
 * Truth model (per window, per construct): a two-state Markov chain whose stationary share is the
 * window's target share, logit(target) = logit(base rate) + student + unit + class + session
 * effect. Persistence is set by the lag-1 autocorrelation rho of the state, so that
 * P(stay in state) = pi + rho(1 - pi) and P(enter) = pi(1 - rho); the mean spell in state is then
 * 1 / ((1 - pi)(1 - rho)) windows: about 5.9 for boredom (pi = .15), 5.3 for gaming (pi = .05),
 * 11 for engaged concentration (pi = .55).
 */
export const CONSTRUCT_KEYS = [
  "bored",
  "confused",
  "frustrated",
  "concentrating",
  "off_task",
  "gaming",
] as const;

export type ConstructKey = (typeof CONSTRUCT_KEYS)[number];

export interface ConstructModel {
  readonly key: ConstructKey;
  readonly label: string;
  readonly kind: "affect" | "behaviour";
  readonly higherIs: "concern" | "good";
  /** Share of windows in state for a typical student on typical content. */
  readonly baseRate: number;
  /** The detector's true AUC (A') on new students; the card reports what its validation sample shows. */
  readonly auc: number;
  /** Minimum run of consecutive in-state windows that counts as a sustained episode. */
  readonly sustainedMinWindows: number;
}

/** In card order. Frustration's detector (AUC .58) sits below the card's floor on purpose. */
export const CONSTRUCTS: readonly ConstructModel[] = [
  c("bored", "Boredom", "affect", "concern", 0.15, 0.68, 6),
  c("confused", "Confusion", "affect", "concern", 0.12, 0.74, 6),
  c("frustrated", "Frustration", "affect", "concern", 0.07, 0.58, 6),
  c("concentrating", "Engaged concentration", "affect", "good", 0.55, 0.72, 6),
  c("off_task", "Off task", "behaviour", "concern", 0.1, 0.8, 4),
  c("gaming", "Gaming the system", "behaviour", "concern", 0.05, 0.78, 4),
];

function c(
  key: ConstructKey,
  label: string,
  kind: ConstructModel["kind"],
  higherIs: ConstructModel["higherIs"],
  baseRate: number,
  auc: number,
  sustainedMinWindows: number,
): ConstructModel {
  return { key, label, kind, higherIs, baseRate, auc, sustainedMinWindows };
}

export const WINDOW_SECONDS = 20;
export const AUC_FLOOR = 0.6;
export const VALIDATED_SETTINGS = ["urban", "suburban"] as const;

/** Lag-1 autocorrelation of the in-state indicator within a session. */
export const PERSISTENCE = 0.8;

/** Standard deviations of the normal random effects, on the logit scale. */
export const EFFECT_SD = { student: 0.5, unit: 0.3, class: 0.25, session: 0.35 } as const;

/**
 * Planted effects (planted mode only), on the logit scale, each replacing the random effect of
 * its cell: a few students with much more boredom (+1.5 takes a typical student from 15% to about
 * 44% of windows), one unit where everyone games the system more (+1.0: 5% to about 12.5%), one
 * class that is more often off task (+1.0: 10% to about 23%).
 */
export const PLANTED = {
  studentConstruct: "bored",
  studentShift: 1.5,
  studentShare: 0.04,
  studentMinimum: 3,
  unitConstruct: "gaming",
  unitShift: 1.0,
  classConstruct: "off_task",
  classShift: 1.0,
  classMinimumSize: 12,
} as const satisfies Record<string, string | number>;

/** Share of window × construct cells left empty (not estimated). */
export const MISSING_RATE = 0.01;

/** Chance, after each window, of a short gap (1 to 3 windows not recorded) before the next one. */
export const GAP_RATE = 0.01;

/** Share of students with very little data (one or two short sessions). */
export const LOW_DATA_SHARE = 0.05;

export function constructIndex(key: ConstructKey): number {
  return CONSTRUCT_KEYS.indexOf(key);
}
