/** The indicator tables: the seam between the indicators stage and the reports. */

/**
 * Status codes as written in the CSVs. Each has one display word per audience in
 * src/reports/vocabulary.ts; every page, legend and table takes its words from there.
 */
export const STUDENT_STATUSES = [
  "suggested",
  "near",
  "class-wide",
  "contacted",
  "typical",
  "unclear",
  "too-little-data",
  "detector-too-weak",
] as const;
export const UNIT_STATUSES = ["review", "better", "typical", "too-little-data", "detector-too-weak"] as const;
export const GROUP_STATUSES = ["concern", "typical", "withheld", "detector-too-weak"] as const;
export type StudentStatus = (typeof STUDENT_STATUSES)[number];
export type UnitStatus = (typeof UNIT_STATUSES)[number];
export type GroupStatus = (typeof GROUP_STATUSES)[number];

/** A figure with its plausible range (the interval at the settings' confidence level). */
export interface Estimate {
  readonly value: number;
  readonly low: number;
  /** +∞ only for a ratio with no upper end (peer-ratio.ts); shares are always within [0, 1]. */
  readonly high: number;
}

/** How a construct's probabilities are turned into shares of time (see correction.ts). */
export type CorrectionMode = "mean-probability" | "threshold" | "relative";

/** One row of students.csv: student × construct. */
export interface StudentIndicator {
  readonly studentId: string;
  readonly construct: string;
  readonly status: StudentStatus;
  readonly windows: number;
  readonly sessions: number;
  readonly days: number;
  /** Corrected share of observed time in state; null in relative mode, without evidence or detector. */
  readonly share: Estimate | null;
  /** Peers' corrected share on the same units (each of the student's windows weighted). */
  readonly peerShare: number | null;
  /** Ratio to peers on the same content; null when not estimable. */
  readonly ratio: Estimate | null;
  /** The interval of the ratio just misses the flag line although the point is beyond it. */
  readonly nearLine: boolean;
  /** Sustained episodes per hour of observed work, and the peers' rate on the same units. */
  readonly sustainedPerHour: number | null;
  readonly peerSustainedPerHour: number | null;
  readonly sustainedEpisodes: number;
  readonly minutes: number;
  /** The class in which the student has most windows (for context beside a flag). */
  readonly classId: string;
  readonly schoolId: string;
  readonly reason: string;
}

/** One row of units.csv (and activities.csv, with activityId): unit × construct. */
export interface UnitIndicator {
  readonly unitId: string;
  /** Empty for a whole unit. */
  readonly activityId: string;
  readonly construct: string;
  readonly status: UnitStatus;
  /** Students with windows both here and elsewhere (the within-student comparison). */
  readonly students: number;
  readonly classes: number;
  readonly windows: number;
  /** Corrected share of time in this unit (raw mean probability in relative mode is not shown). */
  readonly share: number | null;
  /** Within-student difference, this unit minus elsewhere, on the share scale (percentage points / 100). */
  readonly effect: Estimate | null;
  readonly effectShrunk: number | null;
  readonly pValue: number | null;
  readonly qValue: number | null;
  /** Schools whose own estimate points the same way as the overall one, of those with enough students. */
  readonly schoolsAgreeing: number;
  readonly schoolsCompared: number;
  readonly reason: string;
}

export type GroupLevel = "district" | "school" | "class";

/** One row of groups.csv: group × construct. */
export interface GroupIndicator {
  readonly level: GroupLevel;
  readonly groupId: string;
  /** The school of a class; empty for schools and the district. */
  readonly parentId: string;
  readonly construct: string;
  readonly status: GroupStatus;
  readonly students: number;
  /** Corrected share, shrunk toward the district for classes and schools; null when withheld. */
  readonly share: Estimate | null;
  /** Content-adjusted ratio to other groups of the same level on the same units. */
  readonly ratio: Estimate | null;
  readonly reason: string;
}

/** One row of trends.csv: a student or group × construct × ISO week. */
export interface TrendRow {
  readonly level: "student" | GroupLevel;
  readonly id: string;
  readonly construct: string;
  /** ISO 8601 week, e.g. 2026-W37. */
  readonly week: string;
  readonly windows: number;
  readonly sessions: number;
  /** Corrected share (or, in relative mode, null); null also when withheld. */
  readonly share: Estimate | null;
  readonly withheld: boolean;
}

/** Per construct: how the figures were computed, for the methods page and the manifest. */
export interface ConstructMethod {
  readonly construct: string;
  readonly label: string;
  readonly mode: CorrectionMode;
  readonly usable: boolean;
  /** Intraclass correlation of the detector signal within sessions, pooled over students. */
  readonly withinSessionCorrelation: number;
  readonly note: string;
}

export interface Indicators {
  readonly students: readonly StudentIndicator[];
  readonly units: readonly UnitIndicator[];
  readonly activities: readonly UnitIndicator[];
  readonly groups: readonly GroupIndicator[];
  readonly trends: readonly TrendRow[];
  readonly methods: readonly ConstructMethod[];
}
