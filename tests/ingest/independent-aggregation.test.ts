/**
 * The windows ingest checked against an independent, deliberately naive aggregation written in this
 * file from the text of DATA-CONTRACT.md ("sessions file" and "detector card"), not from the source:
 * the whole file is parsed with csv-parse, times with Date.parse, rows are grouped in plain maps,
 * sorted, and summed with ordinary floating-point addition. The ingest's streaming, replay of
 * unsorted sittings and exact integer sums must give the same rows: counts exactly, sums to 1e-9.
 *
 * Rules the contract leaves open, settled as the ingest settles them (stated so the reference
 * below can be read on its own):
 * - A sitting is one student × session_id. When its windows carry several classes, schools, units
 *   or activities ("parts"), each part gets its own rows, but runs are followed across the whole
 *   sitting in time order and a run is credited to the part in which it starts (its episode and
 *   its length count there, even when it goes on into another part).
 * - `day` is the local date, in the window's own UTC offset, of the sitting's first window in time
 *   (any window, with or without estimates); every part of the sitting gets that day.
 * - `above` compares the raw probability with the threshold; sum_p and sum_p2 use the calibrated one.
 * - Runs are followed through the windows that carry an estimate for the construct; a window without
 *   one puts no window into the run, so the next estimated window continues the run only if it
 *   starts within 1.5 window lengths of the previous estimated one (boundary included).
 */
import { mkdtempSync, readFileSync, writeFileSync } from "node:fs";
import { tmpdir } from "node:os";
import { join } from "node:path";
import { parse as parseCsv } from "csv-parse/sync";
import { beforeAll, describe, expect, it } from "vitest";
import { parse as parseYaml, stringify as stringifyYaml } from "yaml";
import { loadCard } from "../../src/config/card.js";
import { DEFAULT_SETTINGS } from "../../src/config/defaults.js";
import { writeDemoDistrict } from "../../src/demo/simulate.js";
import { summarizeWindowsFile, type WindowsResult } from "../../src/ingest/windows.js";
import { sessionsCsv } from "../../src/summaries/sessions-csv.js";

// ---------------------------------------------------------------------------------------------
// The naive reference.

type CalibrationText =
  | "none"
  | { platt: { a: number; b: number } }
  | { bins: [number, number][] }
  | undefined;

interface CardText {
  window_seconds: number;
  constructs: Record<
    string,
    { threshold: number; sustained_min_windows: number; calibration?: CalibrationText }
  >;
}

interface NaiveWindow {
  readonly time: number;
  readonly offsetText: string;
  readonly part: string;
  readonly values: Readonly<Record<string, number | null>>;
}

interface NaiveRow {
  day: string;
  windows: number;
  sumP: number;
  sumP2: number;
  above: number;
  sustained: number;
  longest: number;
}

interface NaiveResult {
  readonly rows: Map<string, NaiveRow>;
  /** Keys (student, session, window_start instant) seen more than once. */
  readonly repeatedKeys: number;
  /** Runs that went on from one part of a sitting into another. */
  readonly runsCrossingParts: number;
  /** Pairs of estimated windows exactly 1.5 window lengths apart (adjacent by the rule). */
  readonly gapsOnBoundary: number;
  /** Sittings whose local day differs from the UTC date of their first window. */
  readonly daysNotUtc: number;
}

/** Calibration per the card section of DATA-CONTRACT.md; Platt on the logit of p (Platt 1999). */
function calibrate(calibration: CalibrationText, p: number): number {
  if (calibration === undefined || calibration === "none") return p;
  if ("platt" in calibration) {
    const { a, b } = calibration.platt;
    return 1 / (1 + Math.exp(-(a * Math.log(p / (1 - p)) + b)));
  }
  const bin = calibration.bins.find(([upper]) => p <= upper);
  if (bin === undefined) throw new Error(`no calibration bin for ${p}`);
  return bin[1];
}

/** YYYY-MM-DD of an ISO 8601 date-time in its own offset. */
function localDate(text: string): string {
  const m = /(Z|([+-])(\d{2}):(\d{2}))$/.exec(text);
  if (!m) throw new Error(`no offset in ${text}`);
  const minutes = m[1] === "Z" ? 0 : (m[2] === "-" ? -1 : 1) * (Number(m[3]) * 60 + Number(m[4]));
  return new Date(Date.parse(text) + minutes * 60_000).toISOString().slice(0, 10);
}

