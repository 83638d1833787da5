/** The optional roster: who a student is to the reader (name, school, grade, counselor, setting). */
import { basename } from "node:path";
import type { Settings } from "../config/types.js";
import { rejectConflict } from "./conflict.js";
import { readCsvTable } from "./csv-table.js";
import { location, RowAccount } from "./quality.js";

export interface RosterEntry {
  readonly studentId: string;
  readonly displayName: string;
  readonly schoolId: string;
  readonly grade: string;
  readonly counselor: string;
  readonly setting: string;
}

export interface Roster {
  readonly file: string;
  readonly entries: ReadonlyMap<string, RosterEntry>;
  readonly account: RowAccount;
  readonly ignoredColumns: readonly string[];
}

const OPTIONAL = ["display_name", "school_id", "grade", "counselor", "setting"] as const;

/** The roster's columns after student_id, and their fields. */
const ENTRY_COLUMNS = [
  ["display_name", "displayName"],
  ["school_id", "schoolId"],
  ["grade", "grade"],
  ["counselor", "counselor"],
  ["setting", "setting"],
] as const satisfies readonly (readonly [(typeof OPTIONAL)[number], keyof RosterEntry])[];

export function readRoster(path: string, settings: Settings): Roster {
  const file = basename(path);
  const account = new RowAccount(file, settings);
  const found = new Map<string, { entry: RosterEntry; line: number; lines: number[]; conflict: boolean }>();
  let ignored: string[] = [];
  readCsvTable({
    path,
    what: "roster",
    account,
    required: ["student_id"],
    onRow(row, header) {
      const cell = (name: string): string => {
        const i = header.index.get(name);
        return i === undefined ? "" : row.cells[i]!.trim();
      };
      const idColumn = header.index.get("student_id")!;
      const studentId = row.cells[idColumn]!;
      if (studentId === "") {
        account.reject("empty-id", {
          at: location(file, row.lines[idColumn]!, row.columns[idColumn]),
          column: "student_id",
        });
        return;
      }
      if (studentId.length > settings.maxFieldChars) {
        account.reject("long-field", {
          at: location(file, row.lines[idColumn]!, row.columns[idColumn]),
          column: "student_id",
          value: studentId.slice(0, 80),
        });
        return;
      }
      const entry: RosterEntry = {
        studentId,
        displayName: cell("display_name"),
        schoolId: cell("school_id"),
        grade: cell("grade"),
        counselor: cell("counselor"),
        setting: cell("setting"),
      };
      const seen = found.get(studentId);
      if (!seen) {
        found.set(studentId, { entry, line: row.line, lines: [], conflict: false });
        return;
      }
      seen.lines.push(row.line);
      if (JSON.stringify(seen.entry) === JSON.stringify(entry)) return;
      seen.conflict = true;
      // Strict mode stops here, at the earliest of the rows, in the first column where they differ.
      if (settings.strict) {
        const name = ENTRY_COLUMNS.find((n) => seen.entry[n[1]] !== entry[n[1]])?.[0] ?? "student_id";
        rejectConflict(account, {
          path,
          file,
          line: seen.line,
          otherLines: seen.lines,
          column: name,
          index: header.index.get(name) ?? idColumn,
        });
      }
    },
    onHeader(header) {
      ignored = header.names.filter(
        (n) => n !== "student_id" && !(OPTIONAL as readonly string[]).includes(n),
      );
    },
  });
  const entries = new Map<string, RosterEntry>();
  for (const [id, f] of found) {
    if (f.conflict) {
      for (const line of [f.line, ...f.lines])
        account.reject("conflict", { at: location(file, line), column: "student_id", value: id });
    } else {
      for (const line of f.lines)
        account.duplicate({ at: location(file, line), value: `same row as line ${f.line}` });
      entries.set(id, f.entry);
    }
  }
  return { file, entries, account, ignoredColumns: ignored };
}
