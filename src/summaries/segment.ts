/**
 * A segment: consecutive rows of one sitting and one part, in strictly increasing time, reduced
 * where they were parsed (the worker thread, windows-thread.ts) so that the reducing thread adds
 * a few numbers per construct instead of every row (SessionAccumulator.merge). The result is the
 * same as adding the rows one by one: the sums are integers (see SCALE), and the runs are kept as
 * the run that begins at the segment's first estimate (which may continue a run of the rows
 * before), the runs wholly inside it, and the run still open at its last estimate.
 */
import { SCALE } from "./scale.js";
import type { ConstructPlan } from "./session-accumulator.js";

// Per construct: estimates, sums (integer multiples of 1/SCALE), windows above the threshold.
export const SEG_WINDOWS = 0;
export const SEG_SUM_P = 1;
export const SEG_SUM_P2 = 2;
export const SEG_ABOVE = 3;
/**
 * The run that begins at the first estimate: its length once it has ended inside the segment (0:
 * the first estimate was below the threshold); -1 while it has not ended (every estimate so far
 * belongs to it, or there is none yet).
 */
export const SEG_LEAD = 4;
/** The run open at the last estimate: its length (0: none). */
export const SEG_OPEN = 5;
/** Runs that began and ended inside the segment, after the leading one: how many were sustained, the longest. */
export const SEG_EPISODES = 6;
export const SEG_LONGEST = 7;
/** Times of the first and the last estimate. */
export const SEG_FIRST = 8;
export const SEG_LAST = 9;
export const SEG_STRIDE = 10;

/**
 * Adds a window to the segment whose per-construct numbers start at `at` in `seg` (as
 * startSegment leaves them). `values[k]` is the raw probability, NaN when not estimated. Returns
 * whether the window carried any estimate.
 */
export function addToSegment(
  plan: ConstructPlan,
  seg: Float64Array,
  at: number,
  time: number,
  values: Float64Array,
): boolean {
  const { thresholds, minRun, calibrate, adjacentMs } = plan;
  let any = false;
  for (let k = 0, b = at; k < values.length; k++, b += SEG_STRIDE) {
    const p = values[k]!;
    if (Number.isNaN(p)) continue;
    any = true;
    const cal = calibrate[k];
    const pc = cal ? cal(p) : p;
    if (seg[b + SEG_WINDOWS] === 0) seg[b + SEG_FIRST] = time;
    seg[b + SEG_WINDOWS]! += 1;
    seg[b + SEG_SUM_P]! += Math.round(pc * SCALE);
    seg[b + SEG_SUM_P2]! += Math.round(pc * pc * SCALE);
    const open = seg[b + SEG_OPEN]!;
    if (p >= thresholds[k]!) {
      seg[b + SEG_ABOVE]! += 1;
      // No run open: the first estimate starts the leading run, a later one a new run.
      if (open === 0) seg[b + SEG_OPEN] = 1;
      else if (time - seg[b + SEG_LAST]! <= adjacentMs) seg[b + SEG_OPEN] = open + 1;
      else {
        closeSegmentRun(seg, b, open, minRun[k]!);
        seg[b + SEG_OPEN] = 1;
      }
    } else if (open > 0 || seg[b + SEG_LEAD]! < 0) {
      // Ends the open run; with none, the first estimate below the threshold: no leading run.
      closeSegmentRun(seg, b, open, minRun[k]!);
      seg[b + SEG_OPEN] = 0;
    }
    seg[b + SEG_LAST] = time;
  }
  return any;
}

function closeSegmentRun(seg: Float64Array, b: number, length: number, minRun: number): void {
  if (seg[b + SEG_LEAD]! < 0) seg[b + SEG_LEAD] = length;
  else {
    if (length >= minRun) seg[b + SEG_EPISODES]! += 1;
    if (length > seg[b + SEG_LONGEST]!) seg[b + SEG_LONGEST] = length;
  }
}

/** Makes ready a segment's numbers for `constructs` constructs from `at`. */
export function startSegment(seg: Float64Array, at: number, constructs: number): void {
  seg.fill(0, at, at + constructs * SEG_STRIDE);
  for (let k = 0; k < constructs; k++) seg[at + k * SEG_STRIDE + SEG_LEAD] = -1;
}
