/**
 * A windows file read by two threads, in parts taken alternately (windows.ts, readInParts). This
 * thread parses and reduces its parts as it would the whole file; meanwhile a worker parses the
 * others (WindowsParser: reading and checking, the larger half of the work) into batches of rows,
 * which this thread reduces in their turn, as if it had parsed them itself: the worker's sittings
 * and parts are renumbered by their ids (adoptSitting), its lines moved on by the lines before each
 * part, and its rejections counted after the rows before them. The reducer sees the same calls in
 * the same order as reading in one go, so the summaries, the account and every message are the same.
 *
 * The rows cross in batches of typed arrays (moved, not copied), with the ids of the sittings and
 * parts that first appear in them. The ingest stays synchronous: this thread takes each batch with
 * receiveMessageOnPort and sleeps on a shared counter (Atomics.wait) while none is there; the
 * worker sleeps likewise when MAX_AHEAD batches are waiting, which bounds the memory in flight.
 */
import { MessageChannel, type MessagePort, receiveMessageOnPort, Worker } from "node:worker_threads";
import type { Card, Settings } from "../config/types.js";
import { InputError, SettingsError, StrictRowError } from "../errors.js";
import { addToSegment, SEG_STRIDE, startSegment } from "../summaries/segment.js";
import { ConstructPlan, type PartIds } from "../summaries/session-accumulator.js";
import type { ReadEnd } from "./csv-records.js";
import {
  countDeferred,
  type DeferredRejects,
  ENTERED,
  type Layout,
  type RowSink,
  WindowsParser,
  type WindowsReducer,
} from "./windows.js";

/** Rows per batch (smaller in tests, to put batch ends inside sittings and runs). */
let batchRows = 8192;

/** For tests: rows per batch from now on (at least 1). */
export function setBatchRows(rows: number): void {
  batchRows = Math.max(1, Math.floor(rows));
}
/** Batches posted and not yet taken, at most (about 20 MB with six constructs). */
const MAX_AHEAD = 32;
/** Slots of the shared counter. */
const PRODUCED = 0;
const CONSUMED = 1;
/** Int32 fields of a row in a batch: sitting, part, line, UTC offset, flags. */
const INTS = 5;
/** Int32 fields of a segment: its first row, its rows, those without any estimate. */
const SEG_INTS = 3;

export interface WorkerInput {
  readonly path: string;
  readonly card: Card;
  readonly settings: Settings;
  /** The worker's parts: start and end offsets, one pair each (the last end is Infinity: the end of the file). */
  readonly parts: readonly number[];
  readonly port: MessagePort;
  readonly counter: Int32Array;
}

export type FromWorker =
  | { type: "header"; layout: Layout; present: boolean[] }
  | RowsMessage
  | {
      type: "part";
      /** Where the part's reading stopped, and its lines. */
      offset: number;
      lines: number;
      rowsRead: number;
      blankLines: number;
      deferred: DeferredRejects;
    }
  | { type: "error"; kind: "input" | "settings" | "strict" | "bug"; message: string; stack: string };

/** A batch of rows, with their segments and the ids first seen in them. */
export interface RowsMessage {
  type: "rows";
  n: number;
  ints: Int32Array;
  floats: Float64Array;
  sittings: (number | string)[];
  parts: (number | PartIds)[];
  /** Segments of the rows (segment.ts): SEG_INTS and 2 + SEG_STRIDE × constructs numbers each. */
  segments: number;
  segInts: Int32Array;
  segFloats: Float64Array;
}

/** A batch's arrays, sent back to the worker for its next batches once reduced. */
export interface BatchArrays {
  readonly ints: Int32Array;
  readonly floats: Float64Array;
  readonly segInts: Int32Array;
  readonly segFloats: Float64Array;
}

/** The worker's side: the arrays of a batch sent back, if one is waiting. */
export function workerTakeBack(port: MessagePort): () => BatchArrays | null {
  return () => (receiveMessageOnPort(port)?.message as BatchArrays | undefined) ?? null;
}

/** The worker's parts, reduced here one by one in their turn. */
export interface WorkerParts {
  /** Reduces the worker's next part, which starts at line `line`; returns where its reading stopped. */
  reducePart(parser: WindowsParser, reducer: WindowsReducer, line: number): ReadEnd;
  close(): void;
}

