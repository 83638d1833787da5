/**
 * The byte-level record reader (src/ingest/csv-records.ts) against csv-parse, the reference CSV
 * parser (csv-parse 7.0.3, `csv-parse/sync`), on random CSV text.
 *
 * Comparison rule, from what csv-parse does with `relax_quotes` off (its default): a quote inside
 * an unquoted field ("Invalid Opening Quote"), text after a closing quote ("Invalid Closing Quote")
 * and a quote never closed ("Quote Not Closed") make it throw. Our reader does not stop: it reports
 * a "bad-quote" problem, gives up that physical line and reads on. So:
 * - csv-parse throws  ⇒ our reader reports at least one problem, and every problem is a quoting one;
 * - csv-parse accepts ⇒ our reader reports no problem and hands over exactly csv-parse's records.
 * When the text was built only from well-formed fields, the test also knows each record's line,
 * each field's column and the blank lines, counted here from the generated pieces (not from either
 * parser), and checks ours against them.
 *
 * Reference options: `bom: true` (a BOM at the start is not data), `skip_empty_lines: true` (our
 * reader hands blank lines to `blank()`, not as records), `relax_column_count: true` (the field
 * count is checked by the callers, not the reader), and the record delimiter fixed to CRLF or LF
 * as the data contract says (left to itself, csv-parse would take a first bare CR for the line
 * ending). One deliberate difference: a lone CR at the very end of a file is read by our reader as
 * a line ending whose LF was cut off; the reference is given that text with the LF restored.
 */
import { mkdtempSync, rmSync, writeFileSync } from "node:fs";
import { tmpdir } from "node:os";
import { join } from "node:path";
import { parse } from "csv-parse/sync";
import fc from "fast-check";
import { afterAll, describe, expect, it } from "vitest";
import { type RecordProblem, readRecordsFromFile } from "../../src/ingest/csv-records.js";

const dir = mkdtempSync(join(tmpdir(), "er-csv-property-"));
afterAll(() => rmSync(dir, { recursive: true, force: true }));

/**
 * Small limits so that records straddle chunk boundaries: the reader's chunk is at least twice the
 * record limit plus 16, so 2 × 512 + 16 = 1040 bytes, and the generated files run to a few KB.
 */
const SMALL = { maxRecordBytes: 512, chunkBytes: 1 } as const;

interface Read {
  readonly records: string[][];
  readonly lines: number[];
  readonly columns: number[][];
  readonly blanks: number[];
  readonly problems: RecordProblem[];
}

let fileNo = 0;
function readOurs(bytes: Buffer, small: boolean): Read {
  const path = join(dir, `input-${fileNo++}.csv`);
  writeFileSync(path, bytes);
  const out: Read = { records: [], lines: [], columns: [], blanks: [], problems: [] };
  readRecordsFromFile(
    path,
    {
      record(view) {
        out.records.push(Array.from({ length: view.count }, (_, i) => view.text(i)));
        out.lines.push(view.line);
        // Columns of every field, and column(count): just past the record's end.
        out.columns.push(Array.from({ length: view.count + 1 }, (_, i) => view.column(i)));
      },
      problem(problem) {
        out.problems.push(problem);
      },
      blank(line) {
        out.blanks.push(line);
      },
    },
    small ? SMALL : {},
  );
  return out;
}

function readReference(text: string): string[][] | Error {
  try {
    return parse(text, {
      bom: true,
      skip_empty_lines: true,
      relax_column_count: true,
      record_delimiter: ["\r\n", "\n"],
    }) as string[][];
  } catch (error) {
    return error as Error;
  }
}

// ---- generators -------------------------------------------------------------------------------

/** One character (or CRLF), weighted toward the ones that matter to CSV. */
const unit = fc.oneof(
  { weight: 4, arbitrary: fc.constantFrom(",", '"', "\r", "\n", "\r\n", " ", "\uFEFF") },
  { weight: 4, arbitrary: fc.constantFrom("a", "Z", "0", ".", "-", "é", "中", "😀") },
  // Any single code point (grapheme of one code point: no lone surrogates).
  { weight: 2, arbitrary: fc.string({ unit: "grapheme", minLength: 1, maxLength: 1 }) },
);

