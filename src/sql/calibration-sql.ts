/**
 * The card's calibration as a SQL expression of the raw probability, the same function as
 * `calibrator` in src/config/card.ts: Platt scaling on the logit, sigmoid(a·logit(p) + b), with p
 * held within [1e-12, 1 − 1e-12] so that the logit stays finite (Platt 1999); or a step function
 * over bins, the rate of the first bin whose upper bound is at least p (histogram binning, Zadrozny
 * & Elkan 2001).
 */
import type { Calibration } from "../config/types.js";
import type { SqlDialect } from "./dialects.js";

/**
 * A double literal that every engine reads back as the same IEEE double as the JavaScript number:
 * the shortest round-trip decimal, cast from text (a bare 0.15 is a DECIMAL in PostgreSQL and Spark).
 */
export function doubleLiteral(value: number, dialect: SqlDialect): string {
  if (!Number.isFinite(value)) throw new Error(`not a finite number: ${value}`);
  return `CAST('${String(value)}' AS ${dialect.double})`;
}

const CLAMP_LOW = 1e-12;
const CLAMP_HIGH = 1 - 1e-12;

/** The calibrated probability of `p` (a SQL expression of type double); `p` itself when none. */
export function calibratedSql(calibration: Calibration, p: string, dialect: SqlDialect): string {
  const lit = (x: number) => doubleLiteral(x, dialect);
  if (calibration.kind === "none") return p;
  if (calibration.kind === "platt") {
    const q = `LEAST(GREATEST(${p}, ${lit(CLAMP_LOW)}), ${lit(CLAMP_HIGH)})`;
    const logit = `LN(${q} / (${lit(1)} - ${q}))`;
    return `${lit(1)} / (${lit(1)} + EXP(-(${lit(calibration.a)} * ${logit} + ${lit(calibration.b)})))`;
  }
  const bins = calibration.bins;
  const whens = bins.map(([upper, rate]) => `WHEN ${p} <= ${lit(upper)} THEN ${lit(rate)}`);
  return `CASE ${whens.join(" ")} ELSE ${lit(bins[bins.length - 1]![1])} END`;
}
