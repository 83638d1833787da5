import { describe, expect, it } from "vitest";
import type { ConstructCard } from "../../src/config/types.js";
import { collectConstruct } from "../../src/indicators/collect.js";
import {
  correctedShare,
  correctedShareVariance,
  correctionFor,
  windowNoiseVariance,
} from "../../src/indicators/correction.js";
import { roganGladen } from "../../src/stats/rogan-gladen.js";
import type { SessionSummary } from "../../src/summaries/types.js";
import { expectClose } from "../stats/close.js";
import { testConstruct } from "../support/cards.js";

function card(over: Partial<ConstructCard> = {}): ConstructCard {
  return testConstruct({ sustainedMinWindows: 6, ...over });
}

function summary(over: Partial<SessionSummary>): SessionSummary {
  return {
    studentId: "lm-001",
    classId: "7a",
    schoolId: "west",
    unitId: "fractions",
    activityId: "",
    sessionId: "s1",
    day: "2026-09-14",
    construct: "bored",
    windows: 1,
    sumP: 0,
    sumP2: 0,
    above: 0,
    sustainedEpisodes: 0,
    longestRun: 0,
    ...over,
  };
}

describe("threshold route = Rogan & Gladen (1978)", () => {
  // REFERENCE-VALUES.md, "Prevalence under misclassification": 23 positive of 150, Se .96, Sp .89:
  // AP .1533333, TP .0509804 [re from TP = (AP + Sp − 1)/(Se + Sp − 1), Rogan & Gladen 1978].
  const c = correctionFor(card({ sensitivity: 0.96, specificity: 0.89 }));

  it("uses the threshold signal, offset 1 − Sp and scale Se + Sp − 1", () => {
    expect(c.mode).toBe("threshold");
    expect(c.usesThreshold).toBe(true);
    expectClose(c.offset, 0.11, { abs: 1e-15 });
    expectClose(c.scale, 0.85, { abs: 1e-15 });
  });

  it("23 of 150 at or above the threshold gives 0.0509804 (REFERENCE-VALUES.md [re]; 5e-8)", () => {
    expectClose(correctedShare(c, 23 / 150), 0.0509804, { abs: 5e-8 });
    // second check only: the project's own Rogan–Gladen routine agrees
    expectClose(
      correctedShare(c, 23 / 150),
      roganGladen({ apparent: 23 / 150, sensitivity: 0.96, specificity: 0.89 }).unclamped,
      {
        abs: 1e-15,
      },
    );
  });

  it("end to end: summaries whose 'above' counts total 23 of 150 windows give the same share", () => {
    const rows = [
      summary({ sessionId: "s1", windows: 90, above: 15, sumP: 40, sumP2: 25 }),
      summary({ sessionId: "s2", windows: 60, above: 8, sumP: 20, sumP2: 9, day: "2026-09-15" }),
    ];
    const data = collectConstruct("bored", rows, c);
    const s = data.students.get("lm-001")!;
    expect(s.n).toBe(150);
    expect(s.s).toBe(23); // the count at or above the threshold, not the probabilities
    expectClose(correctedShare(c, s.s / s.n), 0.0509804, { abs: 5e-8 });
  });

  it("Lang & Reiczigel (2014) point estimate: AP .30, Se .80, Sp .90 gives .285714 (REFERENCE-VALUES.md [re])", () => {
    const lr = correctionFor(card({ sensitivity: 0.8, specificity: 0.9 }));
    expectClose(correctedShare(lr, 0.3), 0.285714, { abs: 5e-7 });
  });

  it("validation variances are binomial: Sp(1 − Sp)/n₀ and Se(1 − Se)/n₁", () => {
    const v = correctionFor(
      card({ sensitivity: 0.8, specificity: 0.9, aucPositives: 50, aucNegatives: 200 }),
    );
    expectClose(v.offsetVariance, (0.9 * 0.1) / 200, { rel: 1e-14 });
    expectClose(v.inStateVariance, (0.8 * 0.2) / 50, { rel: 1e-14 });
    expect(v.noise).toEqual({ inState: 0.8 * (1 - 0.8), notInState: 0.9 * (1 - 0.9) });
  });
});

