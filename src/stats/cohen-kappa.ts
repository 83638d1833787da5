import { twoSidedZ } from "./two-sided-z.js";
import { assertLevel, assertNonNegative } from "./validate.js";

/** Options of `cohenKappa`. */
export interface CohenKappaOptions {
  /**
   * Square agreement table of counts: `table[i][j]` = items rater A put in category i and rater B
   * in category j. At least 2 × 2.
   */
  readonly table: readonly (readonly number[])[];
  /** Two-sided confidence level; default 0.95. */
  readonly level?: number;
}

/** Cohen's kappa with its standard errors and a Wald interval. */
export interface CohenKappa {
  readonly kappa: number;
  /** Observed agreement p_o (share on the diagonal). */
  readonly observedAgreement: number;
  /** Agreement expected by chance p_e = Σ pᵢ. p.ᵢ. */
  readonly expectedAgreement: number;
  /** Fleiss–Cohen–Everitt (1969) asymptotic standard error (for intervals). */
  readonly standardError: number;
  /** Standard error under κ = 0 (for testing agreement beyond chance). */
  readonly nullStandardError: number;
  /** κ / nullStandardError: the z statistic of the test of κ = 0. */
  readonly zStatistic: number;
  /** κ − z·SE and κ + z·SE (not clipped: κ can be negative). */
  readonly lower: number;
  readonly upper: number;
  readonly level: number;
  /** Total count n. */
  readonly n: number;
}

/**
 * Cohen's kappa: agreement between two raters beyond what chance would give.
 *
 * Definition: κ = (p_o − p_e)/(1 − p_e), where p_o is the share of items on which the raters agree
 * and p_e = Σᵢ pᵢ. p.ᵢ the agreement expected if they rated independently with their own marginal
 * rates. κ = 1 is perfect agreement, 0 is chance level, negative is worse than chance.
 *
 * Variant: unweighted kappa. Large-sample standard error of Fleiss, Cohen & Everitt (1969):
 *   Var(κ̂) = [Σᵢ pᵢᵢ((1 − p_e) − (pᵢ. + p.ᵢ)(1 − p_o))² + (1 − p_o)² Σ_{i≠j} pᵢⱼ(p.ᵢ + pⱼ.)²
 *            − (p_o p_e − 2p_e + p_o)²] / (n(1 − p_e)⁴),
 * and under κ = 0:
 *   Var₀(κ̂) = [p_e + p_e² − Σᵢ pᵢ. p.ᵢ(pᵢ. + p.ᵢ)] / (n(1 − p_e)²).
 * The interval is the Wald interval κ ± z·SE with z = Φ⁻¹((1 + level)/2).
 *
 * Fails when: the table is not square (at least 2 × 2), a count is negative or not finite, the
 * total is 0, or p_e = 1 (both raters used a single, identical category, so κ is undefined)
 * (RangeError/TypeError). Kappa depends on prevalence: with rare categories it is low even when
 * raw agreement is high.
 *
 * Example: [[20, 5], [10, 15]] gives p_o 0.70, p_e 0.50, κ 0.40, SE 0.1269961, SE under κ = 0
 * 0.1385641: `cohenKappa({ table: [[20, 5], [10, 15]] })`.
 *
 * Source: J. Cohen (1960), "A coefficient of agreement for nominal scales", Educational and
 * Psychological Measurement 20:37–46; J. L. Fleiss, J. Cohen & B. S. Everitt (1969), "Large sample
 * standard errors of kappa and weighted kappa", Psychological Bulletin 72:323–327.
 */
export function cohenKappa(options: CohenKappaOptions): CohenKappa {
  const level = options.level ?? 0.95;
  assertLevel("level", level);
  const counts = readSquareTable(options.table);
  const k = counts.length;
  let n = 0;
  for (const row of counts) for (const c of row) n += c;
  if (n <= 0) throw new RangeError("table must contain at least one item (its counts sum to 0)");
  const p = counts.map((row) => row.map((c) => c / n));
  const rowTotals = p.map((row) => row.reduce((s, v) => s + v, 0));
  const colTotals = Array.from({ length: k }, (_, j) => p.reduce((s, row) => s + row[j]!, 0));
  let po = 0;
  let pe = 0;
  for (let i = 0; i < k; i++) {
    po += p[i]![i]!;
    pe += rowTotals[i]! * colTotals[i]!;
  }
  if (pe >= 1) {
    throw new RangeError(
      "kappa is undefined when chance agreement is 1 (both raters used one and the same category)",
    );
  }
  const kappa = (po - pe) / (1 - pe);
  let diagonal = 0;
  let offDiagonal = 0;
  let nullSum = 0;
  for (let i = 0; i < k; i++) {
    const ri = rowTotals[i]!;
    const ci = colTotals[i]!;
    diagonal += p[i]![i]! * (1 - pe - (ri + ci) * (1 - po)) ** 2;
    nullSum += ri * ci * (ri + ci);
    for (let j = 0; j < k; j++) {
      if (j !== i) offDiagonal += p[i]![j]! * (ci + rowTotals[j]!) ** 2;
    }
  }
  const variance =
    (diagonal + (1 - po) ** 2 * offDiagonal - (po * pe - 2 * pe + po) ** 2) / (n * (1 - pe) ** 4);
  const nullVariance = (pe + pe * pe - nullSum) / (n * (1 - pe) ** 2);
  const standardError = Math.sqrt(Math.max(0, variance));
  const nullStandardError = Math.sqrt(Math.max(0, nullVariance));
  const multiplier = twoSidedZ(level);
  return {
    kappa,
    observedAgreement: po,
    expectedAgreement: pe,
    standardError,
    nullStandardError,
    zStatistic: nullStandardError > 0 ? kappa / nullStandardError : 0,
    lower: kappa - multiplier * standardError,
    upper: kappa + multiplier * standardError,
    level,
    n,
  };
}

function readSquareTable(table: unknown): number[][] {
  if (!Array.isArray(table)) throw new TypeError("table must be an array of rows of counts");
  const k = table.length;
  if (k < 2) throw new RangeError(`table must be at least 2 × 2, got ${k} row(s)`);
  return table.map((row: unknown, i) => {
    if (!Array.isArray(row) || row.length !== k) {
      throw new RangeError(`table must be square: row ${i} should have ${k} counts`);
    }
    return row.map((c: unknown, j) => {
      assertNonNegative(`table[${i}][${j}]`, c);
      return c;
    });
  });
}
