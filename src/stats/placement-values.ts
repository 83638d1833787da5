/**
 * Placement values for the Mann–Whitney AUC and DeLong's variance.
 *
 * For each positive score X_i, V10_i = (#{negatives < X_i} + ½·#{negatives = X_i}) / n; for each
 * negative score Y_j, V01_j = (#{positives > Y_j} + ½·#{positives = Y_j}) / m. Their means both
 * equal the AUC. Computed by sorting both samples and merging (O((m + n) log(m + n))), never by
 * comparing all m·n pairs. Inputs are copied, not sorted in place.
 *
 * Source: E. R. DeLong, D. M. DeLong & D. L. Clarke-Pearson (1988), Biometrics 44:837–845
 * (structural components V10, V01).
 */
export function placementValues(
  positives: readonly number[],
  negatives: readonly number[],
): { readonly positive: Float64Array; readonly negative: Float64Array } {
  const sortedNegatives = Float64Array.from(negatives).sort();
  const sortedPositives = Float64Array.from(positives).sort();
  const positive = new Float64Array(positives.length);
  for (let i = 0; i < positives.length; i++) {
    const x = positives[i]!;
    const below = lowerBound(sortedNegatives, x);
    const ties = upperBound(sortedNegatives, x) - below;
    positive[i] = (below + ties / 2) / negatives.length;
  }
  const negative = new Float64Array(negatives.length);
  for (let j = 0; j < negatives.length; j++) {
    const y = negatives[j]!;
    const atOrBelow = upperBound(sortedPositives, y);
    const ties = atOrBelow - lowerBound(sortedPositives, y);
    negative[j] = (positives.length - atOrBelow + ties / 2) / positives.length;
  }
  return { positive, negative };
}

/** Index of the first element ≥ value in a sorted array. */
function lowerBound(sorted: Float64Array, value: number): number {
  let lo = 0;
  let hi = sorted.length;
  while (lo < hi) {
    const mid = (lo + hi) >>> 1;
    if (sorted[mid]! < value) lo = mid + 1;
    else hi = mid;
  }
  return lo;
}

/** Index of the first element > value in a sorted array. */
function upperBound(sorted: Float64Array, value: number): number {
  let lo = 0;
  let hi = sorted.length;
  while (lo < hi) {
    const mid = (lo + hi) >>> 1;
    if (sorted[mid]! <= value) lo = mid + 1;
    else hi = mid;
  }
  return lo;
}
