import betaQuantileStdlib from "@stdlib/stats-base-dists-beta-quantile";
import jStat from "jstat";
import { describe, expect, it } from "vitest";
import { clopperPearsonInterval } from "../../src/stats/clopper-pearson-interval.js";
import { jeffreysInterval } from "../../src/stats/jeffreys-interval.js";
import { langReiczigelInterval } from "../../src/stats/lang-reiczigel-interval.js";
import { poissonByarInterval } from "../../src/stats/poisson-byar-interval.js";
import { poissonExactInterval } from "../../src/stats/poisson-exact-interval.js";
import { roganGladen } from "../../src/stats/rogan-gladen.js";
import { standardizedRatio } from "../../src/stats/standardized-ratio.js";
import { wilsonInterval } from "../../src/stats/wilson-interval.js";
import { expectClose } from "./close.js";

describe("binomial proportion intervals", () => {
  // REFERENCE-VALUES.md, "Binomial proportion intervals" (Newcombe 1998, Statistics in Medicine
  // 17:857–872, Table I; Brown, Cai & DasGupta 2001). Wilson limits [pub to 4 dp in Newcombe,
  // 7 digits recomputed]; Clopper–Pearson and Jeffreys [re] (scipy 1.17 / jstat 1.9.6). Tolerance 1e-7.
  const cases: {
    x: number;
    n: number;
    wilson: [number, number];
    exact: [number, number];
    jeffreys: [number, number];
  }[] = [
    {
      x: 81,
      n: 263,
      wilson: [0.2552885, 0.3662096],
      exact: [0.2527367, 0.3676219],
      jeffreys: [0.2545219, 0.3656475],
    },
    {
      x: 15,
      n: 148,
      wilson: [0.0623864, 0.1604872],
      exact: [0.057844, 0.1616505],
      jeffreys: [0.0604485, 0.1576431],
    },
    { x: 0, n: 20, wilson: [0, 0.1611252], exact: [0, 0.1684335], jeffreys: [0, 0.116639] },
    {
      x: 1,
      n: 29,
      wilson: [0.0061132, 0.1717552],
      exact: [0.0008726, 0.1776443],
      jeffreys: [0.0037462, 0.1500777],
    },
    { x: 29, n: 29, wilson: [0.8830302, 1], exact: [0.8805551, 1], jeffreys: [0.9177135, 1] },
  ];

  describe.each(cases)("$x of $n at 95%", ({ x, n, wilson, exact, jeffreys }) => {
    const tolerance = { abs: 1e-7 };
    it("Wilson matches Newcombe (1998) Table I [pub to 4 dp; 7 digits re]", () => {
      const interval = wilsonInterval({ successes: x, trials: n });
      expectClose(interval.lower, wilson[0], tolerance);
      expectClose(interval.upper, wilson[1], tolerance);
      expect(interval.estimate).toBe(x / n);
      expect(interval.level).toBe(0.95);
    });
    it("Clopper–Pearson matches REFERENCE-VALUES.md [re]", () => {
      const interval = clopperPearsonInterval({ successes: x, trials: n });
      expectClose(interval.lower, exact[0], tolerance);
      expectClose(interval.upper, exact[1], tolerance);
    });
    it("Jeffreys with Brown–Cai–DasGupta end conventions matches REFERENCE-VALUES.md [re]", () => {
      const interval = jeffreysInterval({ successes: x, trials: n });
      expectClose(interval.lower, jeffreys[0], tolerance);
      expectClose(interval.upper, jeffreys[1], tolerance);
    });
  });

  describe("published rounded intervals", () => {
    it("5/25 Clopper–Pearson 0.068–0.407 (Conover's tables, via REFERENCE-VALUES.md [pub]; ±0.0005)", () => {
      const interval = clopperPearsonInterval({ successes: 5, trials: 25 });
      expectClose(interval.lower, 0.068, { abs: 5e-4 });
      expectClose(interval.upper, 0.407, { abs: 5e-4 });
    });
    it("12/150: Wilson 0.046–0.135 and exact 0.042–0.136 (REFERENCE-VALUES.md [pub, rounded]; ±0.0005)", () => {
      const w = wilsonInterval({ successes: 12, trials: 150 });
      expectClose(w.lower, 0.046, { abs: 5e-4 });
      expectClose(w.upper, 0.135, { abs: 5e-4 });
      const e = clopperPearsonInterval({ successes: 12, trials: 150 });
      expectClose(e.lower, 0.042, { abs: 5e-4 });
      expectClose(e.upper, 0.136, { abs: 5e-4 });
    });
  });

  describe("agreement with @stdlib/stats-base-dists-beta-quantile 0.2.3 (grid, 1e-12 relative)", () => {
    it("Clopper–Pearson and Jeffreys limits are the stdlib beta quantiles", () => {
      for (const n of [1, 7, 40, 263, 5000]) {
        for (const x of [0, 1, Math.floor(n / 3), n - 1, n].filter(
          (v, i, all) => v >= 0 && all.indexOf(v) === i,
        )) {
          for (const level of [0.8, 0.95, 0.99]) {
            const a = (1 - level) / 2;
            const cp = clopperPearsonInterval({ successes: x, trials: n, level });
            const jf = jeffreysInterval({ successes: x, trials: n, level });
            const tol = { rel: 1e-12, abs: 1e-300 };
            expectClose(
              cp.lower,
              x === 0 ? 0 : betaQuantileStdlib(a, x, n - x + 1),
              tol,
              `cp lower ${x}/${n}`,
            );
            expectClose(
              cp.upper,
              x === n ? 1 : betaQuantileStdlib(1 - a, x + 1, n - x),
              tol,
              `cp upper ${x}/${n}`,
            );
            expectClose(
              jf.lower,
              x === 0 ? 0 : betaQuantileStdlib(a, x + 0.5, n - x + 0.5),
              tol,
              `j lower ${x}/${n}`,
            );
            expectClose(
              jf.upper,
              x === n ? 1 : betaQuantileStdlib(1 - a, x + 0.5, n - x + 0.5),
              tol,
              `j upper ${x}/${n}`,
            );
          }
        }
      }
    });
  });

  describe("argument checks", () => {
    it.each([
      [{ successes: 3, trials: 2 }],
      [{ successes: -1, trials: 2 }],
      [{ successes: 1.5, trials: 2 }],
      [{ successes: 0, trials: 0 }],
      [{ successes: 1, trials: 2, level: 1 }],
    ])("rejects %o", (options) => {
      expect(() => wilsonInterval(options)).toThrow(RangeError);
      expect(() => clopperPearsonInterval(options)).toThrow(RangeError);
      expect(() => jeffreysInterval(options)).toThrow(RangeError);
    });
  });
});

