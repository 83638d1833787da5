import { betaQuantile } from "./beta-quantile.js";
import { type BinomialIntervalOptions, readBinomialOptions } from "./binomial-input.js";
import type { Interval } from "./types.js";

/**
 * Clopper–Pearson ("exact") interval for a binomial proportion.
 *
 * Definition: the proportions π for which neither one-sided binomial test of x successes in n
 * trials rejects at α/2. Its limits are beta quantiles:
 *   lower = B⁻¹(α/2; x, n − x + 1),  upper = B⁻¹(1 − α/2; x + 1, n − x),
 * with lower = 0 when x = 0 and upper = 1 when x = n.
 *
 * Variant: the equal-tailed interval inverting two one-sided exact tests (not Blaker's or Sterne's
 * shorter exact intervals). Coverage is at least the nominal level for every p, so it is
 * conservative (wider than Wilson or Jeffreys on average).
 *
 * Fails when: trials is not a whole number ≥ 1, successes is not a whole number in [0, trials],
 * or level is not in (0, 1) (RangeError).
 *
 * Example: 0 of 20 at 95% gives 0 to 1 − 0.025^(1/20) ≈ 0.1684335:
 * `clopperPearsonInterval({ successes: 0, trials: 20 })`.
 *
 * Source: C. J. Clopper & E. S. Pearson (1934), "The use of confidence or fiducial limits
 * illustrated in the case of the binomial", Biometrika 26:404–413; beta form in Brown, Cai &
 * DasGupta (2001), Statistical Science 16:101–133.
 */
export function clopperPearsonInterval(options: BinomialIntervalOptions): Interval {
  const { successes: x, trials: n, level } = readBinomialOptions(options);
  const alpha = 1 - level;
  return {
    estimate: x / n,
    lower: x === 0 ? 0 : betaQuantile(alpha / 2, x, n - x + 1),
    upper: x === n ? 1 : betaQuantile(alpha / 2, x + 1, n - x, { upperTail: true }),
    level,
  };
}
