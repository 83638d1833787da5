import { assertLevel, assertProbability } from "./validate.js";

/** Options of the multiple-comparison adjustments. */
export interface MultipleTestingOptions {
  /** The p-values of the family of tests, each in [0, 1], in any order. */
  readonly pValues: readonly number[];
  /** Level at which to count rejections (FDR for Benjamini–Hochberg, FWER for Bonferroni); default 0.05. */
  readonly level?: number;
}

/** Adjusted p-values (same order as the input) and the rejections at the level. */
export interface MultipleTestingResult {
  /** Adjusted p-values (q-values for Benjamini–Hochberg), in the order of the input. */
  readonly adjusted: readonly number[];
  /** Whether each hypothesis is rejected at the level (adjusted ≤ level). */
  readonly rejected: readonly boolean[];
  /** Number rejected. */
  readonly rejectedCount: number;
  readonly level: number;
}

/** Checks the options and fills in the default level. */
export function readMultipleTestingOptions(options: MultipleTestingOptions): {
  pValues: readonly number[];
  level: number;
} {
  const { pValues } = options;
  const level = options.level ?? 0.05;
  if (!Array.isArray(pValues)) throw new TypeError("pValues must be an array of numbers");
  for (const [i, p] of pValues.entries()) assertProbability(`pValues[${i}]`, p);
  assertLevel("level", level);
  return { pValues, level };
}

/** Marks and counts the adjusted values at or below the level. */
export function withRejections(adjusted: readonly number[], level: number): MultipleTestingResult {
  const rejected = adjusted.map((q) => q <= level);
  return { adjusted, rejected, rejectedCount: rejected.filter(Boolean).length, level };
}
