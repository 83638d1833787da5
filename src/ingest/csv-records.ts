/**
 * CSV records from a file, read as a byte stream (RFC 4180: comma, double quotes, header row; UTF-8
 * with or without BOM; LF or CRLF). Memory stays flat: one chunk buffer, records handed over as
 * byte ranges into it.
 *
 * Two paths, one result:
 * - the fast path splits an ordinary line (no double quote) at its commas, straight from bytes;
 * - a record with a double quote is first scanned for its structure here (where each field starts,
 *   where the record ends, stray or unclosed quotes with their line and column), then decoded by
 *   csv-parse, the reference parser. A property test checks both paths against csv-parse alone.
 *
 * Problems that belong to a record (stray quote, invalid UTF-8, a record past the size limit) are
 * handed to the sink with a location; reading goes on with the next line.
 */

import { isUtf8 } from "node:buffer";
import { closeSync, openSync, readSync } from "node:fs";
import { parse } from "csv-parse/sync";

export interface RecordView {
  /** The bytes that hold the fields: the chunk, or a scratch buffer for a decoded quoted record. */
  readonly buf: Buffer;
  readonly starts: Int32Array;
  readonly ends: Int32Array;
  readonly count: number;
  /** Physical line (1-based) where the record starts. */
  readonly line: number;
  /**
   * Physical line (1-based) where field i starts: the record's line, or a later one when a quoted
   * field before it holds a line break. Valid during the callback only.
   */
  lineOf(i: number): number;
  /**
   * Character column (1-based) where field i starts, on the line `lineOf(i)`; valid during the
   * callback only. `column(count)` is the column just past the record's last character (where a
   * missing field would have started), for messages about rows with too few fields.
   */
  column(i: number): number;
  /** Field i as text. */
  text(i: number): string;
}

export type RecordProblemKind = "bad-quote" | "bad-utf8" | "too-long";

export interface RecordProblem {
  readonly kind: RecordProblemKind;
  readonly line: number;
  readonly column: number;
  /** Index of the field where the problem is, when known (to name its column). */
  readonly field?: number;
  readonly detail: string;
  readonly value: string;
}

export interface RecordSink {
  /**
   * Optional fast path: offered each non-blank physical line (bytes start..end of `buf`, without
   * its line ending) before it is split. Returning true means the sink has taken the line as a
   * complete record; it may do so only for a line that holds no double quote and no byte above
   * 127, whose fields are then exactly its comma-separated parts. Returning false sends the line
   * down the ordinary path (`record` or `problem`), so a sink takes only the rows it can read
   * cheaply and leaves every irregular one, and its message, to the ordinary path.
   */
  line?(buf: Buffer, start: number, end: number, line: number): boolean;
  record(view: RecordView): void;
  problem(problem: RecordProblem): void;
  /** A line with nothing on it (after removing a CR). */
  blank(line: number): void;
}

export interface ReadOptions {
  /** Records longer than this many bytes are rejected (an unclosed quote would otherwise swallow the file). */
  readonly maxRecordBytes?: number;
  readonly chunkBytes?: number;
  /** Sees every byte read, in order (to hash the file in the same pass). */
  readonly onBytes?: (bytes: Buffer) => void;
  /**
   * Reading a part of a file (readRecordsFromFile): the byte offset to start at, which must be the
   * start of a line (no byte order mark is looked for there), and the offset from which no record
   * is begun: reading stops at the first record that starts at or after it, so a record that
   * crosses it is read whole.
   */
  readonly start?: number;
  readonly until?: number;
  /** The number of the line at `start` (1 when not given). */
  readonly firstLine?: number;
}

/** Where reading stopped: the offset of the first record not read (the file's size at its end) and its line. */
export interface ReadEnd {
  readonly offset: number;
  readonly line: number;
}

const MAX_FIELDS = 4096;

class Reader implements RecordView {
  buf: Buffer;
  starts = new Int32Array(MAX_FIELDS + 1);
  ends = new Int32Array(MAX_FIELDS + 1);
  count = 0;
  line = 1;
  /** Original byte offsets of field starts (for columns) and of the record's line start. */
  private origStarts = new Int32Array(MAX_FIELDS + 1);
  private origBuf: Buffer;
  private lineStart = 0;
  private ascii = true;
  /** The record spans several physical lines (a quoted field holds a line break). */
  private multiline = false;

