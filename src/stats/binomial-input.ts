import { assertInteger, assertLevel } from "./validate.js";

/** Options shared by the binomial proportion intervals. */
export interface BinomialIntervalOptions {
  /** Number of successes x (a whole number, 0 ≤ x ≤ n). */
  readonly successes: number;
  /** Number of trials n (a whole number, at least 1). */
  readonly trials: number;
  /** Two-sided confidence level; default 0.95. */
  readonly level?: number;
}

/** Checks the options of a binomial interval and fills in the default level. */
export function readBinomialOptions(options: BinomialIntervalOptions): {
  successes: number;
  trials: number;
  level: number;
} {
  const { successes, trials } = options;
  const level = options.level ?? 0.95;
  assertInteger("trials", trials, 1);
  assertInteger("successes", successes, 0);
  if (successes > trials) {
    throw new RangeError(`successes must not exceed trials, got successes ${successes} and trials ${trials}`);
  }
  assertLevel("level", level);
  return { successes, trials, level };
}
