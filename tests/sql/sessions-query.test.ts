/**
 * The query text itself: the Spark SQL variant (no Spark here, so it is parsed, not run), the
 * calibration expressions evaluated on DuckDB against the formulas written out in this file, the
 * adjacency limit, and the `sql` command line. DuckDB and PostgreSQL run the whole query in
 * duckdb.test.ts and postgres.test.ts.
 */
import { spawnSync } from "node:child_process";
import { mkdtempSync, rmSync, writeFileSync } from "node:fs";
import { tmpdir } from "node:os";
import { join } from "node:path";
import { DuckDBInstance } from "@duckdb/node-api";
import { SparkSQL } from "dt-sql-parser";
import { afterAll, beforeAll, describe, expect, it, vi } from "vitest";
import { stringify as stringifyYaml } from "yaml";
import { loadCard } from "../../src/config/card.js";
import type { Calibration, Card } from "../../src/config/types.js";
import { UsageError } from "../../src/errors.js";
import { calibratedSql } from "../../src/sql/calibration-sql.js";
import { DIALECTS } from "../../src/sql/dialects.js";
import { adjacentMicros, sessionsQuery } from "../../src/sql/sessions-query.js";

// Runs the compiled CLI, as a user would (npm test builds dist/ first).
const cli = join(import.meta.dirname, "..", "..", "dist", "cli", "main.js");

/** A card written in the card's YAML form, with a construct key that is also an SQL keyword. */
function cardFile(dir: string): string {
  const construct = (threshold: number, calibration: unknown) => ({
    label: "A state",
    kind: "affect",
    higher_is: "concern",
    auc: 0.7,
    auc_positives: 100,
    auc_negatives: 400,
    threshold,
    sustained_min_windows: 3,
    calibration,
  });
  const path = join(dir, "card.yaml");
  writeFileSync(
    path,
    stringifyYaml({
      window_seconds: 20,
      constructs: {
        bored: construct(0.5, "none"),
        order: construct(0.3, { platt: { a: 0.8, b: -0.3 } }),
        confused: construct(0.25, {
          bins: [
            [0.1, 0.05],
            [0.3, 0.2],
            [1, 0.8],
          ],
        }),
      },
    }),
  );
  return path;
}

let dir: string;
let cardPath: string;
beforeAll(() => {
  dir = mkdtempSync(join(tmpdir(), "er-sql-text-"));
  cardPath = cardFile(dir);
});
afterAll(() => rmSync(dir, { recursive: true, force: true }));

/** The query without its header comment. */
function body(query: string): string {
  return query
    .split("\n")
    .filter((line) => !line.startsWith("--"))
    .join("\n");
}

