import betaQuantileStdlib from "@stdlib/stats-base-dists-beta-quantile";
import jStat from "jstat";
import { describe, expect, it } from "vitest";
import { betaQuantile } from "../../src/stats/beta-quantile.js";
import { chiSquareQuantile } from "../../src/stats/chi-square-quantile.js";
import { erfc } from "../../src/stats/erfc.js";
import { gammaQuantile } from "../../src/stats/gamma-quantile.js";
import { logBeta } from "../../src/stats/log-beta.js";
import { logGamma } from "../../src/stats/log-gamma.js";
import { normalCdf } from "../../src/stats/normal-cdf.js";
import { normalQuantile } from "../../src/stats/normal-quantile.js";
import { regularizedGammaP } from "../../src/stats/regularized-gamma.js";
import { regularizedIncompleteBeta } from "../../src/stats/regularized-incomplete-beta.js";
import { studentTQuantile } from "../../src/stats/student-t-quantile.js";
import { twoSidedZ } from "../../src/stats/two-sided-z.js";
import { expectClose } from "./close.js";

describe("normal distribution", () => {
  describe("erfc (Cody 1969)", () => {
    // [re] scipy 1.17.1 scipy.special.erfc (Cody-quality Cephes implementation); tolerance 1e-14 relative.
    const scipy: [number, number][] = [
      [0.1, 0.8875370839817152],
      [0.5, 0.4795001221869535],
      [1, 0.15729920705028516],
      [2, 0.004677734981047266],
      [3.5, 7.430983723414129e-7],
      [5, 1.5374597944280347e-12],
      [10, 2.0884875837625446e-45],
      [26, 5.663192408856145e-296],
    ];
    it.each(scipy)("erfc(%s) matches scipy to 1e-14 relative", (x, expected) => {
      expectClose(erfc(x), expected, { rel: 1e-14 });
    });

    it("satisfies erfc(0) = 1 and erfc(-x) = 2 - erfc(x) (definition; exact to 1e-15)", () => {
      expect(erfc(0)).toBe(1);
      for (const x of [0.3, 1.2, 3]) expectClose(erfc(-x), 2 - erfc(x), { abs: 1e-15 });
    });

    it("rejects non-finite input", () => {
      expect(() => erfc(Number.NaN)).toThrow(RangeError);
    });
  });

  describe("normalCdf", () => {
    // [re] scipy 1.17.1 scipy.special.ndtr; tolerance 1e-14 relative for |x| ≤ 5, 1e-12 in the far
    // tail, where the rounding of x/√2 adds about x²·1e-16 relative error.
    const scipy: [number, number, number][] = [
      [-37, 5.7255712225239266e-300, 1e-12],
      [-20, 2.7536241186061556e-89, 1e-12],
      [-10, 7.61985302416047e-24, 1e-13],
      [-5, 2.866515718791933e-7, 1e-14],
      [-3, 0.0013498980316300933, 1e-14],
      [-1, 0.15865525393145707, 1e-14],
      [-0.3, 0.3820885778110474, 1e-14],
      [0.5, 0.6914624612740131, 1e-14],
      [2, 0.9772498680518208, 1e-14],
    ];
    it.each(scipy)("normalCdf(%s) matches scipy", (x, expected, rel) => {
      expectClose(normalCdf(x), expected, { rel });
    });

    it("agrees with jstat 1.9.6 jStat.normal.cdf on a grid from -6 to 6 (absolute 1e-14)", () => {
      // jstat forms the lower tail as 1 − erf, so only absolute agreement is expected of it.
      for (let x = -6; x <= 6; x += 0.25) {
        expectClose(normalCdf(x), jStat.normal.cdf(x, 0, 1), { abs: 1e-14 }, `x=${x}`);
      }
    });
  });

  describe("normalQuantile (Wichura AS 241)", () => {
    it("gives z = 1.959963984540054 at 0.975 (REFERENCE-VALUES.md preamble [re]; 1e-15 relative)", () => {
      expectClose(normalQuantile(0.975), 1.959963984540054, { rel: 1e-15 });
      expectClose(twoSidedZ(0.95), 1.959963984540054, { rel: 1e-15 });
    });

    // [re] scipy 1.17.1 scipy.special.ndtri; tolerance 1e-15 relative (AS 241 claims about 1e-16).
    const scipy: [number, number][] = [
      [1e-300, -37.0470962993612],
      [1e-20, -9.262340089798409],
      [1e-10, -6.361340902404056],
      [1e-5, -4.264890793922825],
      [0.001, -3.090232306167813],
      [0.3, -0.5244005127080409],
      [0.9, 1.2815515655446004],
    ];
    it.each(scipy)("normalQuantile(%s) matches scipy", (p, expected) => {
      expectClose(normalQuantile(p), expected, { rel: 1e-15 });
    });

    it("agrees with jstat 1.9.6 jStat.normal.inv on a grid of p in [0.001, 0.999] (1e-13 relative)", () => {
      // jstat inverts its own erfc by two Halley steps; about 1e-14 relative in this range.
      for (let p = 0.001; p < 0.9995; p += 0.00731) {
        expectClose(normalQuantile(p), jStat.normal.inv(p, 0, 1), { rel: 1e-13, abs: 1e-15 }, `p=${p}`);
      }
    });

    it("is symmetric, returns ±Infinity at 0 and 1, and inverts normalCdf (identities; 1e-14)", () => {
      expect(normalQuantile(0.5)).toBe(0);
      expect(normalQuantile(0)).toBe(Number.NEGATIVE_INFINITY);
      expect(normalQuantile(1)).toBe(Number.POSITIVE_INFINITY);
      for (const p of [0.01, 0.2, 0.45])
        expectClose(normalQuantile(1 - p), -normalQuantile(p), { abs: 1e-13 });
      for (const p of [1e-12, 0.01, 0.2, 0.45]) expectClose(normalCdf(normalQuantile(p)), p, { rel: 1e-14 });
    });

    it("rejects p outside [0, 1] and levels outside (0, 1)", () => {
      expect(() => normalQuantile(1.5)).toThrow(RangeError);
      expect(() => normalQuantile(Number.NaN)).toThrow(RangeError);
      expect(() => twoSidedZ(1)).toThrow(RangeError);
      expect(() => twoSidedZ(0)).toThrow(RangeError);
    });
  });
});

