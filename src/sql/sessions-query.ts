/**
 * The windows table → the sessions table of the data contract, as one SQL query, for data too
 * large for one machine: a database or Spark runs it, and `build --sessions` reads the result.
 *
 * It is the aggregation of `summarize` (src/ingest/windows.ts, src/summaries/session-accumulator.ts)
 * written as SQL, stage by stage:
 *   typed          the table's columns as text and doubles (an empty estimate is NULL)
 *   distinct_rows  exact duplicates (same ids, instant, offset and estimates) once
 *   counted/clean  rows that share student, session and instant but differ are all set aside;
 *                  each sitting's day is the local date of its earliest window
 *   unpivoted      one row per window × construct (a cross join with the card's constructs)
 *   estimates      only estimated windows; calibrated probability; raw probability ≥ threshold
 *   steps..run_rows  gaps and islands: a run starts at an above-threshold window whose previous
 *                  estimated window (same sitting and construct) is missing, below the threshold
 *                  or more than 1.5 windows earlier; a running sum of starts numbers the runs
 *   part_runs      runs credited to the part (class, school, unit, activity) where they start
 *   part_windows   windows, sums and above-threshold counts per part
 */
import type { Card } from "../config/types.js";
import { UsageError } from "../errors.js";
import { SESSION_COLUMNS } from "../summaries/types.js";
import { VERSION } from "../version.js";
import { calibratedSql, doubleLiteral } from "./calibration-sql.js";
import { DIALECTS, type DialectName, type SqlDialect } from "./dialects.js";

export interface SessionsQueryOptions {
  readonly dialect: DialectName;
  /** The table (or view) holding the windows file's columns; may be qualified: schema.table. */
  readonly table: string;
  /** Keep activity_id: the table has that column, and sessions rows are split by it. */
  readonly withActivity: boolean;
}

export const DEFAULT_TABLE = "windows";

const TABLE_NAME = /^[A-Za-z_][A-Za-z0-9_]*(\.[A-Za-z_][A-Za-z0-9_]*){0,2}$/;

/** Throws UsageError unless the name is a plain (optionally qualified) table name. */
export function checkTableName(table: string): void {
  if (!TABLE_NAME.test(table))
    throw new UsageError(
      `the table name ${JSON.stringify(table)} is not a plain name. Give letters, digits and _ (not starting with a digit), optionally qualified as schema.table; for another name, create a view with a plain name over it.`,
    );
}

/** The whole query: header comment, CTEs, final SELECT. */
export function sessionsQuery(card: Card, options: SessionsQueryOptions): string {
  checkTableName(options.table);
  const d = DIALECTS[options.dialect];
  const parts = ["class_id", "school_id", "unit_id", ...(options.withActivity ? ["activity_id"] : [])];
  const sitting = ["student_id", "session_id"];
  const ids = [...sitting, ...parts];
  const estimates = card.constructs.map((_, i) => `p${i + 1}`);
  const ctes = [
    typedCte(card, options, d, estimates),
    distinctCte(ids, estimates, d),
    countedCte(ids, estimates),
    cleanCte(ids, estimates),
    constructsCte(card, d),
    unpivotedCte(ids, estimates),
    estimatesCte(card, ids, d),
    stepsCte(),
    startsCte(adjacentMicros(card.windowSeconds)),
    numberedCte(),
    runRowsCte(ids),
    partRunsCte(ids),
    partWindowsCte(ids),
  ];
  return [
    ...header(card, options, d).map((line) => (line === "" ? "--" : `-- ${line}`)),
    "WITH",
    ctes.join(",\n"),
    finalSelect(ids, options.withActivity),
  ].join("\n");
}

/**
 * Largest gap between consecutive estimated windows' starts, in whole microseconds, that still
 * counts as adjacent: 1.5 window lengths, boundary included (as in ConstructPlan.adjacentMs).
 */
export function adjacentMicros(windowSeconds: number): number {
  return Math.floor(1.5 * windowSeconds * 1e6 + 1e-3);
}

