import { fiellerInterval } from "../stats/fieller-interval.js";
import type { Cell } from "./collect.js";
import type { Correction } from "./correction.js";
import type { Estimate } from "./types.js";

/**
 * Ratio to peers on the same content, by indirect standardisation on the corrected scale.
 *
 * Each of the subject's windows in unit u expects the mean signal m₋,u that everyone else showed in
 * that unit (the subject left out). On the corrected scale the share is (m − μ₀)/(μ₁ − μ₀), so
 *   ratio = Σ_u (s_u − μ₀n_u) / Σ_u n_u(m₋,u − μ₀) = A / B:
 * μ₁ − μ₀ cancels (its uncertainty does not matter here) while μ₀ does not, and a ratio of raw mean
 * probabilities (μ₀ = 0) would be squashed toward 1 by the detector's error. In relative mode
 * (no validation figures) μ₀ = 0 and the ratio is the raw one, which understates differences.
 * Interval: Fieller's (fieller-interval.ts) with Var A = N²(V_own + v₀), Var B = Σn_u²·V_u + N²v₀
 * and Cov = N²v₀, where V_own is the subject's clustered variance of its mean (cluster-mean.ts),
 * V_u that of the peers' mean in unit u (students as clusters), v₀ = Var(μ̂₀). Units where the subject
 * has no peers are left out of both sums. The lower limit is kept at 0 or more: a share cannot be
 * negative. When the peers' expected share is not clearly above zero (often: a rare state, and a
 * validation sample that leaves μ₀ uncertain) but the subject's own excess is, Fieller's set is
 * two rays (−∞, r₁] ∪ [r₂, ∞); a ratio of two shares is never negative, so with r₁ < 0 < r₂ the
 * range is [r₂, ∞): "r₂ or more", with no upper end (high = +∞), which can still clear a line in
 * the "more" direction and never in the "less" one. Such open ranges are given only when the
 * caller asks (`openEnded`): they arise mostly when the card's μ̂₀ happens to be high, an error
 * that every subject of the run shares, so their coverage given that they arose is below the
 * nominal level (measured on the independent simulated district: 0.70 to 0.88 for students,
 * whose own figures are noisy, against 0.94 to 0.97 for bounded ranges). Groups use them; students
 * do not. No ratio (null) when the set says nothing more than "0 or more", when the subject's own
 * excess over μ₀ is not positive, or when the peers' expected share is not above zero at all.
 */
export interface PeerRatioInput {
  readonly own: ReadonlyMap<string, Cell>;
  readonly ownMeanVariance: number;
  readonly totals: ReadonlyMap<string, Cell>;
  /** Variance of the peers' mean signal per unit (students as clusters). */
  readonly unitVariance: ReadonlyMap<string, number>;
  readonly correction: Correction;
  readonly critical: number;
  /** Give "r₂ or more" when the peers' level is too uncertain to divide by (see above). */
  readonly openEnded?: boolean;
}

export interface PeerRatio {
  readonly ratio: Estimate | null;
  /** The peers' mean signal expected on the subject's windows (Σn_u·m₋,u / N). */
  readonly expectedMean: number | null;
  readonly windows: number;
}

export function peerRatio(input: PeerRatioInput): PeerRatio {
  const { own, totals, correction } = input;
  const mu0 = correction.offset;
  let n = 0;
  let observed = 0;
  let expected = 0;
  let varExpected = 0;
  for (const [unitId, c] of own) {
    const total = totals.get(unitId);
    if (!total || c.n <= 0) continue;
    const peerN = total.n - c.n;
    if (peerN <= 0) continue;
    const peerMean = (total.s - c.s) / peerN;
    n += c.n;
    observed += c.s;
    expected += c.n * peerMean;
    varExpected += c.n * c.n * (input.unitVariance.get(unitId) ?? 0);
  }
  if (n === 0) return { ratio: null, expectedMean: null, windows: 0 };
  const a = observed - mu0 * n;
  const b = expected - mu0 * n;
  const v0 = correction.offsetVariance * n * n;
  const f = fiellerInterval({
    numerator: a,
    denominator: b,
    numeratorVariance: n * n * input.ownMeanVariance + v0,
    denominatorVariance: varExpected + v0,
    covariance: v0,
    critical: input.critical,
  });
  const none = { ratio: null, expectedMean: expected / n, windows: n };
  if (!(b > 0)) return none;
  if (f.kind === "exclusive") {
    // [r₂, ∞) is the whole range within [0, ∞) only when the other ray lies below 0; a/b then lies
    // in it unless the subject's own excess a is negative.
    if (!input.openEnded || !(f.lower < 0 && f.upper > 0 && f.ratio >= f.upper)) return none;
    return { ...none, ratio: { value: f.ratio, low: f.upper, high: Number.POSITIVE_INFINITY } };
  }
  if (f.kind !== "bounded") return none;
  return {
    ...none,
    ratio: { value: Math.max(0, f.ratio), low: Math.max(0, f.lower), high: Math.max(0, f.upper) },
  };
}

/**
 * Variance of each unit's mean signal with subjects (students) as clusters: the ratio-estimator
 * linearisation k/(k − 1)·Σ(s_i − m·n_i)²/N² (Cochran 1977, §6.3).
 */
export function unitMeanVariances(
  subjects: Iterable<ReadonlyMap<string, Cell>>,
  totals: ReadonlyMap<string, Cell>,
): Map<string, number> {
  const sums = new Map<string, { k: number; r2: number }>();
  for (const units of subjects) {
    for (const [unitId, c] of units) {
      const total = totals.get(unitId);
      if (!total || total.n === 0) continue;
      const r = c.s - (total.s / total.n) * c.n;
      const e = sums.get(unitId) ?? { k: 0, r2: 0 };
      e.k++;
      e.r2 += r * r;
      sums.set(unitId, e);
    }
  }
  const out = new Map<string, number>();
  for (const [unitId, e] of sums) {
    const total = totals.get(unitId) as Cell;
    out.set(unitId, e.k > 1 ? ((e.k / (e.k - 1)) * e.r2) / (total.n * total.n) : 0);
  }
  return out;
}