type Hostile = "stray" | "unclosed" | "after";

const fieldArb = fc.record({
  text: fc.string({ unit, maxLength: 6 }),
  quoteAnyway: fc.boolean(),
  /** Leave a CR unquoted where the contract's line endings (LF, CRLF) allow it: it is data. */
  bareCr: fc.boolean(),
  at: fc.nat(),
});
type Field = typeof fieldArb extends fc.Arbitrary<infer T> ? T & { hostile?: Hostile } : never;

const MAX_LINES = 80;
const lineArb = fc.oneof(
  { weight: 8, arbitrary: fc.array(fieldArb, { minLength: 1, maxLength: 6 }) },
  { weight: 1, arbitrary: fc.constant("blank" as const) },
);

const fileArb = fc.record({
  bom: fc.boolean(),
  lines: fc.array(lineArb, { maxLength: MAX_LINES, size: "max" }),
  terminators: fc.array(fc.constantFrom("\n", "\r\n"), { minLength: MAX_LINES, maxLength: MAX_LINES }),
  /** What ends the last line: nothing, LF, CRLF, or a CRLF cut after its CR. */
  last: fc.constantFrom("", "\n", "\r\n", "\r"),
  /** About half the files get one or two broken fields (hostile quoting); the rest are well formed. */
  breaks: fc.array(
    fc.record({
      line: fc.nat(),
      field: fc.nat(),
      how: fc.constantFrom<Hostile>("stray", "unclosed", "after"),
    }),
    { maxLength: 2 },
  ),
  small: fc.boolean(),
});
type File = typeof fileArb extends fc.Arbitrary<infer T> ? T : never;

/** The file's fields with its breaks applied (to copies: the generated value is left as it is). */
function withBreaks(file: File): (Field[] | "blank")[] {
  const lines: (Field[] | "blank")[] = file.lines.map((l) => (l === "blank" ? l : l.map((f) => ({ ...f }))));
  for (const b of file.breaks) {
    const l = lines[b.line % Math.max(1, lines.length)];
    if (l === undefined || l === "blank") continue;
    l[b.field % l.length]!.hostile = b.how;
  }
  return lines;
}