function naiveAggregation(windowsText: string, cardText: string): NaiveResult {
  const card = parseYaml(cardText) as CardText;
  const constructs = Object.keys(card.constructs);
  const adjacentMs = 1.5 * card.window_seconds * 1000;
  const records = parseCsv(windowsText, { columns: true, bom: true, skip_empty_lines: true }) as Record<
    string,
    string
  >[];

  const sittings = new Map<string, NaiveWindow[]>();
  const keysSeen = new Set<string>();
  let repeatedKeys = 0;
  for (const r of records) {
    const time = Date.parse(r.window_start!);
    if (Number.isNaN(time)) throw new Error(`bad time ${r.window_start}`);
    const sitting = `${r.student_id}|${r.session_id}`;
    if (keysSeen.has(`${sitting}|${time}`)) repeatedKeys++;
    keysSeen.add(`${sitting}|${time}`);
    const values: Record<string, number | null> = {};
    for (const c of constructs) values[c] = r[c] === undefined || r[c] === "" ? null : Number(r[c]);
    const part = [r.class_id, r.school_id ?? "", r.unit_id, r.activity_id ?? ""].join("|");
    const list = sittings.get(sitting) ?? [];
    list.push({ time, offsetText: r.window_start!, part, values });
    sittings.set(sitting, list);
  }

  const rows = new Map<string, NaiveRow>();
  let runsCrossingParts = 0;
  let gapsOnBoundary = 0;
  let daysNotUtc = 0;
  for (const [sitting, list] of sittings) {
    const inTime = [...list].sort((x, y) => x.time - y.time);
    const first = inTime[0]!;
    const day = localDate(first.offsetText);
    if (day !== new Date(first.time).toISOString().slice(0, 10)) daysNotUtc++;
    for (const c of constructs) {
      const spec = card.constructs[c]!;
      const rowOf = (part: string): NaiveRow => {
        const key = `${sitting}|${part}|${c}`;
        let row = rows.get(key);
        if (!row) {
          row = { day, windows: 0, sumP: 0, sumP2: 0, above: 0, sustained: 0, longest: 0 };
          rows.set(key, row);
        }
        return row;
      };
      const estimated = inTime.filter((w) => w.values[c] !== null);
      for (const w of estimated) {
        const p = w.values[c]!;
        const q = calibrate(spec.calibration, p);
        const row = rowOf(w.part);
        row.windows += 1;
        row.sumP += q;
        row.sumP2 += q * q;
        if (p >= spec.threshold) row.above += 1;
      }
      // Maximal runs: a run starts at an above-threshold window whose predecessor is missing, below
      // the threshold, or too far back; it extends while the next window is above and adjacent.
      const isAbove = (i: number) => estimated[i]!.values[c]! >= spec.threshold;
      const adjacent = (i: number) => estimated[i]!.time - estimated[i - 1]!.time <= adjacentMs;
      for (let i = 1; i < estimated.length; i++) {
        if (estimated[i]!.time - estimated[i - 1]!.time === adjacentMs) gapsOnBoundary++;
      }
      for (let start = 0; start < estimated.length; start++) {
        if (!isAbove(start)) continue;
        if (start > 0 && isAbove(start - 1) && adjacent(start)) continue; // not the start of a run
        let end = start;
        while (end + 1 < estimated.length && isAbove(end + 1) && adjacent(end + 1)) end++;
        const length = end - start + 1;
        const row = rowOf(estimated[start]!.part);
        if (length >= spec.sustained_min_windows) row.sustained += 1;
        row.longest = Math.max(row.longest, length);
        if (estimated.slice(start, end + 1).some((w) => w.part !== estimated[start]!.part)) {
          runsCrossingParts++;
        }
      }
    }
  }
  return { rows, repeatedKeys, runsCrossingParts, gapsOnBoundary, daysNotUtc };
}

// ---------------------------------------------------------------------------------------------
// Helpers: seeded shuffling, file variants, comparison.

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

function shuffled<T>(items: readonly T[], seed: number): T[] {
  const random = generator(seed);
  const out = [...items];
  for (let i = out.length - 1; i > 0; i--) {
    const j = Math.floor(random() * (i + 1));
    [out[i], out[j]] = [out[j]!, out[i]!];
  }
  return out;
}

