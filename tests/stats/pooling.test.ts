import padjust from "@stdlib/stats-padjust";
import fc from "fast-check";
import { describe, expect, it } from "vitest";
import { benjaminiHochberg } from "../../src/stats/benjamini-hochberg.js";
import { bonferroni } from "../../src/stats/bonferroni.js";
import { clusterEffectiveSize } from "../../src/stats/cluster-effective-size.js";
import { designEffect } from "../../src/stats/design-effect.js";
import { effectiveSampleSize } from "../../src/stats/effective-sample-size.js";
import { empiricalBayesNormal } from "../../src/stats/empirical-bayes-normal.js";
import { jamesStein } from "../../src/stats/james-stein.js";
import { weightingEffectiveSize } from "../../src/stats/weighting-effective-size.js";
import { expectClose } from "./close.js";

describe("multiple comparisons", () => {
  // Benjamini & Hochberg (1995, JRSS B 57:289–300) worked example, 15 p-values [pub]
  // (REFERENCE-VALUES.md, "Multiple comparisons").
  const pValues = Object.freeze([
    0.0001, 0.0004, 0.0019, 0.0095, 0.0201, 0.0278, 0.0298, 0.0344, 0.0459, 0.324, 0.4262, 0.5719, 0.6528,
    0.759, 1,
  ]);

  describe("Benjamini–Hochberg worked example", () => {
    it("rejects 4 at q = 0.05 (Benjamini & Hochberg 1995 [pub])", () => {
      const result = benjaminiHochberg({ pValues, level: 0.05 });
      expect(result.rejectedCount).toBe(4);
      expect(result.rejected.slice(0, 5)).toEqual([true, true, true, true, false]);
    });

    it("adjusted values .0015 .003 .0095 .035625 .0603 … (REFERENCE-VALUES.md [re]; 1e-7)", () => {
      const expected = [
        0.0015, 0.003, 0.0095, 0.035625, 0.0603, 0.0638571, 0.0638571, 0.0645, 0.0765, 0.486, 0.5811818,
        0.714875, 0.7532308, 0.8132143, 1,
      ];
      benjaminiHochberg({ pValues }).adjusted.forEach((q, i) => {
        expectClose(q, expected[i]!, { abs: 1e-7 }, `q[${i}]`);
      });
    });

    it("Bonferroni rejects 3 at 0.05 (Benjamini & Hochberg 1995 [pub])", () => {
      expect(bonferroni({ pValues, level: 0.05 }).rejectedCount).toBe(3);
    });
  });

  describe("agreement with @stdlib/stats-padjust 0.2.1 (random families, 1e-15)", () => {
    it("BH and Bonferroni adjusted values equal stdlib's 'bh' and 'bonferroni' in input order, ties included", () => {
      const family = fc.array(
        fc.oneof(fc.double({ min: 0, max: 1, noNaN: true }), fc.constantFrom(0, 0.01, 0.05, 1)),
        { minLength: 1, maxLength: 40 },
      );
      fc.assert(
        fc.property(family, (ps) => {
          const copy = [...ps];
          const bh = benjaminiHochberg({ pValues: ps }).adjusted;
          const bf = bonferroni({ pValues: ps }).adjusted;
          const refBh = padjust([...ps], "bh");
          const refBf = padjust([...ps], "bonferroni");
          ps.forEach((_, i) => {
            expectClose(bh[i]!, refBh[i]!, { abs: 1e-15, rel: 1e-14 });
            expectClose(bf[i]!, refBf[i]!, { abs: 1e-15, rel: 1e-14 });
          });
          expect(ps).toEqual(copy);
        }),
        { numRuns: 300, seed: 1995 },
      );
    });

    it("handles an empty family and rejects invalid p-values", () => {
      expect(benjaminiHochberg({ pValues: [] }).rejectedCount).toBe(0);
      expect(() => benjaminiHochberg({ pValues: [0.2, 1.2] })).toThrow(RangeError);
      expect(() => bonferroni({ pValues: [Number.NaN] })).toThrow(RangeError);
      expect(() => benjaminiHochberg({ pValues: [0.1], level: 0 })).toThrow(RangeError);
    });
  });
});

