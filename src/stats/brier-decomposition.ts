import { assertFiniteArray } from "./validate.js";

/** Options of `brierDecomposition`. */
export interface BrierDecompositionOptions {
  /** Forecast probabilities fᵢ in [0, 1]. */
  readonly forecasts: readonly number[];
  /** Observed outcomes oᵢ, each 0 or 1, same order and length. */
  readonly outcomes: readonly number[];
}

/** One group of identical forecasts. */
export interface BrierBin {
  readonly forecast: number;
  readonly count: number;
  /** Share of outcomes equal to 1 among these forecasts. */
  readonly observedRate: number;
}

/** The Brier score and its Murphy decomposition. */
export interface BrierDecomposition {
  /** Mean squared difference between forecast and outcome. */
  readonly brier: number;
  /** Calibration error: (1/N) Σ nₖ(fₖ − ōₖ)² (lower is better). */
  readonly reliability: number;
  /** How far the groups' outcome rates spread from the base rate: (1/N) Σ nₖ(ōₖ − ō)² (higher is better). */
  readonly resolution: number;
  /** ō(1 − ō): the Brier score of always forecasting the base rate. */
  readonly uncertainty: number;
  readonly baseRate: number;
  /** The groups, by increasing forecast. */
  readonly bins: readonly BrierBin[];
}

/**
 * Brier score of probability forecasts with Murphy's decomposition into reliability, resolution
 * and uncertainty.
 *
 * Definition: Brier = (1/N) Σ(fᵢ − oᵢ)². Grouping the forecasts by their distinct values fₖ (nₖ
 * forecasts with outcome rate ōₖ, overall rate ō), it splits exactly as
 *   Brier = reliability − resolution + uncertainty,
 * separating miscalibration (reliability), the useful sorting of cases (resolution) and the
 * difficulty of the task (uncertainty).
 *
 * Variant: groups are the distinct forecast values, so the identity is exact. For continuous
 * forecasts every value is its own group and reliability absorbs noise; bin the forecasts first
 * (for example to 0.1) if a readable calibration table is wanted, and note that the identity then
 * holds for the binned forecasts.
 *
 * Fails when: the lists are empty or of different lengths, a forecast is outside [0, 1], or an
 * outcome is not 0 or 1 (RangeError/TypeError).
 *
 * Example: forecasts 0.2 ×5 with outcomes 0,0,0,1,0 and 0.7 ×5 with 1,1,0,1,0 give Brier 0.205 =
 * 0.005 − 0.04 + 0.24.
 *
 * Source: G. W. Brier (1950), "Verification of forecasts expressed in terms of probability",
 * Monthly Weather Review 78:1–3; A. H. Murphy (1973), "A new vector partition of the probability
 * score", Journal of Applied Meteorology 12:595–600.
 */
export function brierDecomposition(options: BrierDecompositionOptions): BrierDecomposition {
  const { forecasts, outcomes } = options;
  assertFiniteArray("forecasts", forecasts);
  assertFiniteArray("outcomes", outcomes);
  if (forecasts.length !== outcomes.length) {
    throw new RangeError(
      `forecasts and outcomes must have the same length, got ${forecasts.length} and ${outcomes.length}`,
    );
  }
  const n = forecasts.length;
  if (n === 0) throw new RangeError("need at least one forecast");
  const groups = new Map<number, { count: number; events: number }>();
  let squaredError = 0;
  let events = 0;
  for (let i = 0; i < n; i++) {
    const f = forecasts[i]!;
    const o = outcomes[i]!;
    if (f < 0 || f > 1) throw new RangeError(`forecasts[${i}] must be between 0 and 1, got ${f}`);
    if (o !== 0 && o !== 1) throw new RangeError(`outcomes[${i}] must be 0 or 1, got ${o}`);
    squaredError += (f - o) ** 2;
    events += o;
    const group = groups.get(f) ?? { count: 0, events: 0 };
    group.count++;
    group.events += o;
    groups.set(f, group);
  }
  const baseRate = events / n;
  let reliability = 0;
  let resolution = 0;
  const bins: BrierBin[] = [];
  for (const [forecast, group] of [...groups].sort((x, y) => x[0] - y[0])) {
    const rate = group.events / group.count;
    reliability += group.count * (forecast - rate) ** 2;
    resolution += group.count * (rate - baseRate) ** 2;
    bins.push({ forecast, count: group.count, observedRate: rate });
  }
  return {
    brier: squaredError / n,
    reliability: reliability / n,
    resolution: resolution / n,
    uncertainty: baseRate * (1 - baseRate),
    baseRate,
    bins,
  };
}
