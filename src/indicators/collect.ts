import type { SessionSummary } from "../summaries/types.js";
import type { Correction } from "./correction.js";

/**
 * One construct's session summaries regrouped for the estimators: per student (with sessions as
 * clusters), per unit, per activity, per class and school. The "signal" of a window is its
 * probability, or 1/0 for at/below the threshold when the correction works from sensitivity and
 * specificity (correction.ts).
 */
export interface Cell {
  n: number;
  s: number;
  s2: number;
}

export interface SessionCell extends Cell {
  readonly day: string;
  readonly week: string;
}

export interface StudentData {
  readonly studentId: string;
  n: number;
  s: number;
  s2: number;
  episodes: number;
  readonly sessions: Map<string, SessionCell>;
  /** Per unit: windows, signal and sustained episodes. */
  readonly units: Map<string, Cell & { episodes: number }>;
  /** Per unit + activity (key `unit\u0000activity`). */
  readonly activities: Map<string, Cell>;
  /** Per class and per school: windows and signal, with the sessions in them by week. */
  readonly classes: Map<string, GroupPart>;
  readonly schools: Map<string, GroupPart>;
  readonly days: Set<string>;
}

export interface GroupPart extends Cell {
  readonly units: Map<string, Cell>;
  readonly weeks: Map<string, Cell & { sessions: Set<string> }>;
}

export interface ConstructData {
  readonly construct: string;
  readonly students: Map<string, StudentData>;
  /** Totals per unit over all students: windows, signal, sustained episodes. */
  readonly units: Map<string, Cell & { episodes: number; classes: Set<string> }>;
  readonly classSchool: Map<string, string>;
  /** Student ids in sorted order (the order of every per-student output and resample). */
  readonly order: readonly string[];
}

export function activityKey(unitId: string, activityId: string): string {
  return `${unitId}\u0000${activityId}`;
}

function cell(): Cell {
  return { n: 0, s: 0, s2: 0 };
}

function add(target: Cell, n: number, s: number, s2: number): void {
  target.n += n;
  target.s += s;
  target.s2 += s2;
}

/** ISO 8601 week (YYYY-Www) of a YYYY-MM-DD date: weeks start on Monday; week 1 holds the year's first Thursday. */
export function isoWeek(day: string): string {
  const [y, m, d] = day.split("-").map(Number) as [number, number, number];
  const date = new Date(Date.UTC(y, m - 1, d));
  const weekday = (date.getUTCDay() + 6) % 7; // Monday 0 … Sunday 6
  date.setUTCDate(date.getUTCDate() - weekday + 3); // the Thursday of this week decides its year
  const year = date.getUTCFullYear();
  const week = 1 + Math.floor((date.getTime() - Date.UTC(year, 0, 1)) / (7 * 86_400_000));
  return `${year}-W${String(week).padStart(2, "0")}`;
}

function groupPart(): GroupPart {
  return { n: 0, s: 0, s2: 0, units: new Map(), weeks: new Map() };
}

export function collectConstruct(
  construct: string,
  summaries: readonly SessionSummary[],
  correction: Correction,
): ConstructData {
  const students = new Map<string, StudentData>();
  const units = new Map<string, Cell & { episodes: number; classes: Set<string> }>();
  const classSchool = new Map<string, string>();
  const weekOf = new Map<string, string>();
  for (const row of summaries) {
    if (row.construct !== construct) continue;
    const s = correction.usesThreshold ? row.above : row.sumP;
    const s2 = correction.usesThreshold ? row.above : row.sumP2;
    const n = row.windows;
    let student = students.get(row.studentId);
    if (!student) {
      student = {
        studentId: row.studentId,
        n: 0,
        s: 0,
        s2: 0,
        episodes: 0,
        sessions: new Map(),
        units: new Map(),
        activities: new Map(),
        classes: new Map(),
        schools: new Map(),
        days: new Set(),
      };
      students.set(row.studentId, student);
    }
    add(student, n, s, s2);
    student.episodes += row.sustainedEpisodes;
    student.days.add(row.day);
    let week = weekOf.get(row.day);
    if (week === undefined) {
      week = isoWeek(row.day);
      weekOf.set(row.day, week);
    }
    let session = student.sessions.get(row.sessionId);
    if (!session) {
      session = { n: 0, s: 0, s2: 0, day: row.day, week };
      student.sessions.set(row.sessionId, session);
    }
    add(session, n, s, s2);
    let unit = student.units.get(row.unitId);
    if (!unit) {
      unit = { n: 0, s: 0, s2: 0, episodes: 0 };
      student.units.set(row.unitId, unit);
    }
    add(unit, n, s, s2);
    unit.episodes += row.sustainedEpisodes;
    if (row.activityId !== "") {
      const key = activityKey(row.unitId, row.activityId);
      let activity = student.activities.get(key);
      if (!activity) {
        activity = cell();
        student.activities.set(key, activity);
      }
      add(activity, n, s, s2);
    }
    for (const [map, id] of [
      [student.classes, row.classId],
      [student.schools, row.schoolId],
    ] as const) {
      let part = map.get(id);
      if (!part) {
        part = groupPart();
        map.set(id, part);
      }
      add(part, n, s, s2);
      let pu = part.units.get(row.unitId);
      if (!pu) {
        pu = cell();
        part.units.set(row.unitId, pu);
      }
      add(pu, n, s, s2);
      let pw = part.weeks.get(week);
      if (!pw) {
        pw = { n: 0, s: 0, s2: 0, sessions: new Set() };
        part.weeks.set(week, pw);
      }
      add(pw, n, s, s2);
      pw.sessions.add(row.sessionId);
    }
    let total = units.get(row.unitId);
    if (!total) {
      total = { n: 0, s: 0, s2: 0, episodes: 0, classes: new Set() };
      units.set(row.unitId, total);
    }
    add(total, n, s, s2);
    total.episodes += row.sustainedEpisodes;
    total.classes.add(row.classId);
    if (!classSchool.has(row.classId)) classSchool.set(row.classId, row.schoolId);
  }
  return { construct, students, units, classSchool, order: [...students.keys()].sort() };
}

/** The key of the largest entry of a map of cells (ties: the first in sorted key order). */
export function largest(map: ReadonlyMap<string, Cell>): string {
  let best = "";
  let bestN = -1;
  for (const key of [...map.keys()].sort()) {
    const n = map.get(key)?.n ?? 0;
    if (n > bestN) {
      best = key;
      bestN = n;
    }
  }
  return best;
}
