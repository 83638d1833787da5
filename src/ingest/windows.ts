/**
 * The windows file → session summaries, streamed.
 *
 * Pass 1 reads every row once, validates it, and feeds each sitting's accumulator while the
 * sitting's rows arrive in time order (the usual layout: sorted by student, session, time). A
 * sitting whose rows arrive out of order, or with a repeated window_start, is marked for replay
 * and its pass-1 sums are discarded.
 *
 * Replay (the "second pass" choice for unsorted input): the file is read again, and only the rows
 * of marked sittings are kept, compactly (time, part, line and one number per construct), in
 * batches that fit a fixed memory budget; each sitting is then sorted by time, its duplicates and
 * conflicts resolved without regard to the order they came in, and reduced exactly as in pass 1.
 * Sorted input never replays, so its memory does not grow with the number of windows; shuffled
 * input costs one more read per batch and stays within the budget.
 */
import { basename } from "node:path";
import type { Card, Settings } from "../config/types.js";
import { InputError } from "../errors.js";
import { msg, type RejectReason } from "../messages.js";
import { ConstructPlan, type PartIds, SessionAccumulator } from "../summaries/session-accumulator.js";
import { compareSummaries, type SessionSummary } from "../summaries/types.js";
import {
  findField,
  type RecordProblem,
  type RecordSink,
  type RecordView,
  readRecordsFromFile,
} from "./csv-records.js";
import { EMPTY, parseNumber } from "./number.js";
import { location, RowAccount } from "./quality.js";
import { parseTimestamp } from "./timestamp.js";

const REQUIRED = ["student_id", "class_id", "unit_id", "session_id", "window_start"] as const;
const OPTIONAL = ["school_id", "activity_id"] as const;
/** Memory for replaying out-of-order sittings, per batch. */
const REPLAY_BUDGET_BYTES = 128 * 1024 * 1024;

export interface ColumnAccount {
  readonly constructs: readonly string[];
  readonly ignored: readonly string[];
  readonly constructsWithoutColumn: readonly string[];
  readonly hasSchool: boolean;
  readonly hasActivity: boolean;
}

export interface WindowsResult {
  readonly file: string;
  readonly summaries: SessionSummary[];
  readonly account: RowAccount;
  readonly columns: ColumnAccount;
  readonly rowsWithoutEstimate: number;
  readonly estimates: readonly { construct: string; windows: number; missing: number }[];
  readonly sittings: number;
  readonly sittingsSpanningParts: number;
  readonly replayedSittings: number;
}

interface Layout {
  readonly fieldCount: number;
  /** student, session, class, school, unit, activity (school and activity -1 when absent). */
  readonly ids: Int32Array;
  readonly time: number;
  /** Column of each construct used, in card order. */
  readonly constructCols: Int32Array;
  readonly names: readonly string[];
  readonly columns: ColumnAccount;
}

const ID_NAMES = ["student_id", "session_id", "class_id", "school_id", "unit_id", "activity_id"] as const;

function layoutOf(
  file: string,
  header: readonly string[],
  card: Card,
): { layout: Layout; present: boolean[] } {
  const names = header.map((h) => h.trim().toLowerCase());
  const index = new Map<string, number>();
  names.forEach((name, i) => {
    if (index.has(name)) throw new InputError(msg.duplicateColumn(file, name));
    index.set(name, i);
  });
  const missing = REQUIRED.filter((c) => !index.has(c));
  if (missing.length > 0) throw new InputError(msg.missingColumns(file, missing, names));
  const present = card.constructs.map((c) => index.has(c.key));
  if (!present.some(Boolean)) {
    throw new InputError(
      msg.noConstructColumns(
        file,
        card.constructs.map((c) => c.key),
      ),
    );
  }
  const known = new Set<string>([...REQUIRED, ...OPTIONAL, ...card.constructs.map((c) => c.key)]);
  const constructs = card.constructs.filter((_, i) => present[i]).map((c) => c.key);
  return {
    present,
    layout: {
      fieldCount: names.length,
      ids: Int32Array.from(ID_NAMES.map((n) => index.get(n) ?? -1)),
      time: index.get("window_start")!,
      constructCols: Int32Array.from(constructs.map((k) => index.get(k)!)),
      names,
      columns: {
        constructs,
        ignored: names.filter((n) => !known.has(n)),
        constructsWithoutColumn: card.constructs.filter((_, i) => !present[i]).map((c) => c.key),
        hasSchool: index.has("school_id"),
        hasActivity: index.has("activity_id"),
      },
    },
  };
}