export function workerParts(
  path: string,
  card: Card,
  settings: Settings,
  parts: readonly number[],
  here: boolean,
): WorkerParts {
  const input = { path, card, settings, parts };
  let next: () => FromWorker;
  let close = (): void => {};
  let giveBack = (_m: RowsMessage): void => {};
  // The TypeScript sources (under the tests) cannot start a worker on Node 20, whose loader hooks
  // do not reach worker threads: they parse the worker's parts here first; the build starts it.
  if (here || import.meta.url.endsWith(".ts")) {
    const messages: FromWorker[] = [];
    parseParts(input, new BatchOut(card, (m) => messages.push(m)));
    let at = 0;
    next = () => messages[at++]!;
  } else {
    const counter = new Int32Array(new SharedArrayBuffer(8));
    const { port1, port2 } = new MessageChannel();
    const workerData: WorkerInput = { ...input, port: port2, counter };
    const worker = new Worker(new URL("./windows-worker.js", import.meta.url), {
      workerData,
      transferList: [port2],
    });
    worker.unref();
    next = () => nextMessage(port1, counter);
    giveBack = (m) => {
      const { ints, floats, segInts, segFloats } = m;
      const back: BatchArrays = { ints, floats, segInts, segFloats };
      port1.postMessage(back, [
        ints.buffer,
        floats.buffer,
        segInts.buffer,
        segFloats.buffer,
      ] as ArrayBuffer[]);
    };
    close = () => {
      port1.close();
      void worker.terminate();
    };
  }
  const feed = new PartFeed();
  return {
    reducePart: (parser, reducer, line) => feed.reduce(next, giveBack, parser, reducer, line),
    close,
  };
}

/** The worker's run (or the tests'): its parts parsed in order, each ended by a "part" message. */
export function parseParts(
  input: { path: string; card: Card; settings: Settings; parts: readonly number[] },
  out: BatchOut,
): void {
  try {
    const parser = new WindowsParser(input.path, input.card, input.settings, out, { deferRejections: true });
    for (let i = 0; i < input.parts.length; i += 2) {
      const end = parser.readPart(input.parts[i]!, input.parts[i + 1]!, 1);
      out.endPart(end, parser.takePart());
    }
  } catch (error) {
    out.error(error);
  }
}

/** Reduces the worker's rows part by part, keeping its sittings' and parts' numbers here. */
class PartFeed {
  private values = new Float64Array(0);
  private readonly sittingOf: number[] = [];
  private readonly partOf: number[] = [];

  reduce(
    next: () => FromWorker,
    giveBack: (m: RowsMessage) => void,
    parser: WindowsParser,
    reducer: WindowsReducer,
    line: number,
  ): ReadEnd {
    const lineBase = line - 1;
    const { sittingOf, partOf } = this;
    for (;;) {
      const m = next();
      if (m.type === "header") {
        this.values = new Float64Array(m.layout.constructCols.length);
      } else if (m.type === "rows") {
        for (let i = 0; i < m.sittings.length; i += 3) {
          sittingOf[m.sittings[i] as number] = parser.adoptSitting(
            m.sittings[i + 1] as string,
            m.sittings[i + 2] as string,
          );
        }
        for (let i = 0; i < m.parts.length; i += 2) {
          partOf[m.parts[i] as number] = parser.adoptPart(m.parts[i + 1] as PartIds);
        }
        const values = this.values;
        const k = values.length;
        const { ints, floats, segInts, segFloats } = m;
        if (m.segments < 0) {
          // A batch without segments: its rows one by one.
          for (let r = 0; r < m.n; r++) {
            const f = r * (k + 1);
            for (let c = 0; c < k; c++) values[c] = floats[f + 1 + c]!;
            const i = r * INTS;
            reducer.row(
              sittingOf[ints[i]!]!,
              partOf[ints[i + 1]!]!,
              floats[f]!,
              ints[i + 3]!,
              ints[i + 2]! + lineBase,
              values,
              ints[i + 4]!,
            );
          }
        }
        const segStride = 2 + SEG_STRIDE * k;
        for (let g = 0; g < m.segments; g++) {
          const gi = g * SEG_INTS;
          const from = segInts[gi]!;
          const n = segInts[gi + 1]!;
          const i0 = from * INTS;
          const s = sittingOf[ints[i0]!]!;
          const part = partOf[ints[i0 + 1]!]!;
          const gf = g * segStride;
          const whole = reducer.segment(
            s,
            part,
            ints[i0 + 4]!,
            n,
            segFloats[gf]!,
            ints[i0 + 3]!,
            segFloats[gf + 1]!,
            segInts[gi + 2]!,
            segFloats,
            gf + 2,
          );
          if (whole) continue;
          // The segment's rows one by one (its flags are taken).
          for (let r = from; r < from + n; r++) {
            const f = r * (k + 1);
            for (let c = 0; c < k; c++) values[c] = floats[f + 1 + c]!;
            const i = r * INTS;
            reducer.row(s, part, floats[f]!, ints[i + 3]!, ints[i + 2]! + lineBase, values, 0);
          }
        }
        giveBack(m);
      } else if (m.type === "part") {
        const account = reducer.account;
        account.rowsRead += m.rowsRead;
        account.blankLines += m.blankLines;
        countDeferred(account, m.deferred, lineBase);
        return { offset: m.offset, line: line + m.lines };
      } else {
        throw rebuilt(m);
      }
    }
  }
}

