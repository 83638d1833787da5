/**
 * A windows file read by two threads (windows-thread.ts: this thread reads the first part, another
 * parser the rest) must give exactly what reading it in one go gives: the same sessions.csv, the
 * same account (counts, examples with their lines and columns, duplicates), the same sittings,
 * replays and, in strict mode, the same stopping message. The reference is the one-thread run of
 * the same file; the file is split at every line start in turn. The later part's parser runs in this
 * thread here (the same code as in the worker, which the last test runs for real).
 */
import { mkdtempSync, readFileSync, writeFileSync } from "node:fs";
import { tmpdir } from "node:os";
import { join } from "node:path";
import { describe, expect, it } from "vitest";
import { DEFAULT_SETTINGS } from "../../src/config/defaults.js";
import type { Card, Settings } from "../../src/config/types.js";
import { summarizeWindowsFile, type WindowsResult } from "../../src/ingest/windows.js";
import { createRandom } from "../../src/stats/random.js";
import { sessionsCsv } from "../../src/summaries/sessions-csv.js";
import { testCard, testConstruct } from "../support/cards.js";

const card: Card = testCard([
  testConstruct({ sustainedMinWindows: 2 }),
  testConstruct({ key: "confused", label: "Confusion", threshold: 0.3, sustainedMinWindows: 3 }),
]);

const header = "student_id,class_id,unit_id,session_id,window_start,bored,confused";

/**
 * Sittings whose runs cross any split point (s1 has a run of 5 above-threshold windows), a sitting
 * over two units, rows the ordinary path reads (quoted ids, a quoted id with a line break), rows
 * rejected for several reasons, a blank line, an exact duplicate and a conflict.
 */
const lines = [
  "s1,c1,u1,a,2026-02-03T09:00:00-06:00,0.6,0.1",
  "s1,c1,u1,a,2026-02-03T09:00:20-06:00,0.7,0.4",
  "s1,c1,u1,a,2026-02-03T09:00:40-06:00,0.8,0.5",
  "s1,c1,u1,a,2026-02-03T09:01:00-06:00,0.9,",
  "s1,c1,u1,a,2026-02-03T09:01:20-06:00,0.55,0.6",
  "s1,c1,u1,a,2026-02-03T09:01:40-06:00,0.2,0.7",
  "s1,c1,u1,a,2026-02-03T09:03:00-06:00,0.6,0.1",
  "s1,c1,u2,a,2026-02-03T09:03:20-06:00,0.6,0.1",
  "s1,c1,u2,a,2026-02-03T09:03:40-06:00,1.5,0.1",
  "",
  '"s2",c1,u1,b,2026-02-03T10:00:00Z,0.1,0.9',
  "s2,c1,u1,b,2026-02-03T10:00:20Z,0.6,0.9",
  's2,"c1",u1,b,2026-02-03T10:00:40Z,0.6,0.9',
  "s2,c1,u1,b,2026-02-03T10:00:40Z,0.6,0.9",
  "s2,c1,u1,b,2026-02-03T10:01:00Z,0.6",
  "s2,c1,u1,b,2026-02-03T10:01:20Z,0.7,0.2",
  "s3,c2,u1,c,2026-02-04T10:00:00+01:00,0.5,0.5",
  "s3,c2,u1,c,2026-02-04T10:00:20+01:00,0.5,0.5",
  "s3,c2,u1,c,2026-02-04T10:00:20+01:00,0.4,0.5",
  ",c2,u1,c,2026-02-04T10:00:40+01:00,0.5,0.5",
  "s3,c2,u1,c,2026-02-04T25:00:40+01:00,0.5,0.5",
  '"s4\nx",c2,u1,d,2026-02-04T11:00:00Z,0.9,0.9',
  "s4,c2,u1,d,2026-02-04T11:00:20Z,0.9,0.9",
  "s4,c2,u1,d,2026-02-04T11:00:40Z,0.9,0.9",
  "s1,c1,u2,a,2026-02-03T09:04:00-06:00,0.6,0.1",
  "s5,c2,u1,e,2026-02-04T12:00:00Z,abc,0.1",
  "s5,c2,u1,e,2026-02-04T12:00:20Z,0.3,0.1",
];

function write(name: string, rows: readonly string[]): string {
  const dir = mkdtempSync(join(tmpdir(), "er-windows-split-"));
  const path = join(dir, name);
  writeFileSync(path, `${[header, ...rows].join("\n")}\n`);
  return path;
}

/** Offsets of every line start after the header's (each a possible split). */
function lineStarts(path: string): number[] {
  const data = readFileSync(path);
  const out: number[] = [];
  for (let i = data.indexOf(10); i !== -1 && i + 1 < data.length; i = data.indexOf(10, i + 1))
    out.push(i + 1);
  return out;
}

/** Everything a run hands on, as plain data. */
function outcome(r: WindowsResult) {
  const csv = [...sessionsCsv(r.store, false)]
    .map((c) => (typeof c === "string" ? c : Buffer.from(c).toString("utf8")))
    .join("");
  return {
    csv,
    rowsRead: r.account.rowsRead,
    blankLines: r.account.blankLines,
    duplicates: r.account.duplicates,
    duplicateExamples: r.account.duplicateExamples,
    reasons: r.account.byReason(),
    rowsWithoutEstimate: r.rowsWithoutEstimate,
    estimates: r.estimates,
    sittings: r.sittings,
    spanning: r.sittingsSpanningParts,
    replayed: r.replayedSittings,
  };
}

