/**
 * The windows file → session summaries, streamed.
 *
 * Pass 1 reads every row once, validates it, and feeds each sitting's accumulator while the
 * sitting's rows arrive in time order (the usual layouts: sorted by student, session and time, or
 * by time across sittings). Most rows take a fast path that reads the fields straight from the
 * bytes of the line: ids are compared in place with the previous row's, and decoded (and looked
 * up, by their bytes, in ByteKeyTable) only when they change; numbers and times are parsed from
 * bytes. Any row the fast path cannot read plainly (quotes, non-ASCII bytes, spaces, exponents, a
 * value to reject) goes the ordinary way, through the CSV reader's fields and the checks below,
 * which give every rejection its message.
 *
 * Sittings are closed (reduced to their summaries, their accumulators freed) when more than a
 * limit are open (OPEN_SITTINGS_FIRST, growing), least recently seen first, so memory does not
 * grow with the number of sittings being read.
 *
 * Unsorted input: a sitting whose row arrives out of time order, with a repeated window_start, or
 * after the sitting was closed, is marked for replay; its pass-1 sums are discarded, and from then
 * on its rows are set aside on disk in buckets of sittings (replay-spill.ts says why buckets, and
 * why in that order). The rows it had before the mark are read again in a second pass that stops at
 * the last such line (for a shuffled file, early: a sitting is marked within its first few rows).
 * Then each bucket is read back, each sitting's rows sorted by time, duplicates and conflicts
 * resolved without regard to the order they came in, and reduced exactly as in pass 1. Sorted input
 * never replays and writes nothing to disk.
 */
import { closeSync, fstatSync, mkdtempSync, openSync, readSync, statSync } from "node:fs";
import { availableParallelism, tmpdir } from "node:os";
import { basename, join } from "node:path";
import type { Card, Settings } from "../config/types.js";
import { InputError } from "../errors.js";
import { msg, type RejectReason } from "../messages.js";
import { ConstructPlan, type PartIds, SessionAccumulator } from "../summaries/session-accumulator.js";
import { SummaryStore } from "../summaries/summary-store.js";
import type { SessionSummary } from "../summaries/types.js";
import { ByteKeyTable } from "./byte-key-table.js";
import {
  findField,
  type ReadEnd,
  type RecordProblem,
  type RecordSink,
  type RecordView,
  readRecordsFromFile,
} from "./csv-records.js";
import { EMPTY, parseNumber } from "./number.js";
import { type Example, location, RowAccount } from "./quality.js";
import { SpillBuckets } from "./replay-spill.js";
import { parseTimestamp, TimestampReader } from "./timestamp.js";
import { workerParts } from "./windows-thread.js";

const REQUIRED = ["student_id", "class_id", "unit_id", "session_id", "window_start"] as const;
const OPTIONAL = ["school_id", "activity_id"] as const;
/** Memory for the rows of replayed sittings held at once (a bucket, or part of one). */
const REPLAY_BUDGET_BYTES = 64 * 1024 * 1024;
/**
 * Sittings accumulating at once: beyond this many, the least recently seen half is closed, and a
 * closed sitting that comes back is replayed. A file sorted by sitting needs one open at a time; a
 * file sorted by time interleaves the sittings under way at the same moment (a few thousand in a
 * large district). So the limit starts low and doubles each time a closed sitting comes back, up
 * to OPEN_SITTINGS_MAX: an open sitting costs 1–3 KB with what the garbage collector keeps beside
 * it, and a fixed 16,384 held about 50 MB more at the peak of a sorted ten-million-row file than
 * 2,048 (bench/RESULTS.md). A file sorted by time pays with the replay of the sittings closed
 * before the limit reached what it needs (about that many sittings, once).
 */
const OPEN_SITTINGS_FIRST = 1024;
const OPEN_SITTINGS_MAX = 16384;
/** 2^12 sittings per replay bucket. */
const BUCKET_SHIFT = 12;

export interface ColumnAccount {
  readonly constructs: readonly string[];
  readonly ignored: readonly string[];
  readonly constructsWithoutColumn: readonly string[];
  readonly hasSchool: boolean;
  readonly hasActivity: boolean;
}

export interface WindowsResult {
  readonly file: string;
  /** The summaries in columns, in the order of compareSummaries (summarize writes them from here). */
  readonly store: SummaryStore;
  /** The same as objects, made when first asked for. */
  readonly summaries: SessionSummary[];
  readonly account: RowAccount;
  readonly columns: ColumnAccount;
  readonly rowsWithoutEstimate: number;
  readonly estimates: readonly { construct: string; windows: number; missing: number }[];
  readonly sittings: number;
  readonly sittingsSpanningParts: number;
  readonly replayedSittings: number;
}

/** What a column holds, for the fast path. */
const ROLE_OTHER = 0;
const ROLE_ID = 1;
const ROLE_VALUE = 2;
const ROLE_TIME = 3;

/** Id slots: student, session, class, school, unit, activity. */
const ID_NAMES = ["student_id", "session_id", "class_id", "school_id", "unit_id", "activity_id"] as const;
const SCHOOL = 3;
const ACTIVITY = 5;
/** Bit masks over the id slots. */
const SITTING_SLOTS = 0b000011;
const PART_SLOTS = 0b111100;
const ALL_SLOTS = 0b111111;

