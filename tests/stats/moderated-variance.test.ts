import { describe, expect, it } from "vitest";
import { moderatedVariance } from "../../src/stats/moderated-variance.js";
import { expectClose } from "./close.js";

/**
 * Smyth (2004), "Linear models and empirical Bayes methods for assessing differential expression
 * in microarray experiments", Statistical Applications in Genetics and Molecular Biology 3(1),
 * article 3, equation (3): the posterior variance
 *   s̃² = (d₀s₀² + d·s²)/(d₀ + d),
 * used with d₀ + d degrees of freedom for the moderated t. Expected values below are that formula
 * worked by hand (arithmetic shown), not the code under test.
 */
describe("moderated variance (Smyth 2004, eq. 3)", () => {
  it("s² = 4 on d = 2, s₀² = 1 on d₀ = 6: (6·1 + 2·4)/8 = 14/8 = 1.75 on 8 df", () => {
    const m = moderatedVariance({
      variance: 4,
      degreesOfFreedom: 2,
      priorVariance: 1,
      priorDegreesOfFreedom: 6,
    });
    expectClose(m.variance, 1.75, { abs: 1e-15 });
    expect(m.degreesOfFreedom).toBe(8);
  });

  it("s² = 0.5 on d = 10, s₀² = 2 on d₀ = 4: (4·2 + 10·0.5)/14 = 13/14 = 0.928571… on 14 df", () => {
    const m = moderatedVariance({
      variance: 0.5,
      degreesOfFreedom: 10,
      priorVariance: 2,
      priorDegreesOfFreedom: 4,
    });
    expectClose(m.variance, 0.9285714285714286, { abs: 1e-15 });
    expect(m.degreesOfFreedom).toBe(14);
  });

  it("s² = 0.03 on d = 3, s₀² = 0.012 on d₀ = 3 (equal weights): the plain average 0.021 on 6 df", () => {
    const m = moderatedVariance({
      variance: 0.03,
      degreesOfFreedom: 3,
      priorVariance: 0.012,
      priorDegreesOfFreedom: 3,
    });
    expectClose(m.variance, 0.021, { rel: 1e-14 });
    expect(m.degreesOfFreedom).toBe(6);
  });

  it("d = 0 (no own estimate) gives the prior exactly, on d₀ df", () => {
    const m = moderatedVariance({
      variance: 123,
      degreesOfFreedom: 0,
      priorVariance: 2.5,
      priorDegreesOfFreedom: 4,
    });
    expect(m.variance).toBe(2.5);
    expect(m.degreesOfFreedom).toBe(4);
  });

  it("d → ∞ gives the unit's own variance: the gap to s² is d₀|s₀² − s²|/(d₀ + d)", () => {
    const s2 = 3;
    const prior = 1;
    const d0 = 5;
    for (const d of [1e3, 1e6, 1e9, 1e12]) {
      const m = moderatedVariance({
        variance: s2,
        degreesOfFreedom: d,
        priorVariance: prior,
        priorDegreesOfFreedom: d0,
      });
      expectClose(m.variance, s2, { abs: (d0 * Math.abs(prior - s2)) / (d0 + d) + 1e-15 }, `d = ${d}`);
      expect(m.variance).toBeLessThan(s2); // pulled toward the smaller prior, ever less
    }
    const far = moderatedVariance({
      variance: s2,
      degreesOfFreedom: 1e12,
      priorVariance: prior,
      priorDegreesOfFreedom: d0,
    });
    expectClose(far.variance, s2, { rel: 1e-10 });
  });

  it("lies between s² and s₀², and does not change its input object", () => {
    const input = Object.freeze({
      variance: 0.2,
      degreesOfFreedom: 7,
      priorVariance: 0.9,
      priorDegreesOfFreedom: 3,
    });
    const m = moderatedVariance(input);
    expect(m.variance).toBeGreaterThan(0.2);
    expect(m.variance).toBeLessThan(0.9);
    expect(input).toEqual({
      variance: 0.2,
      degreesOfFreedom: 7,
      priorVariance: 0.9,
      priorDegreesOfFreedom: 3,
    });
  });

  it("rejects values outside the domain (RangeError)", () => {
    const ok = { variance: 1, degreesOfFreedom: 2, priorVariance: 1, priorDegreesOfFreedom: 3 };
    expect(() => moderatedVariance({ ...ok, variance: -1 })).toThrow(RangeError);
    expect(() => moderatedVariance({ ...ok, variance: Number.NaN })).toThrow(RangeError);
    expect(() => moderatedVariance({ ...ok, degreesOfFreedom: -1 })).toThrow(RangeError);
    expect(() => moderatedVariance({ ...ok, priorVariance: 0 })).toThrow(RangeError);
    expect(() => moderatedVariance({ ...ok, priorDegreesOfFreedom: 0 })).toThrow(RangeError);
    expect(() => moderatedVariance({ ...ok, degreesOfFreedom: Number.POSITIVE_INFINITY })).toThrow(
      RangeError,
    );
  });
});
