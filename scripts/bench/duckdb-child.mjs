/**
 * One DuckDB run of the benchmark, in its own process so that its peak memory can be measured:
 * reads a windows file with read_csv and writes the session summaries to a CSV file.
 *
 *   node scripts/bench/duckdb-child.mjs JOB.json
 *
 * JOB.json: { windows, out, threads, query: "aggregate" | "runs", windowSeconds, tempDir,
 *             constructs: [{ key, threshold, minRun }] }
 * (tempDir: where DuckDB may spill when a sort outgrows its memory limit.)
 *
 * "aggregate": windows, sum_p, sum_p2 and above per student × session × class × school × unit ×
 * activity × construct (GROUP BY over the wide file, then one row per construct).
 * "runs": the same, plus sustained_episodes and longest_run from runs of consecutive
 * above-threshold windows (gaps and islands with window functions over the long table; a run
 * breaks when the next estimated window starts more than 1.5 window lengths later, and counts
 * for the part in which it started). Sitting and part travel through the window sort as 64-bit
 * hashes of their ids. Both queries give the sessions table of the data contract; the benchmark
 * checks them against `summarize` on its smallest file.
 * Prints one JSON line: { ms, rows, maxRssKb } (ms from before the instance opens to after COPY).
 */
import { readFileSync } from "node:fs";
import { performance } from "node:perf_hooks";
import { DuckDBInstance } from "@duckdb/node-api";

const job = JSON.parse(readFileSync(process.argv[2], "utf8"));
const q = (s) => `'${String(s).replaceAll("'", "''")}'`;
const id = (s) => `"${String(s).replaceAll('"', '""')}"`;
const ID_COLUMNS = ["student_id", "class_id", "school_id", "unit_id", "activity_id", "session_id"];
const keys = job.constructs.map((c) => c.key);

const columns = Object.fromEntries([
  ...ID_COLUMNS.map((c) => [c, "VARCHAR"]),
  ["window_start", "VARCHAR"],
  ...keys.map((k) => [k, "DOUBLE"]),
]);
const source = `read_csv(${q(job.windows)}, header = true, delim = ',', quote = '"', columns = {${Object.entries(
  columns,
)
  .map(([name, type]) => `${q(name)}: ${q(type)}`)
  .join(", ")}})`;
const part = ID_COLUMNS.map(id).join(", ");
const order = `ORDER BY student_id, session_id, class_id, school_id, unit_id, activity_id, construct_order`;

/** Per part: windows, sum_p, sum_p2 and above of every construct, as one wide row. */
function wideSums() {
  const perConstruct = job.constructs
    .map((c) => {
      const k = id(c.key);
      return [
        `count(${k}) AS ${id(`${c.key}__windows`)}`,
        `sum(${k}) AS ${id(`${c.key}__sum_p`)}`,
        `sum(${k} * ${k}) AS ${id(`${c.key}__sum_p2`)}`,
        `count_if(${k} >= ${Number(c.threshold)}) AS ${id(`${c.key}__above`)}`,
      ].join(", ");
    })
    .join(",\n      ");
  return `SELECT ${part}, left(arg_min(window_start, window_start::TIMESTAMPTZ), 10) AS day,
      ${perConstruct}
    FROM ${source}
    GROUP BY ALL`;
}

/** The wide sums as one row per part × construct with at least one estimate. */
function longSums() {
  const rows = job.constructs
    .map(
      (c, i) =>
        `SELECT ${part}, day, ${q(c.key)} AS construct, ${i} AS construct_order, ${id(`${c.key}__windows`)} AS windows, ` +
        `${id(`${c.key}__sum_p`)} AS sum_p, ${id(`${c.key}__sum_p2`)} AS sum_p2, ${id(`${c.key}__above`)} AS above FROM g`,
    )
    .join("\n    UNION ALL ");
  return `SELECT * FROM (${rows}) WHERE windows > 0`;
}

function aggregateSql() {
  return `
  WITH g AS (${wideSums()}), l AS (${longSums()})
  SELECT l.* EXCLUDE (construct_order) FROM l
  ${order}`;
}

