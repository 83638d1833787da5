/**
 * Every message a user reads, in one place and one style: what is wrong, where (file:line:column,
 * key path or column name), the value found, and what to do.
 */

function quote(value: string, max = 60): string {
  const short = value.length > max ? `${value.slice(0, max - 3)}...` : value;
  return JSON.stringify(short);
}

function reason(error: unknown): string {
  const code = (error as { code?: string }).code;
  if (code === "ENOENT") return "no such file";
  if (code === "EACCES") return "permission denied";
  if (code === "EISDIR") return "it is a folder, not a file";
  return error instanceof Error ? error.message : String(error);
}

const DATE_TIME = "a date-time with offset such as 2026-09-01T08:00:00Z";

/**
 * Plain words for each text pattern in schemas/, so that no message shows a regular expression.
 * Keyed by the pattern exactly as the schema writes it; a test checks every pattern has an entry.
 */
export const PATTERN_TEXT: Readonly<Record<string, string>> = {
  "^\\d{4}-\\d{2}-\\d{2}T\\d{2}:\\d{2}:\\d{2}(\\.\\d+)?(Z|[+-]\\d{2}:\\d{2})$": DATE_TIME,
  "^\\d{4}-\\d{2}-\\d{2}$": "a date such as 2026-09-01",
  "^[A-Za-z_][A-Za-z0-9_]*$":
    "the name of an environment variable (letters, digits and _, not starting with a digit)",
  "^[a-z][a-z0-9_]*$": "lower-case letters, digits and _, starting with a letter",
};

/** Plain words for the JSON Schema types. */
const TYPE_TEXT: Readonly<Record<string, string>> = {
  number: "a number",
  integer: "a whole number",
  string: "text",
  boolean: "true or false",
  object: "a mapping of keys",
  array: "a list",
  null: "an empty value",
};

/** What a schema asks for, in words: "a number", "text or an empty value", "text such as ...". */
export function expectedText(types: readonly string[]): string {
  return types.map((t) => TYPE_TEXT[t] ?? t).join(" or ");
}

