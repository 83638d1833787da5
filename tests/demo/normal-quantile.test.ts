import { describe, expect, it } from "vitest";
import { normalQuantile } from "../../src/demo/normal-quantile.js";
import { jStat } from "./reference.js";

describe("normalQuantile (Wichura 1988, AS 241)", () => {
  it("gives z = 1.959963984540054 at p = .975 (REFERENCE-VALUES.md, to 1e-14)", () => {
    expect(normalQuantile(0.975)).toBeCloseTo(1.959963984540054, 14);
    expect(normalQuantile(0.025)).toBeCloseTo(-1.959963984540054, 14);
  });

  it("agrees with jstat 1.9.6 jStat.normal.inv where jstat is accurate, p ≥ 1e-6 (1e-9)", () => {
    // Central region |p − .5| ≤ .425 and the tail region with r ≤ 5 of the algorithm.
    const ps = [1e-6, 0.001, 0.01, 0.05, 0.075, 0.2, 0.5, 0.58, 0.68, 0.74, 0.925, 0.999999];
    for (const p of ps) {
      const expected = jStat.normal.inv(p, 0, 1);
      expect(Math.abs(normalQuantile(p) - expected)).toBeLessThan(1e-9);
    }
  });

  it("matches known far-tail quantiles, where jstat's inverse is too coarse (1e-12 relative)", () => {
    // Φ⁻¹(1e-10) = −6.361340902404056 is R's qnorm value (from memory); the other two are from
    // Python's statistics.NormalDist().inv_cdf (CPython 3, its own AS 241 implementation).
    // jStat.normal.inv(1e-20) gives −9.1469, 0.12 off, so jstat cannot serve here.
    const known: [number, number][] = [
      [1e-10, -6.361340902404056],
      [1e-20, -9.262340089798405],
      [1e-300, -37.0470962993612],
    ];
    for (const [p, z] of known) expect(Math.abs(normalQuantile(p) / z - 1)).toBeLessThan(1e-12);
  });

  it("rejects p outside (0, 1)", () => {
    for (const p of [0, 1, -0.1, 1.5, Number.NaN]) expect(() => normalQuantile(p)).toThrow(RangeError);
  });
});