  constructor(chunk: Buffer) {
    this.buf = chunk;
    this.origBuf = chunk;
  }

  lineOf(i: number): number {
    if (!this.multiline) return this.line;
    const at = this.origStarts[Math.min(i, this.count)]!;
    let line = this.line;
    for (let j = this.lineStart; j < at; j++) if (this.origBuf[j] === 10) line++;
    return line;
  }

  column(i: number): number {
    const at = this.origStarts[Math.min(i, this.count)]!;
    // Bytes are characters in ASCII; but a line break inside the record restarts the count.
    if (this.ascii && !this.multiline) return at - this.lineStart + 1;
    // Characters, not bytes: count the UTF-8 lead bytes before the field.
    let chars = 0;
    let lineStart = this.lineStart;
    for (let j = this.lineStart; j < at; j++) {
      const b = this.origBuf[j]!;
      if (b === 10) {
        lineStart = j + 1;
        chars = 0;
      } else if ((b & 0xc0) !== 0x80) chars++;
    }
    return at === lineStart ? 1 : chars + 1;
  }

  text(i: number): string {
    return this.buf.toString("utf8", this.starts[i]!, this.ends[i]!);
  }

  setFast(chunk: Buffer, lineStart: number, line: number, ascii: boolean, multiline = false): void {
    this.buf = chunk;
    this.origBuf = chunk;
    this.lineStart = lineStart;
    this.line = line;
    this.ascii = ascii;
    this.multiline = multiline;
    this.origStarts.set(this.starts.subarray(0, this.count));
    // On the fast path the field ends are file offsets too: the last one is where the record ends.
    if (this.count > 0) this.origStarts[this.count] = this.ends[this.count - 1]!;
  }

  setDecoded(
    fields: readonly string[],
    chunk: Buffer,
    lineStart: number,
    line: number,
    ascii: boolean,
    multiline: boolean,
  ): void {
    const scratch = Buffer.from(fields.join(""), "utf8");
    let at = 0;
    const n = Math.min(fields.length, MAX_FIELDS);
    for (let i = 0; i < n; i++) {
      const len = Buffer.byteLength(fields[i]!, "utf8");
      this.starts[i] = at;
      this.ends[i] = at + len;
      at += len;
    }
    this.count = n;
    this.buf = scratch;
    this.origBuf = chunk;
    this.lineStart = lineStart;
    this.line = line;
    this.ascii = ascii;
    this.multiline = multiline;
  }

  setOrigStart(i: number, at: number): void {
    this.origStarts[i] = at;
  }

  /** Where a decoded record ends in the file (for `column(count)`). */
  setOrigEnd(at: number): void {
    this.origStarts[this.count] = at;
  }
}

/**
 * Structure of a record that holds a double quote, from `pos`: where it ends and where each field
 * starts, or the first quoting problem. Returns "more" when the record runs past the bytes at hand.
 */
type QuotedScan =
  | { kind: "ok"; end: number; next: number; lines: number; fieldStarts: number[] }
  | { kind: "more" }
  | { kind: "error"; at: number; field: number; detail: string };

