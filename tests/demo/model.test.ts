import { describe, expect, it } from "vitest";
import { CONSTRUCT_KEYS, CONSTRUCTS, PERSISTENCE } from "../../src/demo/constructs.js";
import { DETECTOR_SLOPE } from "../../src/demo/detector.js";
import { anovaF, histogramAuc, type Tally, tally } from "./collect.js";
import { jStat } from "./reference.js";

const planted: Tally = tally({ students: 300, seed: 5, mode: "planted" });
const nullRun: Tally = tally({ students: 300, seed: 5, mode: "null" });
const B = CONSTRUCT_KEYS.indexOf("bored");

function mean(values: readonly number[]): number {
  return values.reduce((a, b) => a + b, 0) / values.length;
}

/** Least-squares slope of y on x. */
function slope(x: readonly number[], y: readonly number[]): number {
  const mx = mean(x);
  const my = mean(y);
  let sxy = 0;
  let sxx = 0;
  x.forEach((xi, i) => {
    sxy += (xi - mx) * (y[i]! - my);
    sxx += (xi - mx) ** 2;
  });
  return sxy / sxx;
}

/** E[p | state] − E[p | not], integrating the documented score model against jstat's normal density. */
function probabilityGap(model: (typeof CONSTRUCTS)[number]): number {
  const d = Math.SQRT2 * jStat.normal.inv(model.auc, 0, 1);
  const logitBase = Math.log(model.baseRate / (1 - model.baseRate));
  const h = 0.001;
  let gap = 0;
  for (let x = -12 + h / 2; x < 12; x += h) {
    const p = 1 / (1 + Math.exp(-(logitBase + DETECTOR_SLOPE * (x - d / 2))));
    gap += (jStat.normal.pdf(x, d, 1) - jStat.normal.pdf(x, 0, 1)) * p * h;
  }
  return gap;
}

function sessionShares(run: Tally, c: number): number[][] {
  const lowData = new Set(run.truth.students.filter((s) => s.low_data).map((s) => s.student_id));
  const groups = new Map<string, number[]>();
  for (const session of run.sessions.values()) {
    if (lowData.has(session.student)) continue;
    const [windows, inState] = session.counts[c]!;
    if (windows === 0) continue;
    groups.set(session.student, [...(groups.get(session.student) ?? []), inState / windows]);
  }
  return [...groups.values()];
}

describe("demo model: detector", () => {
  it("reaches the chosen AUC over the district's windows (binormal AUC = Φ(d/√2); ±0.015)", () => {
    // Hanley (1988) / Swets: with scores N(d, 1) in state and N(0, 1) out, AUC = Φ(d/√2). Scores are
    // independent given the states, so the Hanley–McNeil SE applies: below 0.005 with the
    // 10 000+ in-state cells of the rarest construct here; ±0.015 is 3 SE.
    for (const [c, model] of CONSTRUCTS.entries()) {
      const [negatives, positives] = planted.histogram[c]!;
      expect(Math.abs(histogramAuc(negatives!, positives!) - model.auc), model.key).toBeLessThan(0.015);
      const d = Math.SQRT2 * jStat.normal.inv(model.auc, 0, 1);
      expect(jStat.normal.cdf(d / Math.SQRT2, 0, 1)).toBeCloseTo(model.auc, 12);
    }
  });

  it("pulls a student's mean probability toward the base rate: slope on true share = E[p|in] − E[p|out] (±0.03)", () => {
    // Mean p over a student's windows = m0 + share·(m1 − m0) in expectation (the misclassification
    // relation behind Rogan & Gladen 1978), so regressing mean p on true share recovers m1 − m0.
    // Standard error of the slope here is about 0.01; 0.03 is 3 SE.
    for (const [c, model] of CONSTRUCTS.entries()) {
      const shares: number[] = [];
      const means: number[] = [];
      for (const student of planted.students.values()) {
        if (student.windows[c]! < 100) continue;
        shares.push(student.inState[c]! / student.windows[c]!);
        means.push(student.sumP[c]! / student.windows[c]!);
      }
      const gap = probabilityGap(model);
      expect(Math.abs(slope(shares, means) - gap), model.key).toBeLessThan(0.03);
      expect(gap).toBeLessThan(0.25);
    }
  });

  it("makes planted bored students differ from others by far less in mean probability than in true share", () => {
    const ids = new Set(planted.truth.planted.student_ids);
    const group = (inside: boolean) =>
      planted.truth.students.filter((s) => !s.low_data && ids.has(s.student_id) === inside);
    const trueShare = (list: typeof planted.truth.students) => mean(list.map((s) => s.share[B]!));
    const meanP = (list: typeof planted.truth.students) =>
      mean(list.map((s) => planted.students.get(s.student_id)!.sumP[B]! / s.windows[B]!));
    const shareGap = trueShare(group(true)) - trueShare(group(false));
    const probabilityGapSeen = meanP(group(true)) - meanP(group(false));
    expect(shareGap).toBeGreaterThan(0.2);
    expect(probabilityGapSeen).toBeGreaterThan(0);
    // m1 − m0 = 0.128 for boredom: the probability gap is about an eighth of the share gap.
    expect(probabilityGapSeen).toBeLessThan(0.25 * shareGap);
  });
});

