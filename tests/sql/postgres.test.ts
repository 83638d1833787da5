/**
 * The emitted PostgreSQL query, run on a real PostgreSQL server (Debian's postgresql package,
 * started here in a temporary folder on a loopback port and removed after), against `summarize`
 * on the same windows file: row by row, counts and runs exactly, sums to 1e-9 (cases.ts).
 * Without the server programs the test fails with a message saying what to install; it does not skip.
 */
import { mkdtempSync, rmSync } from "node:fs";
import { tmpdir } from "node:os";
import { join } from "node:path";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { loadCard } from "../../src/config/card.js";
import { DEFAULT_SETTINGS } from "../../src/config/defaults.js";
import { summarizeWindowsFile } from "../../src/ingest/windows.js";
import { sessionsQuery } from "../../src/sql/sessions-query.js";
import { SESSION_COLUMNS } from "../../src/summaries/types.js";
import { columnsOf, expectSameAsSummarize, type SqlCases, writeSqlCases } from "./cases.js";
import { type PostgresServer, startPostgres } from "./engines.js";

describe("sessions query on PostgreSQL against summarize", () => {
  let cases: SqlCases;
  let server: PostgresServer | null = null;

  beforeAll(async () => {
    cases = await writeSqlCases(mkdtempSync(join(tmpdir(), "er-sql-postgres-")));
    server = await startPostgres();
    server.loadCsv("demo_windows", cases.demoWindows);
    server.loadCsv("messy_windows", cases.messyWindows);
  });
  afterAll(() => {
    server?.stop();
    if (cases) rmSync(cases.dir, { recursive: true, force: true });
  });

  it("agrees on the demo district, with and without activity_id", () => {
    const card = loadCard(cases.demoCard);
    const withActivity = summarizeWindowsFile(cases.demoWindows, card, DEFAULT_SETTINGS);
    const rows = server!.rows(
      sessionsQuery(card, { dialect: "postgres", table: "demo_windows", withActivity: true }),
    );
    expect(columnsOf(rows)).toEqual([...SESSION_COLUMNS]);
    expectSameAsSummarize(rows, withActivity.summaries, true);

    const without = summarizeWindowsFile(cases.demoWithoutActivity, card, DEFAULT_SETTINGS);
    const rowsWithout = server!.rows(
      sessionsQuery(card, { dialect: "postgres", table: "public.demo_windows", withActivity: false }),
    );
    expect(columnsOf(rowsWithout)).toEqual(SESSION_COLUMNS.filter((c) => c !== "activity_id"));
    expectSameAsSummarize(rowsWithout, without.summaries, false);
  });

  it("agrees on the messy copy (shuffled, gaps, missing estimates, offsets, duplicates, conflicts, calibration)", () => {
    const card = loadCard(cases.messyCard);
    const result = summarizeWindowsFile(cases.messyWindows, card, DEFAULT_SETTINGS);
    expect(result.account.byReason().map((r) => r.reason)).toEqual(["conflict"]);
    expect(result.account.duplicates).toBeGreaterThan(200);
    const rows = server!.rows(
      sessionsQuery(card, { dialect: "postgres", table: "messy_windows", withActivity: true }),
    );
    expectSameAsSummarize(rows, result.summaries, true);
  });
});
