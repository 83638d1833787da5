/**
 * Axis domains and tick values for the charts, computed here (not by vega) so that one compiled
 * chart serves every data set: the domain and ticks reach the view as signals.
 */
export interface Domain {
  readonly lo: number;
  readonly hi: number;
  /** Tick values inside [lo, hi], ascending. */
  readonly ticks: readonly number[];
}

/** Rounds away floating-point noise such as 0.30000000000000004. */
function tidy(value: number): number {
  return Number(value.toPrecision(12));
}

function finite(values: readonly number[]): number[] {
  return values.filter((value) => Number.isFinite(value));
}

/** Ticks at mantissas × 10^k between lo and hi. */
function decadeTicks(lo: number, hi: number, mantissas: readonly number[]): number[] {
  const ticks: number[] = [];
  for (let exponent = Math.floor(Math.log10(lo)) - 1; exponent <= Math.ceil(Math.log10(hi)); exponent++) {
    for (const mantissa of mantissas) {
      const tick = tidy(mantissa * 10 ** exponent);
      if (tick >= lo && tick <= hi) ticks.push(tick);
    }
  }
  return ticks;
}

/** Powers of two (…, 0.25, 0.5, 1, 2, 4, …): halving and doubling read naturally for ratios. */
function doublingTicks(lo: number, hi: number): number[] {
  const ticks: number[] = [];
  for (let exponent = Math.ceil(Math.log2(lo)); 2 ** exponent <= hi; exponent++)
    ticks.push(tidy(2 ** exponent));
  return ticks;
}

const LOG_TICK_SETS: readonly ((lo: number, hi: number) => number[])[] = [
  (lo, hi) => decadeTicks(lo, hi, [1]),
  (lo, hi) => decadeTicks(lo, hi, [1, 2, 5]),
  doublingTicks,
  (lo, hi) => decadeTicks(lo, hi, [1, 1.5, 2, 3, 5, 7]),
  (lo, hi) => decadeTicks(lo, hi, [1, 1.2, 1.5, 2, 2.5, 3, 4, 5, 6, 8]),
];

/**
 * A log-scale domain covering the positive values with a margin (a factor of 1.15 each side, and
 * at least a factor of 2 overall), with the coarsest tick set that gives three ticks or more.
 * Non-positive values cannot be placed on a log scale and are left out (the chart clamps them to
 * the left edge). Without positive values the domain is 0.5 to 2.
 */
export function logDomain(values: readonly number[]): Domain {
  const positive = finite(values).filter((value) => value > 0);
  let lo = positive.length > 0 ? Math.min(...positive) / 1.15 : 0.5;
  let hi = positive.length > 0 ? Math.max(...positive) * 1.15 : 2;
  if (hi / lo < 2) {
    const centre = Math.sqrt(lo * hi);
    lo = centre / Math.SQRT2;
    hi = centre * Math.SQRT2;
  }
  let ticks: number[] = [];
  for (const tickSet of LOG_TICK_SETS) {
    ticks = tickSet(lo, hi);
    if (ticks.length >= 3 && ticks.length <= 8) break;
  }
  return { lo, hi, ticks };
}

/** A round step (1, 2 or 5 × 10^k) giving about five intervals across `span`. */
function niceStep(span: number): number {
  const raw = span / 5;
  const magnitude = 10 ** Math.floor(Math.log10(raw));
  const ratio = raw / magnitude;
  const factor = ratio < 1.5 ? 1 : ratio < 3.5 ? 2 : ratio < 7.5 ? 5 : 10;
  return magnitude * factor;
}

export interface LinearDomainOptions {
  /** Shares: the domain never leaves [0, 1]. */
  readonly unit?: boolean;
}

/**
 * A linear domain covering the values with a 5% margin, extended to round tick steps. With `unit`
 * the domain stays inside [0, 1]. Without values it is 0 to 1.
 */
export function linearDomain(values: readonly number[], options: LinearDomainOptions = {}): Domain {
  const present = finite(values);
  let lo = present.length > 0 ? Math.min(...present) : 0;
  let hi = present.length > 0 ? Math.max(...present) : 1;
  if (hi - lo < 1e-9) {
    const half = Math.max(Math.abs(hi) * 0.1, 0.01);
    lo -= half;
    hi += half;
  }
  const margin = (hi - lo) * 0.05;
  lo -= margin;
  hi += margin;
  if (options.unit) {
    lo = Math.max(lo, 0);
    hi = Math.min(hi, 1);
  }
  const step = niceStep(hi - lo);
  lo = tidy(Math.floor(tidy(lo / step)) * step);
  hi = tidy(Math.ceil(tidy(hi / step)) * step);
  const ticks: number[] = [];
  for (let k = Math.round(lo / step); k * step <= hi + step * 1e-9; k++) ticks.push(tidy(k * step));
  return { lo, hi, ticks };
}