function splitLines(text: string): { header: string; rows: string[] } {
  const lines = text.split(/\r?\n/).filter((l) => l !== "");
  return { header: lines[0]!, rows: lines.slice(1) };
}

/**
 * A harder copy of the demo's windows: each sitting's middle third moves to another unit (some
 * sittings also to an empty school or activity), so sittings span parts and runs cross them; times
 * are jittered by −5, 0, +5 or +5.5 s, so consecutive windows lie 9.5 to 30.5 s apart (30 s sits
 * on the adjacency boundary, 30.5 s just beyond it); about 3% of rows are dropped; and each row is
 * written in one of five UTC offsets, so the local day of a sitting depends on its first row.
 */
function variedWindows(text: string, seed: number): string {
  const random = generator(seed);
  const { header, rows } = splitLines(text);
  const columns = header.split(",");
  const col = (name: string) => columns.indexOf(name);
  const [iStudent, iSession, iSchool, iUnit, iActivity, iTime] = [
    "student_id",
    "session_id",
    "school_id",
    "unit_id",
    "activity_id",
    "window_start",
  ].map(col) as [number, number, number, number, number, number];
  const offsets: [string, number][] = [
    ["-06:00", -360],
    ["Z", 0],
    ["+10:00", 600],
    ["+05:30", 330],
    ["-09:30", -570],
  ];
  const jitters = [-5000, 0, 5000, 5500];
  const bySitting = new Map<string, string[][]>();
  for (const line of rows) {
    if (line.includes('"')) throw new Error("the demo's ids need no quoting");
    const fields = line.split(",");
    const key = `${fields[iStudent]}|${fields[iSession]}`;
    bySitting.set(key, [...(bySitting.get(key) ?? []), fields]);
  }
  const out: string[] = [];
  let sittingIndex = 0;
  for (const sitting of bySitting.values()) {
    sittingIndex++;
    sitting.forEach((fields, i) => {
      if (random() < 0.03) return;
      const copy = [...fields];
      if (i >= sitting.length / 3 && i < (2 * sitting.length) / 3) {
        copy[iUnit] = `${copy[iUnit]}-review`;
        if (sittingIndex % 4 === 0) copy[iActivity] = "";
        if (sittingIndex % 5 === 0) copy[iSchool] = "";
      }
      const time = Date.parse(copy[iTime]!) + jitters[Math.floor(random() * jitters.length)]!;
      const [suffix, minutes] = offsets[Math.floor(random() * offsets.length)]!;
      copy[iTime] = `${new Date(time + minutes * 60_000).toISOString().slice(0, 23)}${suffix}`;
      out.push(copy.join(","));
    });
  }
  return `${[header, ...out].join("\n")}\n`;
}

/** The demo card with calibrations added (the demo card itself has none) and one shorter minimum. */
function calibratedCard(text: string): string {
  const card = parseYaml(text) as CardText;
  const c = card.constructs;
  c.bored!.calibration = { platt: { a: 0.8, b: -0.3 } };
  c.confused!.calibration = {
    bins: [
      [0.1, 0.05],
      [0.3, 0.2],
      [0.6, 0.45],
      [1, 0.8],
    ],
  };
  c.off_task!.sustained_min_windows = 2;
  return stringifyYaml(card);
}

function summaryKey(s: WindowsResult["summaries"][number]): string {
  return [s.studentId, s.sessionId, s.classId, s.schoolId, s.unitId, s.activityId, s.construct].join("|");
}

/** Every row of the ingest equals the naive row with the same key, and no row is missing on either side. */
function expectSameAsNaive(result: WindowsResult, naive: NaiveResult): void {
  expect(result.summaries.length).toBe(naive.rows.size);
  let compared = 0;
  for (const s of result.summaries) {
    const n = naive.rows.get(summaryKey(s));
    if (n === undefined)
      throw new Error(`the ingest has a row the naive aggregation lacks: ${summaryKey(s)}`);
    const where = summaryKey(s);
    expect([s.day, s.windows, s.above, s.sustainedEpisodes, s.longestRun], where).toEqual([
      n.day,
      n.windows,
      n.above,
      n.sustained,
      n.longest,
    ]);
    expect(Math.abs(s.sumP - n.sumP), where).toBeLessThanOrEqual(1e-9);
    expect(Math.abs(s.sumP2 - n.sumP2), where).toBeLessThanOrEqual(1e-9);
    compared++;
  }
  expect(compared).toBe(naive.rows.size);
}