function scanQuoted(buf: Buffer, pos: number, len: number, eof: boolean, maxBytes: number): QuotedScan {
  const fieldStarts = [pos];
  let i = pos;
  let lines = 0;
  let atFieldStart = true;
  let inQuotes = false;
  let quoteOpenedAt = -1;
  // The quote that was open at the end of the record's first physical line, and that line's end.
  let spanningQuoteAt = -1;
  let spanningField = 0;
  let firstLineEnd = -1;
  /**
   * A problem found past the first physical line is reported where the record's first line went
   * wrong: at the quote that carried the record onto the next line. Only that first line is given
   * up (reading resumes on the next line), so the location must be on it; and in practice the cause
   * is nearly always that quote left unclosed, not the later text where the scan noticed.
   */
  const error = (at: number, detail: string): QuotedScan => {
    if (firstLineEnd >= 0 && at > firstLineEnd) {
      return {
        kind: "error",
        at: spanningQuoteAt,
        field: spanningField,
        detail: `a quoted field opens here and is not closed on this line, so the row runs on for ${lines} more line(s) and breaks there (${detail.replace(/ \(.*\)$/, "")}); close the quote on this line, or double each quote inside the field`,
      };
    }
    return { kind: "error", at, field: fieldStarts.length - 1, detail };
  };
  while (true) {
    if (i - pos > maxBytes) {
      return inQuotes
        ? error(quoteOpenedAt, `quoted field never closed within ${maxBytes} bytes`)
        : error(pos, `record longer than ${maxBytes} bytes`);
    }
    if (i >= len) {
      if (!eof) return { kind: "more" };
      if (inQuotes) return error(quoteOpenedAt, "quoted field never closed before the end of the file");
      // A lone CR at the very end of the file is read as a line ending whose LF was cut off, as on
      // the fast path (which strips it too), so both paths give the same fields.
      const end = len > pos && buf[len - 1] === 13 ? len - 1 : len;
      return { kind: "ok", end, next: len, lines, fieldStarts };
    }
    const b = buf[i]!;
    if (inQuotes) {
      if (b === 34) {
        if (i + 1 >= len && !eof) return { kind: "more" };
        // Bounded by len: past it the buffer holds stale bytes (allocUnsafe, earlier chunks), and a
        // stale quote there made a closing quote at the end of the file look like a doubled one.
        if (i + 1 < len && buf[i + 1] === 34) {
          i += 2;
          continue;
        }
        inQuotes = false;
        const after = buf[i + 1];
        const endOfLine =
          i + 1 >= len || after === 10 || (after === 13 && (i + 2 >= len || buf[i + 2] === 10));
        if (after !== 44 && !endOfLine) {
          return error(i + 1, "text after a closing quote (a quote inside a field must be doubled)");
        }
      } else if (b === 10) {
        if (lines === 0) {
          firstLineEnd = i;
          spanningQuoteAt = quoteOpenedAt;
          spanningField = fieldStarts.length - 1;
        }
        lines++;
      }
      i++;
      continue;
    }
    if (b === 44) {
      fieldStarts.push(i + 1);
      atFieldStart = true;
      i++;
      continue;
    }
    if (b === 10) {
      const end = i > pos && buf[i - 1] === 13 ? i - 1 : i;
      return { kind: "ok", end, next: i + 1, lines, fieldStarts };
    }
    if (b === 34) {
      if (!atFieldStart)
        return error(i, "a quote inside an unquoted field (quote the whole field and double the quote)");
      inQuotes = true;
      quoteOpenedAt = i;
    }
    atFieldStart = false;
    i++;
  }
}

function utf8Problem(view: Reader, buf: Buffer): RecordProblem | null {
  for (let f = 0; f < view.count; f++) {
    if (!isUtf8(buf.subarray(view.starts[f]!, view.ends[f]!))) {
      return {
        kind: "bad-utf8",
        line: view.line,
        column: view.column(f),
        field: f,
        detail: "bytes that are not valid UTF-8 (save the file as UTF-8)",
        value: buf.toString("latin1", view.starts[f]!, Math.min(view.ends[f]!, view.starts[f]! + 40)),
      };
    }
  }
  return null;
}

/** Where field f of a scanned record ends (before its comma, or at the record's end). */
function fieldEndOf(fieldStarts: readonly number[], f: number, end: number): number {
  return f + 1 < fieldStarts.length ? fieldStarts[f + 1]! - 1 : end;
}

/** Index of the first field of a quoted record whose bytes are not valid UTF-8, or -1. */
function invalidUtf8Field(buf: Buffer, fieldStarts: readonly number[], end: number): number {
  for (let f = 0; f < fieldStarts.length; f++) {
    if (!isUtf8(buf.subarray(fieldStarts[f]!, fieldEndOf(fieldStarts, f, end)))) return f;
  }
  return -1;
}

