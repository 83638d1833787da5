/**
 * Small CSV tables (sessions file, roster): the same record reader as the windows file, with every
 * field decoded to text. Rows with broken structure are counted in the RowAccount with their
 * location (in strict mode the account stops the run at the first); a missing file or header is
 * fatal.
 */
import { basename } from "node:path";
import { InputError } from "../errors.js";
import { msg } from "../messages.js";
import { unneutralise } from "../output/csv-write.js";
import { readRecordsFromFile } from "./csv-records.js";
import { location, type RowAccount } from "./quality.js";

export interface TableRow {
  readonly line: number;
  readonly cells: readonly string[];
  /** Character column where field i starts, on the line `lines[i]`. */
  readonly columns: readonly number[];
  /** Physical line where field i starts (later than `line` after a quoted line break). */
  readonly lines: readonly number[];
}

export interface TableHeader {
  readonly names: readonly string[];
  readonly index: ReadonlyMap<string, number>;
}

export interface CsvTableOptions {
  readonly path: string;
  /** What the file is, for messages ("roster"). */
  readonly what: string;
  readonly account: RowAccount;
  readonly required: readonly string[];
  /** Each data row whose field count matches the header's. */
  readonly onRow: (row: TableRow, header: TableHeader) => void;
  readonly onHeader?: (header: TableHeader) => void;
}

export function readCsvTable(options: CsvTableOptions): TableHeader {
  const { path, what, account, required, onRow, onHeader } = options;
  const file = basename(path);
  let header: TableHeader | null = null;
  let rows = 0;
  try {
    readRecordsFromFile(path, {
      record(view) {
        const cells = Array.from({ length: view.count }, (_, i) => unneutralise(view.text(i)));
        if (!header) {
          const names = cells.map((c) => c.trim().toLowerCase());
          const index = new Map<string, number>();
          for (const [i, name] of names.entries()) {
            if (index.has(name)) throw new InputError(msg.duplicateColumn(file, name));
            index.set(name, i);
          }
          const missing = required.filter((c) => !index.has(c));
          if (missing.length > 0) throw new InputError(msg.missingColumns(file, missing, names));
          header = { names, index };
          onHeader?.(header);
          return;
        }
        rows++;
        account.rowsRead++;
        if (view.count !== header.names.length) {
          // Point at the first extra field, or just past the end of a row cut short.
          const at = Math.min(view.count, header.names.length);
          account.reject("wrong-field-count", {
            at: location(file, view.lineOf(at), view.column(at)),
            ...msg.fieldCount(view.count, header.names),
          });
          return;
        }
        onRow(
          {
            line: view.line,
            cells,
            columns: Array.from({ length: view.count }, (_, i) => view.column(i)),
            lines: Array.from({ length: view.count }, (_, i) => view.lineOf(i)),
          },
          header,
        );
      },
      problem(problem) {
        if (!header)
          throw new InputError(
            `${location(file, problem.line, problem.column)}: the header row: ${problem.detail}.`,
          );
        rows++;
        account.rowsRead++;
        const name = problem.field === undefined ? undefined : header.names[problem.field];
        account.reject(problem.kind, {
          at: location(file, problem.line, problem.column),
          ...(name === undefined ? {} : { column: name }),
          value: problem.value,
          // The UTF-8 detail only repeats the reason's text; the others say which case it is.
          ...(problem.kind === "bad-utf8" ? {} : { detail: problem.detail }),
        });
      },
      blank() {
        account.blankLines++;
      },
    });
  } catch (error) {
    const code = (error as { code?: unknown }).code;
    if (typeof code === "string" && code.startsWith("E"))
      throw new InputError(msg.cannotRead(path, what, error));
    throw error;
  }
  if (!header) throw new InputError(msg.emptyFile(path, what));
  if (rows === 0) throw new InputError(msg.headerOnly(path, what));
  return header;
}