function header(card: Card, options: SessionsQueryOptions, d: SqlDialect): string[] {
  const activity = options.withActivity ? "activity_id, " : "";
  const calibration = (c: Card["constructs"][number]): string => {
    const cal = c.calibration;
    if (cal.kind === "none") return "none";
    if (cal.kind === "platt") return `platt a=${cal.a} b=${cal.b}`;
    return `bins ${cal.bins.map(([u, r]) => `<=${u}:${r}`).join(" ")}`;
  };
  return [
    `engagement-report ${VERSION}: the sessions table of the data contract from a windows table.`,
    `Dialect: ${d.label}. Table: ${options.table}. Card: window_seconds ${card.windowSeconds};`,
    "constructs in card order (threshold on the raw probability, sustained_min_windows, calibration):",
    ...card.constructs.map(
      (c) => `  ${c.key}: threshold ${c.threshold}, ${c.sustainedMinWindows} windows, ${calibration(c)}`,
    ),
    "",
    "Assumes:",
    `- ${options.table} has the windows file's columns: student_id, class_id, school_id, unit_id,`,
    `  ${activity}session_id, window_start, and one column per construct above (text or number;`,
    `  empty or NULL = not estimated). Ids are text; school_id${
      options.withActivity ? " and activity_id" : ""
    } may be empty or NULL.`,
    "- window_start is the text as written in the windows file: ISO 8601 with its UTC offset, such",
    "  as 2026-02-02T08:12:52-06:00. The instant (order, gaps) comes from casting it; the day of a",
    "  sitting is the first 10 characters of its earliest window, which is the local date in the",
    "  offset the row was written in. A timestamptz column has lost that offset: keep the text.",
    "  Fractions of a second are kept to the microsecond.",
    "- The rows are clean: this query does not validate them (ids present, probabilities in [0, 1],",
    "  date-times with an offset). Run `engagement-report check --windows FILE --card CARD` on the",
    "  data first, or load only rows that it accepts. As summarize does, an exact duplicate",
    "  (same student, session and window_start) counts once, and rows that share student, session",
    "  and window_start but differ are all left out; unlike check, the query does not report them.",
    ...(options.withActivity
      ? []
      : ["- activity_id is not read: rows of a part that differ only in activity are summed together."]),
    ...d.requirements.map((line) => (line.startsWith("  ") ? line : `- ${line}`)),
    "",
    "Result: one row per student, session, part and construct, with the sessions.csv columns",
    ...wrap(sessionOutputColumns(options.withActivity), 90).map((line) => `  ${line}`),
    "in no particular order. Save it as CSV with a header row and run",
    "  engagement-report build --sessions FILE --card CARD --out DIR",
    "",
  ];
}

function sessionOutputColumns(withActivity: boolean): string[] {
  return SESSION_COLUMNS.filter((c) => withActivity || c !== "activity_id");
}

/** Comma-separated names, in lines of at most `width` characters. */
function wrap(names: readonly string[], width: number): string[] {
  const lines: string[] = [];
  let line = "";
  for (const [i, name] of names.entries()) {
    const item = i < names.length - 1 ? `${name},` : name;
    if (line !== "" && line.length + 1 + item.length > width) {
      lines.push(line);
      line = item;
    } else {
      line = line === "" ? item : `${line} ${item}`;
    }
  }
  if (line !== "") lines.push(line);
  return lines;
}

const list = (columns: readonly string[], prefix = ""): string =>
  columns.map((c) => `${prefix}${c}`).join(", ");

function cte(name: string, comment: string | null, body: string[]): string {
  const lines = [...(comment === null ? [] : [`  -- ${comment}`]), ...body.map((l) => `  ${l}`)];
  return `${name} AS (\n${lines.join("\n")}\n)`;
}

