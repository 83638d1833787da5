import { assertNonNegative, assertPositive } from "./validate.js";

/** Options of `effectiveSampleSize`. */
export interface EffectiveSampleSizeOptions {
  /** Actual number of observations n (≥ 0). */
  readonly n: number;
  /** Design effect (> 0), for example from `designEffect`. */
  readonly designEffect: number;
}

/**
 * Effective sample size: the number of independent observations that would give the same variance.
 *
 * Definition: n_eff = n / deff. A survey of 500 clustered observations with deff 5.8 carries the
 * information of about 86 independent ones.
 *
 * Variant: Kish's definition; not rounded.
 *
 * Fails when: n is negative or not finite, or deff is not positive (RangeError).
 *
 * Example: n = 500, deff = 5.8 gives 86.2069: `effectiveSampleSize({ n: 500, designEffect: 5.8 })`.
 *
 * Source: L. Kish (1965), Survey Sampling, Wiley.
 */
export function effectiveSampleSize(options: EffectiveSampleSizeOptions): number {
  const { n, designEffect } = options;
  assertNonNegative("n", n);
  assertPositive("designEffect", designEffect);
  return n / designEffect;
}
