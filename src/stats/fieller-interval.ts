import { assertFinite, assertNonNegative, assertPositive } from "./validate.js";

/** Options of `fiellerInterval`. */
export interface FiellerOptions {
  /** Estimated numerator a. */
  readonly numerator: number;
  /** Estimated denominator b. */
  readonly denominator: number;
  /** Var(a) ≥ 0. */
  readonly numeratorVariance: number;
  /** Var(b) ≥ 0. */
  readonly denominatorVariance: number;
  /** Cov(a, b); default 0. */
  readonly covariance?: number;
  /** Critical value c of the pivot (1.96 for a 95% normal interval, or a t quantile); > 0. */
  readonly critical: number;
}

/** A Fieller confidence set for a ratio. */
export interface FiellerInterval {
  /** Point estimate a / b (NaN when b = 0). */
  readonly ratio: number;
  /**
   * The three shapes of the set (Franz 2007, §3):
   * - "bounded": the closed interval [lower, upper] (the denominator is clearly away from zero,
   *   b² > c²·Var(b));
   * - "exclusive": the denominator is not clearly away from zero but the numerator is: the set is
   *   the complement of an open interval, (−∞, lower] ∪ [upper, ∞), with lower < upper the two roots;
   * - "unbounded": the whole line (neither is clearly away from zero); lower and upper are then −∞
   *   and +∞.
   */
  readonly kind: "bounded" | "exclusive" | "unbounded";
  readonly lower: number;
  readonly upper: number;
  /** g = c²·Var(b)/b², Fieller's measure of how uncertain the denominator is (g ≥ 1 ⇔ unbounded). */
  readonly g: number;
}

/**
 * Fieller's confidence set for the ratio ρ = α/β of two jointly normal estimates.
 *
 * Definition: ρ belongs to the set when the pivot (a − ρb)/√(Var a − 2ρ·Cov + ρ²·Var b) lies
 * within ±c. Squaring gives the quadratic
 *   ρ²(b² − c²V_b) − 2ρ(ab − c²C) + (a² − c²V_a) ≤ 0,
 * whose roots are the limits when b² > c²V_b (the denominator is clearly away from zero). When
 * b² < c²V_b the leading coefficient is negative: if the discriminant is positive the set is the
 * two rays outside the roots ("exclusive"), and otherwise the whole line ("unbounded"). A caller
 * that knows the ratio's sign (two shares, say) can intersect the rays with [0, ∞).
 * Unlike the delta method on log(a/b), it needs no positive numerator, is exact for normal
 * estimates, and widens honestly as the denominator nears zero.
 * Variant: two-sided, equal tails; the caller picks c (normal or t quantile).
 * Fails when: a variance is negative or c ≤ 0 (RangeError). When the denominator is not clearly
 * away from zero the set is unbounded; never report its point a/b as if it had a finite range.
 * Example: a = 10, b = 5, Var a = 4, Var b = 1, Cov = 0, c = 1.96 gives the ratio 2 and the
 * limits (1.1044, 3.6218) (the roots of 21.1584ρ² − 100ρ + 84.6336 = 0).
 * Source: E. C. Fieller (1954), "Some problems in interval estimation", Journal of the Royal
 * Statistical Society B 16:175–185; V. H. Franz (2007), "Ratios: a short guide to confidence
 * limits and proper use", arXiv:0710.2024 (the quadratic form and the unbounded cases).
 */
export function fiellerInterval(options: FiellerOptions): FiellerInterval {
  const a = options.numerator;
  const b = options.denominator;
  const va = options.numeratorVariance;
  const vb = options.denominatorVariance;
  const cov = options.covariance ?? 0;
  const c = options.critical;
  assertFinite("numerator", a);
  assertFinite("denominator", b);
  assertNonNegative("numeratorVariance", va);
  assertNonNegative("denominatorVariance", vb);
  assertFinite("covariance", cov);
  assertPositive("critical", c);
  const c2 = c * c;
  const ratio = b === 0 ? Number.NaN : a / b;
  const g = b === 0 ? Number.POSITIVE_INFINITY : (c2 * vb) / (b * b);
  const quadratic = b * b - c2 * vb;
  const linear = a * b - c2 * cov;
  const constant = a * a - c2 * va;
  const discriminant = linear * linear - quadratic * constant;
  if (!(quadratic > 0)) {
    // Exclusive when the roots are real and distinct; at quadratic = 0 exactly the roots run to ±∞.
    if (quadratic < 0 && discriminant > 0) {
      const root = Math.sqrt(discriminant);
      // With a negative leading coefficient, (linear + root)/quadratic is the smaller root.
      return {
        ratio,
        kind: "exclusive",
        lower: (linear + root) / quadratic,
        upper: (linear - root) / quadratic,
        g,
      };
    }
    return { ratio, kind: "unbounded", lower: Number.NEGATIVE_INFINITY, upper: Number.POSITIVE_INFINITY, g };
  }
  const root = Math.sqrt(Math.max(0, discriminant));
  return {
    ratio,
    kind: "bounded",
    lower: (linear - root) / quadratic,
    upper: (linear + root) / quadratic,
    g,
  };
}