describe("demo model: states", () => {
  it("has persistent spells: mean spell in state 4 to 8 windows for the rarer states, runs past the minimum", () => {
    // Two-state chain with lag-1 autocorrelation ρ: mean spell 1 / ((1 − π)(1 − ρ)), 5.3 to 5.9 at
    // the base rates of these constructs with ρ = 0.8.
    expect(PERSISTENCE).toBe(0.8);
    for (const key of ["bored", "confused", "frustrated", "off_task", "gaming"] as const) {
      const c = CONSTRUCT_KEYS.indexOf(key);
      const spells = nullRun.spells[c]!;
      const meanSpell = mean(spells);
      expect(meanSpell, key).toBeGreaterThan(4);
      expect(meanSpell, key).toBeLessThan(8);
      expect(spells.filter((n) => n >= 6).length / spells.length, key).toBeGreaterThan(0.15);
    }
  });
});

describe("demo model: truth.json figures", () => {
  it("agrees with an independent recount of shares, peer ratios and sustained episodes", () => {
    // Peer ratio: indirect standardisation, each window given the in-state rate of the other
    // students in the same unit (the student left out).
    const unitTotals = new Map<string, [number, number][]>();
    for (const student of planted.students.values()) {
      for (const [unit, counts] of student.units) {
        const total = unitTotals.get(unit) ?? CONSTRUCT_KEYS.map((): [number, number] => [0, 0]);
        counts.forEach(([w, s], c) => {
          total[c]![0] += w;
          total[c]![1] += s;
        });
        unitTotals.set(unit, total);
      }
    }
    for (const truth of planted.truth.students) {
      const mine = planted.students.get(truth.student_id)!;
      expect(truth.windows).toEqual(mine.windows);
      expect(truth.in_state).toEqual(mine.inState);
      expect(truth.sustained_episodes).toEqual(mine.episodes);
      CONSTRUCT_KEYS.forEach((_, c) => {
        let expected = 0;
        for (const [unit, counts] of mine.units) {
          const [w, s] = counts[c]!;
          const [tw, ts] = unitTotals.get(unit)![c]!;
          expected += (w * (ts - s)) / (tw - w);
        }
        // truth.json rounds shares and ratios to 6 decimals.
        expect(truth.share[c]).toBeCloseTo(mine.inState[c]! / mine.windows[c]!, 5);
        expect(truth.ratio[c]).toBeCloseTo(mine.inState[c]! / expected, 5);
      });
    }
  });
});

