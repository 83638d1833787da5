/**
 * Empirical AUC (A'): the chance that a randomly chosen in-state window scores higher than a
 * randomly chosen not-in-state one, ties counting one half.
 *
 * Variant: Mann–Whitney U over mid-ranks, AUC = (R₊ − n₊(n₊+1)/2) / (n₊·n₋), where R₊ is the sum of
 * the positives' mid-ranks in the pooled sample. Fails (throws RangeError) when either group is
 * empty.
 *
 * Example: positives {.8, .7, .4}, negatives {.5, .3, .2}: 8 of 9 pairs ordered correctly, AUC 8/9.
 *
 * Source: Hanley, J. A. & McNeil, B. J. (1982). The meaning and use of the area under a receiver
 * operating characteristic (ROC) curve. Radiology 143, 29–36.
 */
export function rankAuc(options: { positives: readonly number[]; negatives: readonly number[] }): number {
  const { positives, negatives } = options;
  if (positives.length === 0 || negatives.length === 0) {
    throw new RangeError("rankAuc needs at least one positive and one negative value");
  }
  const pooled = [
    ...positives.map((value) => ({ value, positive: true })),
    ...negatives.map((value) => ({ value, positive: false })),
  ].sort((a, b) => a.value - b.value);
  let rankSumPositives = 0;
  let start = 0;
  while (start < pooled.length) {
    let end = start;
    while (end + 1 < pooled.length && pooled[end + 1]!.value === pooled[start]!.value) end++;
    const midRank = (start + end) / 2 + 1;
    for (let i = start; i <= end; i++) if (pooled[i]!.positive) rankSumPositives += midRank;
    start = end + 1;
  }
  const n1 = positives.length;
  return (rankSumPositives - (n1 * (n1 + 1)) / 2) / (n1 * negatives.length);
}
