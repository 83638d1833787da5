/**
 * Reduces one sitting's windows, given in time order, to its session summaries. Memory per sitting
 * is a few numbers per construct, whatever the number of windows.
 *
 * Sums are kept exactly: each (calibrated) probability is rounded to a whole multiple of 10^-12 (an error
 * of at most 5e-13 per window, none for inputs of up to 12 decimals) and the multiples are added as integers, which doubles hold exactly up to
 * 2^53, that is 9007 windows of probability 1 in one part of a sitting (50 hours of 20-second windows). So the
 * sums do not depend on the order the rows arrived in, and the output is byte-identical.
 *
 * Runs: for each construct, the windows with an estimate in time order; a run is a maximal stretch
 * of above-threshold windows each starting within 1.5 window lengths of the previous one's start
 * (DATA-CONTRACT.md), between windows with an estimate for the construct: a window without one is
 * skipped, and it ends a run only through the time gap it leaves (more than 1.5 window lengths).
 * When a sitting spans several units (or classes, schools, activities), each run is credited to the
 * part in which it started.
 */

import { calibrator } from "../config/card.js";
import type { Card } from "../config/types.js";
import { SCALE } from "./scale.js";
import {
  SEG_ABOVE,
  SEG_EPISODES,
  SEG_FIRST,
  SEG_LAST,
  SEG_LEAD,
  SEG_LONGEST,
  SEG_OPEN,
  SEG_STRIDE,
  SEG_SUM_P,
  SEG_SUM_P2,
  SEG_WINDOWS,
} from "./segment.js";
import type { RowNumbers, SummaryStore } from "./summary-store.js";
import type { SessionSummary } from "./types.js";

export { SCALE };

// Layout of a part's accumulator: six numbers per construct.
const WINDOWS = 0;
const SUM_P = 1;
const SUM_P2 = 2;
const ABOVE = 3;
const EPISODES = 4;
const LONGEST = 5;
const STRIDE = 6;

export interface PartIds {
  readonly classId: string;
  readonly schoolId: string;
  readonly unitId: string;
  readonly activityId: string;
}

export interface Part extends PartIds {
  /** The caller's number for these ids (the same ids always come with the same number). */
  readonly id: number;
  readonly acc: Float64Array;
}

/** What the accumulator needs of the card, prepared once. */
export class ConstructPlan {
  readonly keys: readonly string[];
  readonly thresholds: Float64Array;
  readonly minRun: Int32Array;
  readonly calibrate: readonly (((p: number) => number) | null)[];
  /** Largest gap between consecutive window starts, in ms, that still counts as adjacent. */
  readonly adjacentMs: number;

  constructor(card: Card, present: readonly boolean[]) {
    const used = card.constructs.filter((_, i) => present[i]);
    this.keys = used.map((c) => c.key);
    this.thresholds = Float64Array.from(used.map((c) => c.threshold));
    this.minRun = Int32Array.from(used.map((c) => c.sustainedMinWindows));
    this.calibrate = used.map((c) => calibrator(c.calibration));
    this.adjacentMs = 1.5 * card.windowSeconds * 1000 + 1e-6;
  }
}

export class SessionAccumulator {
  readonly parts: Part[] = [];
  firstTime = Number.POSITIVE_INFINITY;
  firstOffsetMinutes = 0;
  lastTime = Number.NEGATIVE_INFINITY;
  /** Windows that carried no estimate for any construct. */
  rowsWithoutEstimate = 0;
  /** Zeroed sums arrays of earlier parts, for reuse (see restart). */
  private readonly spare: Float64Array[] = [];
  private readonly runLength: Int32Array;
  private readonly runPart: Int32Array;
  private readonly lastEstimate: Float64Array;

  constructor(
    public studentId: string,
    public sessionId: string,
    private readonly plan: ConstructPlan,
  ) {
    const k = plan.keys.length;
    this.runLength = new Int32Array(k);
    this.runPart = new Int32Array(k);
    this.lastEstimate = new Float64Array(k).fill(Number.NEGATIVE_INFINITY);
  }

  /**
   * The index, in this sitting, of the part the caller numbers `id` (with these ids), added when
   * new. Parts are indexed in the order they were first given.
   */
  partIndex(id: number, ids: PartIds): number {
    for (let i = 0; i < this.parts.length; i++) if (this.parts[i]!.id === id) return i;
    const acc = this.spare.pop() ?? new Float64Array(this.plan.keys.length * STRIDE);
    this.parts.push({
      classId: ids.classId,
      schoolId: ids.schoolId,
      unitId: ids.unitId,
      activityId: ids.activityId,
      id,
      acc,
    });
    return this.parts.length - 1;
  }