export const msg = {
  badThreads: (value: string) =>
    `--threads must be 1 or 2; got ${JSON.stringify(value)}. Give 1 to read in one thread, or leave it out to let summarize choose.`,
  // Files
  cannotRead: (path: string, what: string, error: unknown) =>
    `cannot read the ${what} ${path}: ${reason(error)}. Check the path and that the file is readable.`,
  emptyFile: (path: string, what: string) =>
    `${path}: the ${what} is empty. It needs a header row and at least one data row.`,
  headerOnly: (path: string, what: string) =>
    `${path}: the ${what} has a header row but no data rows. Check that the export finished and wrote its rows.`,
  emptyYaml: (path: string, what: string) => `${path}: the ${what} is empty.`,
  notUtf8Text: (path: string, what: string, line: number, col: number) =>
    `${path}:${line}:${col}: the ${what} is not UTF-8 text (the bytes here are not valid UTF-8; is it the right file?). Give a YAML file saved as UTF-8.`,
  noUsableRows: () =>
    "no usable rows: every data row was rejected or lies outside the settings' period; the account above says why and where.",
  yamlSyntax: (path: string, line: number, col: number, text: string) =>
    `${path}:${line}:${col}: not valid YAML: ${text}`,
  /** `keyPath` is null when the repeated key cannot be placed in the document. */
  duplicateKey: (path: string, line: number, col: number, keyPath: string | null) =>
    `${path}:${line}:${col}: not valid YAML: ${keyPath === null ? "a key appears more than once in one mapping" : `the key ${quote(keyPath)} appears more than once`}; keep one.`,
  severalDocuments: (path: string, line: number, col: number) =>
    `${path}:${line}:${col}: the file holds several YAML documents (---); keep one.`,

  // Card and settings
  unknownKey: (path: string, allowed: readonly string[]) =>
    `unknown key ${quote(path)}; allowed here: ${allowed.join(", ")}. Check the spelling.`,
  /** `expected` names the value wanted, as `expectedText` gives it ("a number"). */
  missingKey: (path: string, expected: string) =>
    `missing required key ${quote(path)}: expected ${expected}. Add it to the mapping that starts here.`,
  /** A text that does not match its schema pattern: the pattern in words, never the expression. */
  patternText: (pattern: string) => PATTERN_TEXT[pattern] ?? "text of the form the documentation gives",
  badKeyName: (where: string, key: string) =>
    `${where}: construct key ${quote(key)} must be lower-case letters, digits and _, starting with a letter (the windows file's column name).`,
  badCalibration: (path: string, found: string) =>
    `${path}: expected none, {platt: {a: number, b: number}} or {bins: [[upper_p, rate], ...]}, found ${found}.`,
  binsNotIncreasing: (key: string) =>
    `constructs.${key}.calibration.bins: the upper bounds must increase from one bin to the next.`,
  binsNotToOne: (key: string) => `constructs.${key}.calibration.bins: the last bin's upper bound must be 1.`,
  pairIncomplete: (key: string, present: string, missing: string) =>
    `constructs.${key}: ${present} is given but ${missing} is not; give both or neither.`,
  badDate: (key: string, value: string) => `${key}: ${quote(value)} is not a valid date.`,
  badDateTime: (key: string, value: string) =>
    `${key}: ${quote(value)} is not a real date and time; expected ${DATE_TIME}.`,
  periodReversed: (from: string, to: string) => `period.from (${from}) is after period.to (${to}).`,
  twoKeySources: () => "pseudonymise: give key_env or key_file, not both.",

  // CSV structure
  missingColumns: (path: string, columns: readonly string[], found: readonly string[]) =>
    `${path}:1: missing required column${columns.length > 1 ? "s" : ""} ${columns.join(", ")}. The header has: ${found.join(", ")}. Add ${columns.length > 1 ? "them" : "it"} to the header row, or rename the column that holds ${columns.length > 1 ? "each" : "it"} (names are matched in lower case).`,
  duplicateColumn: (path: string, column: string) =>
    `${path}:1: the column ${quote(column)} appears more than once in the header.`,
  noConstructColumns: (path: string, constructs: readonly string[]) =>
    `${path}:1: no column matches a construct of the detector card (${constructs.join(", ")}). Name each probability column after its construct key.`,
  unknownColumns: (columns: readonly string[]) =>
    `columns ignored (neither in the data contract nor constructs of the card): ${columns.join(", ")}`,
  constructsWithoutColumn: (constructs: readonly string[]) =>
    `constructs in the card with no column in the data: ${constructs.join(", ")}`,
  /** The value and detail shown for a row whose field count differs from the header's. */
  fieldCount: (count: number, header: readonly string[]) => ({
    value: `${count} fields, header has ${header.length}`,
    detail:
      count < header.length
        ? `the row ends after ${header[count - 1] ?? "its first field"}, so ${header.slice(count).join(", ")} ${header.length - count > 1 ? "are" : "is"} missing`
        : "the first extra field starts here",
  }),
  /** The value shown for each of the rows that share a key but disagree. */
  conflictWith: (line: number, lines: readonly number[]) =>
    `same key as line${lines.length > 2 ? "s" : ""} ${lines.filter((l) => l !== line).join(", ")}, with different values`,
  /**
   * A rejected row stops the run (settings `strict: true`): the reason's text, then what was found
   * there (column, value, detail), as the data-quality account shows each example.
   */
  strictStop: (text: string, found: { at: string; column?: string; value?: string; detail?: string }) => {
    const cell = [
      found.column === undefined ? undefined : `column ${found.column}`,
      found.value === undefined ? undefined : `value ${quote(found.value)}`,
    ]
      .filter((x) => x !== undefined)
      .join(", ");
    const here = [cell, found.detail].filter((x) => x !== undefined && x !== "").join("; ");
    return `${found.at}: ${text}.${here === "" ? "" : ` Found: ${here}.`} The settings ask for strictness (strict: true), so the run stops at the first rejected row.`;
  },
} as const;

/** Plain-language text of each reason a row can be rejected, and what to do about it. */
export const REJECT_REASONS = {
  "wrong-field-count":
    "the row has a different number of fields from the header (look for a comma inside a value that is not quoted, or a line cut short)",
  "empty-id": "a required identifier is empty (fill it in, or remove the row)",
  "long-field":
    "an identifier is longer than the limit (max_field_chars); usually a broken quote or a wrong column, else raise max_field_chars in the settings",
  "bad-time": "window_start is not an ISO 8601 date-time such as 2026-02-03T09:15:20-06:00",
  "no-offset": "window_start has no UTC offset (add Z or an offset such as -06:00)",
  "bad-date": "window_start is not a real date or time of day",
  "not-number":
    "a value that must be a number is not one (write plain decimals such as 0.42; leave a probability empty when there is no estimate)",
  "out-of-range":
    "a probability is outside 0 to 1 (the column must hold the detector's probability, not a percentage or a score)",
  "bad-quote":
    "the row's quoting is broken: a stray or unclosed double quote (quote the whole field and double each quote inside it)",
  "bad-utf8": "the row has bytes that are not valid UTF-8 (save the file as UTF-8)",
  "too-long":
    "the row is longer than the record size limit (usually a missing line ending or a broken quote)",
  conflict:
    "two or more rows with the same key disagree, so all of them are set aside (the key: student, session and window_start in a windows file; student, session, class, school, unit, activity and construct in a sessions file; student_id in a roster)",
  "bad-integer": "a count is not a whole number of the allowed size",
  "bad-day": "day is not a date of the form YYYY-MM-DD",
  "unknown-construct": "construct is not a key of the detector card",
  "inconsistent-sums":
    "the sums do not fit the window count (sum_p between 0 and windows, sum_p2 at most sum_p, above at most windows, longest_run at most above)",
} as const;

export type RejectReason = keyof typeof REJECT_REASONS;
