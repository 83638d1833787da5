/** The indicator tables as CSV, exactly in the data contract's column order (DATA-CONTRACT.md, outputs). */
import type {
  Estimate,
  GroupIndicator,
  StudentIndicator,
  TrendRow,
  UnitIndicator,
} from "../indicators/types.js";
import { csvLine, textCell } from "./csv-write.js";

/** A figure rounded to `digits` decimals, without trailing zeros; empty when absent. */
export function fixedCell(value: number | null | undefined, digits = 4): string {
  if (value === null || value === undefined || !Number.isFinite(value)) return "";
  const text = Number(value.toFixed(digits)).toString();
  return text === "-0" ? "0" : text;
}

/** A p- or q-value with 4 significant digits (small values keep their size). */
export function probabilityCell(value: number | null): string {
  if (value === null || !Number.isFinite(value)) return "";
  return Number(value.toPrecision(4)).toString();
}

/** Rows joined into pieces of about 1 MB, so that a large table is written without one huge string. */
export function* chunkedCsv<T>(
  columns: readonly string[],
  rows: Iterable<T>,
  cells: (row: T) => string[],
): Generator<string> {
  yield csvLine(columns);
  let chunk = "";
  for (const r of rows) {
    chunk += csvLine(cells(r));
    if (chunk.length > 1 << 20) {
      yield chunk;
      chunk = "";
    }
  }
  if (chunk.length > 0) yield chunk;
}

function estimateCells(e: Estimate | null, digits = 4): string[] {
  return e ? [fixedCell(e.value, digits), fixedCell(e.low, digits), fixedCell(e.high, digits)] : ["", "", ""];
}

export const STUDENT_COLUMNS = [
  "student_id",
  "construct",
  "status",
  "windows",
  "sessions",
  "days",
  "share",
  "share_low",
  "share_high",
  "peer_share",
  "ratio",
  "ratio_low",
  "ratio_high",
  "sustained_per_hour",
  "reason",
] as const;

export function studentsCsv(rows: readonly StudentIndicator[]): Generator<string> {
  return chunkedCsv(STUDENT_COLUMNS, rows, (r) => [
    textCell(r.studentId),
    textCell(r.construct),
    r.status,
    String(r.windows),
    String(r.sessions),
    String(r.days),
    ...estimateCells(r.share),
    fixedCell(r.peerShare),
    ...estimateCells(r.ratio, 3),
    fixedCell(r.sustainedPerHour, 3),
    textCell(r.reason),
  ]);
}

export const UNIT_COLUMNS = [
  "unit_id",
  "construct",
  "status",
  "students",
  "classes",
  "windows",
  "share",
  "effect",
  "effect_low",
  "effect_high",
  "effect_shrunk",
  "p_value",
  "q_value",
  "schools_consistent",
  "reason",
] as const;

function unitCells(r: UnitIndicator): string[] {
  return [
    textCell(r.construct),
    r.status,
    String(r.students),
    String(r.classes),
    String(r.windows),
    fixedCell(r.share),
    ...estimateCells(r.effect),
    fixedCell(r.effectShrunk),
    probabilityCell(r.pValue),
    probabilityCell(r.qValue),
    r.schoolsCompared >= 2 ? `${r.schoolsAgreeing}/${r.schoolsCompared}` : "",
    textCell(r.reason),
  ];
}

export function* unitsCsv(rows: readonly UnitIndicator[]): Generator<string> {
  yield csvLine([...UNIT_COLUMNS]);
  for (const r of rows) yield csvLine([textCell(r.unitId), ...unitCells(r)]);
}

/** activities.csv: the units table with activity_id after unit_id (only when the data has activities). */
export function* activitiesCsv(rows: readonly UnitIndicator[]): Generator<string> {
  yield csvLine(["unit_id", "activity_id", ...UNIT_COLUMNS.slice(1)]);
  for (const r of rows) yield csvLine([textCell(r.unitId), textCell(r.activityId), ...unitCells(r)]);
}

export const GROUP_COLUMNS = [
  "level",
  "group_id",
  "construct",
  "status",
  "students",
  "share",
  "share_low",
  "share_high",
  "ratio",
  "ratio_low",
  "ratio_high",
  "reason",
] as const;

export function* groupsCsv(rows: readonly GroupIndicator[]): Generator<string> {
  yield csvLine([...GROUP_COLUMNS]);
  for (const r of rows) {
    yield csvLine([
      r.level,
      textCell(r.groupId),
      textCell(r.construct),
      r.status,
      // A withheld group's size is withheld too: a count under the suppression size is itself a small-cell figure.
      r.status === "withheld" ? "" : String(r.students),
      ...estimateCells(r.share),
      ...estimateCells(r.ratio, 3),
      textCell(r.reason),
    ]);
  }
}

export const TREND_COLUMNS = [
  "level",
  "id",
  "construct",
  "week",
  "status",
  "windows",
  "sessions",
  "share",
  "share_low",
  "share_high",
] as const;

export function trendsCsv(rows: readonly TrendRow[]): Generator<string> {
  return chunkedCsv(TREND_COLUMNS, rows, (r) => [
    r.level,
    textCell(r.id),
    textCell(r.construct),
    r.week,
    r.withheld ? "withheld" : "shown",
    r.withheld ? "" : String(r.windows),
    r.withheld ? "" : String(r.sessions),
    ...estimateCells(r.share),
  ]);
}
