/**
 * quality.json and the readable account that `check` prints: rows read, accepted, rejected by
 * reason with examples, duplicates, columns ignored, constructs without data, roster coverage and
 * the period covered.
 */
import type { Card } from "../config/types.js";
import { msg } from "../messages.js";
import { SummaryStore } from "../summaries/summary-store.js";
import type { SessionSummary } from "../summaries/types.js";
import type { Example, ReasonCount, RowAccount } from "./quality.js";
import type { Roster } from "./roster.js";

export interface FileAccount {
  readonly file: string;
  readonly kind: "windows" | "sessions" | "roster";
  readonly rows_read: number;
  readonly rows_accepted: number;
  readonly rows_rejected: number;
  readonly duplicates: number;
  readonly blank_lines: number;
  readonly rejected_by_reason: readonly ReasonCount[];
  readonly duplicate_examples: readonly Example[];
  readonly columns_ignored: readonly string[];
}

export interface Quality {
  readonly inputs: readonly FileAccount[];
  readonly constructs: readonly {
    construct: string;
    label: string;
    windows_with_estimate: number;
    windows_without_estimate: number | null;
  }[];
  readonly constructs_missing_from_card: readonly string[];
  readonly card_constructs_without_data: readonly string[];
  readonly rows_without_any_estimate: number | null;
  readonly students: number;
  readonly sessions: number;
  readonly sessions_spanning_several_units_or_classes: number | null;
  readonly sessions_replayed_for_order: number | null;
  readonly classes: number;
  readonly schools: number;
  readonly units: number;
  readonly roster: {
    readonly students_without_roster_entry: number;
    readonly examples: readonly string[];
    readonly roster_students_without_data: number;
    readonly school_taken_from_roster: number;
  } | null;
  readonly period: {
    readonly first_day: string | null;
    readonly last_day: string | null;
    readonly days: number;
  };
  readonly period_filter: {
    readonly from: string | null;
    readonly to: string | null;
    readonly session_rows_outside: number;
  };
  readonly notes: readonly string[];
}

export function fileAccount(
  kind: FileAccount["kind"],
  account: RowAccount,
  ignored: readonly string[],
): FileAccount {
  return {
    file: account.file,
    kind,
    rows_read: account.rowsRead,
    rows_accepted: account.accepted,
    rows_rejected: account.rejected,
    duplicates: account.duplicates,
    blank_lines: account.blankLines,
    rejected_by_reason: account.byReason(),
    duplicate_examples: account.duplicateExamples,
    columns_ignored: ignored,
  };
}

export interface QualityInput {
  readonly card: Card;
  readonly files: readonly FileAccount[];
  readonly summaries: Iterable<SessionSummary>;
  readonly constructsInData: readonly string[];
  readonly estimates: readonly { construct: string; windows: number; missing: number }[] | null;
  readonly rowsWithoutEstimate: number | null;
  readonly sittingsSpanning: number | null;
  readonly replayed: number | null;
  readonly unknownConstructs: readonly string[];
  readonly roster: Roster | null;
  readonly schoolFromRoster: number;
  readonly studentsWithoutRoster: readonly string[];
  readonly period: { from: string | null; to: string | null; outside: number };
  readonly notes: readonly string[];
}

/** The distinct ids and days of the summaries, and the windows per construct. */
export interface Census {
  readonly students: Set<string>;
  readonly sessions: number;
  readonly classes: Set<string>;
  readonly schools: Set<string>;
  readonly units: Set<string>;
  readonly days: Set<string>;
  readonly windowsBy: Map<string, number>;
}

/** The census of summaries given as objects (a SummaryStore takes its own, from its columns). */
function censusOf(summaries: Iterable<SessionSummary>): Census {
  if (summaries instanceof SummaryStore) return summaries.census();
  const students = new Set<string>();
  const sessions = new Set<string>();
  const classes = new Set<string>();
  const schools = new Set<string>();
  const units = new Set<string>();
  const days = new Set<string>();
  const windowsBy = new Map<string, number>();
  // Summaries mostly come sorted, several to a session: a value that repeats the previous row's
  // adds nothing new to its set, so only changes are added.
  let last: SessionSummary | null = null;
  for (const s of summaries) {
    if (last === null || s.studentId !== last.studentId || s.sessionId !== last.sessionId) {
      students.add(s.studentId);
      sessions.add(`${s.studentId}\u0000${s.sessionId}`);
    }
    if (last === null || s.day !== last.day) days.add(s.day);
    if (last === null || s.classId !== last.classId) classes.add(s.classId);
    if (last === null || s.schoolId !== last.schoolId) schools.add(s.schoolId);
    if (last === null || s.unitId !== last.unitId) units.add(s.unitId);
    windowsBy.set(s.construct, (windowsBy.get(s.construct) ?? 0) + s.windows);
    last = s;
  }
  return { students, sessions: sessions.size, classes, schools, units, days, windowsBy };
}