/** Rows of one sitting kept for replay. */
class ReplayBuffer {
  n = 0;
  times = new Float64Array(16);
  offsets = new Int16Array(16);
  parts = new Int32Array(16);
  lines = new Int32Array(16);
  values: Float64Array;
  constructor(private readonly k: number) {
    this.values = new Float64Array(16 * k);
  }
  push(time: number, offset: number, part: number, line: number, values: Float64Array): void {
    if (this.n === this.times.length) {
      const grow = <T extends Float64Array | Int32Array | Int16Array>(a: T, size: number): T => {
        const b = new (a.constructor as new (n: number) => T)(size);
        b.set(a);
        return b;
      };
      const size = this.n * 2;
      this.times = grow(this.times, size);
      this.offsets = grow(this.offsets, size);
      this.parts = grow(this.parts, size);
      this.lines = grow(this.lines, size);
      this.values = grow(this.values, size * this.k);
    }
    this.times[this.n] = time;
    this.offsets[this.n] = offset;
    this.parts[this.n] = part;
    this.lines[this.n] = line;
    this.values.set(values, this.n * this.k);
    this.n++;
  }
}

interface Sitting {
  readonly acc: SessionAccumulator;
  rows: number;
  replay: boolean;
  batch: number;
  buffer: ReplayBuffer | null;
}

/** Compares field bytes with the previous row's, so sorted input does not decode ids on every row. */
class PreviousIds {
  private readonly bytes = Buffer.alloc(1 << 16);
  private readonly start = new Int32Array(6);
  private readonly len = new Int32Array(6).fill(-1);
  valid = false;

  same(view: RecordView, slot: number, col: number): boolean {
    if (col < 0) return true;
    const s = view.starts[col]!;
    const n = view.ends[col]! - s;
    if (n !== this.len[slot]) return false;
    const buf = view.buf;
    const at = this.start[slot]!;
    for (let i = 0; i < n; i++) if (buf[s + i] !== this.bytes[at + i]) return false;
    return true;
  }

  remember(view: RecordView, ids: Int32Array): void {
    let at = 0;
    this.valid = true;
    for (let slot = 0; slot < 6; slot++) {
      const col = ids[slot]!;
      if (col < 0) continue;
      const s = view.starts[col]!;
      const n = view.ends[col]! - s;
      if (at + n > this.bytes.length) {
        this.valid = false;
        return;
      }
      view.buf.copy(this.bytes, at, s, s + n);
      this.start[slot] = at;
      this.len[slot] = n;
      at += n;
    }
  }
}

