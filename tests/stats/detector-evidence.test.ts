import fc from "fast-check";
import { describe, expect, it } from "vitest";
import { abroca } from "../../src/stats/abroca.js";
import { brierDecomposition } from "../../src/stats/brier-decomposition.js";
import { cohenKappa } from "../../src/stats/cohen-kappa.js";
import { delongAuc } from "../../src/stats/delong-auc.js";
import { hanleyMcNeilStandardError } from "../../src/stats/hanley-mcneil-standard-error.js";
import { mannWhitneyAuc } from "../../src/stats/mann-whitney-auc.js";
import { rocCurve } from "../../src/stats/roc-curve.js";
import { expectClose } from "./close.js";

describe("AUC, ROC and ABROCA", () => {
  /** Expands counts per rating 1..5 into a list of ratings. */
  function ratings(counts: readonly number[]): number[] {
    return counts.flatMap((count, i) => Array.from({ length: count }, () => i + 1));
  }

  // Hanley & McNeil (1982, Radiology 143:29–36), 5-point rating data [pub]: non-diseased 33, 6, 6, 11, 2;
  // diseased 3, 2, 2, 11, 33 (REFERENCE-VALUES.md, "AUC (A′) and its standard error").
  const negatives = Object.freeze(ratings([33, 6, 6, 11, 2]));
  const positives = Object.freeze(ratings([3, 2, 2, 11, 33]));

  describe("Hanley & McNeil (1982) rating example", () => {
    it("AUC = 2642/2958 = 0.8931710615 with ties ½ ([re]; published 0.893) — 1e-10", () => {
      expectClose(mannWhitneyAuc({ positives, negatives }), 2642 / 2958, { abs: 1e-10 });
      expectClose(mannWhitneyAuc({ positives, negatives }), 0.893, { abs: 5e-4 });
    });

    it("Hanley–McNeil SE 0.0324866 ([re]; published 0.032) — 1e-7", () => {
      const se = hanleyMcNeilStandardError({ auc: 2642 / 2958, positiveCount: 51, negativeCount: 58 });
      expectClose(se, 0.0324866, { abs: 1e-7 });
      expectClose(se, 0.032, { abs: 5e-4 });
    });

    it("DeLong SE 0.0307244, 95% CI 0.8329523–0.9533898 (REFERENCE-VALUES.md [re]) — 1e-7", () => {
      const result = delongAuc({ positives, negatives });
      expectClose(result.auc, 2642 / 2958, { abs: 1e-12 });
      expectClose(result.standardError, 0.0307244, { abs: 1e-7 });
      expectClose(result.lower, 0.8329523, { abs: 1e-7 });
      expectClose(result.upper, 0.9533898, { abs: 1e-7 });
      expect(result.clipped).toBe(false);
    });
  });

  describe("toy example (REFERENCE-VALUES.md [re])", () => {
    const toy = { positives: Object.freeze([0.8, 0.7, 0.4]), negatives: Object.freeze([0.5, 0.3, 0.2]) };
    it("AUC 8/9 and DeLong variance 2/81 (1e-15)", () => {
      expectClose(mannWhitneyAuc(toy), 8 / 9, { abs: 1e-15 });
      expectClose(delongAuc(toy).variance, 2 / 81, { abs: 1e-15 });
    });
    it("does not mutate its inputs (frozen arrays)", () => {
      expect(() => delongAuc(toy)).not.toThrow();
      expect(toy.positives).toEqual([0.8, 0.7, 0.4]);
    });
  });

  describe("mannWhitneyAuc against the pairwise definition (Bamber 1975: AUC = U/(mn), ties ½)", () => {
    it("equals the count over all pairs for random samples with ties (exact up to 1e-12)", () => {
      const scores = fc.array(fc.integer({ min: 0, max: 6 }), { minLength: 1, maxLength: 25 });
      fc.assert(
        fc.property(scores, scores, (pos, neg) => {
          let wins = 0;
          for (const x of pos) for (const y of neg) wins += x > y ? 1 : x === y ? 0.5 : 0;
          expectClose(mannWhitneyAuc({ positives: pos, negatives: neg }), wins / (pos.length * neg.length), {
            abs: 1e-12,
          });
        }),
        { numRuns: 200, seed: 20240601 },
      );
    });

    it("rejects empty samples and non-finite scores; DeLong needs two of each", () => {
      expect(() => mannWhitneyAuc({ positives: [], negatives: [1] })).toThrow(RangeError);
      expect(() => mannWhitneyAuc({ positives: [Number.NaN], negatives: [1] })).toThrow(RangeError);
      expect(() => delongAuc({ positives: [1], negatives: [0, 1] })).toThrow(RangeError);
      expect(() => hanleyMcNeilStandardError({ auc: 1.2, positiveCount: 3, negativeCount: 3 })).toThrow(
        RangeError,
      );
    });
  });

  describe("rocCurve and ABROCA", () => {
    it("traces (0,0) → (1,1) with ties as one diagonal step (Fawcett 2006, Algorithm 1)", () => {
      expect(rocCurve({ positives: [0.9, 0.4], negatives: [0.6] })).toEqual([
        { fpr: 0, tpr: 0 },
        { fpr: 0, tpr: 0.5 },
        { fpr: 1, tpr: 0.5 },
        { fpr: 1, tpr: 1 },
      ]);
      expect(rocCurve({ positives: [0.5], negatives: [0.5] })).toEqual([
        { fpr: 0, tpr: 0 },
        { fpr: 1, tpr: 1 },
      ]);
    });

    it("ABROCA 0.375 for the REFERENCE-VALUES.md groups (Gardner, Brooks & Baker 2019 definition [re]; 1e-12)", () => {
      // Labels [1,1,1,1,0,0,0,0]: group A scores [.9,.8,.7,.4,.6,.5,.3,.2] (AUC .875),
      // group B [.9,.6,.4,.3,.8,.7,.5,.2] (AUC .5).
      const first = { positives: [0.9, 0.8, 0.7, 0.4], negatives: [0.6, 0.5, 0.3, 0.2] };
      const second = { positives: [0.9, 0.6, 0.4, 0.3], negatives: [0.8, 0.7, 0.5, 0.2] };
      expectClose(mannWhitneyAuc(first), 0.875, { abs: 1e-15 });
      expectClose(mannWhitneyAuc(second), 0.5, { abs: 1e-15 });
      expectClose(abroca({ first, second }), 0.375, { abs: 1e-12 });
      expectClose(abroca({ first: second, second: first }), 0.375, { abs: 1e-12 });
    });

    it("ABROCA of a group with itself is 0, and of perfect vs chance-diagonal is ½ (geometry)", () => {
      const g = { positives: [0.9, 0.3, 0.6], negatives: [0.5, 0.2, 0.6] };
      expect(abroca({ first: g, second: g })).toBe(0);
      const perfect = { positives: [1], negatives: [0] };
      const diagonal = { positives: [0.5], negatives: [0.5] };
      expectClose(abroca({ first: perfect, second: diagonal }), 0.5, { abs: 1e-15 });
    });

    it("integrates opposite curves and splits crossing curves at the crossing (triangle geometry, 1e-15)", () => {
      // Perfect (0,0)→(0,1)→(1,1) against perfectly wrong (0,0)→(1,0)→(1,1): they differ by 1 everywhere.
      const right = { positives: [1], negatives: [0] };
      const wrong = { positives: [0], negatives: [1] };
      expectClose(abroca({ first: right, second: wrong }), 1, { abs: 1e-15 });
      // (0,0)→(0,½)→(1,½)→(1,1) crosses the diagonal y = x at ½: ∫₀¹ |½ − x| dx = ¼.
      const flat = { positives: [3, 1], negatives: [2, 2] };
      const diagonal = { positives: [0.5], negatives: [0.5] };
      expectClose(abroca({ first: flat, second: diagonal }), 0.25, { abs: 1e-15 });
      // (0,0)→(½,0)→(½,1)→(1,1) against the diagonal: two triangles of ⅛.
      const late = { positives: [2, 2], negatives: [3, 1] };
      expectClose(abroca({ first: late, second: diagonal }), 0.25, { abs: 1e-15 });
    });
  });
});