function expectEverySplit(path: string, settings: Settings = DEFAULT_SETTINGS): number {
  const one = outcome(summarizeWindowsFile(path, card, settings, { threads: 1 }));
  const starts = lineStarts(path);
  for (const splitAt of starts) {
    const two = outcome(
      summarizeWindowsFile(path, card, settings, { threads: 2, parts: [splitAt], workerHere: true }),
    );
    expect({ splitAt, ...two }).toEqual({ splitAt, ...one });
  }
  return starts.length;
}

function errorOf(run: () => unknown): string {
  try {
    run();
  } catch (error) {
    return `${(error as Error).name}: ${(error as Error).message}`;
  }
  return "no error";
}

describe("a windows file read in two parts", () => {
  it("gives what one thread gives, split at every line", () => {
    const path = write("mixed.csv", lines);
    const one = summarizeWindowsFile(path, card, DEFAULT_SETTINGS, { threads: 1 });
    // The file has what the test is about: rejections, a duplicate, a conflict, a replay.
    expect(one.account.rejected).toBeGreaterThanOrEqual(5);
    expect(one.account.duplicates).toBe(1);
    expect(one.replayedSittings).toBeGreaterThan(0);
    expect(one.store.length).toBeGreaterThan(5);
    expect(expectEverySplit(path)).toBe(lines.length + 1);
  });

  it("gives what one thread gives in three parts, split at every pair of lines", () => {
    const path = write("three.csv", lines);
    const one = outcome(summarizeWindowsFile(path, card, DEFAULT_SETTINGS, { threads: 1 }));
    const starts = lineStarts(path);
    let runs = 0;
    for (const a of starts) {
      for (const b of starts) {
        if (b <= a) continue;
        const three = outcome(
          summarizeWindowsFile(path, card, DEFAULT_SETTINGS, { threads: 2, parts: [a, b], workerHere: true }),
        );
        expect({ a, b, ...three }).toEqual({ a, b, ...one });
        runs++;
      }
    }
    expect(runs).toBe((starts.length * (starts.length - 1)) / 2);
  });

  it("gives what one thread gives for the same rows shuffled, split at every line", () => {
    const random = createRandom(5);
    // The row with a line break inside quotes stays whole; the others in a seeded random order.
    const rows = lines.filter((l) => l !== "");
    for (let i = rows.length - 1; i > 0; i--) {
      const j = random.int(i + 1);
      [rows[i], rows[j]] = [rows[j]!, rows[i]!];
    }
    expect(expectEverySplit(write("shuffled.csv", rows))).toBeGreaterThan(20);
  });

  it("sorted by time across sittings: runs that cross the split are exact", () => {
    const clock = (w: number) =>
      `2026-02-03T09:${String(Math.floor(w / 3)).padStart(2, "0")}:${String((w % 3) * 20).padStart(2, "0")}Z`;
    const rows: string[] = [];
    for (let w = 0; w < 12; w++)
      for (let s = 0; s < 4; s++) rows.push(`s${s},c1,u1,x${s},${clock(w)},${w % 5 === 4 ? 0.1 : 0.9},0.5`);
    const path = write("by-time.csv", rows);
    const one = summarizeWindowsFile(path, card, DEFAULT_SETTINGS, { threads: 1 });
    // By hand, bored per sitting: runs of 4, 4, 2 (windows 0-3, 5-8, 10-11), all sustained (≥ 2).
    expect(one.summaries.map((s) => [s.construct, s.sustainedEpisodes, s.longestRun])).toContainEqual([
      "bored",
      3,
      4,
    ]);
    expect(expectEverySplit(path)).toBe(rows.length);
  });

  it("in strict mode stops at the same row with the same message, split at every line", () => {
    const path = write("strict.csv", lines);
    const strict = { ...DEFAULT_SETTINGS, strict: true };
    const one = errorOf(() => summarizeWindowsFile(path, card, strict, { threads: 1 }));
    expect(one).toMatch(/^StrictRowError: .*strict\.csv:10:/);
    for (const splitAt of lineStarts(path)) {
      const two = errorOf(() =>
        summarizeWindowsFile(path, card, strict, { threads: 2, parts: [splitAt], workerHere: true }),
      );
      expect({ splitAt, error: two }).toEqual({ splitAt, error: one });
    }
  });

  it("a file with only a header is refused with the same message", () => {
    const path = write("header-only.csv", []);
    const one = errorOf(() => summarizeWindowsFile(path, card, DEFAULT_SETTINGS, { threads: 1 }));
    expect(one).toMatch(/^InputError: /);
    expect(errorOf(() => summarizeWindowsFile(path, card, DEFAULT_SETTINGS, { threads: 2 }))).toBe(one);
  });

  it("with the worker's parts parsed in a worker thread (the build in dist/: run npm run build first)", async () => {
    // Node 20 starts workers only from JavaScript, so this runs the compiled ingest.
    const dist = "../../dist/ingest/windows.js";
    const { summarizeWindowsFile: compiled } = (await import(
      dist
    )) as typeof import("../../src/ingest/windows.js");
    const path = write("worker.csv", lines);
    const one = outcome(summarizeWindowsFile(path, card, DEFAULT_SETTINGS, { threads: 1 }));
    const starts = lineStarts(path);
    for (let i = 3; i + 4 < starts.length; i += 7) {
      const parts = [starts[i]!, starts[i + 4]!];
      expect(outcome(compiled(path, card, DEFAULT_SETTINGS, { threads: 2, parts }))).toEqual(one);
    }
  });
});
