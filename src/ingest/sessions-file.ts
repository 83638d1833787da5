/**
 * A sessions file produced elsewhere (an external engine running the same aggregation) → session
 * summaries, each row checked against the data contract. Duplicate rows count once; rows that
 * share a key but disagree are all set aside, so the result does not depend on row order.
 */
import { basename } from "node:path";
import type { Card, Settings } from "../config/types.js";
import { msg, type RejectReason } from "../messages.js";
import { compareSummaries, type SessionSummary } from "../summaries/types.js";
import { rejectConflict } from "./conflict.js";
import { readCsvTable } from "./csv-table.js";
import { location, RowAccount } from "./quality.js";
import { validCalendarDate } from "./timestamp.js";

const REQUIRED = [
  "student_id",
  "class_id",
  "school_id",
  "unit_id",
  "session_id",
  "day",
  "construct",
  "windows",
  "sum_p",
  "sum_p2",
  "above",
  "sustained_episodes",
  "longest_run",
] as const;

export interface SessionsResult {
  readonly file: string;
  readonly summaries: SessionSummary[];
  readonly account: RowAccount;
  readonly hasActivity: boolean;
  readonly ignoredColumns: readonly string[];
  readonly unknownConstructs: readonly string[];
}

/** The columns that may differ between rows with the same key, and their fields. */
const VALUE_COLUMNS = [
  ["day", "day"],
  ["windows", "windows"],
  ["sum_p", "sumP"],
  ["sum_p2", "sumP2"],
  ["above", "above"],
  ["sustained_episodes", "sustainedEpisodes"],
  ["longest_run", "longestRun"],
] as const satisfies readonly (readonly [string, keyof SessionSummary])[];

const NUMBER = /^[+-]?(\d+\.?\d*|\.\d+)([eE][+-]?\d+)?$/;

export function readSessionsFile(path: string, card: Card, settings: Settings): SessionsResult {
  const file = basename(path);
  const account = new RowAccount(file, settings);
  const constructs = new Set(card.constructs.map((c) => c.key));
  const unknownConstructs = new Set<string>();
  const byKey = new Map<string, { row: SessionSummary; line: number; lines: number[]; conflict: boolean }>();
  let hasActivity = false;
  let ignored: string[] = [];
  const known = new Set<string>([...REQUIRED, "activity_id"]);

  const reject = (reason: RejectReason, line: number, column?: number, name?: string, value?: string) => {
    account.reject(reason, {
      at: location(file, line, column),
      ...(name === undefined ? {} : { column: name }),
      ...(value === undefined ? {} : { value }),
    });
  };

  readCsvTable({
    path,
    what: "sessions file",
    account,
    required: REQUIRED,
    onRow(row, header) {
      const col = (name: string): number => header.index.get(name) ?? -1;
      const cell = (name: string): string => (col(name) < 0 ? "" : row.cells[col(name)]!);
      const at = (name: string): number => row.columns[col(name)] ?? 1;
      // The line where a field starts (a later one after a quoted line break in the row).
      const lineAt = (name: string): number => row.lines[col(name)] ?? row.line;
      for (const name of ["student_id", "class_id", "unit_id", "session_id"]) {
        const v = cell(name);
        if (v === "") return reject("empty-id", lineAt(name), at(name), name);
        if (v.length > settings.maxFieldChars)
          return reject("long-field", lineAt(name), at(name), name, v.slice(0, 80));
      }
      const day = cell("day");
      const m = /^(\d{4})-(\d{2})-(\d{2})$/.exec(day);
      if (!m || !validCalendarDate(Number(m[1]), Number(m[2]), Number(m[3]))) {
        return reject("bad-day", lineAt("day"), at("day"), "day", day);
      }
      const construct = cell("construct");
      if (!constructs.has(construct)) {
        unknownConstructs.add(construct);
        return reject("unknown-construct", lineAt("construct"), at("construct"), "construct", construct);
      }
      const nums: Record<string, number> = {};
      for (const name of ["windows", "sum_p", "sum_p2", "above", "sustained_episodes", "longest_run"]) {
        const text = cell(name).trim();
        if (!NUMBER.test(text)) return reject("not-number", lineAt(name), at(name), name, text);
        const v = Number(text);
        const integer = name !== "sum_p" && name !== "sum_p2";
        if (integer && (!Number.isInteger(v) || v < 0 || v > 2 ** 31)) {
          return reject("bad-integer", lineAt(name), at(name), name, text);
        }
        nums[name] = v;
      }
      const {
        windows,
        sum_p: sumP,
        sum_p2: sumP2,
        above,
        sustained_episodes: episodes,
        longest_run: longest,
      } = nums as Record<string, number>;
      const tol = 1e-9 * Math.max(1, windows!);
      if (
        windows! < 1 ||
        sumP! < -tol ||
        sumP! > windows! + tol ||
        sumP2! < -tol ||
        sumP2! > sumP! + tol ||
        sumP2! * windows! < sumP! * sumP! - tol * windows! ||
        above! > windows! ||
        longest! > above! ||
        episodes! > above!
      ) {
        return reject(
          "inconsistent-sums",
          lineAt("windows"),
          at("windows"),
          "windows",
          // Each figure with its name: the reason's rule names them, and the reader checks them against it.
          `windows ${windows}, sum_p ${sumP}, sum_p2 ${sumP2}, above ${above}, sustained_episodes ${episodes}, longest_run ${longest}`,
        );
      }
      const summary: SessionSummary = {
        studentId: cell("student_id"),
        classId: cell("class_id"),
        schoolId: cell("school_id"),
        unitId: cell("unit_id"),
        activityId: cell("activity_id"),
        sessionId: cell("session_id"),
        day,
        construct,
        windows: windows!,
        sumP: sumP!,
        sumP2: sumP2!,
        above: above!,
        sustainedEpisodes: episodes!,
        longestRun: longest!,
      };
      const key = [
        summary.studentId,
        summary.sessionId,
        summary.classId,
        summary.schoolId,
        summary.unitId,
        summary.activityId,
        construct,
      ].join("\u0000");
      const seen = byKey.get(key);
      if (!seen) {
        byKey.set(key, { row: summary, line: row.line, lines: [], conflict: false });
        return;
      }
      seen.lines.push(row.line);
      if (JSON.stringify(seen.row) === JSON.stringify(summary)) return;
      seen.conflict = true;
      // Strict mode stops here, at the earliest of the rows, in the first column where they differ.
      if (settings.strict) {
        const name = VALUE_COLUMNS.find((n) => seen.row[n[1]] !== summary[n[1]])?.[0] ?? "student_id";
        rejectConflict(account, {
          path,
          file,
          line: seen.line,
          otherLines: seen.lines,
          column: name,
          index: col(name),
        });
      }
    },
    onHeader(header) {
      hasActivity = header.index.has("activity_id");
      ignored = header.names.filter((n) => !known.has(n));
    },
  });

  const summaries: SessionSummary[] = [];
  for (const entry of byKey.values()) {
    if (entry.conflict) {
      const lines = [entry.line, ...entry.lines];
      for (const line of lines) reject("conflict", line, undefined, undefined, msg.conflictWith(line, lines));
    } else {
      for (const line of entry.lines)
        account.duplicate({ at: location(file, line), value: `same row as line ${entry.line}` });
      summaries.push(entry.row);
    }
  }
  summaries.sort(compareSummaries(new Map(card.constructs.map((c, i) => [c.key, i]))));
  return {
    file,
    summaries,
    account,
    hasActivity,
    ignoredColumns: ignored,
    unknownConstructs: [...unknownConstructs].sort(),
  };
}
