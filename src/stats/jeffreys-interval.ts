import { betaQuantile } from "./beta-quantile.js";
import { type BinomialIntervalOptions, readBinomialOptions } from "./binomial-input.js";
import type { Interval } from "./types.js";

/**
 * Jeffreys interval for a binomial proportion.
 *
 * Definition: the equal-tailed Bayesian credible interval under the Jeffreys prior Beta(½, ½):
 * the α/2 and 1 − α/2 quantiles of the posterior Beta(x + ½, n − x + ½). It has close to nominal
 * frequentist coverage and is recommended for small n by Brown, Cai & DasGupta (2001).
 *
 * Variant: with the end conventions of Brown, Cai & DasGupta (2001): the lower limit is 0
 * when x = 0 and the upper limit is 1 when x = n (the other limit is the posterior quantile as
 * usual). No further modification at x = 1 or x = n − 1.
 *
 * Fails when: trials is not a whole number ≥ 1, successes is not a whole number in [0, trials],
 * or level is not in (0, 1) (RangeError).
 *
 * Example: 0 of 20 at 95% gives 0 to B⁻¹(0.975; 0.5, 20.5) ≈ 0.1166390:
 * `jeffreysInterval({ successes: 0, trials: 20 })`.
 *
 * Source: L. D. Brown, T. T. Cai & A. DasGupta (2001), "Interval estimation for a binomial
 * proportion", Statistical Science 16:101–133; H. Jeffreys (1946), Proceedings of the
 * Royal Society A 186:453–461 (the prior).
 */
export function jeffreysInterval(options: BinomialIntervalOptions): Interval {
  const { successes: x, trials: n, level } = readBinomialOptions(options);
  const alpha = 1 - level;
  return {
    estimate: x / n,
    lower: x === 0 ? 0 : betaQuantile(alpha / 2, x + 0.5, n - x + 0.5),
    upper: x === n ? 1 : betaQuantile(alpha / 2, x + 0.5, n - x + 0.5, { upperTail: true }),
    level,
  };
}