describe("shrinkage", () => {
  // Efron & Morris (1975, JASA 70:311–319), 18 players [pub] (REFERENCE-VALUES.md, "Shrinkage").
  const hits = [18, 17, 16, 15, 14, 14, 13, 12, 11, 11, 10, 10, 10, 10, 10, 9, 8, 7];
  const restOfSeason = [
    0.346, 0.298, 0.276, 0.222, 0.273, 0.27, 0.263, 0.21, 0.269, 0.23, 0.264, 0.256, 0.303, 0.264, 0.226,
    0.285, 0.316, 0.2,
  ];

  describe("jamesStein: Efron & Morris (1975) baseball example", () => {
    const averages = Object.freeze(hits.map((h) => h / 45));
    const grand = averages.reduce((s, y) => s + y, 0) / averages.length;
    const result = jamesStein({ estimates: averages, variance: (grand * (1 - grand)) / 45 });

    it("grand mean .2654321, c = .2116534 ([re]; published c = .212 [mem]); tolerance 5e-4 as stated, met to 1e-7", () => {
      expectClose(result.grandMean, 0.2654321, { abs: 1e-7 });
      expectClose(result.shrinkage, 0.2116534, { abs: 1e-7 });
      expectClose(result.shrinkage, 0.212, { abs: 5e-4 });
    });

    it("first estimate .2939, last .2422 ([re]; 5e-4)", () => {
      expectClose(result.estimates[0]!, 0.2939, { abs: 5e-4 });
      expectClose(result.estimates[17]!, 0.2422, { abs: 5e-4 });
    });

    it("total squared error against the rest of the season: raw .0753170, James–Stein .0213069 ([re]; 1e-7)", () => {
      const sse = (values: readonly number[]) =>
        values.reduce((s, v, i) => s + (v - restOfSeason[i]!) ** 2, 0);
      expectClose(sse(averages), 0.075317, { abs: 1e-7 });
      expectClose(sse(result.estimates), 0.0213069, { abs: 1e-7 });
    });

    it("uses the positive part and rejects fewer than 4 estimates", () => {
      const tight = jamesStein({ estimates: [0.1, 0.11, 0.12, 0.13], variance: 1 });
      expect(tight.shrinkage).toBe(0);
      expect(tight.estimates.every((e) => Math.abs(e - 0.115) < 1e-12)).toBe(true);
      expect(() => jamesStein({ estimates: [1, 2, 3], variance: 1 })).toThrow(RangeError);
      expect(() => jamesStein({ estimates: [1, 2, 3, 4], variance: 0 })).toThrow(RangeError);
    });
  });

  // BCG vaccine trials (Colditz et al. 1994, JAMA 271:698–702), as the data set dat.bcg of the R
  // package metafor [mem of the counts]: tpos, tneg, cpos, cneg. The counts are confirmed by the
  // fixed-effect figures below, which they reproduce to 4 dp.
  const bcg: [number, number, number, number][] = [
    [4, 119, 11, 128],
    [6, 300, 29, 274],
    [3, 228, 11, 209],
    [62, 13536, 248, 12619],
    [33, 5036, 47, 5761],
    [180, 1361, 372, 1079],
    [8, 2537, 10, 619],
    [505, 87886, 499, 87892],
    [29, 7470, 45, 7232],
    [17, 1699, 65, 1600],
    [186, 50448, 141, 27197],
    [5, 2493, 3, 2338],
    [27, 16886, 29, 17825],
  ];
  const logRr = Object.freeze(bcg.map(([a, b, c, d]) => Math.log(a / (a + b) / (c / (c + d)))));
  const variances = Object.freeze(bcg.map(([a, b, c, d]) => 1 / a - 1 / (a + b) + 1 / c - 1 / (c + d)));

  describe("empiricalBayesNormal on the BCG trials", () => {
    it("reproduces the fixed-effect mean −0.4303 (metafor test suite vs Stata metan [pub]; 5e-5)", () => {
      // The precision-weighted mean with weights 1/vᵢ, computed here from the data as the reference
      // value is printed: a check of the data transcription, not of the method.
      const weights = variances.map((v) => 1 / v);
      const mean = weights.reduce((s, w, i) => s + w * logRr[i]!, 0) / weights.reduce((s, w) => s + w, 0);
      expectClose(mean, -0.4303, { abs: 5e-5 });
    });

    it("moments (DerSimonian–Laird): τ² 0.3088, μ −0.7141 (metafor test suite vs Stata metan [pub]; 5e-5)", () => {
      const result = empiricalBayesNormal({ estimates: logRr, variances, method: "moments" });
      expectClose(result.tau2, 0.3088, { abs: 5e-5 });
      expectClose(result.mean, -0.7141, { abs: 5e-5 });
      expectClose(result.mean - 1.959963984540054 * result.meanStandardError, -1.0644, { abs: 5e-5 });
      expectClose(result.mean + 1.959963984540054 * result.meanStandardError, -0.3638, { abs: 5e-5 });
      expect(result.iterations).toBe(0);
    });

    it("REML: τ² 0.3132, μ −0.7145, SE 0.1798 (metafor documentation for dat.bcg [mem]; 5e-5)", () => {
      const result = empiricalBayesNormal({ estimates: logRr, variances });
      expect(result.method).toBe("reml");
      expect(result.converged).toBe(true);
      expectClose(result.tau2, 0.3132, { abs: 5e-5 });
      expectClose(result.mean, -0.7145, { abs: 5e-5 });
      expectClose(result.meanStandardError, 0.1798, { abs: 5e-5 });
    });

    it("shrinks noisy estimates more, and posterior variances follow Morris (1983)", () => {
      const result = empiricalBayesNormal({ estimates: logRr, variances });
      const { tau2, mean, meanStandardError } = result;
      result.shrunk.forEach((theta, i) => {
        const b = variances[i]! / (variances[i]! + tau2);
        expectClose(theta, mean + (1 - b) * (logRr[i]! - mean), { abs: 1e-14 });
        expectClose(result.posteriorVariances[i]!, variances[i]! * (1 - b) + b * b * meanStandardError ** 2, {
          abs: 1e-14,
        });
      });
      // Trial 1 (4 cases) has a far larger variance than trial 8 (505 cases), so a larger pull.
      expect(result.shrinkage[0]!).toBeGreaterThan(result.shrinkage[7]!);
    });

    it("pools completely when the spread is no more than the noise (τ̂² = 0)", () => {
      const result = empiricalBayesNormal({ estimates: [0.1, 0.12, 0.09, 0.11], variances: [1, 1, 1, 1] });
      expect(result.tau2).toBe(0);
      for (const theta of result.shrunk) expectClose(theta, 0.105, { abs: 1e-12 });
    });

    it("rejects mismatched lengths, non-positive variances and single estimates", () => {
      expect(() => empiricalBayesNormal({ estimates: [1, 2], variances: [1] })).toThrow(RangeError);
      expect(() => empiricalBayesNormal({ estimates: [1, 2], variances: [1, 0] })).toThrow(RangeError);
      expect(() => empiricalBayesNormal({ estimates: [1], variances: [1] })).toThrow(RangeError);
    });
  });
});

