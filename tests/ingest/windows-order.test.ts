/**
 * DATA-CONTRACT.md, windows file: "Rows may come in any order; results must not depend on it", and
 * the file is RFC 4180 CSV, so a field may be quoted or not. These checks hold the ingest to both
 * where its shortcuts could break them: a file sorted by time across more sittings than the ingest
 * keeps open at once (sittings are closed and must be replayed when they come back), and rows
 * written in forms that the fast byte-level reading leaves to the ordinary CSV path (quoted ids,
 * spaces, exponents, fractions of a second). Expected values are counted by hand in the comments,
 * not computed with the code under test.
 */
import { mkdtempSync, writeFileSync } from "node:fs";
import { tmpdir } from "node:os";
import { join } from "node:path";
import { describe, expect, it } from "vitest";
import { DEFAULT_SETTINGS } from "../../src/config/defaults.js";
import type { Card } from "../../src/config/types.js";
import { summarizeWindowsFile } from "../../src/ingest/windows.js";
import { testCard, testConstruct } from "../support/cards.js";

const card: Card = testCard([testConstruct({ sustainedMinWindows: 2 })]);

const header = "student_id,class_id,unit_id,session_id,window_start,bored";

function write(name: string, lines: readonly string[]): string {
  const dir = mkdtempSync(join(tmpdir(), "er-windows-order-"));
  const path = join(dir, name);
  writeFileSync(path, `${[header, ...lines].join("\n")}\n`);
  return path;
}

