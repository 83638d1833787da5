/**
 * Cohen's kappa for two binary codings: agreement beyond what the two codings' marginal rates
 * would give by chance, κ = (p_o − p_e) / (1 − p_e).
 *
 * Variant: unweighted, from a 2×2 table [[both yes, first yes only], [second yes only, both no]].
 * Fails (throws RangeError) on an empty table; returns 0 when chance agreement is already perfect
 * (p_e = 1), where the ratio is undefined.
 *
 * Example: [[20, 5], [10, 15]]: p_o = .70, p_e = .50, κ = .40.
 *
 * Source: Cohen, J. (1960). A coefficient of agreement for nominal scales. Educational and
 * Psychological Measurement 20(1), 37–46.
 */
export function cohenKappa(options: {
  table: readonly [readonly [number, number], readonly [number, number]];
}): number {
  const [[a, b], [c, d]] = options.table;
  const n = a + b + c + d;
  if (!(n > 0)) throw new RangeError("cohenKappa needs a table with at least one observation");
  const observed = (a + d) / n;
  const expected = ((a + b) * (a + c) + (c + d) * (b + d)) / (n * n);
  return expected === 1 ? 0 : (observed - expected) / (1 - expected);
}
