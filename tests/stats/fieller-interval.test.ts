import { describe, expect, it } from "vitest";
import { fiellerInterval } from "../../src/stats/fieller-interval.js";
import { createRandom } from "../../src/stats/random.js";
import { expectClose } from "./close.js";

/**
 * Fieller's confidence set for a ratio α/β (E. C. Fieller 1954, "Some problems in interval
 * estimation", JRSS B 16:175–185): ρ is in the set when the pivot
 *   T(ρ) = (a − ρb)/√(Va − 2ρC + ρ²Vb)
 * satisfies |T(ρ)| ≤ c. Every expected value below comes from that definition, worked out here
 * independently of the code under test (a quadratic solved in the test, a bisection on T, or a
 * simulation), never from fiellerInterval itself.
 */
const Z95 = 1.959963984540054; // REFERENCE-VALUES.md, two-sided 95%

interface Case {
  readonly a: number;
  readonly b: number;
  readonly va: number;
  readonly vb: number;
  readonly cov: number;
  readonly c: number;
}

function run(k: Case) {
  return fiellerInterval({
    numerator: k.a,
    denominator: k.b,
    numeratorVariance: k.va,
    denominatorVariance: k.vb,
    covariance: k.cov,
    critical: k.c,
  });
}

/** Fieller's pivot, straight from the definition. */
function pivot(k: Case, rho: number): number {
  return (k.a - rho * k.b) / Math.sqrt(k.va - 2 * rho * k.cov + rho * rho * k.vb);
}

/** Plain bisection on a sign change of f in [lo, hi]. */
function bisectRoot(f: (x: number) => number, lo: number, hi: number): number {
  let l = lo;
  let h = hi;
  const fl = f(l);
  expect(Math.sign(fl) * Math.sign(f(h))).toBe(-1);
  for (let i = 0; i < 200; i++) {
    const m = (l + h) / 2;
    if (Math.sign(f(m)) === Math.sign(fl)) l = m;
    else h = m;
  }
  return (l + h) / 2;
}

/**
 * The limits by brute force: start at a/b (where T = 0) and step outward, doubling the step, until
 * |T| > c; then bisect on |T| − c. Between a/b and that first crossing |T| ≤ c throughout.
 */
function bruteLimits(k: Case): { lower: number; upper: number } {
  const centre = k.a / k.b;
  const excess = (rho: number) => Math.abs(pivot(k, rho)) - k.c;
  const outward = (direction: 1 | -1) => {
    let step = 1e-3 * (1 + Math.abs(centre));
    let inside = centre;
    let x = centre + direction * step;
    while (excess(x) <= 0) {
      inside = x;
      step *= 2;
      x = centre + direction * step;
      expect(step).toBeLessThan(1e12);
    }
    return bisectRoot(excess, inside, x);
  };
  return { lower: outward(-1), upper: outward(1) };
}

describe("Fieller interval: the doc-comment example", () => {
  // a = 10, b = 5, Va = 4, Vb = 1, C = 0, c = 1.96. Squaring |T(ρ)| ≤ c gives
  // (b² − c²Vb)ρ² − 2(ab − c²C)ρ + (a² − c²Va) ≤ 0 (Fieller 1954; Franz 2007, arXiv:0710.2024), here
  // 21.1584ρ² − 100ρ + 84.6336 ≤ 0, solved below with the textbook quadratic formula.
  const k: Case = { a: 10, b: 5, va: 4, vb: 1, cov: 0, c: 1.96 };

  it("coefficients 21.1584, −100, 84.6336 and roots ≈ 1.1044 and 3.6218 (1e-12 against the formula)", () => {
    const qa = k.b * k.b - k.c * k.c * k.vb;
    const qb = -2 * (k.a * k.b - k.c * k.c * k.cov);
    const qc = k.a * k.a - k.c * k.c * k.va;
    expectClose(qa, 21.1584, { abs: 1e-12 });
    expectClose(qb, -100, { abs: 1e-12 });
    expectClose(qc, 84.6336, { abs: 1e-12 });
    const disc = Math.sqrt(qb * qb - 4 * qa * qc);
    const lower = (-qb - disc) / (2 * qa);
    const upper = (-qb + disc) / (2 * qa);
    const f = run(k);
    expect(f.kind).toBe("bounded");
    expect(f.ratio).toBe(2);
    expectClose(f.lower, lower, { abs: 1e-12 }, "lower");
    expectClose(f.upper, upper, { abs: 1e-12 }, "upper");
    // The four digits printed in the doc comment.
    expectClose(f.lower, 1.1044, { abs: 5e-5 }, "lower, 4 dp");
    expectClose(f.upper, 3.6218, { abs: 5e-5 }, "upper, 4 dp");
    // g = c²Vb/b² (Fieller 1954's measure of the denominator's uncertainty)
    expectClose(f.g, (1.96 * 1.96) / 25, { rel: 1e-15 });
  });

  it("the pivot equals ∓c exactly at the two limits (Fieller 1954's definition, 1e-9)", () => {
    const f = run(k);
    expectClose(pivot(k, f.lower), 1.96, { abs: 1e-9 }, "T(lower)");
    expectClose(pivot(k, f.upper), -1.96, { abs: 1e-9 }, "T(upper)");
  });
});