describe("the Spark SQL variant (parsed, not run: no Spark in the tests)", () => {
  let card: Card;
  beforeAll(() => {
    card = loadCard(cardPath);
  });

  it("parses without error under the Spark SQL grammar of dt-sql-parser 4.5.1", () => {
    const parser = new SparkSQL();
    for (const withActivity of [true, false]) {
      const query = sessionsQuery(card, { dialect: "spark", table: "lake.windows", withActivity });
      expect(parser.validate(query)).toEqual([]);
    }
    // The grammar does reject broken text (a parenthesis left open).
    const broken = sessionsQuery(card, { dialect: "spark", table: "windows", withActivity: true }).replace(
      "LAG(e.above)",
      "LAG(e.above",
    );
    const quiet = vi.spyOn(console, "error").mockImplementation(() => undefined);
    try {
      expect(parser.validate(broken).length).toBeGreaterThan(0);
    } finally {
      quiet.mockRestore();
    }
  });

  it("is the DuckDB query (run in duckdb.test.ts) with exactly the dialect differences substituted", () => {
    const duck = body(sessionsQuery(card, { dialect: "duckdb", table: "windows", withActivity: true }));
    const spark = body(sessionsQuery(card, { dialect: "spark", table: "windows", withActivity: true }));
    const translated = duck
      .replaceAll("epoch_us(CAST(window_text AS TIMESTAMPTZ))", "unix_micros(to_timestamp(window_text))")
      .replaceAll(" AS VARCHAR)", " AS STRING)")
      .replace(/"([a-z_]+)"/g, "`$1`");
    expect(spark).toBe(translated);
    // What Spark lacks or reads differently is absent from its text.
    expect(spark).not.toMatch(/TIMESTAMPTZ|VARCHAR|DOUBLE PRECISION|EXTRACT\(EPOCH|epoch_us|::|"/);
    expect(spark).toContain("unix_micros(to_timestamp(window_text)) AS t_us");
    expect(spark).toContain("CAST(NULLIF(TRIM(CAST(`order` AS STRING)), '') AS DOUBLE) AS p2");
    expect(spark).toContain("ROWS BETWEEN UNBOUNDED PRECEDING AND CURRENT ROW");
    // The header says what was and was not run.
    expect(sessionsQuery(card, { dialect: "spark", table: "windows", withActivity: false })).toContain(
      "-- - Not run by engagement-report's own tests",
    );
  });

  it("has the PostgreSQL variant cast to timestamptz and read the epoch exactly", () => {
    const pg = body(sessionsQuery(card, { dialect: "postgres", table: "windows", withActivity: false }));
    expect(pg).toContain(
      "CAST(EXTRACT(EPOCH FROM CAST(window_text AS TIMESTAMPTZ)) * 1000000 AS BIGINT) AS t_us",
    );
    expect(pg).toContain("CAST(NULLIF(TRIM(CAST(\"order\" AS TEXT)), '') AS DOUBLE PRECISION) AS p2");
    expect(pg).not.toContain("activity_id");
  });
});

describe("pieces of the query", () => {
  it("sets adjacency at 1.5 window lengths in whole microseconds, boundary included", () => {
    // 1.5 × 20 s = 30 s; 1.5 × 2.5 s = 3.75 s; 1.5 × 0.1 s = 0.15 s (0.15000000000000002 s in
    // binary floating point, which must not add a microsecond).
    expect(adjacentMicros(20)).toBe(30_000_000);
    expect(adjacentMicros(2.5)).toBe(3_750_000);
    expect(adjacentMicros(0.1)).toBe(150_000);
    expect(
      sessionsQuery(loadCard(cardPath), {
        dialect: "duckdb",
        table: "windows",
        withActivity: false,
      }),
    ).toContain("s.t_us - s.prev_t_us > 30000000");
  });

  it("evaluates Platt and bins calibrations on DuckDB as the formulas give them", async () => {
    // Platt (1999): sigmoid(a·logit(p) + b), p held within [1e-12, 1 − 1e-12]; bins: the rate of
    // the first bin whose upper bound is at least p (Zadrozny & Elkan 2001). Written out here.
    const sigmoid = (x: number) => 1 / (1 + Math.exp(-x));
    const platt = (p: number, a: number, b: number) => {
      const q = Math.min(Math.max(p, 1e-12), 1 - 1e-12);
      return sigmoid(a * Math.log(q / (1 - q)) + b);
    };
    const bins: [number, number][] = [
      [0.1, 0.05],
      [0.3, 0.2],
      [1, 0.8],
    ];
    const binned = (p: number) => bins.find(([upper]) => p <= upper)![1];
    const cases: { calibration: Calibration; expected: (p: number) => number }[] = [
      { calibration: { kind: "platt", a: 0.8, b: -0.3 }, expected: (p) => platt(p, 0.8, -0.3) },
      { calibration: { kind: "platt", a: 1.7, b: 0.25 }, expected: (p) => platt(p, 1.7, 0.25) },
      { calibration: { kind: "bins", bins }, expected: binned },
      { calibration: { kind: "none" }, expected: (p) => p },
    ];
    const ps = [0, 1e-13, 0.05, 0.1, 0.1000001, 0.3, 0.42, 0.5, 0.9, 1 - 1e-13, 1];
    const instance = await DuckDBInstance.create(":memory:");
    const connection = await instance.connect();
    expect.assertions(cases.length * ps.length);
    try {
      for (const { calibration, expected } of cases) {
        const expression = calibratedSql(calibration, "p", DIALECTS.duckdb);
        const values = ps.map((p) => `(CAST('${p}' AS DOUBLE))`).join(", ");
        const reader = await connection.runAndReadAll(
          `SELECT p, ${expression} AS q FROM (VALUES ${values}) AS t(p) ORDER BY p`,
        );
        for (const [p, q] of reader.getRows() as [number, number][]) {
          expect(Math.abs(q - expected(p)), `${calibration.kind} at ${p}`).toBeLessThanOrEqual(1e-15);
        }
      }
    } finally {
      connection.closeSync();
      instance.closeSync();
    }
  });

  it("refuses a table name that is not a plain name", () => {
    const card = loadCard(cardPath);
    for (const table of ["windows; DROP TABLE x", "1windows", "a.b.c.d", "", '"windows"'])
      expect(() => sessionsQuery(card, { dialect: "postgres", table, withActivity: false })).toThrow(
        UsageError,
      );
    expect(
      sessionsQuery(card, { dialect: "postgres", table: "analytics.windows_2026", withActivity: false }),
    ).toContain("FROM analytics.windows_2026");
  });
});

describe("engagement-report sql", () => {
  let card: string;
  beforeAll(() => {
    card = cardPath;
  });

  it("prints the query for each dialect on stdout", () => {
    for (const dialect of ["duckdb", "postgres", "spark"]) {
      const r = spawnSync("node", [cli, "sql", "--dialect", dialect, "--card", card, "--with-activity"], {
        encoding: "utf8",
      });
      expect(r.status, r.stderr).toBe(0);
      expect(r.stdout).toContain(
        `-- Dialect: ${DIALECTS[dialect as keyof typeof DIALECTS].label}. Table: windows.`,
      );
      expect(r.stdout.trimEnd().endsWith(";")).toBe(true);
      expect(r.stdout).toContain("activity_id");
    }
    const help = spawnSync("node", [cli, "--help"], { encoding: "utf8" });
    expect(help.stdout).toMatch(/\n {2}sql +print the SQL query/);
  });

  it("answers a wrong command line with exit code 2 and an unreadable card with exit code 1", () => {
    const missingDialect = spawnSync("node", [cli, "sql", "--card", card], { encoding: "utf8" });
    expect(missingDialect.status).toBe(2);
    expect(missingDialect.stderr).toContain("sql needs --dialect with one of duckdb, postgres, spark");
    const wrongDialect = spawnSync("node", [cli, "sql", "--dialect", "oracle", "--card", card], {
      encoding: "utf8",
    });
    expect(wrongDialect.status).toBe(2);
    expect(wrongDialect.stderr).toContain('got "oracle"');
    const noCard = spawnSync("node", [cli, "sql", "--dialect", "spark"], { encoding: "utf8" });
    expect(noCard.status).toBe(2);
    expect(noCard.stderr).toContain("sql needs --card");
    const badTable = spawnSync("node", [cli, "sql", "--dialect", "spark", "--card", card, "--table", "a;b"], {
      encoding: "utf8",
    });
    expect(badTable.status).toBe(2);
    expect(badTable.stderr).toContain('the table name "a;b" is not a plain name');
    const missingFile = spawnSync(
      "node",
      [cli, "sql", "--dialect", "duckdb", "--card", join(dir, "none.yaml")],
      {
        encoding: "utf8",
      },
    );
    expect(missingFile.status).toBe(1);
    expect(missingFile.stderr).toContain("cannot read the detector card");
  });
});