export function summarizeWindowsFile(
  path: string,
  card: Card,
  settings: Settings,
  onBytes?: (bytes: Buffer) => void,
): WindowsResult {
  const file = basename(path);
  const account = new RowAccount(file, settings);
  const sittings = new Map<string, Sitting>();
  const maxBytes = settings.maxFieldChars * 4;
  let layout: Layout | null = null;
  let plan: ConstructPlan | null = null;
  let values = new Float64Array(0);
  let sawHeader = false;
  const timeOut = { offsetMinutes: 0 };
  const prev = new PreviousIds();
  let current: Sitting | null = null;
  let currentPart = 0;
  /** 0 in pass 1; in replay, the batch being collected. */
  let pass = 0;

  const reject = (
    reason: RejectReason,
    line: number,
    column: number | undefined,
    name?: string,
    value?: string,
    detail?: string,
  ) => {
    if (pass > 0) return; // counted in pass 1
    account.reject(reason, {
      at: location(file, line, column),
      ...(name === undefined ? {} : { column: name }),
      ...(value === undefined ? {} : { value: value.length > 80 ? `${value.slice(0, 77)}...` : value }),
      ...(detail === undefined ? {} : { detail }),
    });
  };

  const onRow = (view: RecordView, lay: Layout, pl: ConstructPlan): void => {
    if (pass === 0) account.rowsRead++;
    if (view.count !== lay.fieldCount) {
      // Point at the first extra field, or just past the end of a row cut short.
      const at = Math.min(view.count, lay.fieldCount);
      const { value, detail } = msg.fieldCount(view.count, lay.names);
      reject("wrong-field-count", view.lineOf(at), view.column(at), undefined, value, detail);
      return;
    }
    const ids = lay.ids;
    for (let slot = 0; slot < 6; slot++) {
      const col = ids[slot]!;
      if (col < 0) continue;
      const n = view.ends[col]! - view.starts[col]!;
      if (n === 0 && slot !== 3 && slot !== 5) {
        reject("empty-id", view.lineOf(col), view.column(col), lay.names[col]);
        return;
      }
      if (n > settings.maxFieldChars && (n > maxBytes || view.text(col).length > settings.maxFieldChars)) {
        reject("long-field", view.lineOf(col), view.column(col), lay.names[col], view.text(col));
        return;
      }
    }
    const time = parseTimestamp(view.buf, view.starts[lay.time]!, view.ends[lay.time]!, timeOut);
    if (typeof time === "string") {
      reject(time, view.lineOf(lay.time), view.column(lay.time), "window_start", view.text(lay.time));
      return;
    }
    for (let k = 0; k < lay.constructCols.length; k++) {
      const col = lay.constructCols[k]!;
      const v = parseNumber(view.buf, view.starts[col]!, view.ends[col]!);
      if (v === EMPTY) {
        values[k] = Number.NaN;
        continue;
      }
      if (Number.isNaN(v)) {
        reject("not-number", view.lineOf(col), view.column(col), lay.names[col], view.text(col));
        return;
      }
      if (v < 0 || v > 1) {
        reject("out-of-range", view.lineOf(col), view.column(col), lay.names[col], view.text(col));
        return;
      }
      values[k] = v;
    }
    // Which sitting and part: skip decoding when the ids repeat the previous row's.
    const sameSitting =
      prev.valid && current !== null && prev.same(view, 0, ids[0]!) && prev.same(view, 1, ids[1]!);
    const samePart =
      sameSitting &&
      prev.same(view, 2, ids[2]!) &&
      prev.same(view, 3, ids[3]!) &&
      prev.same(view, 4, ids[4]!) &&
      prev.same(view, 5, ids[5]!);
    if (!sameSitting) {
      const student = view.text(ids[0]!);
      const session = view.text(ids[1]!);
      const key = `${student}\u0000${session}`;
      let sitting = sittings.get(key);
      if (!sitting) {
        if (pass > 0) throw new Error(`sitting ${key} appeared only in replay`);
        sitting = {
          acc: new SessionAccumulator(student, session, pl),
          rows: 0,
          replay: false,
          batch: 0,
          buffer: null,
        };
        sittings.set(key, sitting);
      }
      current = sitting;
    }
    const sitting = current!;
    if (!samePart) {
      const text = (slot: number): string => (ids[slot]! < 0 ? "" : view.text(ids[slot]!));
      const part: PartIds = { classId: text(2), schoolId: text(3), unitId: text(4), activityId: text(5) };
      currentPart = sitting.acc.partIndex(part);
    }
    if (!sameSitting || !samePart) prev.remember(view, ids);
    if (pass === 0) {
      sitting.rows++;
      if (sitting.replay) return;
      if (time <= sitting.acc.lastTime) {
        sitting.replay = true;
        return;
      }
      sitting.acc.add(time, timeOut.offsetMinutes, currentPart, values);
    } else if (sitting.replay && sitting.batch === pass) {
      sitting.buffer!.push(time, timeOut.offsetMinutes, currentPart, view.line, values);
    }
  };

  const sink: RecordSink = {
    record(view) {
      if (!sawHeader) {
        sawHeader = true;
        if (pass > 0) return;
        const header = Array.from({ length: view.count }, (_, i) => view.text(i));
        const built = layoutOf(file, header, card);
        layout = built.layout;
        plan = new ConstructPlan(card, built.present);
        values = new Float64Array(plan.keys.length);
        return;
      }
      onRow(view, layout!, plan!);
    },
    problem(problem: RecordProblem) {
      if (!sawHeader)
        throw new InputError(
          `${location(file, problem.line, problem.column)}: the header row: ${problem.detail}.`,
        );
      if (pass === 0) account.rowsRead++;
      const name = problem.field === undefined ? undefined : layout!.names[problem.field];
      // The UTF-8 detail only repeats the reason's text; the others say which case it is.
      const detail = problem.kind === "bad-utf8" ? undefined : problem.detail;
      reject(problem.kind, problem.line, problem.column, name, problem.value, detail);
    },
    blank() {
      if (pass === 0) account.blankLines++;
    },
  };

  const maxRecordBytes = Math.max(1 << 20, maxBytes * 64);
  const read = (): void => {
    sawHeader = false;
    current = null;
    prev.valid = false;
    try {
      readRecordsFromFile(path, sink, {
        maxRecordBytes,
        ...(pass === 0 && onBytes ? { onBytes } : {}),
      });
    } catch (error) {
      const code = (error as { code?: string }).code;
      if (code !== undefined && typeof code === "string" && code.startsWith("E")) {
        throw new InputError(msg.cannotRead(path, "windows file", error));
      }
      throw error;
    }
  };

  read();
  if (!sawHeader) throw new InputError(msg.emptyFile(path, "windows file"));
  if (account.rowsRead === 0) throw new InputError(msg.headerOnly(path, "windows file"));

  /**
   * Strict mode, rows that disagree: stop at the earliest of them, at a field where it differs from
   * another (read again from the file, as the replay keeps no columns).
   */
  const stopOnConflict: ConflictStop | null = settings.strict
    ? (s, b, rows, lines) => {
        const lay = layout!;
        const k = plan!.keys.length;
        const byLine = [...rows].sort((i, j) => b.lines[i]! - b.lines[j]!);
        const first = byLine[0]!;
        // A group holds at least two rows that differ, so some row differs from the first.
        let field = lay.time;
        for (const r of byLine) {
          const d = differingField(s, b, k, first, r);
          if (d === null) continue;
          if (d.kind === "part") field = lay.ids[d.slot]!;
          else if (d.kind === "value") field = lay.constructCols[d.construct]!;
          break;
        }
        const line = b.lines[first]!;
        const place = findField(path, line, field, { maxRecordBytes });
        account.reject("conflict", {
          at: location(file, place?.line ?? line, place?.column),
          column: lay.names[field]!,
          ...(place ? { value: place.text } : {}),
          detail: msg.conflictWith(line, lines),
        });
      }
    : null;

  const replayed = planReplay(sittings, plan!.keys.length);
  for (let batch = 1; batch <= replayed.batches; batch++) {
    pass = batch;
    for (const s of sittings.values())
      if (s.replay && s.batch === batch) s.buffer = new ReplayBuffer(plan!.keys.length);
    read();
    for (const s of sittings.values()) {
      if (s.replay && s.batch === batch) {
        replaySitting(s, plan!.keys.length, account, file, stopOnConflict);
        s.buffer = null;
      }
    }
  }

  const summaries: SessionSummary[] = [];
  let spanning = 0;
  let rowsWithoutEstimate = 0;
  const estimated = new Float64Array(plan!.keys.length);
  const constructIndex = new Map(plan!.keys.map((key, i) => [key, i]));
  for (const s of sittings.values()) {
    const rows = s.acc.finish();
    if (s.acc.parts.length > 1) spanning++;
    rowsWithoutEstimate += s.acc.rowsWithoutEstimate;
    for (const r of rows) {
      summaries.push(r);
      estimated[constructIndex.get(r.construct)!]! += r.windows;
    }
  }
  summaries.sort(compareSummaries(constructIndex));
  const lay = layout as Layout | null;
  return {
    file,
    summaries,
    account,
    columns: lay!.columns,
    rowsWithoutEstimate,
    estimates: plan!.keys.map((construct, k) => ({
      construct,
      windows: estimated[k]!,
      missing: account.accepted - estimated[k]!,
    })),
    sittings: sittings.size,
    sittingsSpanningParts: spanning,
    replayedSittings: replayed.count,
  };
}

