/** sessions.csv, the seam of the data contract, written in chunks. */
import { csvLine, numberCell, textCell } from "../output/csv-write.js";
import { SCALE } from "./session-accumulator.js";
import { SummaryStore } from "./summary-store.js";
import { SESSION_COLUMNS, type SessionSummary } from "./types.js";

/** Characters held before a chunk is handed to the writer. */
const CHUNK_CHARS = 1 << 20;
/** Bytes of a chunk of the store's lines (fewer, larger writes). */
const CHUNK_BYTES = 1 << 22;

export function sessionColumns(withActivity: boolean): string[] {
  return SESSION_COLUMNS.filter((c) => withActivity || c !== "activity_id");
}

/**
 * textCell of each text column, remembered from the row before: rows come sorted by student and
 * session, so most ids repeat the previous row's and need no escaping again (a million rows for
 * ten million windows).
 */
class TextCells {
  private readonly last: string[] = [];
  private readonly cells: string[] = [];

  cell(column: number, value: string): string {
    if (this.last[column] !== value || this.cells[column] === undefined) {
      this.last[column] = value;
      this.cells[column] = textCell(value);
    }
    return this.cells[column]!;
  }
}

/**
 * Lines of sessions.csv built as bytes in a buffer, not as strings: a million rows of template
 * strings kept the garbage collector busy for longer than writing them took (1.6 s of 3.5 s at
 * ten million windows). Numbers are written digit by digit from integers.
 */
export class CsvBytes {
  private buf = Buffer.allocUnsafe(CHUNK_BYTES + 4096);
  at = 0;

  /** Whether the chunk is full enough to hand over. */
  get full(): boolean {
    return this.at >= CHUNK_BYTES;
  }

  /** The bytes so far (a chunk of its own), and a fresh buffer for what follows. */
  take(): Buffer {
    const out = this.buf.subarray(0, this.at);
    this.buf = Buffer.allocUnsafe(CHUNK_BYTES + 4096);
    this.at = 0;
    return out;
  }

  private room(n: number): void {
    if (this.at + n <= this.buf.length) return;
    const bigger = Buffer.allocUnsafe(Math.max(this.buf.length * 2, this.at + n));
    this.buf.copy(bigger, 0, 0, this.at);
    this.buf = bigger;
  }

  bytes(b: Uint8Array): void {
    this.room(b.length);
    const buf = this.buf;
    let at = this.at;
    for (let i = 0; i < b.length; i++) buf[at++] = b[i]!;
    this.at = at;
  }

  byte(c: number): void {
    this.room(1);
    this.buf[this.at++] = c;
  }

  ascii(text: string): void {
    this.room(text.length);
    for (let i = 0; i < text.length; i++) this.buf[this.at++] = text.charCodeAt(i);
  }

  /**
   * A line of the store's: `prefix` (the line's start), the construct's cell with its
   * comma, then the six numbers (sums as whole multiples of 1e-12), comma-separated.
   */
  line(
    prefix: Uint8Array,
    construct: Uint8Array,
    windows: number,
    sumP: number,
    sumP2: number,
    above: number,
    episodes: number,
    longest: number,
  ): void {
    // Six numbers take at most 6 × 22 bytes with their commas.
    this.room(prefix.length + construct.length + 140);
    // TypedArray.set copies an array of the exact length fastest (a loop, or a subarray made per
    // line, took three times as long for the 70-odd bytes of a line's start).
    this.buf.set(prefix, this.at);
    this.at += prefix.length;
    this.buf.set(construct, this.at);
    this.at += construct.length;
    this.int(windows);
    this.buf[this.at++] = 44;
    this.scaled(sumP);
    this.buf[this.at++] = 44;
    this.scaled(sumP2);
    this.buf[this.at++] = 44;
    this.int(above);
    this.buf[this.at++] = 44;
    this.int(episodes);
    this.buf[this.at++] = 44;
    this.int(longest);
    this.buf[this.at++] = 10;
  }

  /** A whole number 0 ≤ n < 2^53, as String(n) writes it. */
  int(n: number): void {
    if (n < 2147483648) {
      // Counts: int32 arithmetic.
      let x = n | 0;
      let len = 1;
      for (let y = x; y >= 10; y = (y / 10) | 0) len++;
      this.room(len);
      const buf = this.buf;
      let p = this.at + len;
      while (x >= 10) {
        const q = (x / 10) | 0;
        buf[--p] = 48 + (x - q * 10);
        x = q;
      }
      buf[--p] = 48 + x;
      this.at += len;
      return;
    }
    let len = 1;
    for (let x = n; x >= 10; x = Math.floor(x / 10)) len++;
    this.room(len);
    const buf = this.buf;
    let p = this.at + len;
    let x = n;
    while (x >= 10) {
      const q = Math.floor(x / 10);
      buf[--p] = 48 + (x - q * 10);
      x = q;
    }
    buf[--p] = 48 + x;
    this.at += len;
  }