/**
 * Runs over a narrow long table (sitting and part as 64-bit hashes, construct as its index), so the
 * window sort carries a few numbers per estimate rather than every id; ids come back by joining the
 * run totals to the sums.
 */
function runsSql() {
  const adjacentMs = 1.5 * Number(job.windowSeconds) * 1000;
  const card = `(VALUES ${job.constructs
    .map((c, i) => `(${q(c.key)}, ${i}, ${Number(c.threshold)}, ${Number(c.minRun)})`)
    .join(", ")}) AS card(construct, construct_order, threshold, min_run)`;
  return `
  WITH g AS (${wideSums()}), l AS (
    SELECT *, hash(student_id, session_id) AS sitting, hash(class_id, school_id, unit_id, activity_id) AS part
    FROM (${longSums()})
  ), w AS (
    SELECT hash(student_id, session_id) AS sitting, hash(class_id, school_id, unit_id, activity_id) AS part,
      epoch_ms(window_start::TIMESTAMPTZ) AS ts, ${keys.map(id).join(", ")}
    FROM ${source}
  ), t AS (
    SELECT u.sitting, u.part, u.ts, card.construct_order, card.min_run, u.p >= card.threshold AS up
    FROM (UNPIVOT w ON ${keys.map(id).join(", ")} INTO NAME construct VALUE p) u JOIN ${card} USING (construct)
  ), n AS (
    SELECT sitting, part, construct_order, min_run, up, ts,
      lag(up) OVER win AS prev_up, lag(ts) OVER win AS prev_ts,
      lead(up) OVER win AS next_up, lead(ts) OVER win AS next_ts, row_number() OVER win AS rn
    FROM t
    WINDOW win AS (PARTITION BY sitting, construct_order ORDER BY ts)
  ), s AS (
    SELECT sitting, part, construct_order, min_run, up, rn,
      coalesce(prev_up AND ts - prev_ts <= ${adjacentMs}, false) AS continues,
      coalesce(next_up AND next_ts - ts <= ${adjacentMs}, false) AS continued
    FROM n
  ), edges AS (
    SELECT sitting, part, construct_order, min_run, rn, NOT continues AS opens, NOT continued AS closes
    FROM s WHERE up AND NOT (continues AND continued)
  ), runs AS (
    SELECT * FROM (
      SELECT sitting, construct_order, min_run, closes,
        CASE WHEN opens THEN 1 ELSE rn - lag(rn) OVER e + 1 END AS len,
        CASE WHEN opens THEN part ELSE lag(part) OVER e END AS part
      FROM edges
      WINDOW e AS (PARTITION BY sitting, construct_order ORDER BY rn)
    ) WHERE closes
  ), run_totals AS (
    SELECT sitting, part, construct_order, count_if(len >= min_run) AS sustained_episodes, max(len) AS longest_run
    FROM runs GROUP BY ALL
  )
  SELECT ${part}, day, construct, windows, sum_p, sum_p2, above,
    coalesce(sustained_episodes, 0) AS sustained_episodes, coalesce(longest_run, 0) AS longest_run
  FROM l LEFT JOIN run_totals USING (sitting, part, construct_order)
  ${order}`;
}

const start = performance.now();
const instance = await DuckDBInstance.create(":memory:");
const connection = await instance.connect();
await connection.run(`SET threads = ${Number(job.threads)}`);
await connection.run("SET TimeZone = 'UTC'");
if (job.tempDir) await connection.run(`SET temp_directory = ${q(job.tempDir)}`);
const sql = job.query === "runs" ? runsSql() : aggregateSql();
const result = await connection.run(`COPY (${sql}) TO ${q(job.out)} (HEADER, DELIMITER ',')`);
const rows = Number(result.rowsChanged);
const ms = performance.now() - start;
connection.closeSync();
instance.closeSync();
process.stdout.write(`${JSON.stringify({ ms, rows, maxRssKb: process.resourceUsage().maxRSS })}\n`);
