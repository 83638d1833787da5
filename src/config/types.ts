/** The detector card and the settings as used (every default filled in): the types that cross seams. */

export type Calibration =
  | { readonly kind: "none" }
  | { readonly kind: "platt"; readonly a: number; readonly b: number }
  | { readonly kind: "bins"; readonly bins: readonly (readonly [upper: number, rate: number])[] };

export interface ConstructCard {
  readonly key: string;
  readonly label: string;
  readonly kind: "affect" | "behaviour";
  readonly higherIs: "concern" | "good";
  readonly auc: number;
  readonly aucPositives: number;
  readonly aucNegatives: number;
  readonly kappa: number | undefined;
  readonly threshold: number;
  readonly sensitivity: number | undefined;
  readonly specificity: number | undefined;
  readonly meanPInState: number | undefined;
  readonly meanPNotInState: number | undefined;
  readonly sdPInState: number | undefined;
  readonly sdPNotInState: number | undefined;
  readonly sustainedMinWindows: number;
  readonly calibration: Calibration;
}

export interface Card {
  readonly windowSeconds: number;
  readonly validatedSettings: readonly string[];
  readonly aucFloor: number;
  /** In the order the card lists them; that order is kept in every output. */
  readonly constructs: readonly ConstructCard[];
}

export type Audience = "counselors" | "content" | "support" | "about";

export interface Settings {
  readonly title: string;
  readonly period: { readonly from: string | null; readonly to: string | null };
  readonly confidence: number;
  readonly strict: boolean;
  readonly audiences: readonly Audience[];
  readonly evidence: {
    readonly minMinutes: number;
    readonly minSessions: number;
    readonly minDays: number;
    readonly minStudents: number;
  };
  readonly suppressionSize: number;
  /** The rules on the interval that turn a figure into a flag (never the point estimate alone). */
  readonly flags: {
    /** `check-in` when a student's whole plausible range of the ratio to peers lies at or beyond this. */
    readonly studentRatio: number;
    /** `elevated` when a class's or school's whole plausible range lies at or beyond this. */
    readonly groupRatio: number;
    /** `review` when a unit's content effect has a Benjamini–Hochberg q-value below this. */
    readonly unitQ: number;
  };
  /** Every student of a caseload gets a page and goes into the caseload's PDF, not only suggested check-ins. */
  readonly allStudentPages: boolean;
  /** Resamples of students for the content effects' intervals. */
  readonly replicates: number;
  readonly pseudonymise: { readonly keyEnv: string | null; readonly keyFile: string | null };
  readonly buildTime: string | null;
  readonly seed: number;
  readonly examplesPerReason: number;
  readonly maxFieldChars: number;
}