function typedCte(card: Card, options: SessionsQueryOptions, d: SqlDialect, estimates: string[]): string {
  const text = (column: string) => `CAST(${column} AS ${d.text})`;
  const optionalId = (column: string) => `COALESCE(${text(column)}, '') AS ${column}`;
  return cte("typed", "the table's columns as text and doubles; an empty estimate is NULL", [
    "SELECT",
    `  ${text("student_id")} AS student_id,`,
    `  ${text("session_id")} AS session_id,`,
    `  ${text("class_id")} AS class_id,`,
    `  ${optionalId("school_id")},`,
    `  ${text("unit_id")} AS unit_id,`,
    ...(options.withActivity ? [`  ${optionalId("activity_id")},`] : []),
    // A lower-case t or z and a decimal comma are valid ISO 8601; the engines read only T, Z and '.'.
    `  REPLACE(UPPER(TRIM(${text("window_start")})), ',', '.') AS window_text,`,
    ...card.constructs.map(
      (c, i) =>
        `  CAST(NULLIF(TRIM(${text(d.quote(c.key))}), '') AS ${d.double}) AS ${estimates[i]}${
          i < card.constructs.length - 1 ? "," : ""
        }`,
    ),
    `FROM ${options.table}`,
  ]);
}

function distinctCte(ids: string[], estimates: string[], d: SqlDialect): string {
  return cte(
    "distinct_rows",
    "an exact duplicate (same ids, instant, local time and estimates) counts once",
    [
      "SELECT DISTINCT",
      `  ${list(ids)},`,
      `  ${d.instantMicros("window_text")} AS t_us,`,
      "  SUBSTR(window_text, 1, 10) AS local_date,",
      "  SUBSTR(window_text, 12, 8) AS local_time,",
      `  ${list(estimates)}`,
      "FROM typed",
    ],
  );
}

function countedCte(ids: string[], estimates: string[]): string {
  return cte("counted", null, [
    `SELECT ${list(ids)}, t_us, local_date, ${list(estimates)},`,
    "  COUNT(*) OVER (PARTITION BY student_id, session_id, t_us) AS copies",
    "FROM distinct_rows",
  ]);
}

function cleanCte(ids: string[], estimates: string[]): string {
  return cte(
    "clean",
    "rows that share student, session and instant but differ are all left out; the sitting's day is the local date of its earliest window",
    [
      `SELECT ${list(ids)}, t_us, ${list(estimates)},`,
      "  FIRST_VALUE(local_date) OVER (PARTITION BY student_id, session_id ORDER BY t_us) AS sitting_day",
      "FROM counted",
      "WHERE copies = 1",
    ],
  );
}

function constructsCte(card: Card, d: SqlDialect): string {
  const rows = card.constructs.map((c, i) => {
    const values = [
      String(i + 1),
      `'${c.key}'`,
      doubleLiteral(c.threshold, d),
      String(c.sustainedMinWindows),
    ];
    if (i > 0) return `UNION ALL SELECT ${values.join(", ")}`;
    const names = ["construct_order", "construct", "threshold", "min_run"];
    return `SELECT ${values.map((v, j) => `${v} AS ${names[j]}`).join(", ")}`;
  });
  return cte("constructs", "the card: construct keys in card order, thresholds, minimum sustained run", rows);
}

function unpivotedCte(ids: string[], estimates: string[]): string {
  const pick = estimates.map((p, i) => `WHEN ${i + 1} THEN c.${p}`).join(" ");
  return cte("unpivoted", "one row per window and construct", [
    `SELECT ${list(ids, "c.")}, c.t_us, c.sitting_day,`,
    "  k.construct_order, k.construct, k.threshold, k.min_run,",
    `  CASE k.construct_order ${pick} END AS p`,
    "FROM clean c CROSS JOIN constructs k",
  ]);
}

function estimatesCte(card: Card, ids: string[], d: SqlDialect): string {
  const calibrated = card.constructs.map((c) => calibratedSql(c.calibration, "p", d));
  const q = calibrated.every((expression) => expression === "p")
    ? "p"
    : `CASE construct_order ${calibrated
        .map((expression, i) => (expression === "p" ? null : `WHEN ${i + 1} THEN ${expression}`))
        .filter((w) => w !== null)
        .join("\n    ")}\n    ELSE p END`;
  return cte(
    "estimates",
    "estimated windows only; q is the calibrated probability, above compares the raw one",
    [
      `SELECT ${list(ids)}, t_us, sitting_day, construct_order, construct, min_run, p,`,
      `  ${q} AS q,`,
      "  CASE WHEN p >= threshold THEN 1 ELSE 0 END AS above",
      "FROM unpivoted",
      "WHERE p IS NOT NULL",
    ],
  );
}

