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
  const correlation = pooledCorrelation(
    [...data.students.values()].map((s) => clusterParts(s.sessions.values())),
  );
  const cache = new Map<number, number>();
  const tail = (1 + settings.confidence) / 2;
  return {
    card,
    construct,
    settings,
    correction,
    data,
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