describe("design effect", () => {
  describe("Kish design effect (Kish 1965)", () => {
    it("m = 25, ρ = .2 → deff 5.8; n = 500 → n_eff 86.2069 (REFERENCE-VALUES.md [re, mem of formula]; 1e-4)", () => {
      const deff = designEffect({ clusterSize: 25, icc: 0.2 });
      expectClose(deff, 5.8, { abs: 1e-12 });
      expectClose(effectiveSampleSize({ n: 500, designEffect: deff }), 86.2069, { abs: 1e-4 });
    });

    it("unequal clusters reduce to the same figure when all sizes are equal (20 × 25, ρ = .2)", () => {
      const result = clusterEffectiveSize({ clusterSizes: Array.from({ length: 20 }, () => 25), icc: 0.2 });
      expect(result.n).toBe(500);
      expectClose(result.meanClusterSize, 25, { abs: 1e-12 });
      expectClose(result.designEffect, 5.8, { abs: 1e-12 });
      expectClose(result.effectiveN, 86.2069, { abs: 1e-4 });
    });

    it("uses the size-weighted mean Σm²/Σm for unequal clusters (Kish 1987 formula [mem]): sizes 10, 30, ρ = .1", () => {
      const result = clusterEffectiveSize({ clusterSizes: [10, 30], icc: 0.1 });
      expectClose(result.meanClusterSize, 1000 / 40, { abs: 1e-12 });
      expectClose(result.designEffect, 3.4, { abs: 1e-12 });
      expectClose(result.effectiveN, 40 / 3.4, { abs: 1e-12 });
    });

    it("weighting: n_eff = (Σw)²/Σw², weights 1,1,2,2 → 3.6 (Kish 1965 formula [mem])", () => {
      const result = weightingEffectiveSize({ weights: [1, 1, 2, 2] });
      expectClose(result.effectiveN, 3.6, { abs: 1e-12 });
      expectClose(result.designEffect, 10 / 9, { abs: 1e-12 });
    });

    it("rejects invalid arguments", () => {
      expect(() => designEffect({ clusterSize: 0.5, icc: 0.1 })).toThrow(RangeError);
      expect(() => designEffect({ clusterSize: 5, icc: -0.1 })).toThrow(RangeError);
      expect(() => effectiveSampleSize({ n: 10, designEffect: 0 })).toThrow(RangeError);
      expect(() => clusterEffectiveSize({ clusterSizes: [], icc: 0.1 })).toThrow(RangeError);
      expect(() => weightingEffectiveSize({ weights: [0, 0] })).toThrow(RangeError);
      expect(() => weightingEffectiveSize({ weights: [1, -1] })).toThrow(RangeError);
    });
  });
});