describe("mean-probability route is exact on a constructed student", () => {
  // A student in state for 30 of 120 windows (π = 0.25). In state, the detector's probabilities
  // average 0.62 (the card's mean_p_in_state); out of state they average 0.18. Then the student's
  // mean probability is 0.25·0.62 + 0.75·0.18 = 0.29, and (0.29 − 0.18)/(0.62 − 0.18) = 0.25.
  const c = correctionFor(
    card({ meanPInState: 0.62, meanPNotInState: 0.18, sdPInState: 0.1, sdPNotInState: 0.08 }),
  );
  const inState = Array.from({ length: 30 }, (_, i) => 0.62 + (i % 2 === 0 ? 0.1 : -0.1));
  const outOfState = Array.from({ length: 90 }, (_, i) => 0.18 + [0.05, -0.05, 0][i % 3]!);
  const windows = [...inState, ...outOfState];

  it("uses the probabilities themselves, offset μ₀ and scale μ₁ − μ₀", () => {
    expect(c.mode).toBe("mean-probability");
    expect(c.usesThreshold).toBe(false);
    expect(c.offset).toBe(0.18);
    expectClose(c.scale, 0.44, { abs: 1e-15 });
  });

  it("recovers π = 0.25 from the windows' mean (1e-12)", () => {
    const mean = windows.reduce((a, b) => a + b, 0) / windows.length;
    expectClose(mean, 0.29, { abs: 1e-12 });
    expectClose(correctedShare(c, mean), 0.25, { abs: 1e-12 });
  });

  it("through collectConstruct: the signal is sum_p, so the same share comes out", () => {
    const sumP = windows.reduce((a, b) => a + b, 0);
    const sumP2 = windows.reduce((a, b) => a + b * b, 0);
    const data = collectConstruct("bored", [summary({ windows: 120, sumP, sumP2, above: 35 })], c);
    const s = data.students.get("lm-001")!;
    expectClose(correctedShare(c, s.s / s.n), 0.25, { abs: 1e-12 });
  });

  it("validation variances sd²/n, and the largest possible sd √(m(1 − m)) when the card gives none", () => {
    expectClose(c.offsetVariance, 0.08 ** 2 / 1100, { rel: 1e-14 });
    expectClose(c.inStateVariance, 0.1 ** 2 / 140, { rel: 1e-14 });
    const bare = correctionFor(card({ meanPInState: 0.62, meanPNotInState: 0.18 }));
    expectClose(bare.offsetVariance, (0.18 * 0.82) / 1100, { rel: 1e-14 });
    expectClose(bare.inStateVariance, (0.62 * 0.38) / 140, { rel: 1e-14 });
  });

  it("window noise at share π is πσ₁² + (1 − π)σ₀² (the within-state variance mixed by π)", () => {
    expectClose(windowNoiseVariance(c, 0.25)!, 0.25 * 0.01 + 0.75 * 0.0064, { rel: 1e-14 });
    // clamped to [0, 1] before weighting
    expectClose(windowNoiseVariance(c, 1.3)!, 0.01, { rel: 1e-14 });
    expectClose(windowNoiseVariance(c, -0.2)!, 0.0064, { rel: 1e-14 });
  });

  it("is preferred to sensitivity and specificity when the card has both", () => {
    const both = correctionFor(
      card({ meanPInState: 0.62, meanPNotInState: 0.18, sensitivity: 0.7, specificity: 0.8 }),
    );
    expect(both.mode).toBe("mean-probability");
  });
});

