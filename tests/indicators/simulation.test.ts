/**
 * The indicators checked against the demo district's known truth (src/demo, truth.json): the demo is
 * written to files, read by the windows ingest, and turned into indicators exactly as a build
 * does; the figures are then scored against the truth the simulator counted window by window.
 *
 * Acceptance figures (the issue's, not ours to relax):
 * - coverage of the 95% share interval ≥ 0.93 for every usable construct, over students past the
 *   evidence gate, the truth being the student's realized share of windows in state;
 * - planted students (high boredom): at least 6 in 10 get `check-in`, while rows whose true ratio
 *   to peers is below 1.2 in the concern direction (above 1/1.2 for a construct where higher is
 *   good) get `check-in` at most 1% of the time;
 * - the planted unit gets `review` for gaming, the planted class `elevated` for off task;
 * - null scenario: at most 1% of student × construct rows of usable constructs are `check-in`, and
 *   unit reviews no more often than Benjamini–Hochberg's false-discovery rate allows (below).
 *
 * Seeds are pooled (3 planted districts of 300 students give about 36 planted students) and fixed,
 * so every run of this file sees the same districts.
 */
import { mkdtempSync, readFileSync, rmSync } from "node:fs";
import { tmpdir } from "node:os";
import { join } from "node:path";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { loadCard } from "../../src/config/card.js";
import { DEFAULT_SETTINGS } from "../../src/config/defaults.js";
import type { Card, Settings } from "../../src/config/types.js";
import { type DemoMode, type DemoTruth, writeDemoDistrict } from "../../src/demo/simulate.js";
import { computeIndicators } from "../../src/indicators/index.js";
import type { Indicators } from "../../src/indicators/types.js";
import { summarizeWindowsFile, type WindowsResult } from "../../src/ingest/windows.js";
import {
  activitiesCsv,
  groupsCsv,
  studentsCsv,
  trendsCsv,
  unitsCsv,
} from "../../src/output/indicator-csv.js";
import {
  binomialUpperCount,
  deepFreeze,
  emptyFigures,
  type Figures,
  scoreRun,
} from "./independent-district.js";

const STUDENTS = 300;
const PLANTED_SEEDS = [1, 2, 3, 4, 5, 6, 7, 8];
const NULL_SEEDS = [11, 12, 13, 14, 15, 16];
const settings: Settings = DEFAULT_SETTINGS;

interface Run {
  readonly mode: DemoMode;
  readonly seed: number;
  readonly dir: string;
  readonly windowsPath: string;
  readonly card: Card;
  readonly ingest: WindowsResult;
  readonly truth: DemoTruth;
  readonly indicators: Indicators;
}

const runs: Run[] = [];
const planted = emptyFigures();
const nulls = emptyFigures();
const pooled = emptyFigures();

async function run(mode: DemoMode, seed: number): Promise<Run> {
  const dir = mkdtempSync(join(tmpdir(), "er-simulation-"));
  const paths = await writeDemoDistrict(dir, { students: STUDENTS, seed, mode });
  const card = loadCard(paths.card);
  const ingest = summarizeWindowsFile(paths.windows, card, settings);
  const truth = JSON.parse(readFileSync(paths.truth, "utf8")) as DemoTruth;
  const indicators = computeIndicators({
    card,
    settings,
    summaries: ingest.summaries,
    hasActivity: ingest.columns.hasActivity,
  });
  return { mode, seed, dir, windowsPath: paths.windows, card, ingest, truth, indicators };
}

function score(into: Figures, r: Run): void {
  scoreRun(into, { card: r.card, indicators: r.indicators, truth: r.truth });
}

beforeAll(async () => {
  for (const seed of PLANTED_SEEDS) runs.push(await run("planted", seed));
  for (const seed of NULL_SEEDS) runs.push(await run("null", seed));
  for (const r of runs) {
    score(r.mode === "planted" ? planted : nulls, r);
    score(pooled, r);
  }
});

afterAll(() => {
  for (const r of runs) rmSync(r.dir, { recursive: true, force: true });
});

/** The constructs the demo card lets judge (frustration's detector is below the floor on purpose). */
const USABLE = ["bored", "confused", "concentrating", "off_task", "gaming"];

describe("demo district: share intervals", () => {
  it("frustration alone is below the card's floor, so the other five are the ones checked", () => {
    const usable = runs[0]!.indicators.methods.filter((x) => x.usable).map((x) => x.construct);
    expect(usable.sort()).toEqual([...USABLE].sort());
  });

  it.each(USABLE)("covers the true share of %s at least 93% of the time (all runs pooled)", (construct) => {
    const tally = pooled.coverage.get(construct);
    expect(tally).toBeDefined();
    // Every run contributes nearly all of its 300 students (the demo's low-data 5% are gated out).
    expect(tally!.total).toBeGreaterThan(0.9 * runs.length * STUDENTS);
    expect(tally!.covered / tally!.total).toBeGreaterThanOrEqual(0.93);
  });
});