export function buildQuality(q: QualityInput): Quality {
  const { students, sessions, classes, schools, units, days, windowsBy } = censusOf(q.summaries);
  const sortedDays = [...days].sort();
  const rosterIds = q.roster ? [...q.roster.entries.keys()] : [];
  return {
    inputs: q.files,
    constructs: q.card.constructs
      .filter((c) => q.constructsInData.includes(c.key))
      .map((c) => {
        const e = q.estimates?.find((x) => x.construct === c.key);
        return {
          construct: c.key,
          label: c.label,
          windows_with_estimate: windowsBy.get(c.key) ?? 0,
          windows_without_estimate: e ? e.missing : null,
        };
      }),
    constructs_missing_from_card: q.unknownConstructs,
    card_constructs_without_data: q.card.constructs
      .filter((c) => !q.constructsInData.includes(c.key))
      .map((c) => c.key),
    rows_without_any_estimate: q.rowsWithoutEstimate,
    students: students.size,
    sessions,
    sessions_spanning_several_units_or_classes: q.sittingsSpanning,
    sessions_replayed_for_order: q.replayed,
    classes: classes.size,
    schools: schools.size,
    units: units.size,
    roster: q.roster
      ? {
          students_without_roster_entry: q.studentsWithoutRoster.length,
          examples: q.studentsWithoutRoster.slice(0, 20),
          roster_students_without_data: rosterIds.filter((id) => !students.has(id)).length,
          school_taken_from_roster: q.schoolFromRoster,
        }
      : null,
    period: {
      first_day: sortedDays[0] ?? null,
      last_day: sortedDays[sortedDays.length - 1] ?? null,
      days: days.size,
    },
    period_filter: { from: q.period.from, to: q.period.to, session_rows_outside: q.period.outside },
    notes: q.notes,
  };
}

const n = (x: number): string => x.toLocaleString("en-US");

/** The account as plain lines for a terminal. */
export function formatQuality(quality: Quality): string[] {
  const out: string[] = [];
  for (const f of quality.inputs) {
    out.push(`${f.file} (${f.kind})`);
    out.push(`  rows read        ${n(f.rows_read)}`);
    out.push(`  accepted         ${n(f.rows_accepted)}`);
    out.push(`  rejected         ${n(f.rows_rejected)}`);
    out.push(`  duplicates       ${n(f.duplicates)} (each counted once)`);
    if (f.blank_lines > 0) out.push(`  blank lines      ${n(f.blank_lines)} (skipped)`);
    for (const r of f.rejected_by_reason) {
      out.push(`  ${n(r.count)} rejected: ${r.text}`);
      for (const e of r.examples.slice(0, 5)) {
        const detail = [e.column, e.value === undefined ? undefined : JSON.stringify(e.value)]
          .filter(Boolean)
          .join(" ");
        out.push(`      at ${e.at}${detail ? `  ${detail}` : ""}`);
        if (e.detail) out.push(`         ${e.detail}`);
      }
      if (r.count > Math.min(5, r.examples.length)) out.push("      (more examples in quality.json)");
    }
    for (const e of f.duplicate_examples.slice(0, 3)) out.push(`  duplicate at ${e.at}: ${e.value ?? ""}`);
    if (f.columns_ignored.length > 0) out.push(`  ${msg.unknownColumns(f.columns_ignored)}`);
  }
  out.push("");
  out.push(
    `Data: ${n(quality.students)} students, ${n(quality.sessions)} sessions, ${n(quality.classes)} classes, ${n(quality.schools)} schools, ${n(quality.units)} units`,
  );
  if (quality.period.first_day) {
    out.push(
      `Period: ${quality.period.first_day} to ${quality.period.last_day} (${n(quality.period.days)} days with data)`,
    );
  }
  for (const c of quality.constructs) {
    const missing = c.windows_without_estimate === null ? "" : `, ${n(c.windows_without_estimate)} without`;
    out.push(
      `  ${c.label} (${c.construct}): ${n(c.windows_with_estimate)} windows with an estimate${missing}`,
    );
  }
  if (quality.card_constructs_without_data.length > 0)
    out.push(msg.constructsWithoutColumn(quality.card_constructs_without_data));
  if (quality.constructs_missing_from_card.length > 0) {
    out.push(
      `constructs in the data but not in the card (rows rejected): ${quality.constructs_missing_from_card.join(", ")}`,
    );
  }
  if (quality.rows_without_any_estimate)
    out.push(`${n(quality.rows_without_any_estimate)} windows carry no estimate at all`);
  if (quality.sessions_spanning_several_units_or_classes) {
    out.push(
      `${n(quality.sessions_spanning_several_units_or_classes)} sessions span several units, classes or activities (summarised per part)`,
    );
  }
  if (quality.roster) {
    const r = quality.roster;
    out.push(
      `Roster: ${n(r.students_without_roster_entry)} students in the data have no roster entry (kept)${r.examples.length > 0 ? `, e.g. ${r.examples.slice(0, 3).join(", ")}` : ""}; ${n(r.roster_students_without_data)} roster students have no data`,
    );
  }
  const pf = quality.period_filter;
  if (pf.from !== null || pf.to !== null) {
    out.push(
      `Period setting ${pf.from ?? "start"} to ${pf.to ?? "end"}: ${n(pf.session_rows_outside)} session rows outside it were left out`,
    );
  }
  for (const note of quality.notes) out.push(`Note: ${note}`);
  return out;
}