describe("variance of the corrected share = delta method, by finite differences in the test", () => {
  // π̂ = (m − μ₀)/(μ₁ − μ₀) with m, μ̂₀, μ̂₁ independent: Var π̂ ≈ ∇π̂ᵀ diag(Vm, v₀, v₁) ∇π̂.
  // The gradient is taken numerically (central differences) from the formula written here.
  const pi = (m: number, mu0: number, mu1: number) => (m - mu0) / (mu1 - mu0);

  function numericVariance(m: number, mu0: number, mu1: number, vm: number, v0: number, v1: number): number {
    const h = 1e-6;
    const dm = (pi(m + h, mu0, mu1) - pi(m - h, mu0, mu1)) / (2 * h);
    const d0 = (pi(m, mu0 + h, mu1) - pi(m, mu0 - h, mu1)) / (2 * h);
    const d1 = (pi(m, mu0, mu1 + h) - pi(m, mu0, mu1 - h)) / (2 * h);
    return dm * dm * vm + d0 * d0 * v0 + d1 * d1 * v1;
  }

  const cases = [
    {
      label: "mean-probability",
      c: card({ meanPInState: 0.62, meanPNotInState: 0.18, sdPInState: 0.1, sdPNotInState: 0.08 }),
      mu0: 0.18,
      mu1: 0.62,
    },
    {
      label: "mean-probability, few validation windows",
      c: card({ meanPInState: 0.41, meanPNotInState: 0.22, aucPositives: 20, aucNegatives: 35 }),
      mu0: 0.22,
      mu1: 0.41,
    },
    { label: "threshold", c: card({ sensitivity: 0.62, specificity: 0.74 }), mu0: 0.26, mu1: 0.62 },
  ];

  it.each(cases)("$label: matches at several means and mean variances (rel 1e-6)", ({ c, mu0, mu1 }) => {
    const correction = correctionFor(c);
    for (const frac of [0.05, 0.3, 0.5, 0.9]) {
      const m = mu0 + frac * (mu1 - mu0);
      for (const vm of [0, 1e-4, 2.5e-3]) {
        const share = correctedShare(correction, m);
        expectClose(share, frac, { abs: 1e-12 });
        const expected = numericVariance(
          m,
          mu0,
          mu1,
          vm,
          correction.offsetVariance,
          correction.inStateVariance,
        );
        expectClose(
          correctedShareVariance(correction, vm, share),
          expected,
          { rel: 1e-6 },
          `m ${m}, Vm ${vm}`,
        );
      }
    }
  });

  it("at a share outside [0, 1] the validation terms are weighted at the nearer end (documented rule)", () => {
    const correction = correctionFor(card({ sensitivity: 0.62, specificity: 0.74 }));
    const vm = 1e-3;
    // π clamped to 1: Var = [Vm + v₁]/J²; to 0: [Vm + v₀]/J²
    const j2 = correction.scale ** 2;
    expectClose(correctedShareVariance(correction, vm, 1.4), (vm + correction.inStateVariance) / j2, {
      rel: 1e-14,
    });
    expectClose(correctedShareVariance(correction, vm, -0.3), (vm + correction.offsetVariance) / j2, {
      rel: 1e-14,
    });
  });
});

describe("relative mode when the card has no usable validation figures", () => {
  it.each([
    ["nothing", {}],
    ["only one mean", { meanPInState: 0.5 }],
    ["means in the wrong order", { meanPInState: 0.2, meanPNotInState: 0.3 }],
    ["only sensitivity", { sensitivity: 0.8 }],
    ["a detector no better than chance (Se + Sp = 1)", { sensitivity: 0.6, specificity: 0.4 }],
  ] as const)("%s → relative", (_, over) => {
    const c = correctionFor(card(over));
    expect(c).toMatchObject({ mode: "relative", offset: 0, scale: 1, offsetVariance: 0, inStateVariance: 0 });
    expect(c.usesThreshold).toBe(false);
    expect(c.noise).toBeNull();
    expect(windowNoiseVariance(c, 0.3)).toBeNull();
    // the "share" is then the raw mean probability, and its variance only the mean's own
    expect(correctedShare(c, 0.37)).toBe(0.37);
    expect(correctedShareVariance(c, 0.002, 0.37)).toBe(0.002);
  });

  it("means in the wrong order fall back to sensitivity and specificity when those are given", () => {
    const c = correctionFor(
      card({ meanPInState: 0.2, meanPNotInState: 0.3, sensitivity: 0.7, specificity: 0.8 }),
    );
    expect(c.mode).toBe("threshold");
  });
});