describe("demo district: ratio ranges", () => {
  // Not an acceptance figure of its own, but a check-in rests on the ratio's range.
  it.each(USABLE)(
    "covers the true ratio to peers of %s at least 93% of the time (all runs pooled)",
    (construct) => {
      const tally = pooled.ratioCoverage.get(construct);
      expect(tally).toBeDefined();
      expect(tally!.total).toBeGreaterThan(0.3 * runs.length * STUDENTS);
      expect(tally!.covered / tally!.total).toBeGreaterThanOrEqual(0.93);
    },
  );
});

describe("demo district: students", () => {
  it("finds at least 6 in 10 planted students (check-in for boredom)", () => {
    expect(planted.planted.total).toBeGreaterThanOrEqual(30);
    // The demo draws planted students among those with full data: none is gated out.
    expect(planted.planted.gated).toBe(planted.planted.total);
    expect(planted.planted.found / planted.planted.gated).toBeGreaterThanOrEqual(0.6);
  });

  it("flags at most 1% of rows whose true ratio is below 1.2 in the concern direction", () => {
    let total = 0;
    let flagged = 0;
    for (const e of pooled.lowRatio.values()) {
      total += e.total;
      flagged += e.flagged;
    }
    expect(total).toBeGreaterThan(5000);
    expect(flagged / total).toBeLessThanOrEqual(0.01);
  });

  it("in the null scenario, at most 1% of usable rows are check-in", () => {
    let rows = 0;
    let flagged = 0;
    for (const e of nulls.checkIns.values()) {
      rows += e.rows;
      flagged += e.flagged;
    }
    expect(rows).toBe(NULL_SEEDS.length * STUDENTS * USABLE.length);
    expect(flagged / rows).toBeLessThanOrEqual(0.01);
  });
});

describe("demo district: units and classes", () => {
  it("marks the planted unit for review of gaming in every planted run", () => {
    expect(planted.plantedUnits).toHaveLength(PLANTED_SEEDS.length);
    for (const u of planted.plantedUnits) expect(u.status).toBe("review");
  });

  it("marks the planted class elevated for off task in every planted run", () => {
    expect(planted.plantedClasses).toHaveLength(PLANTED_SEEDS.length);
    for (const k of planted.plantedClasses) expect(k.status).toBe("concern");
  });

  /*
   * Criterion for false reviews. In the null scenario every unit effect is 0, so every review is a
   * false discovery, and with all hypotheses true the false-discovery rate Benjamini–Hochberg
   * controls is the chance of any review at all (Benjamini and Hochberg 1995, section 2): at most
   * 0.05 per run. Over the null runs, the number of runs with a review is then at most
   * Binomial(runs, 0.05); we fail above its 99th percentile. A second check looks at the tests
   * themselves: the share of unit × construct p-values below 0.05 must stay within the 99th
   * percentile of Binomial(tests, 0.05) (approximate, as units of one run share students).
   */
  it("in the null scenario, reviews no more runs than the false-discovery rate allows", () => {
    expect(nulls.units.runs).toBe(NULL_SEEDS.length);
    expect(nulls.units.runsWithReview).toBeLessThanOrEqual(binomialUpperCount(nulls.units.runs, 0.05, 0.99));
  });

  it("in the null scenario, unit p-values below 0.05 are no more common than 5% allows", () => {
    expect(nulls.units.tested).toBeGreaterThan(100);
    expect(nulls.units.below05).toBeLessThanOrEqual(binomialUpperCount(nulls.units.tested, 0.05, 0.99));
  });
});

describe("demo district: determinism and inputs", () => {
  function allCsv(ind: Indicators): string {
    return [
      ...studentsCsv(ind.students),
      ...unitsCsv(ind.units),
      ...activitiesCsv(ind.activities),
      ...groupsCsv(ind.groups),
      ...trendsCsv(ind.trends),
    ].join("");
  }

  it("gives byte-identical CSV tables for the same inputs and settings", () => {
    const first = runs[0]!;
    const again = summarizeWindowsFile(first.windowsPath, first.card, settings);
    const indicators = computeIndicators({
      card: first.card,
      settings,
      summaries: again.summaries,
      hasActivity: again.columns.hasActivity,
    });
    const text = allCsv(indicators);
    expect(text.length).toBeGreaterThan(100_000);
    expect(text).toBe(allCsv(first.indicators));
  });

  it("does not depend on the order of the session summaries", () => {
    const first = runs[0]!;
    const reversed = [...first.ingest.summaries].reverse();
    const indicators = computeIndicators({
      card: first.card,
      settings,
      summaries: reversed,
      hasActivity: true,
    });
    expect(allCsv(indicators)).toBe(allCsv(first.indicators));
  });

  it("leaves the card, settings and summaries as they were (frozen, and equal afterwards)", () => {
    const first = runs[1]!;
    const inputs = {
      card: structuredClone(first.card),
      settings: structuredClone(settings),
      summaries: structuredClone(first.ingest.summaries),
      hasActivity: true,
    };
    const before = JSON.stringify(inputs);
    deepFreeze(inputs);
    // A write to a frozen object throws in module code (strict mode), so a mutation cannot pass.
    const indicators = computeIndicators(inputs);
    expect(JSON.stringify(inputs)).toBe(before);
    expect(allCsv(indicators)).toBe(allCsv(first.indicators));
  });
});