function planReplay(sittings: Map<string, Sitting>, k: number): { batches: number; count: number } {
  const bytesPerRow = 8 + 2 + 4 + 4 + 8 * k;
  const rowsPerBatch = Math.max(1, Math.floor(REPLAY_BUDGET_BYTES / bytesPerRow));
  let batch = 0;
  let used = rowsPerBatch;
  let count = 0;
  for (const s of sittings.values()) {
    if (!s.replay) continue;
    count++;
    if (used + s.rows > rowsPerBatch) {
      batch++;
      used = 0;
    }
    s.batch = batch;
    used += s.rows;
  }
  return { batches: batch, count };
}

/** Stops the run on buffered rows of a sitting that share a window_start but disagree (strict mode). */
type ConflictStop = (s: Sitting, b: ReplayBuffer, rows: readonly number[], lines: readonly number[]) => void;

const PART_SLOTS = [
  ["classId", 2],
  ["schoolId", 3],
  ["unitId", 4],
  ["activityId", 5],
] as const;

/**
 * The first field in which buffered rows i and j of a sitting differ: an id of the part (its slot
 * in Layout.ids), a construct's value, or else the window_start's UTC offset (the same instant
 * written two ways); null when they agree.
 */
function differingField(
  s: Sitting,
  b: ReplayBuffer,
  k: number,
  i: number,
  j: number,
): { kind: "part"; slot: number } | { kind: "value"; construct: number } | { kind: "time" } | null {
  if (b.parts[i] !== b.parts[j]) {
    const p = s.acc.parts[b.parts[i]!]!;
    const q = s.acc.parts[b.parts[j]!]!;
    for (const [key, slot] of PART_SLOTS) if (p[key] !== q[key]) return { kind: "part", slot };
  }
  for (let c = 0; c < k; c++) {
    const x = b.values[i * k + c]!;
    const y = b.values[j * k + c]!;
    if (x !== y && !(Number.isNaN(x) && Number.isNaN(y))) return { kind: "value", construct: c };
  }
  return b.offsets[i] === b.offsets[j] ? null : { kind: "time" };
}

