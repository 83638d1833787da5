/**
 * The column store keeps its rows in blocks of a fixed size (summary-store.ts). Block ends fall
 * inside sittings, and a sitting kept again or dropped leaves rows behind in earlier blocks: the
 * store must give what a plain list of the same summaries gives, sorted in the contract's order
 * (compareSummaries, DATA-CONTRACT.md), whatever the block size. The reference is that list, made
 * here without the store.
 */
import { describe, expect, it } from "vitest";
import { createRandom } from "../../src/stats/random.js";
import type { PartIds } from "../../src/summaries/session-accumulator.js";
import { SCALE } from "../../src/summaries/session-accumulator.js";
import { sessionsCsv } from "../../src/summaries/sessions-csv.js";
import { SummaryStore } from "../../src/summaries/summary-store.js";
import { compareSummaries, type SessionSummary } from "../../src/summaries/types.js";

const keys = ["bored", "confused", "gaming"];

function text(chunks: Iterable<string | Uint8Array>): string {
  return [...chunks].map((c) => (typeof c === "string" ? c : Buffer.from(c).toString())).join("");
}

describe("the column store in blocks", () => {
  it("gives the plain list's rows, census and sessions.csv for any block size", () => {
    const random = createRandom(5);
    const sittings = 400;
    const students = Array.from({ length: sittings }, (_, s) => `st${(s * 37) % 101}`);
    const sessions = Array.from({ length: sittings }, (_, s) => `x${s}`);
    const parts: PartIds[] = Array.from({ length: 9 }, (_, p) => ({
      classId: `c${p % 3}`,
      schoolId: `sch${p % 2}`,
      unitId: `u${p}`,
      activityId: "",
    }));
    const stores = [0, 2, 5, 16].map((log2) => new SummaryStore(keys, students, sessions, parts, log2));
    // The reference: each sitting's latest rows.
    const kept = new Map<number, SessionSummary[]>();
    const order = Array.from({ length: sittings }, (_, s) => s);
    // Some sittings are kept twice (the second replaces the first) and some dropped after.
    for (let i = 0; i < 120; i++) order.push(random.int(sittings));
    for (const s of order) {
      const day = `2026-02-${String(2 + (s % 20)).padStart(2, "0")}`;
      for (const store of stores) store.beginSitting(s, day);
      const rows: SessionSummary[] = [];
      const partList = [...new Set([random.int(9), random.int(9), random.int(9)])].slice(
        0,
        1 + random.int(3),
      );
      for (const part of partList) {
        for (let k = 0; k < keys.length; k++) {
          if (random.uniform() < 0.2) continue;
          const n = {
            windows: 1 + random.int(500),
            sumP: random.int(400) * 1_000_000_000_000 + random.int(1e9),
            sumP2: random.int(200) * 1_000_000_000_000 + random.int(1e9),
            above: random.int(300),
            episodes: random.int(20),
            longest: random.int(40),
          };
          for (const store of stores) store.add(s, part, k, n);
          const ids = parts[part]!;
          rows.push({
            studentId: students[s]!,
            ...ids,
            sessionId: sessions[s]!,
            day,
            construct: keys[k]!,
            windows: n.windows,
            sumP: n.sumP / SCALE,
            sumP2: n.sumP2 / SCALE,
            above: n.above,
            sustainedEpisodes: n.episodes,
            longestRun: n.longest,
          });
        }
      }
      kept.set(s, rows);
      if (random.uniform() < 0.05) {
        for (const store of stores) store.drop(s);
        kept.delete(s);
      }
    }
    const want = [...kept.values()].flat().sort(compareSummaries(new Map(keys.map((k, i) => [k, i]))));
    expect(want.length).toBeGreaterThan(500);
    const wantCsv = text(sessionsCsv(want, false));
    for (const store of stores) {
      expect(store.length).toBe(want.length);
      expect(store.toArray()).toEqual(want);
      expect([...store]).toEqual(want);
      expect(text(sessionsCsv(store, false))).toBe(wantCsv);
      const census = store.census();
      expect(census.sessions).toBe([...kept.values()].filter((r) => r.length > 0).length);
      expect(census.students).toEqual(new Set(want.map((r) => r.studentId)));
      expect(census.units).toEqual(new Set(want.map((r) => r.unitId)));
      const windows = new Map<string, number>();
      for (const r of want) windows.set(r.construct, (windows.get(r.construct) ?? 0) + r.windows);
      expect(census.windowsBy).toEqual(windows);
    }
  });
});