describe("agreement", () => {
  describe("cohenKappa (Cohen 1960; SE of Fleiss, Cohen & Everitt 1969)", () => {
    it("2×2 [[20,5],[10,15]]: p_o .70, p_e .50, κ .40, ASE .1269961, CI .1510923–.6489077, SE₀ .1385641 (REFERENCE-VALUES.md [re]; common textbook table [mem]; 1e-7)", () => {
      const table = Object.freeze([Object.freeze([20, 5]), Object.freeze([10, 15])]);
      const result = cohenKappa({ table });
      expectClose(result.observedAgreement, 0.7, { abs: 1e-12 });
      expectClose(result.expectedAgreement, 0.5, { abs: 1e-12 });
      expectClose(result.kappa, 0.4, { abs: 1e-12 });
      expectClose(result.standardError, 0.1269961, { abs: 1e-7 });
      expectClose(result.lower, 0.1510923, { abs: 1e-7 });
      expectClose(result.upper, 0.6489077, { abs: 1e-7 });
      expectClose(result.nullStandardError, 0.1385641, { abs: 1e-7 });
      expectClose(result.zStatistic, 0.4 / 0.1385641, { rel: 1e-6 });
      expect(result.n).toBe(50);
    });

    it("perfect agreement gives κ = 1 with SE 0; independence-shaped tables give κ = 0 (definition)", () => {
      const perfect = cohenKappa({
        table: [
          [10, 0, 0],
          [0, 5, 0],
          [0, 0, 7],
        ],
      });
      expectClose(perfect.kappa, 1, { abs: 1e-15 });
      expectClose(perfect.standardError, 0, { abs: 1e-12 });
      // Outer product of margins (0.4, 0.6) × (0.3, 0.7), times 100: p_o = p_e.
      const independent = cohenKappa({
        table: [
          [12, 28],
          [18, 42],
        ],
      });
      expectClose(independent.kappa, 0, { abs: 1e-15 });
    });

    it("rejects non-square tables, negative counts, empty tables and p_e = 1", () => {
      expect(() =>
        cohenKappa({
          table: [
            [1, 2, 3],
            [4, 5, 6],
          ],
        }),
      ).toThrow(RangeError);
      expect(() =>
        cohenKappa({
          table: [
            [1, -2],
            [3, 4],
          ],
        }),
      ).toThrow(RangeError);
      expect(() =>
        cohenKappa({
          table: [
            [0, 0],
            [0, 0],
          ],
        }),
      ).toThrow(RangeError);
      expect(() =>
        cohenKappa({
          table: [
            [5, 0],
            [0, 0],
          ],
        }),
      ).toThrow(RangeError);
      expect(() => cohenKappa({ table: [[1]] })).toThrow(RangeError);
    });
  });
});