const RUN_PARTITION = "PARTITION BY student_id, session_id, construct";

function stepsCte(): string {
  return cte("steps", "the previous estimated window of the same construct in the same sitting", [
    "SELECT e.*,",
    `  LAG(e.above) OVER (${RUN_PARTITION} ORDER BY e.t_us) AS prev_above,`,
    `  LAG(e.t_us) OVER (${RUN_PARTITION} ORDER BY e.t_us) AS prev_t_us`,
    "FROM estimates e",
  ]);
}

function startsCte(adjacentUs: number): string {
  return cte(
    "starts",
    `a run starts unless the previous estimated window is above and at most ${adjacentUs} microseconds (1.5 windows) earlier`,
    [
      "SELECT s.*,",
      "  CASE WHEN s.above = 1",
      `    AND (s.prev_above IS NULL OR s.prev_above = 0 OR s.t_us - s.prev_t_us > ${adjacentUs})`,
      "  THEN 1 ELSE 0 END AS run_start",
      "FROM steps s",
    ],
  );
}

function numberedCte(): string {
  return cte("numbered", "runs numbered by a running sum of their starts", [
    "SELECT n.*,",
    `  SUM(n.run_start) OVER (${RUN_PARTITION} ORDER BY n.t_us ROWS BETWEEN UNBOUNDED PRECEDING AND CURRENT ROW) AS run_no`,
    "FROM starts n",
  ]);
}

function runRowsCte(ids: string[]): string {
  return cte("run_rows", "above-threshold windows with the length of their run", [
    `SELECT ${list(ids)}, construct, min_run, run_start,`,
    `  COUNT(*) OVER (${RUN_PARTITION}, run_no) AS run_length`,
    "FROM numbered",
    "WHERE above = 1",
  ]);
}

function partRunsCte(ids: string[]): string {
  return cte("part_runs", "each run credited to the part where it starts", [
    `SELECT ${list(ids)}, construct,`,
    "  SUM(CASE WHEN run_length >= min_run THEN 1 ELSE 0 END) AS sustained_episodes,",
    "  MAX(run_length) AS longest_run",
    "FROM run_rows",
    "WHERE run_start = 1",
    `GROUP BY ${list(ids)}, construct`,
  ]);
}

function partWindowsCte(ids: string[]): string {
  return cte("part_windows", null, [
    `SELECT ${list(ids)}, sitting_day, construct_order, construct,`,
    "  COUNT(*) AS windows, SUM(q) AS sum_p, SUM(q * q) AS sum_p2, SUM(above) AS above",
    "FROM estimates",
    `GROUP BY ${list(ids)}, sitting_day, construct_order, construct`,
  ]);
}

function finalSelect(ids: string[], withActivity: boolean): string {
  const on = [...ids, "construct"].map((c) => `w.${c} = r.${c}`).join(" AND ");
  const activity = withActivity ? "w.activity_id, " : "";
  return [
    "SELECT",
    `  w.student_id, w.class_id, w.school_id, w.unit_id, ${activity}w.session_id,`,
    "  w.sitting_day AS day, w.construct,",
    "  CAST(w.windows AS BIGINT) AS windows, w.sum_p, w.sum_p2, CAST(w.above AS BIGINT) AS above,",
    "  CAST(COALESCE(r.sustained_episodes, 0) AS BIGINT) AS sustained_episodes,",
    "  CAST(COALESCE(r.longest_run, 0) AS BIGINT) AS longest_run",
    "FROM part_windows w",
    `LEFT JOIN part_runs r ON ${on};`,
  ].join("\n");
}