describe("Poisson limits and standardised ratios", () => {
  // REFERENCE-VALUES.md, "Exact Poisson limits (Garwood) and Byar's approximation (Breslow & Day
  // 1987, vol. II)": values [re] from the printed formulas; tolerance 1e-6 as stated there.
  const cases: [number, [number, number], [number, number]][] = [
    [0, [0, 3.688879], [0, 3.668012]],
    [1, [0.025318, 5.571643], [0.013072, 5.563756]],
    [10, [4.795389, 18.390356], [4.78745, 18.391459]],
    [100, [81.363991, 121.626794], [81.362105, 121.627938]],
  ];

  describe.each(cases)("observed %s at 95%%", (observed, exact, byar) => {
    it("exact Garwood limits match REFERENCE-VALUES.md [re] (1e-6)", () => {
      const interval = poissonExactInterval({ observed });
      expectClose(interval.lower, exact[0], { abs: 1e-6 });
      expectClose(interval.upper, exact[1], { abs: 1e-6 });
      expect(interval.estimate).toBe(observed);
    });
    it("Byar limits match REFERENCE-VALUES.md [re] (1e-6)", () => {
      const interval = poissonByarInterval({ observed });
      expectClose(interval.lower, byar[0], { abs: 1e-6 });
      expectClose(interval.upper, byar[1], { abs: 1e-6 });
    });
  });

  describe("exact limits against jstat 1.9.6 jStat.chisquare.inv (L = χ²(α/2; 2x)/2, U = χ²(1 − α/2; 2x + 2)/2)", () => {
    it("agree on a grid of counts and levels (1e-7 relative: jstat's tolerance)", () => {
      for (const observed of [1, 2, 5, 17, 60, 250]) {
        for (const level of [0.9, 0.95, 0.99]) {
          const a = (1 - level) / 2;
          const interval = poissonExactInterval({ observed, level });
          expectClose(interval.lower, jStat.chisquare.inv(a, 2 * observed) / 2, { rel: 1e-7 });
          expectClose(interval.upper, jStat.chisquare.inv(1 - a, 2 * observed + 2) / 2, { rel: 1e-7 });
        }
      }
    });
  });

  describe("standardizedRatio", () => {
    it("53 observed / 48.62 expected: 1.090086, exact .816550–1.425860, Byar .816493–1.425888 (REFERENCE-VALUES.md [re]; 1e-6)", () => {
      const exact = standardizedRatio({ observed: 53, expected: 48.62 });
      expectClose(exact.ratio, 1.090086, { abs: 1e-6 });
      expectClose(exact.lower, 0.81655, { abs: 1e-6 });
      expectClose(exact.upper, 1.42586, { abs: 1e-6 });
      expect(exact.method).toBe("exact");
      const byar = standardizedRatio({ observed: 53, expected: 48.62, method: "byar" });
      expectClose(byar.lower, 0.816493, { abs: 1e-6 });
      expectClose(byar.upper, 1.425888, { abs: 1e-6 });
    });

    it("rejects a non-positive expected count, a fractional observed count and an unknown method", () => {
      expect(() => standardizedRatio({ observed: 3, expected: 0 })).toThrow(RangeError);
      expect(() => standardizedRatio({ observed: 2.5, expected: 1 })).toThrow(RangeError);
      expect(() => standardizedRatio({ observed: 2, expected: 1, method: "wald" as "exact" })).toThrow(
        RangeError,
      );
      expect(() => poissonExactInterval({ observed: -1 })).toThrow(RangeError);
    });
  });
});