/** Reads every record of a file and hands it to the sink. Synchronous: the fastest way in Node. */
export function readRecordsFromFile(path: string, sink: RecordSink, options: ReadOptions = {}): ReadEnd {
  const fd = openSync(path, "r");
  let at = options.start ?? 0;
  try {
    return readRecords(
      (buf, offset, length) => {
        const n = readSync(fd, buf, offset, length, at);
        at += n;
        return n;
      },
      sink,
      options,
    );
  } finally {
    closeSync(fd);
  }
}

/** Where a field starts in the file, and its text. */
export interface FieldPlace {
  readonly line: number;
  readonly column: number;
  readonly text: string;
}

/**
 * Field `field` of the record that starts on `line`, read again from the file; null when no record
 * starts there. For messages about a row known only by its line (rows that disagree are found after
 * reading); reading stops at that record.
 */
export function findField(
  path: string,
  line: number,
  field: number,
  options: ReadOptions = {},
): FieldPlace | null {
  let found: FieldPlace | null = null;
  const stop = new Error("found");
  try {
    readRecordsFromFile(
      path,
      {
        record(view) {
          if (view.line < line) return;
          if (view.line === line && field < view.count)
            found = { line: view.lineOf(field), column: view.column(field), text: view.text(field) };
          throw stop;
        },
        problem(problem) {
          if (problem.line >= line) throw stop;
        },
        blank() {},
      },
      options,
    );
  } catch (error) {
    if (error !== stop) throw error;
  }
  return found;
}

/** The same over bytes in memory (tests, small inputs). */
export function readRecordsFromBuffer(data: Uint8Array, sink: RecordSink, options: ReadOptions = {}): void {
  let at = 0;
  readRecords(
    (buf, offset, length) => {
      const n = Math.min(length, data.length - at);
      buf.set(data.subarray(at, at + n), offset);
      at += n;
      return n;
    },
    sink,
    options,
  );
}

type ReadInto = (buf: Buffer, offset: number, length: number) => number;

