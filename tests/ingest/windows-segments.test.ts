/**
 * The worker thread reduces its rows to segments (runs of rows of one sitting and part in time
 * order, src/summaries/segment.ts) and this thread adds a segment whole; the fast path skips the
 * leading id fields when they repeat the previous row's bytes. Both are shortcuts: the reference is
 * the same file read by one thread, row by row. The files are generated (seeded) to put segment
 * and batch ends inside runs, sittings that change part, windows without an estimate, gaps, rows
 * out of time order, repeated windows and ids that share their first bytes.
 */
import { mkdtempSync, writeFileSync } from "node:fs";
import { tmpdir } from "node:os";
import { join } from "node:path";
import { afterEach, describe, expect, it } from "vitest";
import { DEFAULT_SETTINGS } from "../../src/config/defaults.js";
import type { Card } from "../../src/config/types.js";
import { summarizeWindowsFile, type WindowsResult } from "../../src/ingest/windows.js";
import { setBatchRows } from "../../src/ingest/windows-thread.js";
import { createRandom, type Random } from "../../src/stats/random.js";
import { addToSegment, SEG_STRIDE, startSegment } from "../../src/summaries/segment.js";
import { ConstructPlan, SessionAccumulator } from "../../src/summaries/session-accumulator.js";
import { sessionsCsv } from "../../src/summaries/sessions-csv.js";
import { testCard, testConstruct } from "../support/cards.js";

const card: Card = testCard([
  testConstruct({ sustainedMinWindows: 2 }),
  testConstruct({ key: "confused", label: "Confusion", threshold: 0.3, sustainedMinWindows: 3 }),
  testConstruct({ key: "gaming", label: "Gaming", threshold: 0.7, sustainedMinWindows: 1 }),
]);

afterEach(() => setBatchRows(8192));

/** A probability cell: often above the thresholds in stretches, sometimes empty. */
function cell(random: Random, high: boolean): string {
  if (random.uniform() < 0.08) return "";
  const p = high ? 0.55 + 0.45 * random.uniform() : 0.6 * random.uniform();
  return p.toFixed(random.uniform() < 0.5 ? 2 : 4);
}

/** Rows of `sittings` sittings, each over one to three units, with gaps and runs. */
function rows(random: Random, sittings: number, columns: string): string[] {
  const out: string[] = [];
  for (let s = 0; s < sittings; s++) {
    // Ids that share their first bytes with the next sitting's (s1, s12, ...).
    const student = `s${s % 3 === 0 ? s : `${s}${s}`}`;
    let unit = 1;
    let t = Date.UTC(2026, 1, 3, 9, 0, 0) + s * 3_600_000;
    let high = false;
    const n = 1 + random.int(40);
    for (let w = 0; w < n; w++) {
      if (random.uniform() < 0.15) high = !high;
      if (random.uniform() < 0.06) unit++;
      t += random.uniform() < 0.1 ? 45_000 : 20_000;
      const time = new Date(t).toISOString().replace(".000Z", "Z");
      const values = [cell(random, high), cell(random, high), cell(random, high)];
      const ids = { student, cls: `c${s % 4}`, unit: `u${unit}`, session: `x${s}` };
      const line =
        columns === "leading"
          ? `${ids.student},${ids.cls},${ids.unit},${ids.session},${time},${values.join(",")}`
          : `${ids.student},note${w % 2},${ids.cls},${ids.unit},${ids.session},${time},${values.join(",")}`;
      out.push(line);
      // Now and then the same window again, or a window from earlier.
      if (random.uniform() < 0.02) out.push(line);
    }
  }
  // Some rows moved out of place.
  for (let i = 0; i < out.length / 30; i++) {
    const a = random.int(out.length);
    const b = random.int(out.length);
    [out[a], out[b]] = [out[b]!, out[a]!];
  }
  return out;
}

function write(header: string, lines: readonly string[]): string {
  const path = join(mkdtempSync(join(tmpdir(), "er-segments-")), "windows.csv");
  writeFileSync(path, `${[header, ...lines].join("\n")}\n`);
  return path;
}

function outcome(r: WindowsResult) {
  return {
    csv: [...sessionsCsv(r.store, false)]
      .map((c) => (typeof c === "string" ? c : Buffer.from(c).toString()))
      .join(""),
    rowsRead: r.account.rowsRead,
    duplicates: r.account.duplicates,
    reasons: r.account.byReason(),
    rowsWithoutEstimate: r.rowsWithoutEstimate,
    sittings: r.sittings,
    replayed: r.replayedSittings,
  };
}

