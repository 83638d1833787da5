/**
 * What differs between the SQL engines the sessions query is written for, one member per
 * difference. Everything else in the query (CTEs, window functions with ROWS frames, CASE,
 * COALESCE, NULLIF, TRIM, UPPER, REPLACE, SUBSTR, LN, EXP, GREATEST, LEAST) is written once and
 * reads the same in all three.
 */

export const DIALECT_NAMES = ["duckdb", "postgres", "spark"] as const;
export type DialectName = (typeof DIALECT_NAMES)[number];

export interface SqlDialect {
  readonly name: DialectName;
  /** The engine as named in the query's header. */
  readonly label: string;
  /** A column name, quoted so that a construct key that is also a keyword still reads as a name. */
  quote(identifier: string): string;
  /** A string literal. */
  stringLiteral(text: string): string;
  /** The text type used in casts. */
  readonly text: string;
  /** The IEEE double type used in casts. */
  readonly double: string;
  /**
   * Microseconds since 1970-01-01T00:00:00Z of an ISO 8601 date-time text with a UTC offset, as
   * a whole number: integer arithmetic keeps the 1.5-window adjacency test exact.
   */
  instantMicros(text: string): string;
  /** What the engine must provide or be set to, for the query's header. */
  readonly requirements: readonly string[];
}

const doubleQuoted = (identifier: string): string => `"${identifier.replaceAll('"', '""')}"`;

const standardString = (text: string): string => `'${text.replaceAll("'", "''")}'`;

const DUCKDB: SqlDialect = {
  name: "duckdb",
  label: "DuckDB",
  quote: doubleQuoted,
  stringLiteral: standardString,
  text: "VARCHAR",
  double: "DOUBLE",
  // A TIMESTAMPTZ holds the instant; the offset in the text is applied on the cast.
  instantMicros: (text) => `epoch_us(CAST(${text} AS TIMESTAMPTZ))`,
  requirements: ["Tested on DuckDB 1.5.6. The session's TimeZone does not matter."],
};

const POSTGRES: SqlDialect = {
  name: "postgres",
  label: "PostgreSQL",
  quote: doubleQuoted,
  stringLiteral: standardString,
  text: "TEXT",
  double: "DOUBLE PRECISION",
  // From PostgreSQL 14 EXTRACT(EPOCH ...) is numeric, exact to the microsecond.
  instantMicros: (text) => `CAST(EXTRACT(EPOCH FROM CAST(${text} AS TIMESTAMPTZ)) * 1000000 AS BIGINT)`,
  requirements: [
    "Tested on PostgreSQL 15. Before 14, EXTRACT(EPOCH ...) returns a double, which still gives",
    "  the exact microsecond for present-day dates. The session's TimeZone does not matter.",
  ],
};

const SPARK: SqlDialect = {
  name: "spark",
  label: "Spark SQL",
  quote: (identifier) => `\`${identifier.replaceAll("`", "``")}\``,
  // Spark reads a backslash in a literal as an escape.
  stringLiteral: (text) => `'${text.replaceAll("\\", "\\\\").replaceAll("'", "\\'")}'`,
  text: "STRING",
  double: "DOUBLE",
  // Spark has no timestamptz: to_timestamp reads the offset in the text and gives an instant
  // (TIMESTAMP_LTZ); unix_micros keeps the fraction of a second that unix_seconds would drop.
  instantMicros: (text) => `unix_micros(to_timestamp(${text}))`,
  requirements: [
    "Spark 3.1 or later (unix_micros), with spark.sql.timestampType at its default TIMESTAMP_LTZ",
    "  (to_timestamp must return an instant). spark.sql.session.timeZone does not matter.",
    "With spark.sql.ansi.enabled false, a malformed number or date-time becomes NULL without an",
    "  error (the window would count as not estimated, or be lost): another reason to run check first.",
    "Not run by engagement-report's own tests (no Spark there): try it on a sample and compare with",
    "  engagement-report summarize before relying on it.",
  ],
};

export const DIALECTS: Readonly<Record<DialectName, SqlDialect>> = {
  duckdb: DUCKDB,
  postgres: POSTGRES,
  spark: SPARK,
};

export function isDialectName(name: string): name is DialectName {
  return (DIALECT_NAMES as readonly string[]).includes(name);
}