export interface Layout {
  readonly fieldCount: number;
  /** Column of each id slot (school and activity -1 when absent). */
  readonly ids: Int32Array;
  readonly sittingCols: Int32Array;
  readonly partCols: Int32Array;
  readonly time: number;
  /** Column of each construct used, in card order. */
  readonly constructCols: Int32Array;
  /** Per column: ROLE_*, and its id slot or construct index. */
  readonly roles: Int8Array;
  readonly roleArgs: Int32Array;
  /**
   * How many columns from the first hold ids, when every id column is among them (0 otherwise):
   * a row whose first `idLead` fields repeat the previous row's bytes repeats all its ids.
   */
  readonly idLead: number;
  readonly names: readonly string[];
  readonly columns: ColumnAccount;
}

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
  const ids = Int32Array.from(ID_NAMES.map((n) => index.get(n) ?? -1));
  const constructCols = Int32Array.from(constructs.map((k) => index.get(k)!));
  const roles = new Int8Array(names.length).fill(ROLE_OTHER);
  const roleArgs = new Int32Array(names.length);
  ids.forEach((col, slot) => {
    if (col < 0) return;
    roles[col] = ROLE_ID;
    roleArgs[col] = slot;
  });
  constructCols.forEach((col, k) => {
    roles[col] = ROLE_VALUE;
    roleArgs[col] = k;
  });
  roles[index.get("window_start")!] = ROLE_TIME;
  let idLead = 0;
  while (idLead < roles.length && roles[idLead] === ROLE_ID) idLead++;
  if (ids.some((col) => col >= idLead)) idLead = 0;
  return {
    present,
    layout: {
      fieldCount: names.length,
      ids,
      sittingCols: ids.slice(0, 2),
      partCols: ids.slice(2, 6),
      time: index.get("window_start")!,
      constructCols,
      roles,
      roleArgs,
      idLead,
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

/** The previous row's id bytes, so sorted input does not decode or look up ids on every row. */
class PreviousIds {
  readonly bytes = Buffer.alloc(1 << 16);
  readonly start = new Int32Array(6);
  readonly len = new Int32Array(6).fill(-1);
  valid = false;
  /**
   * The ids are plain (ASCII, no comma or quote), so a plain line that repeats them byte for byte
   * holds them as the same fields; ids decoded from a quoted record may hold a comma.
   */
  plain = false;

  same(buf: Uint8Array, starts: Int32Array, ends: Int32Array, slot: number, col: number): boolean {
    if (col < 0) return true;
    const s = starts[col]!;
    const n = ends[col]! - s;
    if (n !== this.len[slot]) return false;
    const at = this.start[slot]!;
    for (let i = 0; i < n; i++) if (buf[s + i] !== this.bytes[at + i]) return false;
    return true;
  }

  /**
   * The previous row's first Layout.idLead fields with the comma after them, as bytes (length 0
   * when not known: set by the fast path only), compared four bytes at a time through `leadView`.
   */
  readonly lead = Buffer.alloc(1 << 12);
  readonly leadView = new DataView(this.lead.buffer, this.lead.byteOffset, this.lead.length);
  leadLength = 0;

  /** Keeps bytes [from, to) of buf as the row's leading id fields (when they fit). */
  rememberLead(buf: Uint8Array, from: number, to: number): void {
    const n = to - from;
    if (n > this.lead.length) return;
    const lead = this.lead;
    for (let i = 0; i < n; i++) lead[i] = buf[from + i]!;
    this.leadLength = n;
  }

  /** Whether buf, seen through `view`, repeats the leading id fields from `at` (see lead). */
  sameLead(buf: Uint8Array, view: DataView, at: number, end: number): boolean {
    const n = this.leadLength;
    if (n === 0 || at + n > end) return false;
    const lead = this.leadView;
    let i = 0;
    for (; i + 4 <= n; i += 4) if (view.getInt32(at + i) !== lead.getInt32(i)) return false;
    for (; i < n; i++) if (buf[at + i] !== this.lead[i]) return false;
    return true;
  }

  remember(buf: Buffer, starts: Int32Array, ends: Int32Array, ids: Int32Array): void {
    this.leadLength = 0;
    let at = 0;
    this.valid = true;
    this.plain = true;
    for (let slot = 0; slot < 6; slot++) {
      const col = ids[slot]!;
      if (col < 0) continue;
      const s = starts[col]!;
      const n = ends[col]! - s;
      if (at + n > this.bytes.length) {
        this.valid = false;
        return;
      }
      // Ids are short: a loop costs less than Buffer.copy's call.
      const bytes = this.bytes;
      for (let i = 0; i < n; i++) {
        const c = buf[s + i]!;
        if (c === 34 || c === 44 || c > 127) this.plain = false;
        bytes[at + i] = c;
      }
      this.start[slot] = at;
      this.len[slot] = n;
      at += n;
    }
  }
}

/** Where a sitting is: accumulating, closed (summaries kept), or marked for replay. */
const OPEN = 0;
const CLOSED = 1;
const REPLAY = 2;

const POW10 = Array.from({ length: 23 }, (_, i) => 10 ** i);

/** Thrown to end the second pass once it has passed the last line it needs. */
const STOP = new Error("stop");

export interface WindowsOptions {
  /** Sees every byte of the file, in order (to hash it in the same pass); keeps the reading in this thread. */
  readonly onBytes?: ((bytes: Buffer) => void) | undefined;
  /**
   * 2 to have a worker thread parse parts of the file while this thread reads the others
   * (ROUND_BYTES, windows-thread.ts); 1 for one thread. Default: defaultThreads.
   */
  readonly threads?: number | undefined;
  /**
   * For tests: where the parts start (line starts, ascending), the first part [0, parts[0]) read
   * here, the next by the worker, and so on alternately; and the worker's parser run in this thread.
   */
  readonly parts?: readonly number[] | undefined;
  readonly workerHere?: boolean | undefined;
}

/**
 * Two threads read the file in rounds of ROUND_BYTES: the worker parses a part of a round, which
 * this thread then reduces, and this thread parses and reduces the rest. The worker parses its next
 * part while this thread reads its own, so the rows waiting between them stay within a round (a few
 * MB), whatever the file's size. This thread's share depends on the order of the rows, which
 * this thread sees in the first PROBE_BYTES: sorted rows cost the worker less to parse (ids repeat
 * the previous row's) than this thread to reduce, so it takes a small share; rows that change
 * sitting on almost every row (shuffled) cost the parser lookups, and this thread takes more.
 */
const ROUND_BYTES = 32 * 1024 * 1024;
const PROBE_BYTES = 1024 * 1024;
const SORTED_SHARE = 0.46;
const SHUFFLED_SHARE = 0.35;

/** Files from this size on are read by two threads when two cores are there: below it, starting a worker does not pay. */
const THREAD_MIN_BYTES = 32 * 1024 * 1024;

/** 2 for a file of at least THREAD_MIN_BYTES on a machine with two cores or more, else 1. */
export function defaultThreads(path: string): number {
  let size = 0;
  try {
    size = statSync(path).size;
  } catch {
    return 1; // the reader gives the message
  }
  return size >= THREAD_MIN_BYTES && availableParallelism() >= 2 ? 2 : 1;
}

export function summarizeWindowsFile(
  path: string,
  card: Card,
  settings: Settings,
  options: WindowsOptions | ((bytes: Buffer) => void) = {},
): WindowsResult {
  const opts: WindowsOptions = typeof options === "function" ? { onBytes: options } : options;
  const threads = opts.onBytes ? 1 : (opts.threads ?? defaultThreads(path));
  if (threads > 1) {
    const reducer = new WindowsReducer(path, card, settings);
    try {
      if (readInParts(path, card, settings, reducer, opts.parts ?? null, opts.workerHere === true)) {
        reducer.replay();
        return reducer.result();
      }
    } finally {
      reducer.spill?.remove();
    }
  }
  const reducer = new WindowsReducer(path, card, settings);
  try {
    readHere(path, card, settings, reducer, opts.onBytes);
    reducer.replay();
    return reducer.result();
  } finally {
    reducer.spill?.remove();
  }
}

/**
 * The starts of the parts from `from` on (see ROUND_BYTES), the worker's first, each moved to the
 * next line start; `share` is this thread's share of a round.
 */
function partStarts(path: string, from: number, share: number): number[] {
  const fd = openSync(path, "r");
  try {
    const size = fstatSync(fd).size;
    const starts = [from];
    const buf = Buffer.allocUnsafe(1 << 16);
    for (let round = from; round < size; round += ROUND_BYTES) {
      for (const offset of [round + ROUND_BYTES * (1 - share), round + ROUND_BYTES]) {
        const at = lineStartAfter(fd, buf, Math.floor(offset), size);
        if (at < 0) return starts;
        if (at > starts[starts.length - 1]!) starts.push(at);
      }
    }
    return starts;
  } finally {
    closeSync(fd);
  }
}

/** The start of the first line at or after `from`, or -1 (see lineStartAfter). */
function lineStartFrom(path: string, from: number): number {
  let fd: number;
  try {
    fd = openSync(path, "r");
  } catch {
    return -1; // the reader gives the message
  }
  try {
    return lineStartAfter(fd, Buffer.allocUnsafe(1 << 16), from, fstatSync(fd).size);
  } finally {
    closeSync(fd);
  }
}

/** The offset just after the first line feed at or after `from`; -1 when there is none, or it ends the file. */
function lineStartAfter(fd: number, buf: Buffer, from: number, size: number): number {
  for (let at = from; at < size; at += buf.length) {
    const n = readSync(fd, buf, 0, buf.length, at);
    const nl = buf.subarray(0, n).indexOf(10);
    if (nl >= 0) return at + nl + 1 < size ? at + nl + 1 : -1;
  }
  return -1;
}

/**
 * Pass 1 in parts, alternately here and in the worker (windows-thread.ts), then the second pass
 * here. False when a record crosses from one part into the next (a quoted field with a line
 * break), which only reading in one go gets right.
 */
function readInParts(
  path: string,
  card: Card,
  settings: Settings,
  reducer: WindowsReducer,
  given: readonly number[] | null,
  workerHere: boolean,
): boolean {
  const parser = new WindowsParser(path, card, settings, reducer);
  reducer.account = parser.account;
  let line = 1;
  let first = 0;
  let starts = given;
  if (starts === null) {
    // The first part, here, shows how the rows are ordered.
    const probe = lineStartFrom(path, PROBE_BYTES);
    if (probe < 0) return false;
    const end = parser.readPart(0, probe, 1);
    if (end.offset !== probe) return false;
    line = end.line;
    first = 1;
    starts = partStarts(path, probe, reducer.enteredShare() > 0.5 ? SHUFFLED_SHARE : SORTED_SHARE);
  }
  const bounds = [0, ...starts, Number.POSITIVE_INFINITY];
  const theirs: number[] = [];
  for (let i = 1; i + 1 < bounds.length; i += 2) theirs.push(bounds[i]!, bounds[i + 1]!);
  const worker = workerParts(path, card, settings, theirs, workerHere);
  try {
    for (let i = first; i + 1 < bounds.length; i++) {
      const [start, until] = [bounds[i]!, bounds[i + 1]!];
      const end =
        i % 2 === 0 ? parser.readPart(start, until, line) : worker.reducePart(parser, reducer, line);
      if (until !== Number.POSITIVE_INFINITY && end.offset !== until) return false;
      line = end.line;
    }
    if (reducer.account.rowsRead === 0) throw new InputError(msg.headerOnly(path, "windows file"));
    reducer.closeAll();
    if (reducer.lastMark > 0) {
      reducer.pass = 1;
      parser.readAgain(reducer.markLine, reducer.lastMark);
    }
    return true;
  } finally {
    worker.close();
  }
}

/** Both passes in this thread: the parser hands each row straight to the reducer. */
function readHere(
  path: string,
  card: Card,
  settings: Settings,
  reducer: WindowsReducer,
  onBytes?: (bytes: Buffer) => void,
): void {
  const parser = new WindowsParser(path, card, settings, reducer);
  reducer.account = parser.account;
  parser.read(onBytes); // pass 1
  reducer.closeAll();
  // The rows of marked sittings from before their mark.
  if (reducer.lastMark > 0) {
    reducer.pass = 1;
    parser.readAgain(reducer.markLine, reducer.lastMark);
  }
}

/** Where the parser's rows go: the reducer, or a worker's batches to it. */
export interface RowSink {
  header(layout: Layout, present: readonly boolean[]): void;
  /** A new sitting, numbered in order of first appearance. */
  sitting(s: number, studentId: string, sessionId: string): void;
  /** A new part (class, school, unit, activity), numbered in order of first appearance. */
  part(id: number, ids: PartIds): void;
  /**
   * A valid row of sitting s and part `part`; `flags` say whether the sitting (ENTERED) or the
   * part (NEW_PART) differ from the previous row's. `values` is reused for the next row.
   */
  row(
    s: number,
    part: number,
    time: number,
    offset: number,
    line: number,
    values: Float64Array,
    flags: number,
  ): void;
}

/** A rejected row as the parser found it, its line counted in the part of the file it read. */
export interface RawReject {
  readonly reason: RejectReason;
  readonly line: number;
  readonly column: number | undefined;
  readonly name: string | undefined;
  readonly value: string | undefined;
  readonly detail: string | undefined;
}

/** A later part's rejections: the first examples of each reason, in line order, and each reason's count. */
export interface DeferredRejects {
  readonly examples: RawReject[];
  readonly counts: [RejectReason, number][];
}

function deferReject(d: DeferredRejects, raw: RawReject, perReason: number): void {
  let entry = d.counts.find((c) => c[0] === raw.reason);
  if (!entry) {
    entry = [raw.reason, 0];
    d.counts.push(entry);
  }
  // In strict mode only the first rejection matters; keep one example even with examples_per_reason 0.
  if (entry[1] < Math.max(1, perReason)) d.examples.push(raw);
  entry[1]++;
}

/** The account's example for a rejection, its line moved on by `lineBase`. */
export function rejectExample(file: string, raw: RawReject, lineBase: number): Example {
  const { name, value, detail } = raw;
  return {
    at: location(file, raw.line + lineBase, raw.column),
    ...(name === undefined ? {} : { column: name }),
    ...(value === undefined ? {} : { value: value.length > 80 ? `${value.slice(0, 77)}...` : value }),
    ...(detail === undefined ? {} : { detail }),
  };
}

/**
 * Counts a later part's rejections in the account (after the rows before them), in line order, so
 * that in strict mode the first of them stops the run, as it would reading in one go.
 */
export function countDeferred(account: RowAccount, d: DeferredRejects, lineBase: number): void {
  const shown = new Map<RejectReason, number>();
  for (const raw of d.examples) {
    account.reject(raw.reason, rejectExample(account.file, raw, lineBase));
    shown.set(raw.reason, (shown.get(raw.reason) ?? 0) + 1);
  }
  for (const [reason, count] of d.counts) account.addRejected(reason, count - (shown.get(reason) ?? 0));
}

/** Field columns of ids laid end to end (adoptSitting, adoptPart). */
const ADOPT_COLS = Int32Array.from([0, 1, 2, 3]);

function idBytes(ids: readonly string[]): { buf: Buffer; starts: Int32Array; ends: Int32Array } {
  const parts = ids.map((id) => Buffer.from(id, "utf8"));
  const starts = new Int32Array(ids.length);
  const ends = new Int32Array(ids.length);
  let at = 0;
  parts.forEach((b, i) => {
    starts[i] = at;
    at += b.length;
    ends[i] = at;
  });
  return { buf: Buffer.concat(parts), starts, ends };
}

/** RowSink.row flags. */
export const ENTERED = 1;
export const NEW_PART = 2;

/**
 * Reading and checking: every row is validated here, rejections counted, ids looked up and
 * numbered; valid rows go to a RowSink. Holds nothing per sitting but its ids' bytes and the part
 * of its last row, so that it can run in a worker apart from the reducer.
 */
export class WindowsParser {
  readonly file: string;
  readonly account: RowAccount;
  private readonly maxBytes: number;
  private readonly maxRecordBytes: number;
  private layout: Layout | null = null;
  private values = new Float64Array(0);
  private readonly timeOut = { offsetMinutes: 0 };
  private sawHeader = false;
  /** 0 in pass 1, 1 when reading again. */
  private pass = 0;
  /** In the second pass: the line at which to stop, and per sitting the line of its mark (0: none). */
  private stopLine = 0;
  private markLine: Int32Array = new Int32Array(0);
  /** Field ranges of the row read by the fast path. */
  private starts = new Int32Array(0);
  private ends = new Int32Array(0);
  private readonly prev = new PreviousIds();
  /** A view of the buffer the fast path last read (for PreviousIds.sameLead). */
  private viewOf: Uint8Array | null = null;
  private view: DataView = new DataView(new ArrayBuffer(0));
  private readonly times = new TimestampReader();

  // Sittings by number (order of first appearance) and parts (global numbers).
  private readonly sittingKeys = new ByteKeyTable(2);
  private readonly partKeys = new ByteKeyTable(4);
  /** Per sitting: the part of its last row (-1 before any). */
  private lastPart = new Int32Array(1024).fill(-1);
  /** The current row's sitting and part. */
  private current = -1;
  private currentPart = -1;
  /**
   * A parser of parts of the file that does not know the lines before them (in a worker): it counts
   * each part's lines from 1 and keeps its rejections with those lines (takePart), to be counted
   * with the right lines by the thread that knows them.
   */
  private deferred: DeferredRejects | null;

  constructor(
    private readonly path: string,
    private readonly card: Card,
    private readonly settings: Settings,
    private readonly out: RowSink,
    options: { deferRejections?: boolean } = {},
  ) {
    this.file = basename(path);
    this.account = new RowAccount(this.file, settings);
    this.maxBytes = settings.maxFieldChars * 4;
    this.maxRecordBytes = Math.max(1 << 20, this.maxBytes * 64);
    this.deferred = options.deferRejections ? { examples: [], counts: [] } : null;
  }

  /**
   * The sitting numbered s by the parser of another part of the file, by its ids: its number here,
   * taken and announced (RowSink.sitting) when new, as if its row had been read here.
   */
  adoptSitting(studentId: string, sessionId: string): number {
    const { buf, starts, ends } = idBytes([studentId, sessionId]);
    const cols = ADOPT_COLS.subarray(0, 2);
    let s = this.sittingKeys.find(buf, starts, ends, cols);
    if (s >= 0) return s;
    s = this.sittingKeys.add(buf, starts, ends, cols);
    this.growLastPart(s);
    this.out.sitting(s, studentId, sessionId);
    return s;
  }

  /** adoptSitting for a part. */
  adoptPart(ids: PartIds): number {
    const { buf, starts, ends } = idBytes([ids.classId, ids.schoolId, ids.unitId, ids.activityId]);
    let part = this.partKeys.find(buf, starts, ends, ADOPT_COLS);
    if (part >= 0) return part;
    part = this.partKeys.add(buf, starts, ends, ADOPT_COLS);
    this.out.part(part, ids);
    return part;
  }

  private growLastPart(s: number): void {
    if (s < this.lastPart.length) return;
    const lastPart = new Int32Array(Math.max(s + 1, this.lastPart.length * 2)).fill(-1);
    lastPart.set(this.lastPart);
    this.lastPart = lastPart;
  }

  /** Second pass: the rows of marked sittings before their marks (markLine, by sitting), up to stopLine. */
  readAgain(markLine: Int32Array, stopLine: number): void {
    if (this.deferred) throw new Error("the second pass reads the whole file, with the first part's parser");
    this.pass = 1;
    this.markLine = markLine;
    this.stopLine = stopLine;
    this.read();
  }

  /**
   * Pass 1 over the part of the file from byte `start` (a line start, whose line is `firstLine`)
   * up to the first record that begins at or after `until`; returns where it stopped. The header
   * is read first from the top of the file when this parser has not seen it.
   */
  readPart(start: number, until: number, firstLine: number): ReadEnd {
    this.current = -1;
    this.currentPart = -1;
    this.prev.valid = false;
    if (start > 0 && this.layout === null) {
      this.sawHeader = false;
      this.headerOnly = true;
      this.readRange({});
      this.headerOnly = false;
    }
    if (start === 0) this.sawHeader = false;
    const end = this.readRange({ start, until, firstLine });
    if (!this.sawHeader) throw new InputError(msg.emptyFile(this.path, "windows file"));
    return end;
  }

  /** The rows read, blank lines and rejections of the parts read since the last call, which it clears. */
  takePart(): { rowsRead: number; blankLines: number; deferred: DeferredRejects } {
    const out = {
      rowsRead: this.account.rowsRead,
      blankLines: this.account.blankLines,
      deferred: this.deferred!,
    };
    this.account.rowsRead = 0;
    this.account.blankLines = 0;
    this.deferred = { examples: [], counts: [] };
    return out;
  }

  // ---------------------------------------------------------------------------------------------
  // Reading.

  /** Reads the whole file (pass 1, or the second pass up to its stop line). */
  read(onBytes?: (bytes: Buffer) => void): void {
    this.sawHeader = false;
    this.current = -1;
    this.currentPart = -1;
    this.prev.valid = false;
    this.readRange(this.pass === 0 && onBytes ? { onBytes } : {});
    if (this.pass > 0) return;
    if (!this.sawHeader) throw new InputError(msg.emptyFile(this.path, "windows file"));
    if (this.account.rowsRead === 0) throw new InputError(msg.headerOnly(this.path, "windows file"));
  }

  /** Pass 1 over a part of the file, or the header alone: no row yet read. */
  private headerOnly = false;

  private readRange(range: {
    onBytes?: (bytes: Buffer) => void;
    start?: number;
    until?: number;
    firstLine?: number;
  }): ReadEnd {
    try {
      return readRecordsFromFile(this.path, this.sink(), { maxRecordBytes: this.maxRecordBytes, ...range });
    } catch (error) {
      if (error === STOP) return { offset: -1, line: -1 };
      const code = (error as { code?: string }).code;
      if (code !== undefined && typeof code === "string" && code.startsWith("E")) {
        throw new InputError(msg.cannotRead(this.path, "windows file", error));
      }
      throw error;
    }
  }

  private sink(): RecordSink {
    return {
      line: (buf, start, end, line) => {
        if (!this.sawHeader) return false;
        if (this.pass > 0) {
          if (line >= this.stopLine) throw STOP;
          if (this.notNeeded(buf, start, end, line)) return true;
        }
        return this.fastRow(buf, start, end, line);
      },
      record: (view) => {
        if (!this.sawHeader) {
          this.sawHeader = true;
          if (this.pass > 0) return;
          this.header(view);
          if (this.headerOnly) throw STOP;
          return;
        }
        if (this.pass > 0 && view.line >= this.stopLine) throw STOP;
        this.row(view);
      },
      problem: (problem: RecordProblem) => {
        if (!this.sawHeader)
          throw new InputError(
            `${location(this.file, problem.line, problem.column)}: the header row: ${problem.detail}.`,
          );
        if (this.pass > 0) return;
        this.account.rowsRead++;
        const name = problem.field === undefined ? undefined : this.layout!.names[problem.field];
        // The UTF-8 detail only repeats the reason's text; the others say which case it is.
        const detail = problem.kind === "bad-utf8" ? undefined : problem.detail;
        this.reject(problem.kind, problem.line, problem.column, name, problem.value, detail);
      },
      blank: () => {
        if (this.pass === 0 && !this.headerOnly) this.account.blankLines++;
      },
    };
  }

  private header(view: RecordView): void {
    const header = Array.from({ length: view.count }, (_, i) => view.text(i));
    const built = layoutOf(this.file, header, this.card);
    this.layout = built.layout;
    this.values = new Float64Array(built.layout.constructCols.length);
    this.starts = new Int32Array(built.layout.fieldCount);
    this.ends = new Int32Array(built.layout.fieldCount);
    this.out.header(built.layout, built.present);
  }

  private reject(
    reason: RejectReason,
    line: number,
    column: number | undefined,
    name?: string,
    value?: string,
    detail?: string,
  ): void {
    if (this.pass > 0) return; // counted in pass 1
    const raw: RawReject = { reason, line, column, name, value, detail };
    if (this.deferred) deferReject(this.deferred, raw, this.settings.examplesPerReason);
    else this.account.reject(reason, rejectExample(this.file, raw, 0));
  }

  /**
   * The fast path: reads a plain line (see RecordSink.line) in one sweep over its bytes, and takes
   * it when every field is as the ordinary path would accept it; returns false, having changed
   * nothing but scratch space, for anything else.
   */
  private fastRow(buf: Buffer, start: number, end: number, line: number): boolean {
    const lay = this.layout!;
    const { roles, roleArgs, fieldCount } = lay;
    const { starts, ends, values, prev } = this;
    const prevBytes = prev.bytes;
    const maxChars = this.settings.maxFieldChars;
    /** Id slots that differ from the previous row's. */
    let changed = prev.valid && prev.plain ? 0 : ALL_SLOTS;
    let time = Number.NaN;
    let p = start;
    let col = 0;
    const lead = lay.idLead;
    if (changed === 0 && lead > 0) {
      if (buf !== this.viewOf) {
        this.viewOf = buf;
        this.view = new DataView(buf.buffer, buf.byteOffset, buf.length);
      }
      if (prev.sameLead(buf, this.view, p, end)) {
        // Every id repeats the previous row's: on to the first column after them.
        p += prev.leadLength;
        col = lead;
      }
    }
    for (; col < fieldCount; col++) {
      if (p > end) return false; // fewer fields than the header
      starts[col] = p;
      const role = roles[col]!;
      if (role === ROLE_VALUE) {
        // Most often "0." and decimals: one comparison a digit (the general loop below reads the same).
        if (buf[p] === 48 && p + 1 < end && buf[p + 1] === 46) {
          let m = 0;
          let q = p + 2;
          for (; q < end; q++) {
            const d = buf[q]! - 48;
            if (d >>> 0 > 9) break;
            m = m * 10 + d;
          }
          const fraction = q - p - 2;
          if (fraction >= 1 && fraction <= 14 && (q === end || buf[q] === 44)) {
            values[roleArgs[col]!] = m / POW10[fraction]!;
            ends[col] = q;
            p = q + 1;
            continue;
          }
        }
        // A plain decimal, read as parseNumber reads it; anything else goes the ordinary way.
        let m = 0;
        let digits = 0;
        let fraction = 0;
        let dot = false;
        let q = p;
        for (; q < end; q++) {
          const c = buf[q]!;
          if (c >= 48 && c <= 57) {
            m = m * 10 + (c - 48);
            digits++;
            if (dot) fraction++;
          } else if (c === 46 && !dot) dot = true;
          else break;
        }
        if (q < end && buf[q] !== 44) return false;
        if (q === p) values[roleArgs[col]!] = Number.NaN;
        else {
          if (digits === 0 || digits > 15) return false;
          const v = m / POW10[fraction]!;
          if (v > 1) return false;
          values[roleArgs[col]!] = v;
        }
        ends[col] = q;
        p = q + 1;
        continue;
      }
      if (role === ROLE_ID) {
        const slot = roleArgs[col]!;
        const bit = 1 << slot;
        if ((changed & bit) === 0) {
          // Compare with the previous row's bytes in place; they were plain when taken.
          const n = prev.len[slot]!;
          const at = prev.start[slot]!;
          const q = p + n;
          if (q <= end && (q === end || buf[q] === 44)) {
            let i = 0;
            while (i < n && buf[p + i] === prevBytes[at + i]) i++;
            if (i === n) {
              ends[col] = q;
              p = q + 1;
              continue;
            }
          }
          changed |= bit;
        }
        let q = p;
        while (q < end) {
          const c = buf[q]!;
          if (c === 44) break;
          if (c === 34 || c > 127) return false;
          q++;
        }
        const n = q - p;
        if ((n === 0 && slot !== SCHOOL && slot !== ACTIVITY) || n > maxChars) return false;
        ends[col] = q;
        p = q + 1;
        continue;
      }
      if (role === ROLE_TIME) {
        // Most often the previous row's date and offset with another clock.
        const reader = this.times;
        let q = p + reader.length;
        if (reader.length > 0 && q <= end && (q === end || buf[q] === 44)) time = reader.sameDay(buf, p, q);
        if (Number.isNaN(time)) {
          q = p;
          while (q < end) {
            const c = buf[q]!;
            if (c === 44) break;
            if (c === 34 || c > 127) return false;
            q++;
          }
          const t = reader.read(buf, p, q);
          if (typeof t === "string") return false;
          time = t;
        }
        ends[col] = q;
        p = q + 1;
        continue;
      }
      // A column the ingest does not use.
      let q = p;
      while (q < end) {
        const c = buf[q]!;
        if (c === 44) break;
        if (c === 34 || c > 127) return false;
        q++;
      }
      ends[col] = q;
      p = q + 1;
    }
    if (p !== end + 1) return false; // more fields than the header
    if (this.pass === 0) this.account.rowsRead++;
    this.take(buf, starts, ends, time, this.times.offsetMinutes, line, changed);
    // take() remembered the ids of a row that changed them; the fast path also keeps their bytes.
    if (changed !== 0 && lead > 0 && prev.valid && prev.plain)
      prev.rememberLead(buf, start, ends[lead - 1]! + 1);
    return true;
  }

  /**
   * Second pass: whether a plain line can be passed over unread, because its sitting is not one
   * whose earlier rows are wanted (or it has none, the row having been rejected). Reads only as far
   * as the sitting's ids; anything unusual is left to the full reading.
   */
  private notNeeded(buf: Buffer, start: number, end: number, line: number): boolean {
    const lay = this.layout!;
    const { starts, ends } = this;
    const student = lay.ids[0]!;
    const session = lay.ids[1]!;
    const last = Math.max(student, session);
    let p = start;
    for (let col = 0; col <= last; col++) {
      if (p > end) return false;
      let q = p;
      while (q < end) {
        const c = buf[q]!;
        if (c === 44) break;
        if (c === 34 || c > 127) return false;
        q++;
      }
      starts[col] = p;
      ends[col] = q;
      p = q + 1;
    }
    const s = this.sittingKeys.find(buf, starts, ends, lay.sittingCols);
    return s < 0 || !(line < this.markLine[s]!);
  }

  /** The ordinary path: a record from the CSV reader, checked field by field. */
  private row(view: RecordView): void {
    const lay = this.layout!;
    const settings = this.settings;
    const values = this.values;
    if (this.pass === 0) this.account.rowsRead++;
    if (view.count !== lay.fieldCount) {
      // Point at the first extra field, or just past the end of a row cut short.
      const at = Math.min(view.count, lay.fieldCount);
      const { value, detail } = msg.fieldCount(view.count, lay.names);
      this.reject("wrong-field-count", view.lineOf(at), view.column(at), undefined, value, detail);
      return;
    }
    const ids = lay.ids;
    for (let slot = 0; slot < 6; slot++) {
      const col = ids[slot]!;
      if (col < 0) continue;
      const n = view.ends[col]! - view.starts[col]!;
      if (n === 0 && slot !== SCHOOL && slot !== ACTIVITY) {
        this.reject("empty-id", view.lineOf(col), view.column(col), lay.names[col]);
        return;
      }
      if (
        n > settings.maxFieldChars &&
        (n > this.maxBytes || view.text(col).length > settings.maxFieldChars)
      ) {
        this.reject("long-field", view.lineOf(col), view.column(col), lay.names[col], view.text(col));
        return;
      }
    }
    const time = parseTimestamp(view.buf, view.starts[lay.time]!, view.ends[lay.time]!, this.timeOut);
    if (typeof time === "string") {
      this.reject(time, view.lineOf(lay.time), view.column(lay.time), "window_start", view.text(lay.time));
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
        this.reject("not-number", view.lineOf(col), view.column(col), lay.names[col], view.text(col));
        return;
      }
      if (v < 0 || v > 1) {
        this.reject("out-of-range", view.lineOf(col), view.column(col), lay.names[col], view.text(col));
        return;
      }
      values[k] = v;
    }
    let changed = 0;
    if (!this.prev.valid) changed = ALL_SLOTS;
    else
      for (let slot = 0; slot < 6; slot++)
        if (!this.prev.same(view.buf, view.starts, view.ends, slot, ids[slot]!)) changed |= 1 << slot;
    this.take(view.buf, view.starts, view.ends, time, this.timeOut.offsetMinutes, view.line, changed);
  }

  // ---------------------------------------------------------------------------------------------
  // A valid row: which sitting and part, then accumulate (pass 1) or set aside (second pass).

  private take(
    buf: Buffer,
    starts: Int32Array,
    ends: Int32Array,
    time: number,
    offset: number,
    line: number,
    changed: number,
  ): void {
    const lay = this.layout!;
    let flags = 0;
    if (this.current < 0 || (changed & SITTING_SLOTS) !== 0) {
      this.enterSitting(buf, starts, ends);
      flags |= ENTERED;
    }
    if (this.currentPart < 0 || (changed & PART_SLOTS) !== 0) {
      // Unsorted input changes ids on every row, but a sitting's rows mostly share one part: try
      // the part of the sitting's previous row before looking the part up.
      const last = this.lastPart[this.current]!;
      let part =
        last >= 0 && this.partKeys.matches(last, buf, starts, ends, lay.partCols)
          ? last
          : this.partKeys.find(buf, starts, ends, lay.partCols);
      if (part < 0) {
        part = this.partKeys.add(buf, starts, ends, lay.partCols);
        this.out.part(part, {
          classId: this.partKeys.text(part, 0),
          schoolId: this.partKeys.text(part, 1),
          unitId: this.partKeys.text(part, 2),
          activityId: this.partKeys.text(part, 3),
        });
      }
      this.currentPart = part;
      this.lastPart[this.current] = part;
      flags |= NEW_PART;
    }
    if (changed !== 0) this.prev.remember(buf, starts, ends, lay.ids);
    if (this.pass > 0 && !(line < this.markLine[this.current]!)) return;
    this.out.row(this.current, this.currentPart, time, offset, line, this.values, flags);
  }

  private enterSitting(buf: Buffer, starts: Int32Array, ends: Int32Array): void {
    const cols = this.layout!.sittingCols;
    let s = this.sittingKeys.find(buf, starts, ends, cols);
    if (s < 0) {
      if (this.pass > 0) throw new Error("a sitting appeared only when the file was read again");
      s = this.sittingKeys.add(buf, starts, ends, cols);
      this.growLastPart(s);
      this.out.sitting(s, this.sittingKeys.text(s, 0), this.sittingKeys.text(s, 1));
    }
    this.current = s;
  }
}

/**
 * Reducing: each sitting's rows, in the order the parser found them, into its accumulator while
 * they come in time order; sittings marked for replay set aside and replayed; the result.
 */
export class WindowsReducer implements RowSink {
  readonly file: string;
  /** The parser's account (after pass 1, when the parser ran in a worker); the replay adds to it. */
  account: RowAccount;
  private readonly maxRecordBytes: number;
  private layout: Layout | null = null;
  private plan: ConstructPlan | null = null;
  /** 0 in pass 1, 1 when reading again (rows are only set aside). */
  pass = 0;
  private readonly partIds: PartIds[] = [];
  private readonly students: string[] = [];
  private readonly sessions: string[] = [];
  private state = new Int8Array(1024);
  /** Rows that passed validation, per sitting. */
  private rows = new Int32Array(1024);
  /** Per sitting marked for replay: the line of the mark when rows before it must be read again, else 0. */
  markLine = new Int32Array(1024);
  private partCount = new Int32Array(1024);
  private withoutEstimate = new Int32Array(1024);
  /** Summaries of closed sittings (a sitting kept again replaces its rows). */
  private store: SummaryStore;
  private readonly open = new Map<number, SessionAccumulator>();
  /** Per sitting: when it was last entered (a count of entries), to close the least recent. */
  private lastSeen = new Float64Array(1024);
  private entries = 0;
  /** Open sittings at most (OPEN_SITTINGS_MAX at most; doubled when a closed sitting comes back). */
  private openLimit = OPEN_SITTINGS_FIRST;
  /** Accumulators of closed sittings, to serve new ones. */
  private readonly pool: SessionAccumulator[] = [];
  private replayed = 0;
  /** Rows taken in pass 1, and those whose sitting differs from the previous row's. */
  private seen = 0;
  private entered = 0;
  /** The last line of a mark: the second pass reads up to it (0: no second pass). */
  lastMark = 0;
  spill: SpillBuckets | null = null;

  /** The current row's sitting, its accumulator (open sittings, pass 1), and its part in the sitting. */
  private current = -1;
  private currentAcc: SessionAccumulator | null = null;
  private localPart = -1;

  constructor(
    private readonly path: string,
    private readonly card: Card,
    private readonly settings: Settings,
  ) {
    this.file = basename(path);
    this.account = new RowAccount(this.file, settings);
    this.maxRecordBytes = Math.max(1 << 20, settings.maxFieldChars * 4 * 64);
    this.store = new SummaryStore([], this.students, this.sessions, this.partIds);
  }

  header(layout: Layout, present: readonly boolean[]): void {
    this.layout = layout;
    this.plan = new ConstructPlan(this.card, present);
    this.store = new SummaryStore(this.plan.keys, this.students, this.sessions, this.partIds);
  }

  part(id: number, ids: PartIds): void {
    this.partIds[id] = ids;
  }

  sitting(s: number, studentId: string, sessionId: string): void {
    if (s >= this.state.length) {
      const size = Math.max(s + 1, this.state.length * 2);
      this.state = growInt8(this.state, size);
      this.rows = growInt32(this.rows, size);
      this.markLine = growInt32(this.markLine, size);
      this.partCount = growInt32(this.partCount, size);
      this.withoutEstimate = growInt32(this.withoutEstimate, size);
      const seen = new Float64Array(size);
      seen.set(this.lastSeen);
      this.lastSeen = seen;
    }
    this.students[s] = studentId;
    this.sessions[s] = sessionId;
  }

  row(
    s: number,
    part: number,
    time: number,
    offset: number,
    line: number,
    values: Float64Array,
    flags: number,
  ): void {
    if (this.pass > 0) {
      // The parser passes on only the rows wanted again.
      this.setAside(s, part, line, time, offset, values);
      return;
    }
    this.seen++;
    if ((flags & ENTERED) !== 0) {
      this.entered++;
      this.enter(s);
    } else if ((flags & NEW_PART) !== 0) this.localPart = -1;
    this.rows[s]!++;
    const acc = this.currentAcc;
    if (acc === null) {
      if (this.state[s] === CLOSED) {
        this.mark(s, line);
        // The file interleaves more sittings than are kept open: keep more from now on.
        this.openLimit = Math.min(OPEN_SITTINGS_MAX, Math.max(this.openLimit, this.open.size) * 2);
      }
      this.setAside(s, part, line, time, offset, values);
      return;
    }
    if (this.localPart < 0) this.localPart = acc.partIndex(part, this.partIds[part]!);
    if (time <= acc.lastTime) {
      this.mark(s, line);
      this.setAside(s, part, line, time, offset, values);
      return;
    }
    acc.add(time, offset, this.localPart, values);
  }

  /**
   * A segment of `n` rows parsed elsewhere (segment.ts): takes its first row's flags and, when the
   * sitting is open and the segment starts after its last window, adds the segment whole and
   * returns true. Returns false otherwise, having taken only the flags: the caller then gives the
   * segment's rows to row() one by one, with no flags, which is what reading them here would do.
   */
  segment(
    s: number,
    part: number,
    flags: number,
    n: number,
    firstTime: number,
    firstOffset: number,
    lastTime: number,
    withoutEstimate: number,
    seg: Float64Array,
    at: number,
  ): boolean {
    if (this.pass > 0) return false;
    if ((flags & ENTERED) !== 0) {
      this.entered++;
      this.enter(s);
    } else if ((flags & NEW_PART) !== 0) this.localPart = -1;
    const acc = this.currentAcc;
    if (acc === null || firstTime <= acc.lastTime) return false;
    this.seen += n;
    this.rows[s]! += n;
    if (this.localPart < 0) this.localPart = acc.partIndex(part, this.partIds[part]!);
    acc.merge(this.localPart, seg, at, firstTime, firstOffset, lastTime, withoutEstimate);
    return true;
  }

  /** The share of the rows so far whose sitting differs from the previous row's (0 for none). */
  enteredShare(): number {
    return this.seen === 0 ? 0 : this.entered / this.seen;
  }

  private enter(s: number): void {
    this.current = s;
    this.localPart = -1;
    this.currentAcc = null;
    if (this.state[s] !== OPEN) return;
    this.lastSeen[s] = ++this.entries;
    let acc = this.open.get(s);
    if (!acc) {
      acc = this.pool.pop();
      if (acc) acc.restart(this.students[s]!, this.sessions[s]!);
      else acc = new SessionAccumulator(this.students[s]!, this.sessions[s]!, this.plan!);
      this.open.set(s, acc);
      if (this.open.size > this.openLimit) this.closeLeastRecent(s);
    }
    this.currentAcc = acc;
  }

  /**
   * Closes the less recently entered half of the open sittings (not `keep`): a sweep every
   * openLimit / 2 new sittings, cheaper than keeping them in order on every row.
   */
  private closeLeastRecent(keep: number): void {
    const stamps = new Float64Array(this.open.size);
    let i = 0;
    for (const s of this.open.keys()) stamps[i++] = this.lastSeen[s]!;
    stamps.sort();
    const cut = stamps[stamps.length >> 1]!;
    for (const s of [...this.open.keys()]) if (s !== keep && this.lastSeen[s]! <= cut) this.close(s);
  }

  /** Reduces an open sitting to its summaries and frees its accumulator. */
  private close(s: number): void {
    const acc = this.open.get(s)!;
    this.open.delete(s);
    this.state[s] = CLOSED;
    this.keep(s, acc);
    this.pool.push(acc);
  }

  /** Closes every open sitting (at the end of pass 1). */
  closeAll(): void {
    for (const s of [...this.open.keys()]) this.close(s);
    this.currentAcc = null;
  }

  private keep(s: number, acc: SessionAccumulator): void {
    acc.finishInto(this.store, s);
    this.partCount[s] = acc.parts.length;
    this.withoutEstimate[s] = acc.rowsWithoutEstimate;
  }

  /** Marks sitting s for replay at this line: its pass-1 sums are dropped. */
  private mark(s: number, line: number): void {
    this.state[s] = REPLAY;
    this.replayed++;
    if (this.rows[s]! > 1) {
      // Rows before this one were read but not set aside: read them again later.
      this.markLine[s] = line;
      this.lastMark = Math.max(this.lastMark, line);
    }
    const acc = this.open.get(s);
    if (acc) {
      this.open.delete(s);
      this.pool.push(acc);
    }
    this.store.drop(s);
    if (s === this.current) this.currentAcc = null;
    if (this.spill === null) {
      const dir = mkdtempSync(join(tmpdir(), "engagement-report-replay-"));
      this.spill = new SpillBuckets(dir, this.plan!.keys.length, BUCKET_SHIFT);
    }
  }

  private setAside(
    s: number,
    part: number,
    line: number,
    time: number,
    offset: number,
    values: Float64Array,
  ): void {
    this.spill!.write(s, part, line, time, offset, values);
  }

  // ---------------------------------------------------------------------------------------------
  // Replay.

  replay(): void {
    const spill = this.spill;
    if (spill === null) return;
    spill.flushAll();
    const k = this.plan!.keys.length;
    const stopOnConflict = this.settings.strict ? this.conflictStop() : null;
    const budgetRows = Math.max(1, Math.floor(REPLAY_BUDGET_BYTES / (8 + 4 + 4 + 4 + 8 * k)));
    const rows = new ReplayRows(k);
    const n = this.students.length;
    for (let b = 0; b < spill.bucketCount; b++) {
      const lo = b << spill.shift;
      const hi = Math.min(n, lo + (1 << spill.shift));
      // Sittings lo..hi in groups whose rows fit the budget (a group holds at least one sitting).
      let from = lo;
      while (from < hi) {
        let to = from;
        let total = 0;
        while (to < hi && (to === from || total + this.replayRows(to) <= budgetRows)) {
          total += this.replayRows(to);
          to++;
        }
        this.replayGroup(b, from, to, total, rows, stopOnConflict);
        from = to;
      }
    }
  }

  private replayRows(s: number): number {
    return this.state[s] === REPLAY ? this.rows[s]! : 0;
  }

  /** Reads the rows of sittings from..to out of bucket b, grouped by sitting, and replays each. */
  private replayGroup(
    b: number,
    from: number,
    to: number,
    total: number,
    rows: ReplayRows,
    stopOnConflict: ConflictStop | null,
  ): void {
    if (total === 0) return;
    rows.reserve(total);
    const k = rows.k;
    // Counting sort by sitting: next[s - from] is where sitting s's next row goes.
    const next = new Int32Array(to - from + 1);
    for (let s = from; s < to; s++) next[s - from + 1] = next[s - from]! + this.replayRows(s);
    const begin = next.slice();
    this.spill!.read(b, (chunk, ints, at) => {
      const i = (at + 1 + k) * 2;
      const s = ints[i]!;
      if (s < from || s >= to) return;
      const r = next[s - from]!++;
      rows.times[r] = chunk[at]!;
      for (let c = 0; c < k; c++) rows.values[r * k + c] = chunk[at + 1 + c]!;
      rows.parts[r] = ints[i + 1]!;
      rows.lines[r] = ints[i + 2]!;
      rows.offsets[r] = ints[i + 3]!;
    });
    for (let s = from; s < to; s++) {
      if (this.state[s] !== REPLAY) continue;
      if (next[s - from] !== begin[s - from + 1])
        throw new Error(`sitting ${s}: rows set aside and read back differ in number`);
      this.replaySitting(s, rows, begin[s - from]!, begin[s - from + 1]!, stopOnConflict);
    }
  }

  /** Sorts one sitting's rows by time, sets aside duplicates and conflicts, and reduces it in order. */
  private replaySitting(
    s: number,
    b: ReplayRows,
    from: number,
    to: number,
    stopOnConflict: ConflictStop | null,
  ): void {
    const k = b.k;
    const acc = new SessionAccumulator(this.students[s]!, this.sessions[s]!, this.plan!);
    // Parts in the order they first appear in the file, as pass 1 would have met them.
    const firstLine = new Map<number, number>();
    for (let r = from; r < to; r++) {
      const seen = firstLine.get(b.parts[r]!);
      if (seen === undefined || b.lines[r]! < seen) firstLine.set(b.parts[r]!, b.lines[r]!);
    }
    for (const [part] of [...firstLine].sort((x, y) => x[1] - y[1])) acc.partIndex(part, this.partIds[part]!);
    for (let r = from; r < to; r++) b.local[r] = acc.partIndex(b.parts[r]!, this.partIds[b.parts[r]!]!);
    const rowCompare = (i: number, j: number): number => {
      if (b.local[i] !== b.local[j]) return b.local[i]! - b.local[j]!;
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
    const order = timeOrder(b, from, to);
    // Rows with the same window_start: by their content, then by line.
    for (let i = 0; i < order.length; ) {
      let j = i + 1;
      while (j < order.length && b.times[order[j]!] === b.times[order[i]!]) j++;
      if (j - i > 1) order.subarray(i, j).sort((x, y) => rowCompare(x, y) || b.lines[x]! - b.lines[y]!);
      i = j;
    }
    const values = new Float64Array(k);
    let i = 0;
    while (i < order.length) {
      let j = i + 1;
      while (j < order.length && b.times[order[j]!] === b.times[order[i]!]) j++;
      const first = order[i]!;
      let identical = true;
      for (let m = i + 1; m < j; m++) if (rowCompare(first, order[m]!) !== 0) identical = false;
      if (!identical) {
        const group = Array.from(order.subarray(i, j));
        const lines = group.map((r) => b.lines[r]!);
        stopOnConflict?.(acc, b, group, lines);
        for (const line of lines)
          this.account.reject("conflict", {
            at: location(this.file, line),
            value: msg.conflictWith(line, lines),
          });
      } else {
        for (let m = i + 1; m < j; m++) {
          const at = location(this.file, b.lines[order[m]!]!);
          this.account.duplicate({ at, value: `same window as line ${b.lines[first]}` });
        }
        values.set(b.values.subarray(first * k, first * k + k));
        acc.add(b.times[first]!, b.offsets[first]!, b.local[first]!, values);
      }
      i = j;
    }
    this.keep(s, acc);
  }

  /**
   * Strict mode, rows that disagree: stop at the earliest of them, at a field where it differs from
   * another (read again from the file, as the replay keeps no columns).
   */
  private conflictStop(): ConflictStop {
    return (acc, b, rows, lines) => {
      const lay = this.layout!;
      const byLine = [...rows].sort((i, j) => b.lines[i]! - b.lines[j]!);
      const first = byLine[0]!;
      // A group holds at least two rows that differ, so some row differs from the first.
      let field = lay.time;
      for (const r of byLine) {
        const d = differingField(acc, b, first, r);
        if (d === null) continue;
        if (d.kind === "part") field = lay.ids[d.slot]!;
        else if (d.kind === "value") field = lay.constructCols[d.construct]!;
        break;
      }
      const line = b.lines[first]!;
      const place = findField(this.path, line, field, { maxRecordBytes: this.maxRecordBytes });
      this.account.reject("conflict", {
        at: location(this.file, place?.line ?? line, place?.column),
        column: lay.names[field]!,
        ...(place ? { value: place.text } : {}),
        detail: msg.conflictWith(line, lines),
      });
    };
  }

  // ---------------------------------------------------------------------------------------------
  // The result.

  result(): WindowsResult {
    const plan = this.plan!;
    const n = this.students.length;
    let spanning = 0;
    let rowsWithoutEstimate = 0;
    for (let s = 0; s < n; s++) {
      if (this.partCount[s]! > 1) spanning++;
      rowsWithoutEstimate += this.withoutEstimate[s]!;
    }
    const estimated = this.store.windowsByConstruct();
    const store = this.store;
    let summaries: SessionSummary[] | null = null;
    const lay = this.layout!;
    return {
      file: this.file,
      store,
      get summaries() {
        summaries ??= store.toArray();
        return summaries;
      },
      account: this.account,
      columns: lay.columns,
      rowsWithoutEstimate,
      estimates: plan.keys.map((construct, k) => ({
        construct,
        windows: estimated[k]!,
        missing: this.account.accepted - estimated[k]!,
      })),
      sittings: n,
      sittingsSpanningParts: spanning,
      replayedSittings: this.replayed,
    };
  }
}

/**
 * Rows from..to in order of time (rows with the same time in any order). When the times are whole
 * milliseconds, each row's key is its time after the sitting's first, times 2^bits, plus its
 * position, which a double holds exactly while below 2^53: the keys then sort natively, with no
 * comparison function, which is most of the cost of replaying. Else (fractions of a millisecond,
 * a span too long) a sort with a comparison.
 */
function timeOrder(b: ReplayRows, from: number, to: number): Int32Array {
  const n = to - from;
  const order = new Int32Array(n);
  let min = Number.POSITIVE_INFINITY;
  let max = Number.NEGATIVE_INFINITY;
  let whole = true;
  for (let r = from; r < to; r++) {
    const t = b.times[r]!;
    if (t < min) min = t;
    if (t > max) max = t;
    if (!Number.isInteger(t)) whole = false;
  }
  const scale = 2 ** (32 - Math.clz32(n));
  if (whole && (max - min + 1) * scale <= 2 ** 53) {
    const keys = new Float64Array(n);
    for (let i = 0; i < n; i++) keys[i] = (b.times[from + i]! - min) * scale + i;
    keys.sort();
    for (let i = 0; i < n; i++) order[i] = from + (keys[i]! % scale);
    return order;
  }
  for (let i = 0; i < n; i++) order[i] = from + i;
  return order.sort((i, j) => b.times[i]! - b.times[j]! || i - j);
}

/** Rows of the sittings being replayed, grouped by sitting. */
class ReplayRows {
  times = new Float64Array(0);
  offsets = new Int32Array(0);
  /** Global part number, and the part's index in its sitting. */
  parts = new Int32Array(0);
  local = new Int32Array(0);
  lines = new Int32Array(0);
  values = new Float64Array(0);

  constructor(readonly k: number) {}

  reserve(n: number): void {
    if (this.times.length >= n) return;
    this.times = new Float64Array(n);
    this.offsets = new Int32Array(n);
    this.parts = new Int32Array(n);
    this.local = new Int32Array(n);
    this.lines = new Int32Array(n);
    this.values = new Float64Array(n * this.k);
  }
}

/** Stops the run on rows of a sitting that share a window_start but disagree (strict mode). */
type ConflictStop = (
  acc: SessionAccumulator,
  b: ReplayRows,
  rows: readonly number[],
  lines: readonly number[],
) => void;

const PART_FIELDS = [
  ["classId", 2],
  ["schoolId", 3],
  ["unitId", 4],
  ["activityId", 5],
] as const;

/**
 * The first field in which rows i and j of a sitting differ: an id of the part (its slot in
 * Layout.ids), a construct's value, or else the window_start's UTC offset (the same instant
 * written two ways); null when they agree.
 */
function differingField(
  acc: SessionAccumulator,
  b: ReplayRows,
  i: number,
  j: number,
): { kind: "part"; slot: number } | { kind: "value"; construct: number } | { kind: "time" } | null {
  const k = b.k;
  if (b.local[i] !== b.local[j]) {
    const p = acc.parts[b.local[i]!]!;
    const q = acc.parts[b.local[j]!]!;
    for (const [key, slot] of PART_FIELDS) if (p[key] !== q[key]) return { kind: "part", slot };
  }
  for (let c = 0; c < k; c++) {
    const x = b.values[i * k + c]!;
    const y = b.values[j * k + c]!;
    if (x !== y && !(Number.isNaN(x) && Number.isNaN(y))) return { kind: "value", construct: c };
  }
  return b.offsets[i] === b.offsets[j] ? null : { kind: "time" };
}

function growInt32(a: Int32Array, size: number): Int32Array<ArrayBuffer> {
  const b = new Int32Array(size);
  b.set(a);
  return b;
}

function growInt8(a: Int8Array, size: number): Int8Array<ArrayBuffer> {
  const b = new Int8Array(size);
  b.set(a);
  return b;
}
