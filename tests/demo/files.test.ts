import { mkdtempSync, readFileSync, rmSync } from "node:fs";
import { tmpdir } from "node:os";
import { join } from "node:path";
import { parse } from "csv-parse/sync";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { parse as parseYaml } from "yaml";
import { type DemoOptions, type DemoTruth, demoCard, writeDemoDistrict } from "../../src/demo/simulate.js";

const scratch = mkdtempSync(join(tmpdir(), "demo-files-"));
afterAll(() => rmSync(scratch, { recursive: true, force: true }));

let runs = 0;
async function write(options: DemoOptions) {
  const dir = mkdtempSync(join(scratch, `run${runs++}-`));
  const paths = await writeDemoDistrict(dir, Object.freeze({ ...options }));
  const read = (path: string) => readFileSync(path);
  return {
    paths,
    bytes: {
      windows: read(paths.windows),
      card: read(paths.card),
      roster: read(paths.roster),
      truth: read(paths.truth),
    },
  };
}

function rows(bytes: Buffer): Record<string, string>[] {
  return parse(bytes, { columns: true }) as Record<string, string>[];
}

const WINDOW_HEADER =
  "student_id,class_id,school_id,unit_id,activity_id,session_id,window_start," +
  "bored,confused,frustrated,concentrating,off_task,gaming";
const CONSTRUCTS = ["bored", "confused", "frustrated", "concentrating", "off_task", "gaming"];
const STAMP = /^2026-(\d\d)-(\d\d)T(\d\d):(\d\d):(\d\d)-06:00$/;

describe("demo files: determinism", () => {
  it("gives byte-identical files for one seed and different ones for another", async () => {
    const options = { students: 60, seed: 11, mode: "planted" } as const;
    const a = await write(options);
    const b = await write(options);
    const c = await write({ ...options, seed: 12 });
    for (const key of ["windows", "card", "roster", "truth"] as const) {
      expect(a.bytes[key].equals(b.bytes[key]), key).toBe(true);
      expect(a.bytes[key].equals(c.bytes[key]), key).toBe(false);
    }
    expect(a.paths.windows.endsWith("windows.csv")).toBe(true);
  });
});