describe("Fieller interval: limits are where the pivot crosses ±c (brute force)", () => {
  const random = createRandom(20_240_611);
  const cases: Case[] = [
    { a: 10, b: 5, va: 4, vb: 1, cov: 0, c: Z95 },
    { a: -3, b: 2, va: 0.5, vb: 0.2, cov: 0.1, c: Z95 },
    { a: 0.3, b: -1.5, va: 0.04, vb: 0.09, cov: -0.03, c: 2.57 },
    { a: 0, b: 4, va: 1, vb: 1, cov: 0.5, c: 1.645 },
    // a strong positive correlation (0.98)
    { a: 7, b: 3, va: 1, vb: 0.25, cov: 0.49, c: Z95 },
  ];
  // plus random cases with a clearly non-zero denominator and a positive-definite covariance
  for (let i = 0; i < 40; i++) {
    const sa = 0.05 + 2 * random.uniform();
    const sb = 0.05 + 2 * random.uniform();
    const r = -0.95 + 1.9 * random.uniform();
    const c = 1 + 2 * random.uniform();
    const sign = random.uniform() < 0.5 ? -1 : 1;
    const b = sign * sb * c * (1.2 + 5 * random.uniform()); // b² > c²Vb with room to spare
    const a = 10 * (random.uniform() - 0.5);
    cases.push({ a, b, va: sa * sa, vb: sb * sb, cov: r * sa * sb, c });
  }

  it.each(cases.map((k, i) => [i, k] as const))(
    "case %i: lower and upper equal the crossings (rel 1e-9)",
    (_, k) => {
      const f = run(k);
      expect(f.kind).toBe("bounded");
      const brute = bruteLimits(k);
      const scale = Math.max(1, Math.abs(brute.upper - brute.lower));
      expectClose(f.lower, brute.lower, { abs: 1e-9 * scale }, "lower");
      expectClose(f.upper, brute.upper, { abs: 1e-9 * scale }, "upper");
    },
  );

  it("on a wide grid, ρ is inside [lower, upper] exactly when |T(ρ)| ≤ c", () => {
    let checked = 0;
    for (const k of cases.slice(0, 10)) {
      const f = run(k);
      const width = f.upper - f.lower;
      for (let i = -400; i <= 1400; i++) {
        const rho = f.lower + (i / 1000) * width;
        // skip points within rounding distance of a limit
        if (Math.abs(rho - f.lower) < 1e-9 * width || Math.abs(rho - f.upper) < 1e-9 * width) continue;
        const inside = rho >= f.lower && rho <= f.upper;
        expect(Math.abs(pivot(k, rho)) <= k.c, `ρ = ${rho}`).toBe(inside);
        checked++;
      }
    }
    expect(checked).toBeGreaterThan(17_000);
  });
});

