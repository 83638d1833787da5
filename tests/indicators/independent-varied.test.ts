/**
 * The independent district (independent-district.ts) in its "varied" scenario: nothing planted, no
 * unit or class effect, but students truly differ (a logit effect per student and construct, sd
 * 0.3), so that some of them show much more of a state than their peers on the same units. A check-in
 * of such a student is not a false alarm; one of a student whose true ratio is below 1.2 is. The
 * acceptance figures that apply (DESIGN.md; the indicators issue): share coverage, false flags
 * below a true ratio of 1.2, no unit reviewed more often than the false-discovery rate allows, and
 * classes (which have no effect here) marked at most as often as a range misses. The generator was
 * not tuned to meet them.
 */
import { mkdtempSync, rmSync } from "node:fs";
import { tmpdir } from "node:os";
import { join } from "node:path";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { loadCard } from "../../src/config/card.js";
import { DEFAULT_SETTINGS } from "../../src/config/defaults.js";
import type { Card } from "../../src/config/types.js";
import { computeIndicators } from "../../src/indicators/index.js";
import type { Indicators } from "../../src/indicators/types.js";
import { summarizeWindowsFile } from "../../src/ingest/windows.js";
import {
  binomialUpperCount,
  emptyFigures,
  pooledCounts,
  type QuarryTruth,
  scoreRun,
  writeQuarryDistrict,
} from "./independent-district.js";

const STUDENTS = 300;
const SEEDS = [201, 202, 203, 204, 205, 206];
const USABLE = ["bored", "concentrating", "confused", "gaming", "off_task"];

interface Run {
  readonly card: Card;
  readonly truth: QuarryTruth;
  readonly indicators: Indicators;
}

const runs: Run[] = [];
const figures = emptyFigures();
const dirs: string[] = [];

beforeAll(() => {
  for (const seed of SEEDS) {
    const dir = mkdtempSync(join(tmpdir(), "er-quarry-varied-"));
    dirs.push(dir);
    const district = writeQuarryDistrict(dir, { students: STUDENTS, seed, mode: "varied" });
    const card = loadCard(district.card);
    const ingest = summarizeWindowsFile(district.windows, card, DEFAULT_SETTINGS);
    const indicators = computeIndicators({
      card,
      settings: DEFAULT_SETTINGS,
      summaries: ingest.summaries,
      hasActivity: ingest.columns.hasActivity,
    });
    runs.push({ card, truth: district.truth, indicators });
    scoreRun(figures, { card, indicators, truth: district.truth });
  }
});

afterAll(() => {
  for (const dir of dirs) rmSync(dir, { recursive: true, force: true });
});

/** Check-in rate among gated rows whose true ratio in the concern direction is at least `from`. */
function checkInRate(from: number): { rows: number; flagged: number } {
  let rows = 0;
  let flagged = 0;
  for (const r of runs) {
    const good = new Set(r.card.constructs.filter((c) => c.higherIs === "good").map((c) => c.key));
    const byId = new Map(r.truth.students.map((s) => [s.student_id, s]));
    for (const row of r.indicators.students) {
      if (!USABLE.includes(row.construct) || row.status === "too-little-data") continue;
      const ratio = byId.get(row.studentId)!.ratio[r.truth.constructs.indexOf(row.construct)];
      if (ratio === null || ratio === undefined) continue;
      const concern = good.has(row.construct) ? 1 / ratio : ratio;
      if (concern < from) continue;
      rows++;
      if (row.status === "suggested") flagged++;
    }
  }
  return { rows, flagged };
}

describe("independent district, students who differ with nothing planted", () => {
  it("covers the true share at least 93% of the time for every usable construct", () => {
    for (const construct of USABLE) {
      const tally = figures.coverage.get(construct)!;
      expect(tally.total, construct).toBeGreaterThan(0.9 * SEEDS.length * STUDENTS);
      expect(tally.covered / tally.total, construct).toBeGreaterThanOrEqual(0.93);
    }
  });

  it("flags at most 1% of rows whose true ratio is below 1.2 in the concern direction", () => {
    const { total, flagged } = pooledCounts(figures, "lowRatio");
    expect(total).toBeGreaterThan(3000);
    expect(flagged / total).toBeLessThanOrEqual(0.01);
  });

  it("suggests check-ins far more often where the true ratio is 1.5 or more than below 1.2", () => {
    const high = checkInRate(1.5);
    const { total: low, flagged: lowFlagged } = pooledCounts(figures, "lowRatio");
    expect(high.rows).toBeGreaterThan(300);
    // At least ten times the rate, and at least 1 in 20 of such rows.
    expect(high.flagged / high.rows).toBeGreaterThanOrEqual(0.05);
    expect(high.flagged / high.rows).toBeGreaterThanOrEqual((10 * lowFlagged) / low);
  });

  it("reviews no more runs than the false-discovery rate allows, and marks classes rarely", () => {
    expect(figures.units.runs).toBe(SEEDS.length);
    expect(figures.units.runsWithReview).toBeLessThanOrEqual(binomialUpperCount(SEEDS.length, 0.05, 0.99));
    expect(figures.classes.shown).toBeGreaterThan(50);
    // A class is marked only when its whole range clears 1.25, so with no class effect a mark is a
    // range that missed (at most 2.5% at the line). Measured: 1 of 390 class rows (a class of 18
    // whose range had no upper end; peer-ratio.ts).
    expect(figures.classes.elevated / figures.classes.shown).toBeLessThanOrEqual(0.01);
  });
});