describe("demo files: structure at 50 students", () => {
  const options = { students: 50, seed: 3, mode: "planted" } as const;
  let bytes: Awaited<ReturnType<typeof write>>["bytes"];
  let windows: Record<string, string>[];
  let roster: Record<string, string>[];
  let truth: DemoTruth;
  beforeAll(async () => {
    bytes = (await write(options)).bytes;
    windows = rows(bytes.windows);
    roster = rows(bytes.roster);
    truth = JSON.parse(bytes.truth.toString("utf8")) as DemoTruth;
  });

  it("writes the contract's columns in order, LF line ends, and the card as YAML", () => {
    const text = bytes.windows.toString("utf8");
    expect(text.slice(0, text.indexOf("\n"))).toBe(WINDOW_HEADER);
    expect(text.includes("\r")).toBe(false);
    expect(bytes.roster.toString("utf8").split("\n")[0]).toBe(
      "student_id,display_name,school_id,grade,counselor,setting",
    );
    expect(parseYaml(bytes.card.toString("utf8"))).toEqual(demoCard(options));
  });

  it("has 2 schools, one rural, 2-3 counselors each, and a planted class of at least 12", () => {
    expect(truth.schools).toHaveLength(2);
    expect(truth.schools.filter((s) => s.setting === "rural")).toHaveLength(1);
    expect(truth.classes.length).toBeGreaterThanOrEqual(2);
    expect(truth.planted.class_ids).toHaveLength(1);
    const planted = truth.classes.find((k) => k.class_id === truth.planted.class_ids[0])!;
    expect(planted.students).toBeGreaterThanOrEqual(12);
    expect(new Set(roster.map((r) => r.school_id))).toEqual(new Set(truth.schools.map((s) => s.school_id)));
    for (const school of truth.schools) {
      const counselors = new Set(
        roster.filter((r) => r.school_id === school.school_id).map((r) => r.counselor),
      );
      expect(counselors.size).toBeGreaterThanOrEqual(2);
      expect(counselors.size).toBeLessThanOrEqual(3);
    }
    expect(new Set(roster.map((r) => r.setting))).toEqual(new Set(truth.schools.map((s) => s.setting)));
  });

  it("has one roster row per student and windows for every student", () => {
    expect(roster.map((r) => r.student_id)).toEqual(truth.students.map((s) => s.student_id));
    expect(new Set(windows.map((w) => w.student_id)).size).toBe(50);
    expect(windows).toHaveLength(truth.rows);
    for (const r of roster) expect(r.display_name).toMatch(/^[A-Z][a-z]+ [A-Z][a-z]+$/);
  });

  it("is sorted by student, session and time, timestamps 20 s apart with occasional gaps", () => {
    const key = (r: Record<string, string>) => `${r.student_id}|${r.session_id}`;
    const steps = new Map<number, number>();
    const unsorted: string[] = [];
    for (let i = 1; i < windows.length; i++) {
      const prev = windows[i - 1]!;
      const row = windows[i]!;
      if (key(prev) !== key(row)) {
        if (!(key(prev) < key(row))) unsorted.push(key(row));
        continue;
      }
      const step = (Date.parse(row.window_start!) - Date.parse(prev.window_start!)) / 1000;
      steps.set(step, (steps.get(step) ?? 0) + 1);
    }
    expect(unsorted).toEqual([]);
    expect([...steps.keys()].sort((a, b) => a - b)).toEqual([20, 40, 60, 80]);
    const gaps = windows.length - 1 - (steps.get(20) ?? 0) - (truth.sessions - 1);
    expect(gaps / windows.length).toBeLessThan(0.03);
  });

  it("writes valid local timestamps with offset -06:00 on term weekdays in school hours", () => {
    const bad = windows
      .map((row) => row.window_start!)
      .filter((stamp) => {
        const match = STAMP.exec(stamp);
        if (!match) return true;
        const offsetMs = Date.parse(stamp) - Date.parse(`${stamp.slice(0, 19)}Z`);
        const weekday = new Date(`${stamp.slice(0, 10)}T00:00:00Z`).getUTCDay();
        const day = stamp.slice(0, 10);
        const hour = Number(match[3]);
        return (
          offsetMs !== 6 * 3600 * 1000 ||
          weekday < 1 ||
          weekday > 5 ||
          day < "2026-02-02" ||
          day > "2026-03-27" ||
          hour < 8 ||
          hour >= 16
        );
      });
    expect(bad).toEqual([]);
  });

  it("writes probabilities in [0, 1] with 4 decimals, about 1% empty", () => {
    const cells = windows.flatMap((row) => CONSTRUCTS.map((key) => row[key]!));
    const empty = cells.filter((value) => value === "").length;
    expect(cells.filter((value) => value !== "" && !/^(0\.\d{4}|1\.0000)$/.test(value))).toEqual([]);
    const share = empty / cells.length;
    expect(share).toBeGreaterThan(0.005);
    expect(share).toBeLessThan(0.015);
  });

  it("keeps sessions within one day, unit, class and school, with unique ids per student", () => {
    const sessions = new Map<string, { rows: Record<string, string>[] }>();
    for (const row of windows) {
      const entry = sessions.get(row.session_id!) ?? { rows: [] };
      entry.rows.push(row);
      sessions.set(row.session_id!, entry);
    }
    expect(sessions.size).toBe(truth.sessions);
    for (const [id, { rows: own }] of sessions) {
      const first = own[0]!;
      expect(id.startsWith(`${first.student_id}-`)).toBe(true);
      for (const field of ["student_id", "class_id", "school_id", "unit_id", "activity_id"]) {
        expect(new Set(own.map((r) => r[field])).size, field).toBe(1);
      }
      expect(new Set(own.map((r) => r.window_start!.slice(0, 10))).size).toBe(1);
      expect(first.activity_id!.startsWith(first.unit_id!.slice(0, 3))).toBe(true);
    }
  });

  it("gives most students 8-16 sessions of 30-90 windows on distinct days, about 5% one or two short ones", () => {
    const byStudent = new Map<string, Map<string, number>>();
    const days = new Map<string, Set<string>>();
    for (const row of windows) {
      const sessions = byStudent.get(row.student_id!) ?? new Map<string, number>();
      sessions.set(row.session_id!, (sessions.get(row.session_id!) ?? 0) + 1);
      byStudent.set(row.student_id!, sessions);
      const seen = days.get(row.student_id!) ?? new Set<string>();
      seen.add(row.window_start!.slice(0, 10));
      days.set(row.student_id!, seen);
    }
    for (const student of truth.students) {
      const sessions = byStudent.get(student.student_id)!;
      expect(days.get(student.student_id)!.size).toBe(sessions.size);
      expect(student.sessions).toBe(sessions.size);
      const lengths = [...sessions.values()];
      if (student.low_data) {
        expect(sessions.size).toBeLessThanOrEqual(2);
        for (const n of lengths) expect(n).toBeLessThanOrEqual(25);
      } else {
        expect(sessions.size).toBeGreaterThanOrEqual(8);
        expect(sessions.size).toBeLessThanOrEqual(16);
        for (const n of lengths) expect(n >= 30 && n <= 90).toBe(true);
      }
    }
    // round(5% of 50) = 3 (rounded up from 2.5).
    expect(truth.students.filter((s) => s.low_data)).toHaveLength(3);
  });

  it("counts in truth.json exactly the non-empty cells of the windows file", () => {
    const counts = new Map<string, number[]>();
    for (const row of windows) {
      const own = counts.get(row.student_id!) ?? CONSTRUCTS.map(() => 0);
      CONSTRUCTS.forEach((key, c) => {
        if (row[key] !== "") own[c]!++;
      });
      counts.set(row.student_id!, own);
    }
    for (const student of truth.students) expect(student.windows).toEqual(counts.get(student.student_id));
  });
});
