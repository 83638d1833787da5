/**
 * The windows files the emitted SQL is checked on, and the row-by-row comparison with `summarize`.
 *
 * - The demo district as written (50 students, seed 5): sorted, one offset, every estimate present.
 * - A messy copy of it: rows shuffled, written with CRLF; about 4% of rows dropped (gaps); times
 *   jittered by −5, 0, +5 or +5.5 s, so consecutive windows lie 9.5 to 30.5 s apart (30 s sits on the
 *   adjacency boundary of 1.5 × 20 s); each sitting's middle third moved to another unit (and some
 *   to an empty school or activity), so sittings span parts and runs cross them; estimates left
 *   empty (about 8% of cells, and 3% of rows with none at all); seven UTC offsets written in
 *   several ISO 8601 forms (Z, z, +00:00, -06:00, +0530, +05:45, a space or a lower-case t between
 *   date and time), so the day of a sitting depends on its earliest row; numbers with spaces
 *   around them or trailing zeros; exact duplicates (also re-written with the same value and
 *   offset); and conflicting copies (another value, another part, or the same instant written in
 *   another offset), including on the earliest row of some sittings.
 *
 * The comparison: the same set of keys (student, session, class, school, unit, activity,
 * construct), the same day, windows, above, sustained_episodes and longest_run, and sum_p, sum_p2
 * within 1e-9 (summarize sums exact multiples of 1e-12; the engines add doubles).
 */
import { readFileSync, writeFileSync } from "node:fs";
import { join } from "node:path";
import { expect } from "vitest";
import { parse as parseYaml, stringify as stringifyYaml } from "yaml";
import { writeDemoDistrict } from "../../src/demo/simulate.js";
import type { SessionSummary } from "../../src/summaries/types.js";
import type { EngineRow } from "./engines.js";

/** mulberry32 (Tommy Ettinger's public-domain 32-bit generator), for test data only. */
function generator(seed: number): () => number {
  let a = seed >>> 0;
  return () => {
    a = (a + 0x6d2b79f5) >>> 0;
    let t = a;
    t = Math.imul(t ^ (t >>> 15), t | 1);
    t ^= t + Math.imul(t ^ (t >>> 7), t | 61);
    return ((t ^ (t >>> 14)) >>> 0) / 4294967296;
  };
}

export interface SqlCases {
  readonly dir: string;
  readonly demoWindows: string;
  /** The demo windows without the activity_id column (what summarize sees when the data has none). */
  readonly demoWithoutActivity: string;
  readonly demoCard: string;
  readonly messyWindows: string;
  readonly messyCard: string;
}

export async function writeSqlCases(dir: string): Promise<SqlCases> {
  const paths = await writeDemoDistrict(dir, { students: 50, seed: 5, mode: "planted" });
  const text = readFileSync(paths.windows, "utf8");
  const demoWithoutActivity = join(dir, "windows-no-activity.csv");
  writeFileSync(demoWithoutActivity, withoutColumn(text, "activity_id"));
  const messyWindows = join(dir, "windows-messy.csv");
  writeFileSync(messyWindows, messy(text, 5));
  const messyCard = join(dir, "card-calibrated.yaml");
  writeFileSync(messyCard, calibratedCard(readFileSync(paths.card, "utf8")));
  return {
    dir,
    demoWindows: paths.windows,
    demoWithoutActivity,
    demoCard: paths.card,
    messyWindows,
    messyCard,
  };
}

function lines(text: string): { header: string[]; rows: string[][] } {
  const all = text.split(/\r?\n/).filter((l) => l !== "");
  if (all.some((l) => l.includes('"'))) throw new Error("the demo's fields need no quoting");
  return { header: all[0]!.split(","), rows: all.slice(1).map((l) => l.split(",")) };
}

function withoutColumn(text: string, column: string): string {
  const { header, rows } = lines(text);
  const i = header.indexOf(column);
  const drop = (fields: string[]) => fields.filter((_, j) => j !== i).join(",");
  return `${[drop(header), ...rows.map(drop)].join("\n")}\n`;
}

/** The demo card with Platt calibration on bored, bins on confused, and a shorter off_task minimum. */
function calibratedCard(text: string): string {
  const card = parseYaml(text) as {
    constructs: Record<string, { calibration?: unknown; sustained_min_windows?: number }>;
  };
  card.constructs.bored!.calibration = { platt: { a: 0.8, b: -0.3 } };
  card.constructs.confused!.calibration = {
    bins: [
      [0.1, 0.05],
      [0.3, 0.2],
      [0.6, 0.45],
      [1, 0.8],
    ],
  };
  card.constructs.off_task!.sustained_min_windows = 2;
  return stringifyYaml(card);
}

const OFFSETS: readonly (readonly [suffix: string, minutes: number])[] = [
  ["-06:00", -360],
  ["Z", 0],
  ["+10:00", 600],
  ["+0530", 330],
  ["-09:30", -570],
  ["+05:45", 345],
  ["+00:00", 0],
];

/** An instant written at an offset: local date and time, milliseconds, suffix; sometimes another separator. */
function written(ms: number, offset: readonly [string, number], separator: string): string {
  const local = new Date(ms + offset[1] * 60_000).toISOString().slice(0, 23);
  const suffix = offset[0] === "Z" && separator === "t" ? "z" : offset[0];
  return `${local.slice(0, 10)}${separator}${local.slice(11)}${suffix}`;
}