  /**
   * String(units / 1e12), the cell of a sum held as whole multiples of 1e-12, from the integer.
   * Exact where the decimal has at most 15 significant digits (units below 10^15, a sum below
   * 1000): such a decimal is the shortest that reads back as the double nearest to it (decimals of
   * 15 digits are always distinct doubles), which is what String gives. Below 10^6 units String
   * writes an exponent (1e-7), and from 10^15 the shortest form can be shorter than the exact
   * decimal: those go through String itself.
   */
  scaled(units: number): void {
    if (!(units >= 1e6 && units < 1e15) || !Number.isInteger(units)) {
      this.ascii(numberCell(units / SCALE));
      return;
    }
    const fraction = units % SCALE;
    this.int((units - fraction) / SCALE);
    if (fraction === 0) return;
    // The twelve decimals as two int32 halves of six digits, then without trailing zeros.
    let hi = Math.floor(fraction / 1e6);
    let lo = fraction - hi * 1e6;
    this.room(13);
    const buf = this.buf;
    buf[this.at++] = 46;
    const end = this.at + 12;
    let p = end;
    for (let i = 0; i < 6; i++) {
      const q = (lo / 10) | 0;
      buf[--p] = 48 + (lo - q * 10);
      lo = q;
    }
    for (let i = 0; i < 6; i++) {
      const q = (hi / 10) | 0;
      buf[--p] = 48 + (hi - q * 10);
      hi = q;
    }
    let last = end;
    while (buf[last - 1] === 48) last--;
    this.at = last;
  }
}

/** textCell of each text column as bytes, remembered from the row before (see TextCells). */
class TextBytes {
  private readonly last: string[] = [];
  private readonly cells: Buffer[] = [];

  cell(column: number, value: string): Buffer {
    if (this.last[column] !== value || this.cells[column] === undefined) {
      this.last[column] = value;
      this.cells[column] = Buffer.from(textCell(value), "utf8");
    }
    return this.cells[column]!;
  }
}

/** sessions.csv from summaries in the order of compareSummaries (a SummaryStore is written from its columns). */
export function sessionsCsv(
  summaries: Iterable<SessionSummary>,
  withActivity: boolean,
): Generator<string | Uint8Array> {
  if (summaries instanceof SummaryStore) return storeCsv(summaries, withActivity);
  return objectsCsv(summaries, withActivity);
}

function* objectsCsv(summaries: Iterable<SessionSummary>, withActivity: boolean): Generator<string> {
  yield csvLine(sessionColumns(withActivity));
  const text = new TextCells();
  let chunk = "";
  for (const s of summaries) {
    const activity = withActivity ? `${text.cell(4, s.activityId)},` : "";
    chunk +=
      `${text.cell(0, s.studentId)},${text.cell(1, s.classId)},${text.cell(2, s.schoolId)},` +
      `${text.cell(3, s.unitId)},${activity}${text.cell(5, s.sessionId)},${s.day},` +
      `${text.cell(6, s.construct)},${numberCell(s.windows)},${numberCell(s.sumP)},` +
      `${numberCell(s.sumP2)},${numberCell(s.above)},${numberCell(s.sustainedEpisodes)},` +
      `${numberCell(s.longestRun)}\n`;
    if (chunk.length > CHUNK_CHARS) {
      yield chunk;
      chunk = "";
    }
  }
  if (chunk.length > 0) yield chunk;
}

/**
 * The same lines from the store's columns: no object per row, the sums written from their
 * integers, and the ids of a sitting (student, session, day) taken once per sitting.
 */
function* storeCsv(store: SummaryStore, withActivity: boolean): Generator<Uint8Array> {
  const out = new CsvBytes();
  out.ascii(csvLine(sessionColumns(withActivity)));
  const text = new TextBytes();
  const mask = store.blockMask;
  const constructCells = store.keys.map((key) => Buffer.from(`${textCell(key)},`, "utf8"));
  // The line's start (student, class, school, unit, activity, session, day), made once per sitting and part.
  let prefix = new Uint8Array(0);
  for (const s of store.sittingOrder()) {
    const sitting = store.sitting(s);
    let prefixPart = -1;
    for (const r of store.rowsOf(s)) {
      const cols = store.blockOf(r);
      const i = r & mask;
      const partId = cols.part[i]!;
      if (partId !== prefixPart) {
        const part = store.parts[partId]!;
        const cells = [
          text.cell(0, sitting.studentId),
          text.cell(1, part.classId),
          text.cell(2, part.schoolId),
          text.cell(3, part.unitId),
          ...(withActivity ? [text.cell(4, part.activityId)] : []),
          text.cell(5, sitting.sessionId),
          text.cell(7, sitting.day),
        ];
        prefix = new Uint8Array(cells.reduce((n, c) => n + c.length + 1, 0));
        let at = 0;
        for (const c of cells) {
          prefix.set(c, at);
          at += c.length;
          prefix[at++] = 44;
        }
        prefixPart = partId;
      }
      out.line(
        prefix,
        constructCells[cols.construct[i]!]!,
        cols.windows[i]!,
        cols.sumP[i]!,
        cols.sumP2[i]!,
        cols.above[i]!,
        cols.episodes[i]!,
        cols.longest[i]!,
      );
    }
    if (out.full) yield out.take();
  }
  if (out.at > 0) yield out.take();
}
