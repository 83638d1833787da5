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
/** The run that begins at the first estimate: its length when it ended inside the segment (0: the first estimate was below). */
export const SEG_LEAD = 4;
/** The run open at the last estimate: its length (0: none). */
export const SEG_OPEN = 5;
/** Runs that began and ended inside the segment, after the leading one: how many were sustained, the longest. */
export const SEG_EPISODES = 6;
export const SEG_LONGEST = 7;
/** Times of the first and the last estimate. */
export const SEG_FIRST = 8;
export const SEG_LAST = 9;
/** 1 while every estimate so far belongs to the leading run. */
export const SEG_WHOLE = 10;
export const SEG_STRIDE = 11;

/**
 * Adds a window to the segment whose per-construct numbers start at `at` in `seg` (zeroed, with
 * SEG_WHOLE at 1, by startSegment). `values[k]` is the raw probability, NaN when not estimated.
 * Returns whether the window carried any estimate.
 */
export function addToSegment(
  plan: ConstructPlan,
  seg: Float64Array,
  at: number,
  time: number,
  values: Float64Array,
): boolean {
  let any = false;
  for (let k = 0; k < values.length; k++) {
    const p = values[k]!;
    if (Number.isNaN(p)) continue;
    any = true;
    const cal = plan.calibrate[k];
    const pc = cal ? cal(p) : p;
    const b = at + k * SEG_STRIDE;
    const first = seg[b + SEG_WINDOWS] === 0;
    seg[b + SEG_WINDOWS]!++;
    seg[b + SEG_SUM_P]! += Math.round(pc * SCALE);
    seg[b + SEG_SUM_P2]! += Math.round(pc * pc * SCALE);
    if (p >= plan.thresholds[k]!) {
      seg[b + SEG_ABOVE]!++;
      if (first) seg[b + SEG_OPEN] = 1;
      else if (seg[b + SEG_OPEN]! > 0 && time - seg[b + SEG_LAST]! <= plan.adjacentMs) seg[b + SEG_OPEN]!++;
      else {
        closeSegmentRun(plan, seg, b, k);
        seg[b + SEG_OPEN] = 1;
      }
    } else closeSegmentRun(plan, seg, b, k);
    if (first) seg[b + SEG_FIRST] = time;
    seg[b + SEG_LAST] = time;
  }
  return any;
}

function closeSegmentRun(plan: ConstructPlan, seg: Float64Array, b: number, k: number): void {
  const length = seg[b + SEG_OPEN]!;
  if (seg[b + SEG_WHOLE] === 1) {
    seg[b + SEG_LEAD] = length;
    seg[b + SEG_WHOLE] = 0;
  } else if (length > 0) {
    if (length >= plan.minRun[k]!) seg[b + SEG_EPISODES]!++;
    if (length > seg[b + SEG_LONGEST]!) seg[b + SEG_LONGEST] = length;
  }
  seg[b + SEG_OPEN] = 0;
}

/** Zeroes a segment's numbers for `constructs` constructs from `at`. */
export function startSegment(seg: Float64Array, at: number, constructs: number): void {
  seg.fill(0, at, at + constructs * SEG_STRIDE);
  for (let k = 0; k < constructs; k++) seg[at + k * SEG_STRIDE + SEG_WHOLE] = 1;
}