describe("demo model: planted mode", () => {
  const truth = planted.truth;

  it("plants 4% of students (at least 3) with boredom, none of them short of data", () => {
    expect(truth.planted.student_ids).toHaveLength(12);
    const ids = new Set(truth.planted.student_ids);
    for (const student of truth.students) {
      expect(student.planted[B]).toBe(ids.has(student.student_id));
      if (ids.has(student.student_id)) {
        expect(student.low_data).toBe(false);
        expect(student.logit_effect[B]).toBe(1.5);
      }
    }
  });

  it("shows the planted students, unit and class clearly elevated in truth", () => {
    const ids = new Set(truth.planted.student_ids);
    const full = truth.students.filter((s) => !s.low_data);
    const plantedShare = mean(full.filter((s) => ids.has(s.student_id)).map((s) => s.share[B]!));
    const otherShare = mean(full.filter((s) => !ids.has(s.student_id)).map((s) => s.share[B]!));
    expect(plantedShare).toBeGreaterThan(2 * otherShare);
    const ratios = full.filter((s) => ids.has(s.student_id)).map((s) => s.ratio[B]!);
    expect(mean(ratios)).toBeGreaterThan(1.8);

    const g = CONSTRUCT_KEYS.indexOf("gaming");
    expect(truth.planted.unit_ids).toHaveLength(1);
    const unit = truth.units.find((u) => u.unit_id === truth.planted.unit_ids[0])!;
    expect(unit.planted[g]).toBe(true);
    expect(unit.logit_effect[g]).toBe(1);
    const otherUnits = truth.units.filter((u) => u !== unit);
    expect(otherUnits.every((u) => !u.planted.includes(true))).toBe(true);
    expect(unit.share[g]!).toBeGreaterThan(1.3 * Math.max(...otherUnits.map((u) => u.share[g]!)));

    const o = CONSTRUCT_KEYS.indexOf("off_task");
    const klass = truth.classes.find((k) => k.class_id === truth.planted.class_ids[0])!;
    expect(klass.planted[o]).toBe(true);
    const otherClasses = truth.classes.filter((k) => k !== klass);
    expect(klass.share[o]!).toBeGreaterThan(1.2 * Math.max(...otherClasses.map((k) => k.share[o]!)));
  });

  it("has student effects: session shares vary between students beyond chance (ANOVA F, α = .001)", () => {
    // Guards the null-mode check below: the same test does detect the random student effects here.
    for (const key of CONSTRUCT_KEYS) {
      const { f, df1, df2 } = anovaF(sessionShares(planted, CONSTRUCT_KEYS.indexOf(key)));
      expect(f, key).toBeGreaterThan(jStat.centralF.inv(0.999, df1, df2));
    }
  });
});

describe("demo model: null mode", () => {
  const truth = nullRun.truth;

  it("plants nothing and has no student, unit or class effects", () => {
    expect(truth.mode).toBe("null");
    expect(truth.planted.student_ids).toEqual([]);
    expect(truth.planted.unit_ids).toEqual([]);
    expect(truth.planted.class_ids).toEqual([]);
    for (const group of [truth.students, truth.units, truth.classes]) {
      for (const item of group) {
        expect(item.planted.every((p) => !p)).toBe(true);
        expect(item.logit_effect.every((e) => e === 0)).toBe(true);
      }
    }
  });

  it("has no spread between students beyond chance: session shares pass a one-way ANOVA (F below the .999 quantile)", () => {
    // Under null mode every session's share has one distribution whoever the student, so F follows
    // (approximately) F(df1, df2); the critical value is from jstat's central F quantile.
    for (const key of CONSTRUCT_KEYS) {
      const { f, df1, df2 } = anovaF(sessionShares(nullRun, CONSTRUCT_KEYS.indexOf(key)));
      expect(f, key).toBeLessThan(jStat.centralF.inv(0.999, df1, df2));
    }
  });

  it("keeps the same rows, timestamps and empty cells as planted mode for the same seed", () => {
    const a = tally({ students: 50, seed: 9, mode: "planted" }, true).windows!;
    const b = tally({ students: 50, seed: 9, mode: "null" }, true).windows!;
    expect(b.length).toBe(a.length);
    const shape = (list: typeof a) =>
      list.map((w) => `${w.session.sessionId} ${w.windowStart} ${w.probabilities.map((p) => p === null)}`);
    expect(shape(b)).toEqual(shape(a));
    expect(b.map((w) => w.probabilities.join())).not.toEqual(a.map((w) => w.probabilities.join()));
  });
});
