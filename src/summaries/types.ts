/** The session summary: the seam of the data contract between ingest (or an external engine) and indicators. */

/** One row per student × session × construct (split further by class, school, unit and activity when a sitting spans several). */
export interface SessionSummary {
  readonly studentId: string;
  readonly classId: string;
  /** Empty when neither the data nor the roster names a school. */
  readonly schoolId: string;
  readonly unitId: string;
  /** Empty when the data has no activity_id. */
  readonly activityId: string;
  readonly sessionId: string;
  /** Local date (YYYY-MM-DD) of the session's first window, as written in its offset. */
  readonly day: string;
  readonly construct: string;
  /** Windows with an estimate for this construct (≥ 1). */
  readonly windows: number;
  /** Sum of the (calibrated) probabilities. */
  readonly sumP: number;
  /** Sum of their squares. */
  readonly sumP2: number;
  /** Windows whose raw probability is at least the construct's threshold. */
  readonly above: number;
  /** Runs of consecutive above-threshold windows at least the card's minimum long. */
  readonly sustainedEpisodes: number;
  /** Longest run of consecutive above-threshold windows (any length). */
  readonly longestRun: number;
}

/** Column order of sessions.csv (activity_id only when the data has it). */
export const SESSION_COLUMNS = [
  "student_id",
  "class_id",
  "school_id",
  "unit_id",
  "activity_id",
  "session_id",
  "day",
  "construct",
  "windows",
  "sum_p",
  "sum_p2",
  "above",
  "sustained_episodes",
  "longest_run",
] as const;

/** Deterministic order for summaries: by student, session, then the part ids, then card order of constructs. */
export function compareSummaries(constructOrder: ReadonlyMap<string, number>) {
  const cmp = (a: string, b: string): number => (a < b ? -1 : a > b ? 1 : 0);
  return (a: SessionSummary, b: SessionSummary): number =>
    cmp(a.studentId, b.studentId) ||
    cmp(a.sessionId, b.sessionId) ||
    cmp(a.day, b.day) ||
    cmp(a.classId, b.classId) ||
    cmp(a.schoolId, b.schoolId) ||
    cmp(a.unitId, b.unitId) ||
    cmp(a.activityId, b.activityId) ||
    (constructOrder.get(a.construct) ?? 0) - (constructOrder.get(b.construct) ?? 0);
}