function messy(text: string, seed: number): string {
  const random = generator(seed);
  const pick = <T>(items: readonly T[]): T => items[Math.floor(random() * items.length)]!;
  const { header, rows } = lines(text);
  const col = (name: string) => header.indexOf(name);
  const [iStudent, iSession, iSchool, iUnit, iActivity, iTime] = [
    "student_id",
    "session_id",
    "school_id",
    "unit_id",
    "activity_id",
    "window_start",
  ].map(col) as [number, number, number, number, number, number];
  const estimates = header.map((_, i) => i).filter((i) => i > iTime);
  const bySitting = new Map<string, string[][]>();
  for (const fields of rows) {
    const key = `${fields[iStudent]}|${fields[iSession]}`;
    bySitting.set(key, [...(bySitting.get(key) ?? []), fields]);
  }
  const out: string[][] = [];
  let sittingIndex = 0;
  for (const sitting of bySitting.values()) {
    sittingIndex++;
    let first = true;
    sitting.forEach((fields, i) => {
      if (random() < 0.04) return;
      const row = [...fields];
      if (i >= sitting.length / 3 && i < (2 * sitting.length) / 3) {
        row[iUnit] = `${row[iUnit]}-review`;
        if (sittingIndex % 4 === 0) row[iActivity] = "";
        if (sittingIndex % 5 === 0) row[iSchool] = "";
      }
      const ms = Date.parse(row[iTime]!) + pick([-5000, 0, 5000, 5500]);
      const offset = pick(OFFSETS);
      const separator = random() < 0.9 ? "T" : pick([" ", "t"]);
      row[iTime] = written(ms, offset, separator);
      if (random() < 0.03) row[iTime] = ` ${row[iTime]} `;
      const none = random() < 0.03;
      for (const e of estimates) {
        const u = random();
        if (none || u < 0.08) row[e] = "";
        else if (u < 0.1) row[e] = ` ${row[e]} `;
        else if (u < 0.12) row[e] = `${row[e]}00`;
      }
      out.push(row);
      // Copies: exact, re-written alike, or conflicting (value, part, or offset).
      const r = random();
      if (r < 0.02) out.push([...row]);
      else if (r < 0.03) {
        const copy = [...row];
        copy[iTime] = written(ms, offset[1] === 0 ? pick(OFFSETS.filter((o) => o[1] === 0)) : offset, "T");
        for (const e of estimates) if (copy[e]!.trim() !== "") copy[e] = `${copy[e]!.trim()}0`;
        out.push(copy);
      } else if (r < 0.04 || (first && sittingIndex % 7 === 0)) {
        const copy = [...row];
        const kind = pick(["value", "part", "offset"]);
        if (kind === "value") {
          const e = pick(estimates);
          copy[e] = copy[e]!.trim() === "0.999" ? "0.998" : "0.999";
        } else if (kind === "part") copy[iUnit] = `${copy[iUnit]}-other`;
        else copy[iTime] = written(ms, OFFSETS.find((o) => o[1] !== offset[1])!, "T");
        out.push(copy);
      }
      first = false;
    });
  }
  for (let i = out.length - 1; i > 0; i--) {
    const j = Math.floor(random() * (i + 1));
    [out[i], out[j]] = [out[j]!, out[i]!];
  }
  return `${[header, ...out].map((fields) => fields.join(",")).join("\r\n")}\r\n`;
}

// ---------------------------------------------------------------------------------------------

const KEY_COLUMNS = [
  "student_id",
  "session_id",
  "class_id",
  "school_id",
  "unit_id",
  "activity_id",
  "construct",
];

function summaryKey(s: SessionSummary, withActivity: boolean): string {
  const activity = withActivity ? s.activityId : "";
  return [s.studentId, s.sessionId, s.classId, s.schoolId, s.unitId, activity, s.construct].join("|");
}

function rowKey(r: EngineRow): string {
  return KEY_COLUMNS.map((c) => String(r[c] ?? "")).join("|");
}

/** Every engine row equals summarize's row with the same key, and neither side has a row the other lacks. */
export function expectSameAsSummarize(
  rows: readonly EngineRow[],
  summaries: readonly SessionSummary[],
  withActivity: boolean,
): void {
  const byKey = new Map(rows.map((r) => [rowKey(r), r]));
  expect(byKey.size, "the engine returned one row per key").toBe(rows.length);
  expect(rows.length).toBe(summaries.length);
  for (const s of summaries) {
    const key = summaryKey(s, withActivity);
    const r = byKey.get(key);
    if (r === undefined) throw new Error(`the engine lacks summarize's row ${key}`);
    expect([r.day, r.windows, r.above, r.sustained_episodes, r.longest_run], key).toEqual([
      s.day,
      s.windows,
      s.above,
      s.sustainedEpisodes,
      s.longestRun,
    ]);
    expect(Math.abs((r.sum_p as number) - s.sumP), key).toBeLessThanOrEqual(1e-9);
    expect(Math.abs((r.sum_p2 as number) - s.sumP2), key).toBeLessThanOrEqual(1e-9);
  }
}

/** The engine's column names, in order (the sessions.csv columns). */
export function columnsOf(rows: readonly EngineRow[]): string[] {
  return Object.keys(rows[0] ?? {});
}