  /**
   * Starts over for another sitting (no parts, no sums), so that one object serves many in turn;
   * the parts' sums arrays are kept for the next parts (allocating them was a tenth of the cost of
   * a sorted file's sittings).
   */
  restart(studentId: string, sessionId: string): void {
    this.studentId = studentId;
    this.sessionId = sessionId;
    this.reset();
    for (const part of this.parts) this.spare.push(part.acc);
    this.parts.length = 0;
  }

  /** Clears every sum and run (the parts are kept), before replaying the sitting in order. */
  reset(): void {
    for (const part of this.parts) part.acc.fill(0);
    this.runLength.fill(0);
    this.lastEstimate.fill(Number.NEGATIVE_INFINITY);
    this.firstTime = Number.POSITIVE_INFINITY;
    this.lastTime = Number.NEGATIVE_INFINITY;
    this.rowsWithoutEstimate = 0;
  }

  /**
   * Adds a window that starts after every window added so far. `values[k]` is the raw probability
   * of construct k, NaN when not estimated.
   */
  add(time: number, offsetMinutes: number, part: number, values: Float64Array): void {
    const plan = this.plan;
    if (time < this.firstTime) {
      this.firstTime = time;
      this.firstOffsetMinutes = offsetMinutes;
    }
    this.lastTime = time;
    const acc = this.parts[part]!.acc;
    let any = false;
    for (let k = 0; k < values.length; k++) {
      const p = values[k]!;
      if (Number.isNaN(p)) continue; // NaN: not estimated
      any = true;
      const cal = plan.calibrate[k];
      const pc = cal ? cal(p) : p;
      const base = k * STRIDE;
      acc[base + WINDOWS]!++;
      acc[base + SUM_P]! += Math.round(pc * SCALE);
      acc[base + SUM_P2]! += Math.round(pc * pc * SCALE);
      if (p >= plan.thresholds[k]!) {
        acc[base + ABOVE]!++;
        if (this.runLength[k]! > 0 && time - this.lastEstimate[k]! <= plan.adjacentMs) {
          this.runLength[k]!++;
        } else {
          this.closeRun(k);
          this.runLength[k] = 1;
          this.runPart[k] = part;
        }
      } else {
        this.closeRun(k);
      }
      this.lastEstimate[k] = time;
    }
    if (!any) this.rowsWithoutEstimate++;
  }

  /**
   * Adds a segment (segment.ts) of windows that all start after every window added so far, with
   * the same result as adding them one by one: `seg` holds its numbers per construct from `at`;
   * `firstTime` and `firstOffsetMinutes` are its first window's, `lastTime` its last window's, and
   * `withoutEstimate` counts its windows without any estimate.
   */
  merge(
    part: number,
    seg: Float64Array,
    at: number,
    firstTime: number,
    firstOffsetMinutes: number,
    lastTime: number,
    withoutEstimate: number,
  ): void {
    const plan = this.plan;
    if (firstTime < this.firstTime) {
      this.firstTime = firstTime;
      this.firstOffsetMinutes = firstOffsetMinutes;
    }
    this.lastTime = lastTime;
    this.rowsWithoutEstimate += withoutEstimate;
    const acc = this.parts[part]!.acc;
    const runLength = this.runLength;
    for (let k = 0; k < plan.keys.length; k++) {
      const b = at + k * SEG_STRIDE;
      const windows = seg[b + SEG_WINDOWS]!;
      if (windows === 0) continue;
      const base = k * STRIDE;
      acc[base + WINDOWS]! += windows;
      acc[base + SUM_P]! += seg[b + SEG_SUM_P]!;
      acc[base + SUM_P2]! += seg[b + SEG_SUM_P2]!;
      acc[base + ABOVE]! += seg[b + SEG_ABOVE]!;
      const whole = seg[b + SEG_LEAD]! < 0;
      const lead = whole ? seg[b + SEG_OPEN]! : seg[b + SEG_LEAD]!;
      if (lead > 0) {
        if (runLength[k]! > 0 && seg[b + SEG_FIRST]! - this.lastEstimate[k]! <= plan.adjacentMs) {
          runLength[k]! += lead;
        } else {
          this.closeRun(k);
          runLength[k] = lead;
          this.runPart[k] = part;
        }
      } else this.closeRun(k);
      if (!whole) {
        this.closeRun(k);
        acc[base + EPISODES]! += seg[b + SEG_EPISODES]!;
        if (seg[b + SEG_LONGEST]! > acc[base + LONGEST]!) acc[base + LONGEST] = seg[b + SEG_LONGEST]!;
        const open = seg[b + SEG_OPEN]!;
        if (open > 0) {
          runLength[k] = open;
          this.runPart[k] = part;
        }
      }
      this.lastEstimate[k] = seg[b + SEG_LAST]!;
    }
  }

