/**
 * Checks that two sessions tables (CSV, as `summarize` and the DuckDB queries write them) hold the
 * same rows: counts equal, sums within a relative 1e-9 (DuckDB adds doubles in any order;
 * `summarize` adds exactly). The benchmark's files hold no quoted fields, so lines split at commas.
 */
import { readFileSync } from "node:fs";

const KEY = ["student_id", "class_id", "school_id", "unit_id", "activity_id", "session_id", "construct"];
const EXACT = ["day", "windows", "above", "sustained_episodes", "longest_run"];
const CLOSE = ["sum_p", "sum_p2"];

function table(path: string): { columns: string[]; rows: Map<string, string[]> } {
  const lines = readFileSync(path, "utf8").split("\n");
  const columns = lines[0]!.split(",");
  const keyAt = KEY.map((k) => columns.indexOf(k));
  if (keyAt.includes(-1)) throw new Error(`${path}: key columns missing`);
  const rows = new Map<string, string[]>();
  for (let i = 1; i < lines.length; i++) {
    const line = lines[i]!;
    if (line === "") continue;
    if (line.includes('"')) throw new Error(`${path}:${i + 1}: quoted fields are not expected here`);
    const fields = line.split(",");
    rows.set(keyAt.map((k) => fields[k]).join("\u0000"), fields);
  }
  return { columns, rows };
}

/** Null when the tables agree on every column both have; else the first few differences. */
export function compareSessions(expectedPath: string, actualPath: string): string | null {
  const expected = table(expectedPath);
  const actual = table(actualPath);
  const problems: string[] = [];
  if (expected.rows.size !== actual.rows.size)
    problems.push(`${expected.rows.size} rows against ${actual.rows.size}`);
  const shared = [...EXACT, ...CLOSE].filter((c) => actual.columns.includes(c));
  for (const [key, e] of expected.rows) {
    if (problems.length >= 5) break;
    const a = actual.rows.get(key);
    if (!a) {
      problems.push(`missing row ${key.replaceAll("\u0000", ",")}`);
      continue;
    }
    for (const column of shared) {
      const x = e[expected.columns.indexOf(column)]!;
      const y = a[actual.columns.indexOf(column)]!;
      const same = CLOSE.includes(column)
        ? Math.abs(Number(x) - Number(y)) <= 1e-9 * Math.max(1, Math.abs(Number(x)))
        : x === y;
      if (!same) problems.push(`${key.replaceAll("\u0000", ",")} ${column}: ${x} against ${y}`);
    }
  }
  return problems.length === 0 ? null : problems.join("; ");
}