describe("calibration", () => {
  describe("brierDecomposition (Brier 1950; Murphy 1973)", () => {
    it("forecasts .2 ×5 (0,0,0,1,0) and .7 ×5 (1,1,0,1,0): Brier .205 = .005 − .04 + .24 (REFERENCE-VALUES.md [re]; 1e-12)", () => {
      const result = brierDecomposition({
        forecasts: Object.freeze([0.2, 0.2, 0.2, 0.2, 0.2, 0.7, 0.7, 0.7, 0.7, 0.7]),
        outcomes: Object.freeze([0, 0, 0, 1, 0, 1, 1, 0, 1, 0]),
      });
      expectClose(result.brier, 0.205, { abs: 1e-12 });
      expectClose(result.reliability, 0.005, { abs: 1e-12 });
      expectClose(result.resolution, 0.04, { abs: 1e-12 });
      expectClose(result.uncertainty, 0.24, { abs: 1e-12 });
      expect(result.bins).toEqual([
        { forecast: 0.2, count: 5, observedRate: 0.2 },
        { forecast: 0.7, count: 5, observedRate: 0.6 },
      ]);
    });

    it("satisfies Murphy's identity Brier = REL − RES + UNC on random discrete forecasts (1e-12)", () => {
      const pair = fc.tuple(fc.constantFrom(0, 0.1, 0.25, 0.5, 0.8, 1), fc.constantFrom(0, 1));
      fc.assert(
        fc.property(fc.array(pair, { minLength: 1, maxLength: 50 }), (pairs) => {
          const r = brierDecomposition({
            forecasts: pairs.map((p) => p[0]),
            outcomes: pairs.map((p) => p[1]),
          });
          expectClose(r.brier, r.reliability - r.resolution + r.uncertainty, { abs: 1e-12 });
        }),
        { numRuns: 200, seed: 1973 },
      );
    });

    it("rejects mismatched lengths, forecasts outside [0, 1] and non-binary outcomes", () => {
      expect(() => brierDecomposition({ forecasts: [0.2], outcomes: [] })).toThrow(RangeError);
      expect(() => brierDecomposition({ forecasts: [1.2], outcomes: [1] })).toThrow(RangeError);
      expect(() => brierDecomposition({ forecasts: [0.2], outcomes: [0.5] })).toThrow(RangeError);
      expect(() => brierDecomposition({ forecasts: [], outcomes: [] })).toThrow(RangeError);
    });
  });
});