describe("gamma, beta and t functions", () => {
  describe("logGamma", () => {
    it("matches ln((n − 1)!) and ln Γ(½) = ln √π (identities; 1e-15 relative, 1e-14 absolute below 10)", () => {
      let factorial = 1;
      for (let n = 1; n <= 30; n++) {
        if (n > 1) factorial *= n - 1;
        expectClose(logGamma(n), Math.log(factorial), { rel: 1e-15, abs: 1e-14 }, `n=${n}`);
      }
      expectClose(logGamma(0.5), 0.5 * Math.log(Math.PI), { abs: 1e-14 });
    });

    // [re] scipy 1.17.1 scipy.special.gammaln; 1e-14 relative (or 1e-14 absolute below 10).
    const scipy: [number, number][] = [
      [0.001, 6.907178885383853],
      [1.5, -0.12078223763524526],
      [3.7, 1.428072326665388],
      [25.5, 56.38916764371994],
      [1e4, 82099.71749644238],
      [1e7, 151180949.36947393],
    ];
    it.each(scipy)("logGamma(%s) matches scipy", (x, expected) => {
      expectClose(logGamma(x), expected, { rel: 1e-14, abs: 1e-14 });
    });

    it("agrees with jstat 1.9.6 jStat.gammaln on a grid (absolute 1e-9: jstat's 6-term Lanczos series)", () => {
      for (let x = 0.05; x < 200; x *= 1.37)
        expectClose(logGamma(x), jStat.gammaln(x), { abs: 1e-9, rel: 1e-10 });
    });

    it("logBeta equals ln(Γ(a)Γ(b)/Γ(a+b)) for small integers and stays accurate for huge shapes", () => {
      // B(2, 3) = 1/12 (definition). Large shapes: [re] mpmath 1.3.0 at 40 digits, log(beta(a, b)).
      expectClose(logBeta(2, 3), Math.log(1 / 12), { rel: 1e-15 });
      expectClose(logBeta(0.5, 0.5), Math.log(Math.PI), { abs: 1e-14 });
      expectClose(logBeta(12, 20), logGamma(12) + logGamma(20) - logGamma(32), { rel: 1e-14 });
      expectClose(logBeta(0.5, 1e6), -6.335390211057437, { rel: 1e-14 });
    });

    it("rejects x ≤ 0", () => {
      expect(() => logGamma(0)).toThrow(RangeError);
      expect(() => logGamma(-1)).toThrow(RangeError);
    });
  });

  describe("regularizedIncompleteBeta", () => {
    it("matches closed forms: I_x(1, b) = 1 − (1 − x)^b, I_x(a, 1) = x^a, I_½(a, a) = ½ (1e-13)", () => {
      for (const x of [0.01, 0.3, 0.77]) {
        for (const s of [0.5, 3, 40]) {
          expectClose(regularizedIncompleteBeta(x, 1, s), 1 - (1 - x) ** s, { rel: 1e-13 });
          expectClose(regularizedIncompleteBeta(x, s, 1), x ** s, { rel: 1e-13 });
        }
      }
      for (const a of [0.3, 2, 17, 500])
        expectClose(regularizedIncompleteBeta(0.5, a, a), 0.5, { rel: 1e-13 });
    });

    it("gives binomial tails: P(X ≥ 2) for 4 fair coins = 11/16 (exact)", () => {
      expectClose(regularizedIncompleteBeta(0.5, 2, 3), 11 / 16, { rel: 1e-15 });
    });

    // [re] scipy 1.17.1 scipy.special.betainc; 1e-12 relative.
    const scipy: [number, number, number, number][] = [
      [0.3, 30000, 70000, 0.5003670623366132],
      [1e-6, 0.5, 1e6, 0.8427008448381964],
      [0.999, 5, 0.3, 0.7776477083814929],
      [1e-5, 0.2, 3, 0.1319995600012],
    ];
    it.each(scipy)("I_%s(%s, %s) matches scipy", (x, a, b, expected) => {
      expectClose(regularizedIncompleteBeta(x, a, b), expected, { rel: 1e-12 });
    });

    it("agrees with jstat 1.9.6 jStat.ibeta on a grid (1e-6 relative: jstat stops its fraction at 3e-7)", () => {
      for (const a of [0.5, 1.5, 4, 20, 90]) {
        for (const b of [0.7, 2, 9, 60]) {
          for (const x of [0.02, 0.2, 0.5, 0.8, 0.98]) {
            expectClose(regularizedIncompleteBeta(x, a, b), jStat.ibeta(x, a, b), { rel: 1e-6, abs: 1e-12 });
          }
        }
      }
    });

    it("computes the complement without cancellation", () => {
      // 1 − I_x(a, b) = I_{1−x}(b, a) (symmetry identity).
      expectClose(
        regularizedIncompleteBeta(0.9, 2, 30, { complement: true }),
        regularizedIncompleteBeta(0.1, 30, 2),
        {
          rel: 1e-13,
        },
      );
    });
  });

  describe("betaQuantile", () => {
    it("agrees with @stdlib/stats-base-dists-beta-quantile 0.2.3 on a grid (1e-12 relative)", () => {
      for (const a of [0.5, 1, 2.5, 12, 81, 400]) {
        for (const b of [0.5, 1, 3, 20, 183, 3000]) {
          for (const p of [1e-8, 0.001, 0.025, 0.2, 0.5, 0.8, 0.975, 0.999]) {
            expectClose(
              betaQuantile(p, a, b),
              betaQuantileStdlib(p, a, b),
              { rel: 1e-12, abs: 1e-300 },
              `${p},${a},${b}`,
            );
          }
        }
      }
    });

    it("agrees with jstat 1.9.6 jStat.beta.inv (1e-6 relative: jstat's tolerance)", () => {
      for (const [p, a, b] of [
        [0.025, 81, 183],
        [0.975, 82, 182],
        [0.3, 2, 2],
      ] as const) {
        expectClose(betaQuantile(p, a, b), jStat.beta.inv(p, a, b), { rel: 1e-6 });
      }
    });

    it("matches closed forms: B⁻¹(p; 1, b) = 1 − (1 − p)^(1/b) and B⁻¹(p; a, 1) = p^(1/a) (1e-14)", () => {
      expectClose(betaQuantile(0.975, 1, 20), 1 - 0.025 ** (1 / 20), { rel: 1e-14 });
      expectClose(betaQuantile(0.3, 4, 1), 0.3 ** (1 / 4), { rel: 1e-14 });
    });

    it("reads upperTail as an upper-tail probability", () => {
      expectClose(betaQuantile(0.025, 82, 182, { upperTail: true }), betaQuantile(0.975, 82, 182), {
        rel: 1e-14,
      });
      expect(betaQuantile(0, 2, 3, { upperTail: true })).toBe(1);
      expect(betaQuantile(1, 2, 3, { upperTail: true })).toBe(0);
      expect(betaQuantile(0, 2, 3)).toBe(0);
      expect(betaQuantile(1, 2, 3)).toBe(1);
    });

    it("rejects invalid shapes and probabilities", () => {
      expect(() => betaQuantile(0.5, 0, 1)).toThrow(RangeError);
      expect(() => betaQuantile(1.1, 1, 1)).toThrow(RangeError);
    });
  });

  describe("regularizedGammaP and gammaQuantile", () => {
    // [re] scipy 1.17.1 scipy.special.gammainc / gammaincc; 1e-13 relative.
    const scipy: [number, number, number, number][] = [
      [0.5, 0.1, 0.34527915398142317, 0.6547208460185768],
      [3, 2, 0.32332358381693654, 0.6766764161830634],
      [100, 90, 0.15822098918643007, 0.84177901081357],
      [1e4, 1.01e4, 0.8413487504471796, 0.15865124955282037],
      [0.01, 0.001, 0.9385706525261288, 0.06142934747387101],
    ];
    it.each(scipy)("P(%s, %s) and Q match scipy", (a, x, lower, upper) => {
      expectClose(regularizedGammaP(a, x), lower, { rel: 1e-13 });
      expectClose(regularizedGammaP(a, x, { complement: true }), upper, { rel: 1e-13 });
    });

    it("agrees with jstat 1.9.6 jStat.lowRegGamma on a grid (1e-8 relative: jstat's log-gamma)", () => {
      for (const a of [0.5, 1, 2.5, 10, 45]) {
        for (const x of [0.1, 1, 3, 10, 40])
          expectClose(regularizedGammaP(a, x), jStat.lowRegGamma(a, x), { rel: 1e-8, abs: 1e-14 });
      }
    });

    // [re] scipy 1.17.1 scipy.special.gammaincinv; 1e-13 relative.
    const inverse: [number, number, number][] = [
      [1e-10, 0.1, 6.073048362408172e-101],
      [0.5, 3, 2.674060313723559],
      [0.999999, 1000, 1157.577911008724],
      [0.025, 0.5, 0.0004910345585876278],
    ];
    it.each(inverse)("gammaQuantile(%s, %s) matches scipy", (p, a, expected) => {
      expectClose(gammaQuantile(p, a), expected, { rel: 1e-13 });
    });

    it("gammaQuantile(p, 1) = −ln(1 − p) (exponential distribution; 1e-14)", () => {
      for (const p of [0.01, 0.5, 0.975]) expectClose(gammaQuantile(p, 1), -Math.log1p(-p), { rel: 1e-14 });
    });
  });

  describe("chiSquareQuantile", () => {
    it("χ²(0.95; 1) = 1.959963984540054² (REFERENCE-VALUES.md z [re]; 1e-14)", () => {
      expectClose(chiSquareQuantile(0.95, 1), 1.959963984540054 ** 2, { rel: 1e-14 });
    });

    it("χ²(p; 2) = −2 ln(1 − p) (exponential with mean 2; 1e-14)", () => {
      expectClose(chiSquareQuantile(0.975, 2), -2 * Math.log(0.025), { rel: 1e-14 });
    });

    it("agrees with jstat 1.9.6 jStat.chisquare.inv on a grid (1e-7 relative: jstat stops at 1e-8)", () => {
      for (const df of [1, 2, 3, 7.5, 20, 100, 202]) {
        for (const p of [0.005, 0.025, 0.1, 0.5, 0.9, 0.975, 0.995]) {
          expectClose(chiSquareQuantile(p, df), jStat.chisquare.inv(p, df), { rel: 1e-7 }, `p=${p} df=${df}`);
        }
      }
    });
  });

  describe("studentTQuantile", () => {
    it("t(0.975; 1) = tan(0.475π) (Cauchy; 1e-13) and t(·; ∞) is normal", () => {
      expectClose(studentTQuantile(0.975, 1), Math.tan(0.475 * Math.PI), { rel: 1e-13 });
      expectClose(studentTQuantile(0.975, Number.POSITIVE_INFINITY), 1.959963984540054, { rel: 1e-15 });
      expect(studentTQuantile(0.5, 4)).toBe(0);
    });

    it("t(0.975; 9) = 2.262 (any printed t table [pub], to 3 dp) and 2.262157162798205 ([re] scipy 1.17.1)", () => {
      expectClose(studentTQuantile(0.975, 9), 2.262, { abs: 5e-4 });
      expectClose(studentTQuantile(0.975, 9), 2.262157162798205, { rel: 1e-13 });
    });

    // [re] scipy 1.17.1 scipy.stats.t.ppf (1e-12 relative), and mpmath 1.3.0 at 50 digits for the
    // value next to the median, where scipy's own result is off in the 10th digit.
    it("matches scipy and mpmath", () => {
      expectClose(studentTQuantile(0.975, 1e6), 1.959966356814107, { rel: 1e-12 });
      expectClose(studentTQuantile(1e-10, 2), -70710.67810804816, { rel: 1e-12 });
      expectClose(studentTQuantile(0.99, 0.5), 1028.4910104716198, { rel: 1e-12 });
      expectClose(studentTQuantile(0.5000001, 5), 2.634305522753727e-7, { rel: 1e-12 });
    });

    it("agrees with jstat 1.9.6 jStat.studentt.inv on a grid (1e-6 relative: jstat's tolerance)", () => {
      for (const df of [1, 2, 5, 9, 30, 120]) {
        for (const p of [0.005, 0.025, 0.1, 0.3, 0.7, 0.9, 0.975, 0.995]) {
          expectClose(studentTQuantile(p, df), jStat.studentt.inv(p, df), { rel: 1e-6 }, `p=${p} df=${df}`);
        }
      }
    });
  });
});