describe("prevalence under misclassification", () => {
  describe("roganGladen (Rogan & Gladen 1978)", () => {
    it("23 of 150 with Se .96, Sp .89: AP .1533333, TP .0509804 (REFERENCE-VALUES.md [re]; 1e-7)", () => {
      const result = roganGladen({ apparent: 23 / 150, sensitivity: 0.96, specificity: 0.89 });
      expectClose(23 / 150, 0.1533333, { abs: 1e-7 });
      expectClose(result.estimate, 0.0509804, { abs: 1e-7 });
      expect(result.clamped).toBe(false);
    });

    it("clamps estimates outside [0, 1] and reports it (project clamping rule)", () => {
      // AP below the false-positive rate 1 − Sp = 0.2: formula gives (0.1 − 0.2)/0.6 < 0.
      const low = roganGladen({ apparent: 0.1, sensitivity: 0.8, specificity: 0.8 });
      expect(low.estimate).toBe(0);
      expectClose(low.unclamped, -1 / 6, { abs: 1e-15 });
      expect(low.clamped).toBe(true);
      const high = roganGladen({ apparent: 0.95, sensitivity: 0.8, specificity: 0.8 });
      expect(high.estimate).toBe(1);
      expect(high.clamped).toBe(true);
    });

    it("refuses a classifier no better than chance (Se + Sp ≤ 1)", () => {
      expect(() => roganGladen({ apparent: 0.3, sensitivity: 0.5, specificity: 0.5 })).toThrow(RangeError);
      expect(() => roganGladen({ apparent: 1.3, sensitivity: 0.9, specificity: 0.9 })).toThrow(RangeError);
    });
  });

  describe("langReiczigelInterval (Lang & Reiczigel 2014)", () => {
    it("AP .30 of 500, Se .80 from 50, Sp .90 from 200: .285714, CI .206436–.380000 (REFERENCE-VALUES.md [re from the published formula]; 1e-6)", () => {
      const result = langReiczigelInterval({
        apparent: 0.3,
        sampleSize: 500,
        sensitivity: 0.8,
        sensitivitySampleSize: 50,
        specificity: 0.9,
        specificitySampleSize: 200,
      });
      expectClose(result.estimate, 0.285714, { abs: 1e-6 });
      expectClose(result.lower, 0.206436, { abs: 1e-6 });
      expectClose(result.upper, 0.38, { abs: 1e-6 });
      expect(result.clamped).toBe(false);
      expect(result.level).toBe(0.95);
    });

    it("clamps the interval to [0, 1] and reports it when the data sit at the edge", () => {
      const result = langReiczigelInterval({
        apparent: 0.12,
        sampleSize: 60,
        sensitivity: 0.7,
        sensitivitySampleSize: 40,
        specificity: 0.85,
        specificitySampleSize: 40,
      });
      expect(result.lower).toBe(0);
      expect(result.estimate).toBe(0);
      expect(result.unclampedEstimate).toBeLessThan(0);
      expect(result.clamped).toBe(true);
      expect(result.upper).toBeGreaterThan(0);
    });

    it("widens as the validation samples shrink (more uncertainty in Se and Sp)", () => {
      const base = { apparent: 0.3, sampleSize: 500, sensitivity: 0.8, specificity: 0.9 };
      const big = langReiczigelInterval({
        ...base,
        sensitivitySampleSize: 5000,
        specificitySampleSize: 5000,
      });
      const small = langReiczigelInterval({ ...base, sensitivitySampleSize: 30, specificitySampleSize: 30 });
      expect(small.upper - small.lower).toBeGreaterThan(big.upper - big.lower);
    });

    it("rejects non-positive sample sizes and chance-level classifiers", () => {
      const base = {
        apparent: 0.3,
        sampleSize: 500,
        sensitivity: 0.8,
        sensitivitySampleSize: 50,
        specificity: 0.9,
        specificitySampleSize: 200,
      };
      expect(() => langReiczigelInterval({ ...base, sampleSize: 0 })).toThrow(RangeError);
      expect(() => langReiczigelInterval({ ...base, sensitivity: 0.1 })).toThrow(RangeError);
    });
  });
});