/** Sorts one sitting's rows by time, sets aside duplicates and conflicts, and reduces it in order. */
function replaySitting(
  s: Sitting,
  k: number,
  account: RowAccount,
  file: string,
  stopOnConflict: ConflictStop | null,
): void {
  const b = s.buffer!;
  const order = Array.from({ length: b.n }, (_, i) => i);
  const rowCompare = (i: number, j: number): number => {
    if (b.parts[i] !== b.parts[j]) return b.parts[i]! - b.parts[j]!;
    for (let c = 0; c < k; c++) {
      const x = b.values[i * k + c]!;
      const y = b.values[j * k + c]!;
      if (x === y || (Number.isNaN(x) && Number.isNaN(y))) continue;
      if (Number.isNaN(x)) return -1;
      if (Number.isNaN(y)) return 1;
      return x - y;
    }
    return b.offsets[i]! - b.offsets[j]!;
  };
  order.sort((i, j) => b.times[i]! - b.times[j]! || rowCompare(i, j) || b.lines[i]! - b.lines[j]!);
  s.acc.reset();
  const values = new Float64Array(k);
  let i = 0;
  while (i < order.length) {
    let j = i + 1;
    while (j < order.length && b.times[order[j]!] === b.times[order[i]!]) j++;
    const first = order[i]!;
    let identical = true;
    for (let m = i + 1; m < j; m++) if (rowCompare(first, order[m]!) !== 0) identical = false;
    if (!identical) {
      const rows = order.slice(i, j);
      const lines = rows.map((r) => b.lines[r]!);
      stopOnConflict?.(s, b, rows, lines);
      for (const line of lines)
        account.reject("conflict", { at: location(file, line), value: msg.conflictWith(line, lines) });
    } else {
      for (let m = i + 1; m < j; m++) {
        const at = location(file, b.lines[order[m]!]!);
        account.duplicate({ at, value: `same window as line ${b.lines[first]}` });
      }
      values.set(b.values.subarray(first * k, first * k + k));
      s.acc.add(b.times[first]!, b.offsets[first]!, b.parts[first]!, values);
    }
    i = j;
  }
}
