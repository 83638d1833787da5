import type { Card, ConstructCard, Settings } from "../config/types.js";
import { studentTQuantile } from "../stats/student-t-quantile.js";
import { clusterParts, pooledCorrelation } from "./cluster-mean.js";
import type { ConstructData } from "./collect.js";
import type { Correction } from "./correction.js";

/** What every estimator of one construct needs: card entry, correction, data and pooled figures. */
export interface ConstructContext {
  readonly card: Card;
  readonly construct: ConstructCard;
  readonly settings: Settings;
  readonly correction: Correction;
  readonly data: ConstructData;
  /** A' at or above the card's floor. */
  readonly usable: boolean;
  /** Concern is more of the state (most constructs) or less (engaged concentration). */
  readonly direction: "higher" | "lower";
  /** Within-session correlation of the signal, pooled over students (cluster-mean.ts). */
  readonly correlation: number;
  /** Design effect assumed for the card's validation sample (see constructContext). */
  readonly validationDesignEffect: number;
  /** Two-sided critical value at the settings' level for the given degrees of freedom. */
  critical(degreesOfFreedom: number): number;
}

export function constructContext(
  card: Card,
  construct: ConstructCard,
  settings: Settings,
  correction: Correction,
  data: ConstructData,
): ConstructContext {
  const parts = [...data.students.values()].map((s) => clusterParts(s.sessions.values()));
  const correlation = pooledCorrelation(parts);
  // The card's validation figures come from coded windows that were themselves grouped in sessions,
  // so their sampling variance is larger than sd²/n. The card does not say how they were grouped;
  // we assume like the local data: Kish's design effect 1 + (M̄ − 1)ρ with M̄ the windows-weighted
  // mean session length here and ρ the pooled within-session correlation. It widens every interval
  // by the correction's share of the uncertainty, never narrows it.
  let n = 0;
  let nm = 0;
  for (const p of parts) {
    n += p.n;
    nm += p.n * p.meanClusterSize;
  }
  const validationDesignEffect = 1 + Math.max(0, (n > 0 ? nm / n : 1) - 1) * correlation;
  const widened: Correction = {
    ...correction,
    offsetVariance: correction.offsetVariance * validationDesignEffect,
    inStateVariance: correction.inStateVariance * validationDesignEffect,
  };
  const cache = new Map<number, number>();
  const tail = (1 + settings.confidence) / 2;
  return {
    card,
    construct,
    settings,
    correction: widened,
    data,
    validationDesignEffect,
    usable: construct.auc >= card.aucFloor,
    direction: construct.higherIs === "good" ? "lower" : "higher",
    correlation,
    critical(df: number): number {
      const key = Math.round(df * 1000) / 1000;
      let c = cache.get(key);
      if (c === undefined) {
        c = studentTQuantile(tail, Math.max(1, key));
        cache.set(key, c);
      }
      return c;
    },
  };
}

/** Is a ratio interval wholly beyond the flag line in the concern direction? */
export function beyondLine(direction: "higher" | "lower", low: number, high: number, line: number): boolean {
  return direction === "higher" ? low >= line : high <= 1 / line;
}

/** Is the point beyond the line (the interval may not be)? */
export function pointBeyond(direction: "higher" | "lower", value: number, line: number): boolean {
  return direction === "higher" ? value >= line : value <= 1 / line;
}
