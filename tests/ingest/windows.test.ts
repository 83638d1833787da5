import { mkdtempSync, writeFileSync } from "node:fs";
import { tmpdir } from "node:os";
import { join } from "node:path";
import { describe, expect, it } from "vitest";
import { DEFAULT_SETTINGS } from "../../src/config/defaults.js";
import type { Card } from "../../src/config/types.js";
import { summarizeWindowsFile } from "../../src/ingest/windows.js";
import { testCard, testConstruct } from "../support/cards.js";

const card: Card = testCard([testConstruct({ sustainedMinWindows: 3 })]);

const header = "student_id,class_id,unit_id,session_id,window_start,bored";
const rows = [
  "s1,c1,u1,x,2026-02-03T09:00:00-06:00,0.6",
  "s1,c1,u1,x,2026-02-03T09:00:20-06:00,0.7",
  "s1,c1,u1,x,2026-02-03T09:00:40-06:00,0.8",
  "s1,c1,u1,x,2026-02-03T09:01:00-06:00,0.1",
  "s1,c1,u1,x,2026-02-03T09:01:20-06:00,1.7",
  "s1,c1,u1,x,2026-02-03T09:01:40,0.2",
  '"s2",c1,u1,y,2026-02-03T23:59:00-06:00,',
];

function write(lines: readonly string[]): string {
  const dir = mkdtempSync(join(tmpdir(), "er-windows-"));
  const path = join(dir, "windows.csv");
  writeFileSync(path, `\uFEFF${[header, ...lines].join("\r\n")}\r\n`);
  return path;
}

describe("windows file to session summaries", () => {
  // Expected values counted by hand from the rows above: 0.6 + 0.7 + 0.8 + 0.1 = 2.2,
  // squares 0.36 + 0.49 + 0.64 + 0.01 = 1.5; one run of three windows at or above 0.5.
  it("sums, counts and runs a sitting, rejecting bad rows with their location", () => {
    const r = summarizeWindowsFile(write(rows), card, DEFAULT_SETTINGS);
    expect(r.summaries).toHaveLength(1);
    const s = r.summaries[0]!;
    expect(s.windows).toBe(4);
    expect(s.sumP).toBeCloseTo(2.2, 12);
    expect(s.sumP2).toBeCloseTo(1.5, 12);
    expect(s.above).toBe(3);
    expect(s.sustainedEpisodes).toBe(1);
    expect(s.longestRun).toBe(3);
    expect(s.day).toBe("2026-02-03");
    expect(r.account.rowsRead).toBe(7);
    const reasons = r.account.byReason().map((x) => [x.reason, x.count, x.examples[0]?.at]);
    expect(reasons).toEqual([
      // Columns counted by hand: window_start starts at character 12, bored at 38.
      ["no-offset", 1, "windows.csv:7:12"],
      ["out-of-range", 1, "windows.csv:6:38"],
    ]);
    expect(r.rowsWithoutEstimate).toBe(1);
  });

  it("gives identical summaries whatever the row order, and counts a duplicate once", () => {
    const sorted = summarizeWindowsFile(write(rows), card, DEFAULT_SETTINGS);
    const shuffled = [rows[3]!, rows[0]!, rows[6]!, rows[2]!, rows[0]!, rows[1]!, rows[5]!, rows[4]!];
    const r = summarizeWindowsFile(write(shuffled), card, DEFAULT_SETTINGS);
    expect(r.summaries).toEqual(sorted.summaries);
    expect(r.account.duplicates).toBe(1);
    expect(r.replayedSittings).toBe(1);
  });
});