/** A field as written in the file: quoted when it must be (or by choice), then perhaps broken. */
function encode(f: Field): string {
  // A CR may stay unquoted unless it ends the field (it would then join the LF after it).
  const needsQuotes = /[",\n]/.test(f.text) || (/\r/.test(f.text) && (!f.bareCr || f.text.endsWith("\r")));
  const quoted = needsQuotes || f.quoteAnyway;
  const body = f.text.replaceAll('"', '""');
  switch (f.hostile) {
    case "stray": {
      // A bare quote inside the field (position 1 or later, so not an opening quote).
      const plain = quoted ? `"${body}"` : f.text;
      const at = 1 + (f.at % Math.max(1, plain.length));
      return `${plain.slice(0, at)}"${plain.slice(at)}`;
    }
    case "unclosed":
      return `"${body}`;
    case "after":
      return `"${body}"x`;
    default:
      return quoted ? `"${body}"` : f.text;
  }
}

interface Built {
  readonly text: string;
  readonly hostile: boolean;
  /** Known only when no field is hostile. */
  readonly records: string[][];
  readonly lines: number[];
  readonly columns: number[][];
  readonly blanks: number[];
}

/** Builds the file and, independently of both parsers, where each record and field starts. */
function build(file: File): Built {
  let text = "";
  let line = 1;
  let hostile = false;
  const records: string[][] = [];
  const lines: number[] = [];
  const columns: number[][] = [];
  const blanks: number[] = [];
  const chars = (s: string): number => [...s].length;
  const all = withBreaks(file);
  all.forEach((l, i) => {
    const end = i === all.length - 1 ? file.last : file.terminators[i]!;
    if (l === "blank" || (l.length === 1 && encode(l[0]!) === "")) {
      // A line with nothing on it (a single empty unquoted field is such a line too); an empty
      // last line with no line ending is no line at all.
      if (end !== "" || i < all.length - 1) blanks.push(line);
      text += end;
      line += end === "" ? 0 : 1;
      return;
    }
    const encoded = l.map(encode);
    if (l.some((f) => f.hostile !== undefined)) hostile = true;
    const cols: number[] = [];
    let sinceLineStart = "";
    for (const [j, e] of encoded.entries()) {
      if (j > 0) sinceLineStart += ",";
      cols.push(chars(sinceLineStart) + 1);
      sinceLineStart = (sinceLineStart + e).split("\n").at(-1)!;
    }
    cols.push(chars(sinceLineStart) + 1);
    records.push(l.map((f) => f.text));
    lines.push(line);
    columns.push(cols);
    const content = encoded.join(",");
    text += content + end;
    line += content.split("\n").length - 1 + (end === "" || end === "\r" ? 0 : 1);
  });
  // A BOM that the first field holds as data survives only behind a BOM at the start (both
  // parsers drop one BOM there), so the file then starts with one whatever `file.bom` says.
  const bom = file.bom || text.startsWith("\uFEFF");
  return { text: (bom ? "\uFEFF" : "") + text, hostile, records, lines, columns, blanks };
}

// ---- properties -------------------------------------------------------------------------------

describe("CSV record reader against csv-parse", () => {
  it("gives csv-parse's records, or reports a quoting problem where csv-parse throws", () => {
    fc.assert(
      fc.property(fileArb, (file) => {
        const built = build(file);
        const ours = readOurs(Buffer.from(built.text, "utf8"), file.small);
        const reference = readReference(built.text.endsWith("\r") ? `${built.text}\n` : built.text);
        if (reference instanceof Error) {
          expect(ours.problems.length).toBeGreaterThan(0);
          for (const p of ours.problems) expect(p.kind).toBe("bad-quote");
          return;
        }
        expect(ours.problems).toEqual([]);
        expect(ours.records).toEqual(reference);
        if (!built.hostile) {
          // Well-formed text: the generator's own account must agree with both parsers.
          expect(reference).toEqual(built.records);
          expect(ours.lines).toEqual(built.lines);
          expect(ours.columns).toEqual(built.columns);
          expect(ours.blanks).toEqual(built.blanks);
        }
      }),
      { numRuns: 200, seed: 20260101 },
    );
  });

  it("locates each quoting problem on the line it gives up, at a column on that line", () => {
    fc.assert(
      fc.property(fileArb, (file) => {
        const built = build(file);
        const ours = readOurs(Buffer.from(built.text, "utf8"), file.small);
        const physical = built.text.replace(/^\uFEFF/, "").split("\n");
        for (const p of ours.problems) {
          const lineText = physical[p.line - 1];
          expect(lineText).toBeDefined();
          expect(p.column).toBeGreaterThanOrEqual(1);
          expect(p.column).toBeLessThanOrEqual([...lineText!].length + 1);
        }
      }),
      { numRuns: 100, seed: 7 },
    );
  });

  // Worked examples of the two differences the property first found (kept as plain regressions).
  it("keeps a bare CR inside an unquoted field of a record that also has a quoted field", () => {
    const ours = readOurs(Buffer.from('x,y\n"a",b\rc\nz\n'), false);
    expect(ours.problems).toEqual([]);
    expect(ours.records).toEqual([["x", "y"], ["a", "b\rc"], ["z"]]);
  });

  it("reads a lone CR at the end of the file as a line ending on both paths", () => {
    expect(readOurs(Buffer.from("a,b\r"), false).records).toEqual([["a", "b"]]);
    expect(readOurs(Buffer.from('"a",b\r'), false).records).toEqual([["a", "b"]]);
    expect(readOurs(Buffer.from('"a"\r'), false).records).toEqual([["a"]]);
  });

  it("reports an unclosed quote on the line where it opens, even when a later quote closes it", () => {
    const text = 'a,b\n1,"2\n3,4\n5,"6",7\n8,9\n';
    const ours = readOurs(Buffer.from(text), false);
    expect(ours.problems).toHaveLength(1);
    expect(ours.problems[0]).toMatchObject({ kind: "bad-quote", line: 2, column: 3, field: 1 });
    // The lines after the given-up one are read again as records of their own.
    expect(ours.records).toEqual([
      ["a", "b"],
      ["3", "4"],
      ["5", "6", "7"],
      ["8", "9"],
    ]);
    expect(readReference(text)).toBeInstanceOf(Error);
  });
});