/**
 * Waiting this long for a batch means the worker has died (it posts its errors, but a thread that
 * fails to start or runs out of memory cannot).
 */
const STALL_MS = 120_000;

/** The next message from the worker, waiting for it. */
function nextMessage(port: MessagePort, counter: Int32Array): FromWorker {
  let waited = 0;
  for (;;) {
    let got = receiveMessageOnPort(port);
    if (!got) {
      const produced = Atomics.load(counter, PRODUCED);
      // A message posted between the two looks has raised the count, or is here now.
      got = receiveMessageOnPort(port);
      if (!got) {
        if (Atomics.wait(counter, PRODUCED, produced, 1000) === "timed-out") waited += 1000;
        if (waited >= STALL_MS)
          throw new Error(`the thread reading the windows file sent nothing for ${STALL_MS / 1000} s`);
        continue;
      }
    }
    Atomics.add(counter, CONSUMED, 1);
    Atomics.notify(counter, CONSUMED);
    return got.message as FromWorker;
  }
}

/** The worker's error as the same kind of error here (messages unchanged). */
function rebuilt(m: Extract<FromWorker, { type: "error" }>): Error {
  if (m.kind === "input") return new InputError(m.message);
  if (m.kind === "settings") return new SettingsError(m.message);
  if (m.kind === "strict") return new StrictRowError(m.message);
  const error = new Error(m.message);
  error.stack = m.stack;
  return error;
}

/** The worker's side: a RowSink that packs rows into batches and posts them. */
export class BatchOut implements RowSink {
  private k = 0;
  private n = 0;
  private ints: Int32Array = new Int32Array(0);
  private floats: Float64Array = new Float64Array(0);
  private sittings: (number | string)[] = [];
  private parts: (number | PartIds)[] = [];
  private plan: ConstructPlan | null = null;
  /** Segments so far in this batch; the last is open while `segmentOpen`, and ends at `segmentLast`. */
  private segments = 0;
  private segInts: Int32Array = new Int32Array(0);
  private segFloats: Float64Array = new Float64Array(0);
  private segmentOpen = false;
  private segmentLast = 0;
  /** Whether this batch is cut into segments; rows of this batch that entered another sitting. */
  private segmenting = true;
  private entered = 0;

  constructor(
    private readonly card: Card,
    private readonly send: (m: FromWorker, transfer: ArrayBuffer[]) => void,
    private readonly takeBack: () => BatchArrays | null = () => null,
  ) {}

  header(layout: Layout, present: readonly boolean[]): void {
    this.k = layout.constructCols.length;
    this.plan = new ConstructPlan(this.card, present);
    this.fresh();
    this.post({ type: "header", layout, present: [...present] });
  }

  sitting(s: number, studentId: string, sessionId: string): void {
    this.sittings.push(s, studentId, sessionId);
  }

  part(id: number, ids: PartIds): void {
    this.parts.push(id, ids);
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
    const i = this.n * INTS;
    const ints = this.ints;
    ints[i] = s;
    ints[i + 1] = part;
    ints[i + 2] = line;
    ints[i + 3] = offset;
    ints[i + 4] = flags;
    const f = this.n * (this.k + 1);
    this.floats[f] = time;
    const floats = this.floats;
    for (let c = 0; c < this.k; c++) floats[f + 1 + c] = values[c]!;
    if ((flags & ENTERED) !== 0) this.entered++;
    if (!this.segmenting) {
      if (++this.n === batchRows) this.flush();
      return;
    }
    // The row continues the open segment when it changes neither sitting nor part and comes later.
    const stride = 2 + SEG_STRIDE * this.k;
    if (!this.segmentOpen || flags !== 0 || !(time > this.segmentLast)) {
      if ((this.segments + 1) * SEG_INTS > this.segInts.length) this.growSegments();
      const g = this.segments++;
      this.segInts[g * SEG_INTS] = this.n;
      this.segInts[g * SEG_INTS + 1] = 0;
      this.segInts[g * SEG_INTS + 2] = 0;
      this.segFloats[g * stride] = time;
      startSegment(this.segFloats, g * stride + 2, this.k);
      this.segmentOpen = true;
    }
    const g = this.segments - 1;
    this.segInts[g * SEG_INTS + 1]!++;
    if (!addToSegment(this.plan!, this.segFloats, g * stride + 2, time, values))
      this.segInts[g * SEG_INTS + 2]!++;
    this.segFloats[g * stride + 1] = time;
    this.segmentLast = time;
    if (++this.n === batchRows) this.flush();
  }

