/**
 * The emitted DuckDB query, run on DuckDB embedded (@duckdb/node-api 1.5.6-r.1), against
 * `summarize` on the same windows file: row by row, counts and runs exactly, sums to 1e-9.
 * The files and the comparison are described in cases.ts. The reference is summarize itself, whose
 * aggregation tests/ingest/independent-aggregation.test.ts checks against a naive one written from
 * DATA-CONTRACT.md; here the question is whether the SQL does the same thing.
 */
import { mkdtempSync, rmSync } from "node:fs";
import { tmpdir } from "node:os";
import { join } from "node:path";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { loadCard } from "../../src/config/card.js";
import { DEFAULT_SETTINGS } from "../../src/config/defaults.js";
import { readSessionsFile } from "../../src/ingest/sessions-file.js";
import { summarizeWindowsFile } from "../../src/ingest/windows.js";
import { sessionsQuery } from "../../src/sql/sessions-query.js";
import { SESSION_COLUMNS } from "../../src/summaries/types.js";
import { columnsOf, expectSameAsSummarize, type SqlCases, writeSqlCases } from "./cases.js";
import { runDuckDb } from "./engines.js";

describe("sessions query on DuckDB against summarize", () => {
  let cases: SqlCases;

  beforeAll(async () => {
    cases = await writeSqlCases(mkdtempSync(join(tmpdir(), "er-sql-duckdb-")));
  });
  afterAll(() => rmSync(cases.dir, { recursive: true, force: true }));

  it("agrees on the demo district with activity_id, and its CSV result reads back as the same summaries", async () => {
    const card = loadCard(cases.demoCard);
    const result = summarizeWindowsFile(cases.demoWindows, card, DEFAULT_SETTINGS);
    expect(result.columns.hasActivity).toBe(true);
    const query = sessionsQuery(card, { dialect: "duckdb", table: "windows", withActivity: true });
    const copyTo = join(cases.dir, "sessions-duckdb.csv");
    const run = await runDuckDb(cases.demoWindows, query, { copyTo });
    expect(columnsOf(run.rows)).toEqual([...SESSION_COLUMNS]);
    expectSameAsSummarize(run.rows, result.summaries, true);
    // Sustained episodes are there to compare (not all zero).
    expect(result.summaries.filter((s) => s.sustainedEpisodes > 0).length).toBeGreaterThan(50);

    // The seam: the engine's CSV is a sessions file that reads back as summarize's summaries.
    const read = readSessionsFile(copyTo, card, DEFAULT_SETTINGS);
    expect(read.account.rejected).toBe(0);
    expect(read.hasActivity).toBe(true);
    expect(read.summaries.length).toBe(result.summaries.length);
    read.summaries.forEach((s, i) => {
      const t = result.summaries[i]!;
      expect({ ...s, sumP: 0, sumP2: 0 }).toEqual({ ...t, sumP: 0, sumP2: 0 });
      expect(Math.abs(s.sumP - t.sumP)).toBeLessThanOrEqual(1e-9);
      expect(Math.abs(s.sumP2 - t.sumP2)).toBeLessThanOrEqual(1e-9);
    });
  });

  it("without --with-activity ignores the table's activity_id and matches summarize on data without one", async () => {
    const card = loadCard(cases.demoCard);
    const result = summarizeWindowsFile(cases.demoWithoutActivity, card, DEFAULT_SETTINGS);
    expect(result.columns.hasActivity).toBe(false);
    const query = sessionsQuery(card, { dialect: "duckdb", table: "windows", withActivity: false });
    expect(query).not.toContain("activity_id,");
    const run = await runDuckDb(cases.demoWindows, query);
    expect(columnsOf(run.rows)).toEqual(SESSION_COLUMNS.filter((c) => c !== "activity_id"));
    expectSameAsSummarize(run.rows, result.summaries, false);
  });

  it("agrees on the messy copy (shuffled, gaps, missing estimates, offsets, duplicates, conflicts, calibration)", async () => {
    const card = loadCard(cases.messyCard);
    const result = summarizeWindowsFile(cases.messyWindows, card, DEFAULT_SETTINGS);
    // The copy exercises what it is meant to, and nothing but duplicates and conflicts is rejected.
    expect(result.account.byReason().map((r) => r.reason)).toEqual(["conflict"]);
    expect(result.account.rejected).toBeGreaterThan(50);
    expect(result.account.duplicates).toBeGreaterThan(200);
    expect(result.rowsWithoutEstimate).toBeGreaterThan(200);
    expect(result.sittingsSpanningParts).toBeGreaterThan(100);
    expect(result.replayedSittings).toBe(result.sittings);
    // Offsets moved the local day of many sittings away from the demo's.
    const demo = summarizeWindowsFile(cases.demoWindows, loadCard(cases.demoCard), DEFAULT_SETTINGS);
    const demoDay = new Map(demo.summaries.map((s) => [`${s.studentId}|${s.sessionId}`, s.day]));
    const moved = new Set(
      result.summaries
        .filter((s) => demoDay.get(`${s.studentId}|${s.sessionId}`) !== s.day)
        .map((s) => s.sessionId),
    );
    expect(moved.size).toBeGreaterThan(20);

    const query = sessionsQuery(card, { dialect: "duckdb", table: "windows", withActivity: true });
    const asText = await runDuckDb(cases.messyWindows, query);
    expectSameAsSummarize(asText.rows, result.summaries, true);
    // Construct columns stored as DOUBLE instead of text give the same rows.
    const asDoubles = await runDuckDb(cases.messyWindows, query, {
      doubleColumns: card.constructs.map((c) => c.key),
    });
    expectSameAsSummarize(asDoubles.rows, result.summaries, true);
  });
});
