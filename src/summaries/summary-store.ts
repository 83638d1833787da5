/**
 * Session summaries in columns: the rows of closed sittings as numbers in typed arrays, the ids
 * kept once per sitting and once per part. A SessionSummary object costs about 200 bytes on the
 * heap; a row here costs 37, so a run of ten million windows (a million summaries) no longer holds
 * its result as objects. The rows come out in the order of compareSummaries, as objects made on
 * the fly (iterating the store) or written straight to sessions.csv (sessions-csv.ts), without a copy.
 */

import type { PartIds } from "./session-accumulator.js";
import { SCALE } from "./session-accumulator.js";
import type { SessionSummary } from "./types.js";

/** The numbers of one row, as the accumulator hands them over (sums as whole multiples of 1e-12). */
export interface RowNumbers {
  windows: number;
  sumP: number;
  sumP2: number;
  above: number;
  episodes: number;
  longest: number;
}

export class SummaryStore implements Iterable<SessionSummary> {
  /** Per row. */
  private part = new Int32Array(1024);
  private construct = new Uint8Array(1024);
  private windows = new Int32Array(1024);
  private sumP = new Float64Array(1024);
  private sumP2 = new Float64Array(1024);
  private above = new Int32Array(1024);
  private episodes = new Int32Array(1024);
  private longest = new Int32Array(1024);
  private used = 0;
  /** Per sitting: its rows (start, count; count 0 for none), and its day as an index into days. */
  private rowStart = new Int32Array(1024);
  private rowCount = new Int32Array(1024);
  private dayOf = new Int32Array(1024);
  private readonly days: string[] = [];
  private readonly dayIndex = new Map<string, number>();
  /** Sittings in output order, set by seal(). */
  private order: Int32Array | null = null;

  constructor(
    /** Construct keys by index (card order). */
    readonly keys: readonly string[],
    /** Ids of each sitting and part, by the ingest's numbers; the store reads them, never changes them. */
    readonly students: readonly string[],
    readonly sessions: readonly string[],
    readonly parts: readonly PartIds[],
  ) {}

  /** Rows of the kept sittings (a sitting kept again replaces its earlier rows). */
  get length(): number {
    let n = 0;
    for (let s = 0; s < this.rowCount.length; s++) n += this.rowCount[s]!;
    return n;
  }

  /**
   * Starts the rows of sitting s (replacing any it had: a sitting replayed after it was closed is
   * kept again; its earlier rows stay in the arrays, unread, which is at most one copy per sitting).
   */
  beginSitting(s: number, day: string): void {
    if (s >= this.rowStart.length) {
      const size = Math.max(s + 1, this.rowStart.length * 2);
      this.rowStart = grow(this.rowStart, size);
      this.rowCount = grow(this.rowCount, size);
      this.dayOf = grow(this.dayOf, size);
    }
    let d = this.dayIndex.get(day);
    if (d === undefined) {
      d = this.days.length;
      this.days.push(day);
      this.dayIndex.set(day, d);
    }
    this.rowStart[s] = this.used;
    this.rowCount[s] = 0;
    this.dayOf[s] = d;
    this.order = null;
  }

  /** Forgets sitting s's rows (its pass-1 sums, dropped when it is marked for replay). */
  drop(s: number): void {
    if (s < this.rowCount.length) this.rowCount[s] = 0;
    this.order = null;
  }

  /** Adds a row to the sitting begun last. */
  add(s: number, part: number, construct: number, n: RowNumbers): void {
    if (this.used === this.part.length) this.growRows();
    const r = this.used++;
    this.part[r] = part;
    this.construct[r] = construct;
    this.windows[r] = n.windows;
    this.sumP[r] = n.sumP;
    this.sumP2[r] = n.sumP2;
    this.above[r] = n.above;
    this.episodes[r] = n.episodes;
    this.longest[r] = n.longest;
    this.rowCount[s]!++;
  }

  private growRows(): void {
    const size = this.part.length * 2;
    this.part = grow(this.part, size);
    this.construct = grow(this.construct, size);
    this.windows = grow(this.windows, size);
    this.sumP = grow(this.sumP, size);
    this.sumP2 = grow(this.sumP2, size);
    this.above = grow(this.above, size);
    this.episodes = grow(this.episodes, size);
    this.longest = grow(this.longest, size);
  }

  /**
   * The distinct students, sittings, classes, schools, units and days of the kept rows, and the
   * windows per construct, read from the columns (quality-report.ts; the same as going through
   * the rows as objects, without making them).
   */
  census(): {
    students: Set<string>;
    sessions: number;
    classes: Set<string>;
    schools: Set<string>;
    units: Set<string>;
    days: Set<string>;
    windowsBy: Map<string, number>;
  } {
    const students = new Set<string>();
    const days = new Set<string>();
    const partUsed = new Uint8Array(this.parts.length);
    const windows = new Float64Array(this.keys.length);
    let sessions = 0;
    const n = Math.min(this.rowCount.length, this.students.length);
    for (let s = 0; s < n; s++) {
      const count = this.rowCount[s]!;
      if (count === 0) continue;
      sessions++;
      students.add(this.students[s]!);
      days.add(this.days[this.dayOf[s]!]!);
      const start = this.rowStart[s]!;
      for (let r = start; r < start + count; r++) {
        partUsed[this.part[r]!] = 1;
        windows[this.construct[r]!]! += this.windows[r]!;
      }
    }
    const classes = new Set<string>();
    const schools = new Set<string>();
    const units = new Set<string>();
    for (let p = 0; p < partUsed.length; p++) {
      if (partUsed[p] === 0) continue;
      const part = this.parts[p]!;
      classes.add(part.classId);
      schools.add(part.schoolId);
      units.add(part.unitId);
    }
    const windowsBy = new Map<string, number>();
    for (let k = 0; k < this.keys.length; k++) {
      if (windows[k]! > 0) windowsBy.set(this.keys[k]!, windows[k]!);
    }
    return { students, sessions, classes, schools, units, days, windowsBy };
  }

