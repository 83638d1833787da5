import { assertFiniteArray, assertPositive } from "./validate.js";

/** Options of `jamesStein`. */
export interface JamesSteinOptions {
  /** The k raw estimates (for example batting averages), k ≥ 4. */
  readonly estimates: readonly number[];
  /** Their common sampling variance σ² (known, equal for all). */
  readonly variance: number;
  /** Use max(0, c) so the estimates are never pushed past the mean; default true. */
  readonly positivePart?: boolean;
}

/** James–Stein estimates with their shrinkage factor. */
export interface JamesSteinResult {
  /** The grand mean ȳ the estimates are shrunk toward. */
  readonly grandMean: number;
  /** The factor c: each estimate becomes ȳ + c(yᵢ − ȳ); c = 1 keeps the raw values. */
  readonly shrinkage: number;
  /** The shrunken estimates, in input order. */
  readonly estimates: readonly number[];
}

/**
 * James–Stein (Efron–Morris) shrinkage of k estimates with a common known variance toward their
 * grand mean.
 *
 * Definition: with raw estimates yᵢ, grand mean ȳ and S = Σ(yᵢ − ȳ)², each estimate becomes
 *   ȳ + c·(yᵢ − ȳ),  c = 1 − (k − 3)σ²/S.
 * When k ≥ 4 this has smaller total squared error than the raw estimates whatever the true means
 * are; extreme values, which are partly luck, move the most toward the middle.
 *
 * Variant: Efron & Morris's version with an estimated common mean (hence k − 3, not k − 2), with
 * the positive-part rule c = max(0, c) by default.
 *
 * Fails when: fewer than 4 estimates, a non-finite value, or σ² ≤ 0 (RangeError/TypeError). When
 * all estimates are equal (S = 0) they are returned unchanged with c = 0. The variances must
 * really be equal; use `empiricalBayesNormal` otherwise.
 *
 * Example: the batting averages after 45 at-bats of Efron & Morris's 18 players, with
 * σ² = ȳ(1 − ȳ)/45, give ȳ = 0.2654321 and c = 0.2116534; the first player's 0.400 becomes
 * 0.2939: `jamesStein({ estimates: hits.map((h) => h / 45), variance: 0.2654321 * 0.7345679 / 45 })`.
 *
 * Source: W. James & C. Stein (1961), "Estimation with quadratic loss", Proc. 4th Berkeley
 * Symposium 1:361–379; B. Efron & C. Morris (1975), "Data analysis using Stein's estimator and its
 * generalizations", JASA 70:311–319.
 */
export function jamesStein(options: JamesSteinOptions): JamesSteinResult {
  const { estimates, variance } = options;
  const positivePart = options.positivePart ?? true;
  assertFiniteArray("estimates", estimates);
  assertPositive("variance", variance);
  const k = estimates.length;
  if (k < 4) throw new RangeError(`James–Stein shrinkage needs at least 4 estimates, got ${k}`);
  const grandMean = estimates.reduce((s, y) => s + y, 0) / k;
  const spread = estimates.reduce((s, y) => s + (y - grandMean) ** 2, 0);
  const raw = spread > 0 ? 1 - ((k - 3) * variance) / spread : 0;
  const shrinkage = positivePart ? Math.max(0, raw) : raw;
  return {
    grandMean,
    shrinkage,
    estimates: estimates.map((y) => grandMean + shrinkage * (y - grandMean)),
  };
}