describe("row order and row form do not change the summaries", () => {
  it("a file sorted by time across 20,000 sittings gives what the file sorted by sitting gives", () => {
    // 20,000 sittings of three windows 20 s apart, probabilities 0.6, 0.7, 0.2: by hand, each
    // sitting has windows 3, sum_p 1.5, above 2, one sustained episode (run of 2), longest run 2.
    const sittings = 20_000;
    const clock = ["09:00:00", "09:00:20", "09:00:40"];
    const p = ["0.6", "0.7", "0.2"];
    const row = (s: number, w: number) =>
      `st${s},c${s % 7},u${s % 3},x${s},2026-02-03T${clock[w]}-06:00,${p[w]}`;
    const bySitting: string[] = [];
    for (let s = 0; s < sittings; s++) for (let w = 0; w < 3; w++) bySitting.push(row(s, w));
    const byTime: string[] = [];
    for (let w = 0; w < 3; w++) for (let s = 0; s < sittings; s++) byTime.push(row(s, w));

    const sorted = summarizeWindowsFile(write("by-sitting.csv", bySitting), card, DEFAULT_SETTINGS);
    const interleaved = summarizeWindowsFile(write("by-time.csv", byTime), card, DEFAULT_SETTINGS);
    expect(sorted.replayedSittings).toBe(0);
    // More sittings under way at once than stay open: some were closed and replayed.
    expect(interleaved.replayedSittings).toBeGreaterThan(0);
    expect(interleaved.summaries).toEqual(sorted.summaries);
    expect(sorted.summaries).toHaveLength(sittings);
    for (const s of sorted.summaries) {
      expect([s.windows, s.above, s.sustainedEpisodes, s.longestRun]).toEqual([3, 2, 1, 2]);
      expect(s.sumP).toBeCloseTo(1.5, 12);
    }
    expect(interleaved.account.accepted).toBe(3 * sittings);
    expect(interleaved.account.duplicates).toBe(0);
  });

  it("sittings kept open grow to what a file sorted by time interleaves, after the first wave", () => {
    // Five waves (days) of 3,000 sittings each under way at the same time, twelve windows 20 s
    // apart, rows sorted by time. The ingest first keeps fewer sittings open than a wave holds:
    // sittings closed too early in the first wave come back and are replayed, and the limit grows;
    // later waves then fit. A limit that did not grow would replay most sittings of every wave.
    const waves = 5;
    const perWave = 3000;
    const windows = 12;
    const p = (s: number, w: number) => ((s * 7 + w * 3) % 10) / 10;
    const row = (wave: number, s: number, w: number) => {
      const t = new Date(Date.UTC(2026, 1, 2 + wave, 15, 0, 20 * w)).toISOString().replace(".000Z", "Z");
      return `st${s},c${s % 7},u${wave},x${wave}-${s},${t},${p(s, w).toFixed(1)}`;
    };
    const bySitting: string[] = [];
    const byTime: string[] = [];
    for (let wave = 0; wave < waves; wave++) {
      for (let s = 0; s < perWave; s++) for (let w = 0; w < windows; w++) bySitting.push(row(wave, s, w));
      for (let w = 0; w < windows; w++) for (let s = 0; s < perWave; s++) byTime.push(row(wave, s, w));
    }
    const sorted = summarizeWindowsFile(write("waves-by-sitting.csv", bySitting), card, DEFAULT_SETTINGS);
    const interleaved = summarizeWindowsFile(write("waves-by-time.csv", byTime), card, DEFAULT_SETTINGS);
    expect(sorted.replayedSittings).toBe(0);
    expect(interleaved.replayedSittings).toBeGreaterThan(0);
    // Only sittings of the first wave: at most its 3,000.
    expect(interleaved.replayedSittings).toBeLessThanOrEqual(perWave);
    expect(interleaved.summaries).toEqual(sorted.summaries);
    expect(sorted.summaries).toHaveLength(waves * perWave);
  });

  it("rows in forms the fast reading passes over are read as their plain forms", () => {
    const plain = [
      "s1,c1,u1,x,2026-02-03T09:00:00-06:00,0.6",
      "s1,c1,u1,x,2026-02-03T09:00:20-06:00,0.5",
      "s1,c1,u1,x,2026-02-03T09:00:40-06:00,",
      "s1,c1,u1,x,2026-02-03T09:01:00-06:00,0.25",
      "s2,c1,u1,y,2026-02-03T10:00:00Z,1",
      "s2,c1,u1,y,2026-02-03T10:00:20Z,0",
    ];
    // The same windows: quoted ids, spaces around a value, an exponent, a fraction of a second of zero, a space for T, an
    // offset without a colon, and a value with more than 15 digits that is exactly 0.25.
    const varied = [
      '"s1","c1",u1,"x",2026-02-03T09:00:00-06:00,0.6',
      "s1,c1,u1,x,2026-02-03T09:00:20.000-06:00, 0.5 ",
      "s1,c1,u1,x,2026-02-03 09:00:40-0600,",
      "s1,c1,u1,x,2026-02-03T09:01:00-06:00,0.2500000000000000",
      's2,c1,"u1",y,2026-02-03T10:00:00Z,1e0',
      "s2,c1,u1,y,2026-02-03T10:00:20Z,0.0e5",
    ];
    const a = summarizeWindowsFile(write("plain.csv", plain), card, DEFAULT_SETTINGS);
    const b = summarizeWindowsFile(write("varied.csv", varied), card, DEFAULT_SETTINGS);
    expect(b.account.rejected).toBe(0);
    expect(b.summaries).toEqual(a.summaries);
    // By hand: s1 has 3 estimated windows, 0.6 + 0.5 + 0.25 = 1.35, above 2 (0.6, 0.5: threshold
    // included) in one run of 2 (a sustained episode at the minimum of 2); s2 has 2 windows, sum 1,
    // above 1, longest run 1.
    const [s1, s2] = a.summaries;
    expect([s1!.windows, s1!.above, s1!.sustainedEpisodes, s1!.longestRun]).toEqual([3, 2, 1, 2]);
    expect(s1!.sumP).toBeCloseTo(1.35, 12);
    expect([s2!.windows, s2!.above, s2!.longestRun]).toEqual([2, 1, 1]);
  });

  it("a value the fast reading cannot take is rejected with the ordinary message", () => {
    const r = summarizeWindowsFile(
      write("bad.csv", [
        "s1,c1,u1,x,2026-02-03T09:00:00-06:00,0.6",
        "s1,c1,u1,x,2026-02-03T09:00:20-06:00,1.5",
        "s1,c1,u1,x,2026-02-03T25:00:40-06:00,0.5",
        "s1,c1,u1,x,2026-02-03T09:01:00-06:00,0.5,extra",
      ]),
      card,
      DEFAULT_SETTINGS,
    );
    // Columns counted by hand: window_start starts at character 12 (after "s1,c1,u1,x,"), bored
    // at 38 (25 characters of window_start and a comma later); the extra field of line 5 at 42.
    expect(r.account.byReason().map((x) => [x.reason, x.examples[0]?.at])).toEqual([
      ["bad-date", "bad.csv:4:12"],
      ["out-of-range", "bad.csv:3:38"],
      ["wrong-field-count", "bad.csv:5:42"],
    ]);
    expect(r.account.accepted).toBe(1);
  });
});
