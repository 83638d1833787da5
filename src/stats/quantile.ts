import { assertFiniteArray, assertProbability } from "./validate.js";

/**
 * Sample quantile by linear interpolation between order statistics (Hyndman–Fan type 7).
 *
 * Definition: with the n values sorted, x₍₁₎ ≤ … ≤ x₍ₙ₎, and h = (n − 1)p, the p-quantile is
 * x₍⌊h⌋+1₎ + (h − ⌊h⌋)(x₍⌊h⌋+2₎ − x₍⌊h⌋+1₎). p = 0 gives the minimum, p = 1 the maximum.
 *
 * Variant: type 7 of Hyndman & Fan (1996), the default of R's `quantile` and of spreadsheet
 * PERCENTILE. The input is copied before sorting, never reordered.
 *
 * Fails when: the list is empty, a value is not finite, or p is outside [0, 1]
 * (RangeError/TypeError).
 *
 * Example: `quantile([1, 2, 3, 4], 0.5)` = 2.5; `quantile([1, 2, 3, 4], 0.25)` = 1.75.
 *
 * Source: R. J. Hyndman & Y. Fan (1996), "Sample quantiles in statistical packages", The American
 * Statistician 50:361–365.
 */
export function quantile(values: readonly number[], p: number): number {
  assertFiniteArray("values", values);
  assertProbability("p", p);
  if (values.length === 0) throw new RangeError("values must not be empty");
  return quantileOfSorted(Float64Array.from(values).sort(), p);
}

/** Type 7 quantile of values already sorted ascending (no checks). */
export function quantileOfSorted(sorted: ArrayLike<number>, p: number): number {
  const h = (sorted.length - 1) * p;
  const below = Math.floor(h);
  const low = sorted[below]!;
  if (below + 1 >= sorted.length) return low;
  return low + (h - below) * (sorted[below + 1]! - low);
}