function sessionsText(result: WindowsResult): string {
  return [...sessionsCsv(result.summaries, result.columns.hasActivity)].join("");
}

// ---------------------------------------------------------------------------------------------

describe("windows ingest against an independent naive aggregation (demo district, 60 students, seed 7)", () => {
  let dir: string;
  let windowsText: string;
  let cardText: string;
  let cardPath: string;

  beforeAll(async () => {
    dir = mkdtempSync(join(tmpdir(), "er-independent-"));
    const paths = await writeDemoDistrict(dir, { students: 60, seed: 7, mode: "planted" });
    windowsText = readFileSync(paths.windows, "utf8");
    cardText = readFileSync(paths.card, "utf8");
    cardPath = paths.card;
  });

  it("agrees row by row on the demo file as written and on a shuffled CRLF copy", () => {
    const { header, rows } = splitLines(windowsText);
    const shuffledPath = join(dir, "windows-shuffled.csv");
    writeFileSync(shuffledPath, `${[header, ...shuffled(rows, 20260207)].join("\r\n")}\r\n`);
    const shuffledText = readFileSync(shuffledPath, "utf8");
    expect(shuffledText).not.toBe(windowsText);
    expect(shuffledText.includes("\r\n")).toBe(true);

    // The demo card has no calibration; this case checks the identity path.
    expect(Object.values((parseYaml(cardText) as CardText).constructs).map((c) => c.calibration)).toEqual(
      Array(6).fill("none"),
    );
    const card = loadCard(cardPath);
    const sorted = summarizeWindowsFile(join(dir, "windows.csv"), card, DEFAULT_SETTINGS);
    const unsorted = summarizeWindowsFile(shuffledPath, card, DEFAULT_SETTINGS);
    const naive = naiveAggregation(windowsText, cardText);
    expect(naive.repeatedKeys).toBe(0);
    expect(sorted.account.accepted).toBe(rows.length);
    expect(sorted.account.duplicates).toBe(0);
    expect(sorted.replayedSittings).toBe(0);
    expect(unsorted.replayedSittings).toBe(sorted.sittings);

    expectSameAsNaive(sorted, naive);
    expectSameAsNaive(unsorted, naiveAggregation(shuffledText, cardText));
    expect(sessionsText(unsorted)).toBe(sessionsText(sorted));
  });

  it("agrees on a harder copy: sittings over several parts, jittered gaps, mixed offsets, calibration", () => {
    const variedText = variedWindows(windowsText, 11);
    const variedPath = join(dir, "windows-varied.csv");
    writeFileSync(variedPath, variedText);
    const { header, rows } = splitLines(variedText);
    const shuffledPath = join(dir, "windows-varied-shuffled.csv");
    writeFileSync(shuffledPath, `${[header, ...shuffled(rows, 99)].join("\r\n")}\r\n`);
    const calibratedText = calibratedCard(cardText);
    const calibratedPath = join(dir, "card-calibrated.yaml");
    writeFileSync(calibratedPath, calibratedText);

    const card = loadCard(calibratedPath);
    const sorted = summarizeWindowsFile(variedPath, card, DEFAULT_SETTINGS);
    const unsorted = summarizeWindowsFile(shuffledPath, card, DEFAULT_SETTINGS);
    const naive = naiveAggregation(variedText, calibratedText);

    // The variant exercises what it is meant to.
    expect(naive.repeatedKeys).toBe(0);
    expect(sorted.account.accepted).toBe(rows.length);
    expect(sorted.sittingsSpanningParts).toBeGreaterThan(100);
    expect(naive.runsCrossingParts).toBeGreaterThan(10);
    expect(naive.gapsOnBoundary).toBeGreaterThan(10);
    expect(naive.daysNotUtc).toBeGreaterThan(10);

    expectSameAsNaive(sorted, naive);
    expectSameAsNaive(unsorted, naive);
    expect(sessionsText(unsorted)).toBe(sessionsText(sorted));
  });
});