describe("Fieller interval: not bounded when b² ≤ c²Vb (Fieller 1954; Franz 2007)", () => {
  it("b = 0 with a numerator near 0 gives the whole line, ratio NaN and g = ∞", () => {
    const f = run({ a: 1, b: 0, va: 1, vb: 1, cov: 0, c: Z95 });
    expect(f.kind).toBe("unbounded");
    expect(f.lower).toBe(Number.NEGATIVE_INFINITY);
    expect(f.upper).toBe(Number.POSITIVE_INFINITY);
    expect(f.ratio).toBeNaN();
    expect(f.g).toBe(Number.POSITIVE_INFINITY);
  });

  it("at the boundary b² = c²Vb (b = 2, Vb = 1, c = 2) the set is not bounded, with g = 1", () => {
    const f = run({ a: 3, b: 2, va: 1, vb: 1, cov: 0, c: 2 });
    expect(f.kind).toBe("unbounded");
    expect(f.g).toBe(1);
  });

  it("just inside the boundary it is bounded, just outside not; g ≥ 1 ⇔ not bounded", () => {
    const base = { a: 3, va: 1, vb: 1, cov: 0.2, c: 2 };
    expect(run({ ...base, b: 2.001 }).kind).toBe("bounded");
    expect(run({ ...base, b: -2.001 }).kind).toBe("bounded");
    expect(run({ ...base, b: 1.999 }).kind).not.toBe("bounded");
    expect(run({ ...base, b: -1.999 }).kind).not.toBe("bounded");
    for (const b of [-3, -2.5, -1, 0.5, 1.5, 2.5, 4]) {
      const f = run({ ...base, b });
      expect(f.kind !== "bounded", `b = ${b}`).toBe(f.g >= 1);
    }
  });

  it("when b² < c²Vb, arbitrarily large |ρ| do satisfy |T(ρ)| ≤ c, so no finite interval is right", () => {
    // |T(ρ)| → |b|/√Vb as |ρ| → ∞ (from the definition), which is below c here.
    const k: Case = { a: 3, b: 1.5, va: 1, vb: 1, cov: 0.2, c: 2 };
    expect(run(k).kind).not.toBe("bounded");
    for (const rho of [1e4, -1e4, 1e8, -1e8]) expect(Math.abs(pivot(k, rho))).toBeLessThan(k.c);
  });

  it("the exclusive case by hand: a = 3, b = 1.5, Va = Vb = 1, C = 0, c = 2", () => {
    // (b² − c²Vb)ρ² − 2abρ + (a² − c²Va) ≤ 0 is −1.75ρ² − 9ρ + 5 ≤ 0: roots (9 ∓ √116)/(−3.5),
    // i.e. −5.5487… and 0.5201…, worked with the quadratic formula here. The numerator is clearly
    // away from 0 (a² > c²Va), so the set is the two rays outside the roots (Franz 2007, §3).
    const f = run({ a: 3, b: 1.5, va: 1, vb: 1, cov: 0, c: 2 });
    expect(f.kind).toBe("exclusive");
    expectClose(f.lower, (9 + Math.sqrt(116)) / -3.5, { abs: 1e-12 });
    expectClose(f.upper, (9 - Math.sqrt(116)) / -3.5, { abs: 1e-12 });
    expect(f.ratio).toBe(2);
  });

  it("exclusive sets match the definition on a grid: ρ is in (−∞, lower] ∪ [upper, ∞) ⇔ |T(ρ)| ≤ c", () => {
    const random = createRandom(20260);
    let exclusive = 0;
    let checked = 0;
    for (let draw = 0; draw < 300; draw++) {
      const vb = 0.2 + random.uniform() * 2;
      const va = 0.2 + random.uniform() * 2;
      const cov = (random.uniform() * 2 - 1) * 0.8 * Math.sqrt(va * vb);
      const k: Case = {
        a: 1 + random.uniform() * 6,
        b: (random.uniform() * 2 - 1) * 2 * Math.sqrt(vb),
        va,
        vb,
        cov,
        c: Z95,
      };
      const f = run(k);
      if (f.kind !== "exclusive") continue;
      exclusive++;
      expect(f.lower).toBeLessThan(f.upper);
      for (let i = 0; i <= 400; i++) {
        const rho = f.lower + ((f.upper - f.lower) * (i - 100)) / 200;
        // Skip points within 1e-7 of a root, where rounding decides.
        if (Math.abs(rho - f.lower) < 1e-7 || Math.abs(rho - f.upper) < 1e-7) continue;
        const inside = Math.abs(pivot(k, rho)) <= k.c;
        expect(inside, `draw ${draw}, ρ = ${rho}`).toBe(rho < f.lower || rho > f.upper);
        checked++;
      }
    }
    expect(exclusive).toBeGreaterThan(50);
    expect(checked).toBeGreaterThan(20_000);
  });

  it("rejects negative variances and a non-positive critical value", () => {
    const ok = { numerator: 1, denominator: 2, numeratorVariance: 1, denominatorVariance: 1, critical: 2 };
    expect(() => fiellerInterval({ ...ok, numeratorVariance: -1 })).toThrow(RangeError);
    expect(() => fiellerInterval({ ...ok, denominatorVariance: -1 })).toThrow(RangeError);
    expect(() => fiellerInterval({ ...ok, critical: 0 })).toThrow(RangeError);
    expect(() => fiellerInterval({ ...ok, numerator: Number.NaN })).toThrow(RangeError);
  });
});