  /** Posts the rows so far (and any new ids). */
  flush(): void {
    if (this.n === 0 && this.sittings.length === 0 && this.parts.length === 0) return;
    const m: FromWorker = {
      type: "rows",
      n: this.n,
      ints: this.ints,
      floats: this.floats,
      sittings: this.sittings,
      parts: this.parts,
      segments: this.segmenting ? this.segments : -1,
      segInts: this.segInts,
      segFloats: this.segFloats,
    };
    // Segments pay when sittings come in stretches; rows that mostly change sitting (unsorted
    // input) would make one segment each, several times the bytes of the row: then the next
    // batch goes without (its rows reduced one by one).
    this.segmenting = this.entered * 4 < this.n;
    this.entered = 0;
    this.post(m, [
      this.ints.buffer as ArrayBuffer,
      this.floats.buffer as ArrayBuffer,
      this.segInts.buffer as ArrayBuffer,
      this.segFloats.buffer as ArrayBuffer,
    ]);
    this.fresh();
  }

  endPart(end: ReadEnd, counts: { rowsRead: number; blankLines: number; deferred: DeferredRejects }): void {
    this.flush();
    this.post({ type: "part", offset: end.offset, lines: end.line - 1, ...counts });
  }

  error(error: unknown): void {
    const e = error instanceof Error ? error : new Error(String(error));
    const kind =
      e instanceof StrictRowError
        ? "strict"
        : e instanceof InputError
          ? "input"
          : e instanceof SettingsError
            ? "settings"
            : "bug";
    this.post({ type: "error", kind, message: e.message, stack: e.stack ?? "" });
  }

  private fresh(): void {
    this.n = 0;
    this.sittings = [];
    this.parts = [];
    this.segments = 0;
    this.segmentOpen = false;
    // The arrays of a batch already reduced, sent back (none in the tests' single thread).
    const back = this.takeBack();
    if (
      back !== null &&
      back.ints.length === batchRows * INTS &&
      back.floats.length === batchRows * (this.k + 1)
    ) {
      this.ints = back.ints;
      this.floats = back.floats;
      this.segInts = back.segInts;
      this.segFloats = back.segFloats;
      return;
    }
    this.ints = new Int32Array(batchRows * INTS);
    this.floats = new Float64Array(batchRows * (this.k + 1));
    // Sorted rows make few segments a batch, shuffled rows one a row: grown when needed.
    this.segInts = new Int32Array(256 * SEG_INTS);
    this.segFloats = new Float64Array(256 * (2 + SEG_STRIDE * this.k));
  }

  private growSegments(): void {
    const ints = new Int32Array(this.segInts.length * 2);
    ints.set(this.segInts);
    this.segInts = ints;
    const floats = new Float64Array(this.segFloats.length * 2);
    floats.set(this.segFloats);
    this.segFloats = floats;
  }

  private post(m: FromWorker, transfer: ArrayBuffer[] = []): void {
    this.send(m, transfer);
  }
}

/** BatchOut's sending from a worker: post, count, and wait while MAX_AHEAD batches are not taken. */
export function workerSend(
  port: MessagePort,
  counter: Int32Array,
): (m: FromWorker, transfer: ArrayBuffer[]) => void {
  return (m, transfer) => {
    for (;;) {
      const consumed = Atomics.load(counter, CONSUMED);
      if (Atomics.load(counter, PRODUCED) - consumed < MAX_AHEAD) break;
      Atomics.wait(counter, CONSUMED, consumed, 1000);
    }
    port.postMessage(m, transfer);
    Atomics.add(counter, PRODUCED, 1);
    Atomics.notify(counter, PRODUCED);
  };
}