describe("segments and repeated leading ids", () => {
  for (const columns of ["leading", "interleaved"]) {
    it(`give what one thread row by row gives (${columns} id columns)`, () => {
      const header =
        columns === "leading"
          ? "student_id,class_id,unit_id,session_id,window_start,bored,confused,gaming"
          : "student_id,note,class_id,unit_id,session_id,window_start,bored,confused,gaming";
      for (let seed = 1; seed <= 6; seed++) {
        const random = createRandom(seed);
        const lines = rows(random, 30, columns);
        const path = write(header, lines);
        const one = outcome(summarizeWindowsFile(path, card, DEFAULT_SETTINGS, { threads: 1 }));
        expect(one.rowsRead).toBe(lines.length);
        for (const batch of [1, 3, 17, 8192]) {
          setBatchRows(batch);
          const at = (share: number) => {
            const text = `${header}\n${lines.slice(0, Math.floor(lines.length * share)).join("\n")}\n`;
            return Buffer.byteLength(text);
          };
          const parts = [at(0.1), at(0.55)];
          const two = outcome(
            summarizeWindowsFile(path, card, DEFAULT_SETTINGS, { threads: 2, parts, workerHere: true }),
          );
          expect({ seed, batch, ...two }).toEqual({ seed, batch, ...one });
        }
      }
    });
  }

  it("values read by the fast path equal the ordinary path's reading of the same values quoted", () => {
    // Quoted fields always go the ordinary way (parseNumber); unquoted plain decimals the fast one.
    const spellings = [
      "0.5",
      "0.",
      "0.0030",
      "0.1",
      "0.99999999999999",
      "0.123456789012345",
      "0.1234567890123456",
      ".5",
      "00.5",
      "0",
      "1",
      "1.0",
      "1.00001",
      "0.5e0",
      "0.7 ",
      " 0.7",
      "0.4x",
      "",
      "0.0",
      "0.000000000001",
    ];
    const random = createRandom(3);
    const header = "student_id,class_id,unit_id,session_id,window_start,bored,confused,gaming";
    const plain: string[] = [];
    const quoted: string[] = [];
    for (let w = 0; w < 400; w++) {
      const values = [0, 1, 2].map(() => spellings[random.int(spellings.length)]!);
      const time = new Date(Date.UTC(2026, 1, 3, 9) + w * 20_000).toISOString().replace(".000Z", "Z");
      const ids = `s${w % 7},c1,u1,x${w % 7},${time}`;
      plain.push(`${ids},${values.join(",")}`);
      quoted.push(`${ids},${values.map((v) => `"${v}"`).join(",")}`);
    }
    const fast = summarizeWindowsFile(write(header, plain), card, DEFAULT_SETTINGS, { threads: 1 });
    const ordinary = summarizeWindowsFile(write(header, quoted), card, DEFAULT_SETTINGS, { threads: 1 });
    expect(fast.account.rejected).toBeGreaterThan(20);
    // The same rows taken and refused, for the same values; only the columns of the examples
    // differ (the quotes move them).
    const lines = (o: ReturnType<typeof outcome>) =>
      JSON.stringify(o, (key, value) => (key === "at" ? String(value).split(":")[1] : value));
    expect(lines(outcome(fast))).toBe(lines(outcome(ordinary)));
    expect(fast.store.length).toBeGreaterThan(10);
  });

  it("a sitting's windows added as segments, cut anywhere, sum and run as added one by one", () => {
    const plan = new ConstructPlan(card, [true, true, true]);
    const random = createRandom(11);
    for (let trial = 0; trial < 300; trial++) {
      const n = 1 + random.int(30);
      const times: number[] = [];
      const values: Float64Array[] = [];
      let t = 0;
      let high = random.uniform() < 0.5;
      for (let w = 0; w < n; w++) {
        t += random.uniform() < 0.15 ? 31_000 : 20_000;
        if (random.uniform() < 0.25) high = !high;
        times.push(t);
        values.push(Float64Array.from({ length: 3 }, () => Number(cell(random, high) || Number.NaN)));
      }
      const parts = 1 + random.int(3);
      const partOf = times.map(() => random.int(parts));
      const byRow = new SessionAccumulator("s", "x", plan);
      const bySegment = new SessionAccumulator("s", "x", plan);
      const ids = (id: number) => ({ classId: `c${id}`, schoolId: "", unitId: "u", activityId: "" });
      for (let w = 0; w < n; w++)
        byRow.add(times[w]!, 0, byRow.partIndex(partOf[w]!, ids(partOf[w]!)), values[w]!);
      const seg = new Float64Array(3 * SEG_STRIDE);
      for (let w = 0; w < n; ) {
        // A segment: one part, cut at random.
        let end = w + 1;
        while (end < n && partOf[end] === partOf[w] && random.uniform() < 0.7) end++;
        startSegment(seg, 0, 3);
        let without = 0;
        for (let i = w; i < end; i++) if (!addToSegment(plan, seg, 0, times[i]!, values[i]!)) without++;
        const part = bySegment.partIndex(partOf[w]!, ids(partOf[w]!));
        bySegment.merge(part, seg, 0, times[w]!, 0, times[end - 1]!, without);
        w = end;
      }
      expect({ trial, rows: bySegment.finish() }).toEqual({ trial, rows: byRow.finish() });
    }
  });
});
