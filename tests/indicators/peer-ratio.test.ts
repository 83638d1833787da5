import { describe, expect, it } from "vitest";
import type { Cell } from "../../src/indicators/collect.js";
import type { Correction } from "../../src/indicators/correction.js";
import { peerRatio } from "../../src/indicators/peer-ratio.js";
import { createRandom } from "../../src/stats/random.js";
import { expectClose } from "../stats/close.js";

/**
 * The ratio to peers on the same content (indirect standardisation on the corrected scale) and its
 * Fieller range. Expected values are worked by hand here from the definitions in peer-ratio.ts:
 * A = Σs − μ₀N, B = Σn_u·m₋,u − μ₀N, Var A = N²(V_own + v₀), Var B = Σn_u²V_u + N²v₀, Cov = N²v₀,
 * and Fieller's pivot (a − ρb)/√(Va − 2ρC + ρ²Vb) within ±c (Fieller 1954; Franz 2007), never
 * from the code under test.
 */
const Z95 = 1.959963984540054; // REFERENCE-VALUES.md, two-sided 95%

function correction(offset: number, offsetVariance: number): Correction {
  return {
    mode: "mean-probability",
    offset,
    scale: 0.2,
    offsetVariance,
    inStateVariance: 0,
    usesThreshold: false,
    noise: { inState: 0.02, notInState: 0.02 },
  };
}

const cell = (n: number, s: number): Cell => ({ n, s, s2: 0 });

describe("peer ratio: a bounded range", () => {
  it("100 windows at mean 0.4 against peers at 0.3, μ₀ = 0.2 known: ratio 2, delta-method range", () => {
    // A = 40 − 20 = 20, B = 100·0.3 − 20 = 10; Var A = 100²·0.0004 = 4, Var B = 0, so the range is
    // (20 ± c·2)/10 = 2 ± 0.392 (with Var B = 0 Fieller's limits are exactly the delta method's).
    const r = peerRatio({
      own: new Map([["u1", cell(100, 40)]]),
      ownMeanVariance: 0.0004,
      totals: new Map([["u1", cell(1100, 340)]]),
      unitVariance: new Map([["u1", 0]]),
      correction: correction(0.2, 0),
      critical: Z95,
    });
    expect(r.windows).toBe(100);
    expectClose(r.expectedMean!, 0.3, { abs: 1e-12 });
    expectClose(r.ratio!.value, 2, { abs: 1e-12 });
    expectClose(r.ratio!.low, 2 - (Z95 * 2) / 10, { abs: 1e-12 });
    expectClose(r.ratio!.high, 2 + (Z95 * 2) / 10, { abs: 1e-12 });
  });
});

describe("peer ratio: the peers' level too uncertain to divide by (Fieller's exclusive case)", () => {
  // Own: 200 windows at mean 0.30; peers in the unit at 0.215; μ₀ = 0.2 with Var(μ̂₀) = 4e-5
  // (sd 0.0063: a small validation sample). A = 60 − 40 = 20, B = 200·0.215 − 40 = 3;
  // Var A = 200²·(1e-5 + 4e-5) = 2, Var B = 0 + 200²·4e-5 = 1.6, Cov = 1.6. With c = 2.5,
  // B² = 9 < c²·Var B = 10: the denominator is not clearly above 0, while the numerator is
  // (A² = 400 > c²·Var A = 12.5).
  const input = {
    own: new Map([["u1", cell(200, 60)]]),
    ownMeanVariance: 1e-5,
    totals: new Map([["u1", cell(10_200, 60 + 10_000 * 0.215)]]),
    unitVariance: new Map([["u1", 0]]),
    correction: correction(0.2, 4e-5),
    critical: 2.5,
    openEnded: true,
  };

  it("gives the upper root as the lower end and no upper end", () => {
    const a = 20;
    const b = 3;
    const va = 2;
    const vb = 1.6;
    const cov = 1.6;
    const c2 = 2.5 * 2.5;
    // (b² − c²Vb)ρ² − 2(ab − c²C)ρ + (a² − c²Va) ≤ 0 with a negative leading coefficient: the set
    // is outside the roots, and the larger root is where a ratio of two shares (never negative) starts.
    const q = b * b - c2 * vb;
    const l = a * b - c2 * cov;
    const k = a * a - c2 * va;
    expect(q).toBeLessThan(0);
    const roots = [(l + Math.sqrt(l * l - q * k)) / q, (l - Math.sqrt(l * l - q * k)) / q].sort(
      (x, y) => x - y,
    );
    expect(roots[0]).toBeLessThan(0);
    const r = peerRatio(input);
    expect(r.ratio).not.toBeNull();
    expectClose(r.ratio!.low, roots[1]!, { rel: 1e-9 });
    expect(r.ratio!.high).toBe(Number.POSITIVE_INFINITY);
    expectClose(r.ratio!.value, a / b, { rel: 1e-9 });
    // The pivot is ±c at the lower end (the definition).
    const rho = r.ratio!.low;
    expectClose(Math.abs(a - rho * b) / Math.sqrt(va - 2 * rho * cov + rho * rho * vb), 2.5, { rel: 1e-9 });
  });

  it("gives no ratio there unless the caller asks for open ranges", () => {
    expect(peerRatio({ ...input, openEnded: false }).ratio).toBeNull();
    expect(peerRatio({ ...input, openEnded: undefined }).ratio).toBeNull();
  });

  it("gives no ratio when the numerator is not clearly above 0 either (the whole line)", () => {
    // A = 41 − 40 = 1 with Var A = 2: A² < c²·Var A, and B as above.
    const r = peerRatio({
      ...input,
      own: new Map([["u1", cell(200, 41)]]),
      totals: new Map([["u1", cell(10_200, 41 + 10_000 * 0.215)]]),
    });
    expect(r.ratio).toBeNull();
    expect(r.windows).toBe(200);
  });

  it("covers the true ratio at least 95% of the time, with jointly normal A and B near B = 0", () => {
    // Simulation of the set [r₂, ∞) ∪ bounded ranges against a known ratio α/β = 3 with β small:
    // a draw counts as covered when the reported range holds 3; no range (null) counts as covered,
    // since nothing is claimed.
    const random = createRandom(7);
    const normal = () => {
      const u = random.uniform();
      const v = random.uniform();
      return Math.sqrt(-2 * Math.log(u)) * Math.cos(2 * Math.PI * v);
    };
    let covered = 0;
    let exclusive = 0;
    const draws = 4000;
    const n = 200;
    for (let i = 0; i < draws; i++) {
      // μ̂₀ = μ₀ + e₀ shifts both A and B; the subject's mean has its own error.
      const e0 = normal() * Math.sqrt(4e-5);
      const eOwn = normal() * Math.sqrt(1e-5);
      const own = cell(n, n * (0.2 + 3 * 0.01 + eOwn));
      const r = peerRatio({
        ...input,
        own: new Map([["u1", own]]),
        totals: new Map([["u1", cell(10_000 + n, own.s + 10_000 * 0.21)]]),
        correction: correction(0.2 + e0, 4e-5),
        critical: Z95,
      });
      if (r.ratio === null || (r.ratio.low <= 3 && r.ratio.high >= 3)) covered++;
      if (r.ratio?.high === Number.POSITIVE_INFINITY) exclusive++;
    }
    expect(exclusive).toBeGreaterThan(200);
    expect(covered / draws).toBeGreaterThanOrEqual(0.94);
  });
});