describe("Fieller interval: exact coverage for jointly normal estimates (Fieller 1954)", () => {
  // With (a, b) bivariate normal with known variances and covariance, T(ρ_true) is exactly standard
  // normal, so the set covers ρ_true with probability exactly 1 − α. 4000 draws: the standard error
  // of a 0.95 coverage is 0.0034, so ±0.015 is more than 4 standard errors.
  function coverage(seed: number, alpha: number, beta: number, sa: number, sb: number, r: number) {
    const random = createRandom(seed);
    const truth = alpha / beta;
    const draws = 4000;
    let covered = 0;
    let unbounded = 0;
    for (let i = 0; i < draws; i++) {
      const z1 = random.normal();
      const z2 = random.normal();
      const a = alpha + sa * z1;
      const b = beta + sb * (r * z1 + Math.sqrt(1 - r * r) * z2);
      const va = sa * sa;
      const vb = sb * sb;
      const cov = r * sa * sb;
      const f = run({ a, b, va, vb, cov, c: Z95 });
      if (f.kind === "unbounded") unbounded++;
      if (f.lower <= truth && truth <= f.upper) covered++;
    }
    return { fieller: covered / draws, unbounded };
  }

  it("covers the true ratio 0.95 ± 0.015 with a precise denominator (β/σ_b = 10, correlation 0.4)", () => {
    const result = coverage(1954, 4, 2, 0.6, 0.2, 0.4);
    expect(result.unbounded).toBe(0);
    expectClose(result.fieller, 0.95, { abs: 0.015 }, "coverage");
  });

  it("covers 0.95 ± 0.015 with a noisy denominator (β/σ_b = 5, correlation −0.5)", () => {
    // A noisy denominator makes the ratio's distribution skewed; Fieller's set stays exact.
    const result = coverage(175, 3, 1, 0.3, 0.2, -0.5);
    expect(result.unbounded).toBeLessThan(10); // P(|b| ≤ c·σ_b) ≈ P(Z < −3.04) ≈ 0.001
    expectClose(result.fieller, 0.95, { abs: 0.015 }, "coverage");
  });
});

describe("Fieller interval: reduces to the delta method as Var(b) → 0", () => {
  // With g = c²Vb/b² → 0 the quadratic's roots tend to a/b ± c·√(Va − 2(a/b)C + (a/b)²Vb)/|b|, the
  // delta-method interval (expand the roots to first order in g; worked out in the test below).
  function delta(k: Case) {
    const q = k.a / k.b;
    const half = (k.c * Math.sqrt(k.va - 2 * q * k.cov + q * q * k.vb)) / Math.abs(k.b);
    return { lower: q - half, upper: q + half, half };
  }

  it("agrees to within 1% of the half-width once g < 1e-4, and the gap shrinks with Vb", () => {
    let previous = Number.POSITIVE_INFINITY;
    for (const vb of [1e-2, 1e-4, 1e-6, 1e-8]) {
      const k: Case = { a: 10, b: 5, va: 0.01, vb, cov: 0, c: Z95 };
      const f = run(k);
      const d = delta(k);
      const gap = Math.max(Math.abs(f.lower - d.lower), Math.abs(f.upper - d.upper));
      expect(gap).toBeLessThan(previous);
      previous = gap;
      if (f.g < 1e-4) expect(gap).toBeLessThan(0.01 * d.half);
    }
    expect(previous).toBeLessThan(1e-6);
  });

  it("with covariance as well (a = −2, b = 8, Va = 1e-3, Vb = 1e-7, C = 1e-6): within 1e-4 of each limit", () => {
    const k: Case = { a: -2, b: 8, va: 1e-3, vb: 1e-7, cov: 1e-6, c: Z95 };
    const f = run(k);
    const d = delta(k);
    expectClose(f.lower, d.lower, { abs: 1e-4 }, "lower");
    expectClose(f.upper, d.upper, { abs: 1e-4 }, "upper");
  });
});
