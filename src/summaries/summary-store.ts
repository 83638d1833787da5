/**
 * Session summaries in columns: the rows of closed sittings as numbers in typed arrays, the ids
 * kept once per sitting and once per part. A SessionSummary object costs about 200 bytes on the
 * heap; a row here costs 37, so a run of ten million windows (a million summaries) no longer holds
 * its result as objects. The rows come out in the order of compareSummaries, as objects made on
 * the fly (iterating the store) or written straight to sessions.csv (sessions-csv.ts), without a copy.
 *
 * The rows live in blocks of a fixed number of rows (the first block grows to that size), not in
 * arrays grown by doubling: doubling copied every row into arrays twice the size, left the old ones
 * to the garbage collector (about 40 MB of them by a million rows, though collected before the
 * peak: the peak memory did not change) and left up to half the capacity unused.
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

/** Rows of a block: 2^16 (about 2.4 MB of columns). */
export const BLOCK_ROWS_LOG2 = 16;

/** The columns of a block of rows; row r is at index r & (block size − 1) of block r >> log2(block size). */
export interface RowBlock {
  readonly part: Int32Array;
  readonly construct: Uint8Array;
  readonly windows: Int32Array;
  readonly sumP: Float64Array;
  readonly sumP2: Float64Array;
  readonly above: Int32Array;
  readonly episodes: Int32Array;
  readonly longest: Int32Array;
}

function newBlock(rows: number): RowBlock {
  return {
    part: new Int32Array(rows),
    construct: new Uint8Array(rows),
    windows: new Int32Array(rows),
    sumP: new Float64Array(rows),
    sumP2: new Float64Array(rows),
    above: new Int32Array(rows),
    episodes: new Int32Array(rows),
    longest: new Int32Array(rows),
  };
}

/** A block of `rows` rows holding the first rows of `b`. */
function grownBlock(b: RowBlock, rows: number): RowBlock {
  const out = newBlock(rows);
  out.part.set(b.part);
  out.construct.set(b.construct);
  out.windows.set(b.windows);
  out.sumP.set(b.sumP);
  out.sumP2.set(b.sumP2);
  out.above.set(b.above);
  out.episodes.set(b.episodes);
  out.longest.set(b.longest);
  return out;
}

export class SummaryStore implements Iterable<SessionSummary> {
  /** Per row, in blocks (the last is being filled). */
  private readonly blocks: RowBlock[];
  /** log2 of the rows of a full block, and that size less one (a row's index within its block). */
  readonly blockShift: number;
  readonly blockMask: number;
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
    /** log2 of the rows of a block (smaller in tests, to put block ends inside sittings). */
    blockRowsLog2 = BLOCK_ROWS_LOG2,
  ) {
    this.blockShift = blockRowsLog2;
    this.blockMask = (1 << blockRowsLog2) - 1;
    this.blocks = [newBlock(Math.min(1024, 1 << blockRowsLog2))];
  }

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
    const r = this.used;
    const b = this.roomFor(r);
    const i = r & this.blockMask;
    b.part[i] = part;
    b.construct[i] = construct;
    b.windows[i] = n.windows;
    b.sumP[i] = n.sumP;
    b.sumP2[i] = n.sumP2;
    b.above[i] = n.above;
    b.episodes[i] = n.episodes;
    b.longest[i] = n.longest;
    this.used = r + 1;
    this.rowCount[s]!++;
  }

  /** The block that holds row r (r is the next row), made or grown when needed. */
  private roomFor(r: number): RowBlock {
    const k = r >>> this.blockShift;
    if (k === this.blocks.length) this.blocks.push(newBlock(this.blockMask + 1));
    const b = this.blocks[k]!;
    if ((r & this.blockMask) < b.part.length) return b;
    // Only the first block grows (to a full block, by doubling).
    const grown = grownBlock(b, Math.min(b.part.length * 2, this.blockMask + 1));
    this.blocks[k] = grown;
    return grown;
  }

  /** The columns of the block holding row r (read only; valid until the next add). */
  blockOf(r: number): RowBlock {
    return this.blocks[r >>> this.blockShift]!;
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
        const b = this.blockOf(r);
        const i = r & this.blockMask;
        partUsed[b.part[i]!] = 1;
        windows[b.construct[i]!]! += b.windows[i]!;
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
      const b = this.blockOf(r);
      const i = r & this.blockMask;
      out[b.construct[i]!]! += b.windows[i]!;
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
    const first = count > 0 ? this.partOf(start) : 0;
    let onePart = true;
    for (let i = 0; i < count; i++) {
      rows[i] = start + i;
      if (this.partOf(start + i) !== first) onePart = false;
    }
    if (onePart) return rows;
    return rows.sort((x, y) => {
      const p = this.parts[this.partOf(x)]!;
      const q = this.parts[this.partOf(y)]!;
      return (
        cmp(p.classId, q.classId) ||
        cmp(p.schoolId, q.schoolId) ||
        cmp(p.unitId, q.unitId) ||
        cmp(p.activityId, q.activityId) ||
        this.constructOf(x) - this.constructOf(y)
      );
    });
  }

  private partOf(r: number): number {
    return this.blockOf(r).part[r & this.blockMask]!;
  }

  private constructOf(r: number): number {
    return this.blockOf(r).construct[r & this.blockMask]!;
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
    const b = this.blockOf(r);
    const i = r & this.blockMask;
    const part = this.parts[b.part[i]!]!;
    return {
      studentId: this.students[s]!,
      classId: part.classId,
      schoolId: part.schoolId,
      unitId: part.unitId,
      activityId: part.activityId,
      sessionId: this.sessions[s]!,
      day: this.days[this.dayOf[s]!]!,
      construct: this.keys[b.construct[i]!]!,
      windows: b.windows[i]!,
      sumP: b.sumP[i]! / SCALE,
      sumP2: b.sumP2[i]! / SCALE,
      above: b.above[i]!,
      sustainedEpisodes: b.episodes[i]!,
      longestRun: b.longest[i]!,
    };
  }

  /** The ids of sitting s (student, session, day). */
  sitting(s: number): { studentId: string; sessionId: string; day: string } {
    return { studentId: this.students[s]!, sessionId: this.sessions[s]!, day: this.days[this.dayOf[s]!]! };
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