  /** Windows with an estimate, per construct, over the kept rows. */
  windowsByConstruct(): Float64Array {
    const out = new Float64Array(this.keys.length);
    this.eachRow((r) => {
      out[this.construct[r]!]! += this.windows[r]!;
    });
    return out;
  }

  /**
   * Row numbers in output order: sittings by student and session, then each sitting's rows by the
   * part's ids and the card's order of constructs (the order of compareSummaries; two sittings never
   * share student and session, and a sitting has one day). Sorting sittings, not rows, is most of
   * the saving: a sitting has a handful of rows, already in construct order within a part.
   */
  private eachRow(visit: (row: number, sitting: number) => void): void {
    for (const s of this.sittingOrder()) for (const r of this.rowsOf(s)) visit(r, s);
  }

  /** Sitting s's rows in output order. */
  rowsOf(s: number): readonly number[] {
    const start = this.rowStart[s]!;
    const count = this.rowCount[s]!;
    const rows: number[] = new Array(count);
    let onePart = true;
    for (let i = 0; i < count; i++) {
      rows[i] = start + i;
      if (this.part[start + i] !== this.part[start]) onePart = false;
    }
    if (onePart) return rows;
    return rows.sort((x, y) => {
      const p = this.parts[this.part[x]!]!;
      const q = this.parts[this.part[y]!]!;
      return (
        cmp(p.classId, q.classId) ||
        cmp(p.schoolId, q.schoolId) ||
        cmp(p.unitId, q.unitId) ||
        cmp(p.activityId, q.activityId) ||
        this.construct[x]! - this.construct[y]!
      );
    });
  }

  /** Sittings with rows, by student and session. */
  sittingOrder(): Int32Array {
    if (this.order) return this.order;
    const n = Math.min(this.rowCount.length, this.students.length);
    const order: number[] = [];
    for (let s = 0; s < n; s++) if (this.rowCount[s]! > 0) order.push(s);
    order.sort(
      (a, b) => cmp(this.students[a]!, this.students[b]!) || cmp(this.sessions[a]!, this.sessions[b]!),
    );
    this.order = Int32Array.from(order);
    return this.order;
  }

  /** The rows as SessionSummary objects, in output order, each made when it is reached. */
  *[Symbol.iterator](): Generator<SessionSummary> {
    for (const s of this.sittingOrder()) for (const r of this.rowsOf(s)) yield this.summary(r, s);
  }

  /** All rows as objects (for `build`, whose indicators take an array). */
  toArray(): SessionSummary[] {
    const all: SessionSummary[] = [];
    this.eachRow((r, s) => all.push(this.summary(r, s)));
    return all;
  }

  private summary(r: number, s: number): SessionSummary {
    const part = this.parts[this.part[r]!]!;
    return {
      studentId: this.students[s]!,
      classId: part.classId,
      schoolId: part.schoolId,
      unitId: part.unitId,
      activityId: part.activityId,
      sessionId: this.sessions[s]!,
      day: this.days[this.dayOf[s]!]!,
      construct: this.keys[this.construct[r]!]!,
      windows: this.windows[r]!,
      sumP: this.sumP[r]! / SCALE,
      sumP2: this.sumP2[r]! / SCALE,
      above: this.above[r]!,
      sustainedEpisodes: this.episodes[r]!,
      longestRun: this.longest[r]!,
    };
  }

  /** The ids of sitting s (student, session, day). */
  sitting(s: number): { studentId: string; sessionId: string; day: string } {
    return { studentId: this.students[s]!, sessionId: this.sessions[s]!, day: this.days[this.dayOf[s]!]! };
  }

  /**
   * The row columns themselves, for writers that go through many rows (sessions-csv.ts); read
   * only, and valid until the next add.
   */
  columns(): {
    readonly part: Int32Array;
    readonly construct: Uint8Array;
    readonly windows: Int32Array;
    readonly sumP: Float64Array;
    readonly sumP2: Float64Array;
    readonly above: Int32Array;
    readonly episodes: Int32Array;
    readonly longest: Int32Array;
  } {
    const { part, construct, windows, sumP, sumP2, above, episodes, longest } = this;
    return { part, construct, windows, sumP, sumP2, above, episodes, longest };
  }

  /** Row r's raw columns, for writers that format numbers themselves (sums as multiples of 1e-12). */
  row(r: number): { part: PartIds; construct: string } & RowNumbers {
    return {
      part: this.parts[this.part[r]!]!,
      construct: this.keys[this.construct[r]!]!,
      windows: this.windows[r]!,
      sumP: this.sumP[r]!,
      sumP2: this.sumP2[r]!,
      above: this.above[r]!,
      episodes: this.episodes[r]!,
      longest: this.longest[r]!,
    };
  }
}

function cmp(a: string, b: string): number {
  return a < b ? -1 : a > b ? 1 : 0;
}

function grow<T extends Int32Array | Uint8Array | Float64Array>(a: T, size: number): T {
  const b = new (a.constructor as new (n: number) => T)(size);
  b.set(a);
  return b;
}