  private closeRun(k: number): void {
    const length = this.runLength[k]!;
    if (length === 0) return;
    const acc = this.parts[this.runPart[k]!]!.acc;
    const base = k * STRIDE;
    if (length >= this.plan.minRun[k]!) acc[base + EPISODES]!++;
    if (length > acc[base + LONGEST]!) acc[base + LONGEST] = length;
    this.runLength[k] = 0;
  }

  /**
   * Ends open runs and adds one row per part × construct with at least one estimate to the store,
   * as sitting `sitting`; the same rows as finish(), without making objects. Parts are named by
   * the caller's numbers (Part.id).
   */
  finishInto(store: SummaryStore, sitting: number): void {
    for (let k = 0; k < this.plan.keys.length; k++) this.closeRun(k);
    store.beginSitting(sitting, localDay(this.firstTime, this.firstOffsetMinutes));
    for (const part of this.parts) {
      const acc = part.acc;
      for (let k = 0; k < this.plan.keys.length; k++) {
        const base = k * STRIDE;
        const windows = acc[base + WINDOWS]!;
        if (windows === 0) continue;
        ROW.windows = windows;
        ROW.sumP = acc[base + SUM_P]!;
        ROW.sumP2 = acc[base + SUM_P2]!;
        ROW.above = acc[base + ABOVE]!;
        ROW.episodes = acc[base + EPISODES]!;
        ROW.longest = acc[base + LONGEST]!;
        store.add(sitting, part.id, k, ROW);
      }
    }
  }

  /** Ends open runs and returns one summary per part × construct with at least one estimate. */
  finish(): SessionSummary[] {
    for (let k = 0; k < this.plan.keys.length; k++) this.closeRun(k);
    const day = localDay(this.firstTime, this.firstOffsetMinutes);
    const out: SessionSummary[] = [];
    for (const part of this.parts) {
      for (let k = 0; k < this.plan.keys.length; k++) {
        const base = k * STRIDE;
        const windows = part.acc[base + WINDOWS]!;
        if (windows === 0) continue;
        out.push({
          studentId: this.studentId,
          classId: part.classId,
          schoolId: part.schoolId,
          unitId: part.unitId,
          activityId: part.activityId,
          sessionId: this.sessionId,
          day,
          construct: this.plan.keys[k]!,
          // Counts are whole numbers well below 2^30: `| 0` keeps them small integers in the
          // object rather than boxed doubles (a third of the memory of a summary).
          windows: windows | 0,
          sumP: part.acc[base + SUM_P]! / SCALE,
          sumP2: part.acc[base + SUM_P2]! / SCALE,
          above: part.acc[base + ABOVE]! | 0,
          sustainedEpisodes: part.acc[base + EPISODES]! | 0,
          longestRun: part.acc[base + LONGEST]! | 0,
        });
      }
    }
    return out;
  }
}

/** finishInto's scratch row (one object, not one per row). */
const ROW: RowNumbers = { windows: 0, sumP: 0, sumP2: 0, above: 0, episodes: 0, longest: 0 };

/** YYYY-MM-DD of an instant seen at a UTC offset (Hinnant's civil_from_days). */
export function localDay(time: number, offsetMinutes: number): string {
  const z = Math.floor((time + offsetMinutes * 60000) / 86400000) + 719468;
  const era = Math.floor(z / 146097);
  const doe = z - era * 146097;
  const yoe = Math.floor(
    (doe - Math.floor(doe / 1460) + Math.floor(doe / 36524) - Math.floor(doe / 146096)) / 365,
  );
  const doy = doe - (365 * yoe + Math.floor(yoe / 4) - Math.floor(yoe / 100));
  const mp = Math.floor((5 * doy + 2) / 153);
  const d = doy - Math.floor((153 * mp + 2) / 5) + 1;
  const m = mp < 10 ? mp + 3 : mp - 9;
  const y = yoe + era * 400 + (m <= 2 ? 1 : 0);
  return `${String(y).padStart(4, "0")}-${String(m).padStart(2, "0")}-${String(d).padStart(2, "0")}`;
}