function readRecords(read: ReadInto, sink: RecordSink, options: ReadOptions): ReadEnd {
  const maxRecordBytes = options.maxRecordBytes ?? 1 << 20;
  const chunkBytes = Math.max(options.chunkBytes ?? 1 << 22, maxRecordBytes * 2 + 16);
  let buf = Buffer.allocUnsafe(chunkBytes);
  let len = 0;
  let pos = 0;
  let eof = false;
  let line = options.firstLine ?? 1;
  let skipping = false; // inside an over-long line being discarded
  const view = new Reader(buf);
  /** File offset of buf[0]. */
  let base = options.start ?? 0;
  const until = options.until ?? Number.POSITIVE_INFINITY;

  const refill = (): void => {
    if (pos > 0) {
      buf.copy(buf, 0, pos, len);
      len -= pos;
      base += pos;
      pos = 0;
    }
    if (len === buf.length) {
      const bigger = Buffer.allocUnsafe(buf.length * 2);
      buf.copy(bigger, 0, 0, len);
      buf = bigger;
    }
    const n = read(buf, len, buf.length - len);
    if (n === 0) eof = true;
    else options.onBytes?.(buf.subarray(len, len + n));
    len += n;
  };

  refill();
  if (base === 0 && len >= 3 && buf[0] === 0xef && buf[1] === 0xbb && buf[2] === 0xbf) pos = 3;

  while (pos < len || !eof) {
    if (base + pos >= until && !skipping) return { offset: base + pos, line };
    if (pos >= len) {
      refill();
      continue;
    }
    let nl = buf.indexOf(10, pos);
    if (nl >= len) nl = -1;
    if (nl === -1 && !eof) {
      if (len - pos > maxRecordBytes && !skipping) {
        sink.problem({
          kind: "too-long",
          line,
          column: 1,
          detail: `line longer than ${maxRecordBytes} bytes`,
          value: buf.toString("latin1", pos, pos + 40),
        });
        skipping = true;
      }
      if (skipping) {
        pos = len;
      }
      refill();
      continue;
    }
    const lineEnd = nl === -1 ? len : nl;
    if (skipping) {
      skipping = false;
      pos = lineEnd + 1;
      line++;
      continue;
    }
    let contentEnd = lineEnd;
    if (contentEnd > pos && buf[contentEnd - 1] === 13) contentEnd--;
    if (contentEnd === pos) {
      sink.blank(line);
      pos = lineEnd + 1;
      line++;
      continue;
    }
    if (contentEnd - pos > maxRecordBytes) {
      sink.problem({
        kind: "too-long",
        line,
        column: 1,
        detail: `line longer than ${maxRecordBytes} bytes`,
        value: buf.toString("latin1", pos, pos + 40),
      });
      pos = lineEnd + 1;
      line++;
      continue;
    }
    if (sink.line?.(buf, pos, contentEnd, line)) {
      pos = lineEnd + 1;
      line++;
      continue;
    }
    // Fast path: split at commas; note quotes and non-ASCII bytes on the way.
    let count = 0;
    let quote = false;
    let high = false;
    view.starts[0] = pos;
    for (let i = pos; i < contentEnd; i++) {
      const b = buf[i]!;
      if (b === 44) {
        if (count < MAX_FIELDS - 1) {
          view.ends[count] = i;
          count++;
          view.starts[count] = i + 1;
        }
      } else if (b === 34) {
        quote = true;
        break;
      } else if (b > 127) {
        high = true;
      }
    }
    if (!quote) {
      view.ends[count] = contentEnd;
      view.count = count + 1;
      view.setFast(buf, pos, line, !high);
      const problem = high ? utf8Problem(view, buf) : null;
      if (problem) sink.problem(problem);
      else sink.record(view);
      pos = lineEnd + 1;
      line++;
      continue;
    }
    // A quote: scan the whole record's structure, then let csv-parse decode it.
    const scan = scanQuoted(buf, pos, len, eof, maxRecordBytes);
    if (scan.kind === "more") {
      refill();
      continue;
    }
    if (scan.kind === "error") {
      view.count = 0;
      let nonAscii = false;
      for (let i = pos; i < scan.at; i++) if (buf[i]! > 127) nonAscii = true;
      view.setFast(buf, pos, line, !nonAscii);
      view.setOrigStart(0, scan.at);
      sink.problem({
        kind: "bad-quote",
        line,
        column: view.column(0),
        field: scan.field,
        detail: scan.detail,
        value: buf.toString("utf8", Math.max(pos, scan.at - 20), Math.min(contentEnd, scan.at + 20)),
      });
      // Only the first physical line is given up; reading resumes on the next one.
      pos = lineEnd + 1;
      line++;
      continue;
    }
    const raw = buf.subarray(pos, scan.end);
    let nonAscii = false;
    for (let i = 0; i < raw.length; i++) if (raw[i]! > 127) nonAscii = true;
    const badField = nonAscii ? invalidUtf8Field(buf, scan.fieldStarts, scan.end) : -1;
    if (badField >= 0) {
      // Locate the field, as on the fast path, so the message can name its column.
      const at = scan.fieldStarts[badField]!;
      view.count = 0;
      view.setFast(buf, pos, line, false, scan.lines > 0);
      view.setOrigStart(0, at);
      sink.problem({
        kind: "bad-utf8",
        line: view.lineOf(0),
        column: view.column(0),
        field: badField,
        detail: "bytes that are not valid UTF-8 (save the file as UTF-8)",
        value: buf.toString(
          "latin1",
          at,
          Math.min(fieldEndOf(scan.fieldStarts, badField, scan.end), at + 40),
        ),
      });
    } else {
      // The record delimiter is given, not discovered: csv-parse would otherwise take the first
      // bare CR outside quotes for the line ending and split the record there, losing the fields
      // after it. The scan above has already ended the record at its LF (CRLF), so inside `raw` a
      // bare CR outside quotes is data, as on the fast path.
      const rows = parse(raw, {
        relax_column_count: true,
        bom: false,
        skip_empty_lines: false,
        record_delimiter: "\n",
      }) as string[][];
      const fields = rows[0] ?? [""];
      view.setDecoded(fields, buf, pos, line, !nonAscii, scan.lines > 0);
      for (let f = 0; f < Math.min(scan.fieldStarts.length, MAX_FIELDS); f++)
        view.setOrigStart(f, scan.fieldStarts[f]!);
      view.setOrigEnd(scan.end);
      sink.record(view);
    }
    pos = scan.next;
    line += scan.lines + 1;
  }
  return { offset: base + pos, line };
}
