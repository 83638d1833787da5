/**
 * `engagement-report sql`: read the card → check the options → print the sessions query.
 */
import { loadCard } from "../config/card.js";
import { UsageError } from "../errors.js";
import { DIALECT_NAMES, isDialectName } from "./dialects.js";
import { DEFAULT_TABLE, sessionsQuery } from "./sessions-query.js";

/** The query for the parsed options of the `sql` command; throws UsageError or SettingsError. */
export function sqlCommand(values: Readonly<Record<string, unknown>>): string {
  const dialect = values.dialect;
  if (typeof dialect !== "string" || !isDialectName(dialect))
    throw new UsageError(
      `sql needs --dialect with one of ${DIALECT_NAMES.join(", ")}${
        typeof dialect === "string" ? `; got ${JSON.stringify(dialect)}` : ""
      }. Run engagement-report sql --help.`,
    );
  const card = values.card;
  if (typeof card !== "string" || card === "")
    throw new UsageError(
      "sql needs --card: the detector card gives the construct columns, thresholds, minimum runs, window length and calibration. Run engagement-report sql --help.",
    );
  const table = values.table;
  return sessionsQuery(loadCard(card), {
    dialect,
    table: typeof table === "string" ? table : DEFAULT_TABLE,
    withActivity: values["with-activity"] === true,
  });
}
