/**
 * sessions.csv from the column store must be byte for byte what String() of the doubles gives
 * (the file is the data contract, and the golden and SQL tests compare it). The reference here is
 * JavaScript's own String(number) (ECMA-262 Number::toString, shortest round-trip form) on the
 * double units / 1e12, never the formatter under test.
 */
import { mkdtempSync, rmSync } from "node:fs";
import { tmpdir } from "node:os";
import { join } from "node:path";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { loadCard } from "../../src/config/card.js";
import { DEFAULT_SETTINGS } from "../../src/config/defaults.js";
import { summarizeWindowsFile } from "../../src/ingest/windows.js";
import { createRandom } from "../../src/stats/random.js";
import { CsvBytes, sessionsCsv } from "../../src/summaries/sessions-csv.js";
import { type SqlCases, writeSqlCases } from "../sql/cases.js";

/** The values written one to a line by CsvBytes, and by String(units / 1e12). */
function expectAllScaled(values: readonly number[]): number {
  const out = new CsvBytes();
  for (const u of values) {
    out.scaled(u);
    out.byte(10);
  }
  const got = out.take().toString("latin1").split("\n");
  const wrong: string[] = [];
  values.forEach((u, i) => {
    const want = String(u / 1e12);
    if (got[i] !== want && wrong.length < 5) wrong.push(`${u}: ${got[i]} instead of ${want}`);
  });
  expect(wrong).toEqual([]);
  expect(got).toHaveLength(values.length + 1);
  return values.length;
}

describe("sums written from their integers", () => {
  it("equal String() of units / 1e12 near every boundary of the integer path", () => {
    const values: number[] = [];
    for (let u = 0; u <= 3000; u++) values.push(u);
    for (const edge of [1e6, 1e7, 1e11, 1e12, 1e13, 1e14, 1e15, 2 ** 53 / 2]) {
      for (let d = -3000; d <= 3000; d++) values.push(edge + d);
    }
    expect(expectAllScaled(values)).toBe(3001 + 8 * 6001);
  });

  it("equal String() on 400,000 seeded random sums of every size up to 2^53", () => {
    const random = createRandom(20261202);
    const values: number[] = [];
    for (let i = 0; i < 200_000; i++) {
      const digits = 1 + random.int(16);
      values.push(Math.floor(random.uniform() * 10 ** digits));
    }
    // Sums as the accumulator makes them: windows of 4-decimal probabilities, and their squares.
    for (let i = 0; i < 100_000; i++) {
      let sum = 0;
      let sum2 = 0;
      const windows = 1 + random.int(3000);
      for (let w = 0; w < windows; w += 1 + random.int(50)) {
        const p = random.int(10001) / 10000;
        sum += Math.round(p * 1e12);
        sum2 += Math.round(p * p * 1e12);
      }
      values.push(sum, sum2);
    }
    expect(expectAllScaled(values)).toBe(400_000);
  });

  it("writes whole numbers as String() does", () => {
    const random = createRandom(7);
    const values = [0, 1, 9, 10, 99, 100, 2 ** 31, 2 ** 53 - 1];
    for (let i = 0; i < 50_000; i++) values.push(random.int(2 ** 31));
    const out = new CsvBytes();
    for (const n of values) {
      out.int(n);
      out.byte(44);
    }
    expect(out.take().toString("latin1")).toBe(`${values.join(",")},`);
  });
});

describe("sessions.csv from the column store", () => {
  let cases: SqlCases;
  beforeAll(async () => {
    cases = await writeSqlCases(mkdtempSync(join(tmpdir(), "er-sessions-csv-")));
  });
  afterAll(() => rmSync(cases.dir, { recursive: true, force: true }));

  const text = (chunks: Iterable<string | Uint8Array>): string =>
    [...chunks].map((c) => (typeof c === "string" ? c : Buffer.from(c).toString("utf8"))).join("");

  it("is byte-identical to the file written from the summaries as objects, with String() numbers", () => {
    for (const [windows, card] of [
      [cases.demoWindows, cases.demoCard],
      [cases.messyWindows, cases.messyCard],
    ] as const) {
      const result = summarizeWindowsFile(windows, loadCard(card), DEFAULT_SETTINGS);
      const fromObjects = text(sessionsCsv([...result.summaries], true));
      const fromStore = text(sessionsCsv(result.store, true));
      expect(result.store.length).toBe(result.summaries.length);
      expect(fromStore.split("\n").length).toBeGreaterThan(100);
      expect(fromStore).toBe(fromObjects);
      expect(text(sessionsCsv(result.store, false))).toBe(text(sessionsCsv([...result.summaries], false)));
    }
  });

  it("counts the same students, sittings, classes, schools, units, days and windows as the objects", () => {
    for (const [windows, card] of [
      [cases.demoWindows, cases.demoCard],
      [cases.messyWindows, cases.messyCard],
    ] as const) {
      const result = summarizeWindowsFile(windows, loadCard(card), DEFAULT_SETTINGS);
      const objects = [...result.summaries];
      const census = result.store.census();
      expect(census.sessions).toBe(new Set(objects.map((s) => `${s.studentId}/${s.sessionId}`)).size);
      expect(census.students).toEqual(new Set(objects.map((s) => s.studentId)));
      expect(census.classes).toEqual(new Set(objects.map((s) => s.classId)));
      expect(census.schools).toEqual(new Set(objects.map((s) => s.schoolId)));
      expect(census.units).toEqual(new Set(objects.map((s) => s.unitId)));
      expect(census.days).toEqual(new Set(objects.map((s) => s.day)));
      const windowsBy = new Map<string, number>();
      for (const s of objects) windowsBy.set(s.construct, (windowsBy.get(s.construct) ?? 0) + s.windows);
      expect(census.windowsBy).toEqual(windowsBy);
      expect(census.students.size).toBeGreaterThan(5);
    }
  });

  it("iterates the same summaries, in the same order, as the objects", () => {
    const result = summarizeWindowsFile(cases.messyWindows, loadCard(cases.messyCard), DEFAULT_SETTINGS);
    expect([...result.store]).toEqual(result.summaries);
  });
});
