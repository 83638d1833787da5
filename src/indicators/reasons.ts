/**
 * The reason sentences: every row's status in plain words, stating its evidence. One module, so
 * that the wording is consistent and can be read and reviewed in one place (STYLE.md, habit 11).
 */
import type { Estimate } from "./types.js";

export function plural(n: number, one: string, many = `${one}s`): string {
  return `${n.toLocaleString("en-US")} ${n === 1 ? one : many}`;
}

/** A ratio as read aloud: one decimal from 1 up, two below. */
export function ratioText(x: number): string {
  if (!Number.isFinite(x)) return "not bounded";
  return x >= 1 ? x.toFixed(1) : x.toFixed(2);
}

/**
 * A ratio's plausible range read aloud: "1.6 to 2.7", or "1.8 or more" when it has no upper end
 * (peer-ratio.ts: the peers' own level is too uncertain to divide by).
 */
export function ratioRangeText(r: Estimate): string {
  return r.high === Number.POSITIVE_INFINITY
    ? `${ratioText(r.low)} or more`
    : `${ratioText(r.low)} to ${ratioText(r.high)}`;
}

/** A share as a whole percentage, "under 1%" and "over 99%" at the ends. */
export function percentText(x: number): string {
  const p = x * 100;
  if (p > 0 && p < 0.5) return "under 1%";
  if (p < 100 && p > 99.5) return "over 99%";
  return `${Math.round(p)}%`;
}

/** A run length read aloud: seconds under two minutes, else whole minutes. */
export function duration(seconds: number): string {
  return seconds < 120 ? plural(Math.round(seconds), "second") : plural(Math.round(seconds / 60), "minute");
}

export function lower(label: string): string {
  return label.length > 0 ? label[0]!.toLowerCase() + label.slice(1) : label;
}

export const reasons = {
  detectorTooWeak: (label: string, auc: number, floor: number): string =>
    `The ${lower(label)} detector's A' is ${auc.toFixed(2)}, below the floor of ${floor.toFixed(2)}. That is too close to chance (0.50) to judge by, so no figure is shown.`,

  studentTooLittle: (o: {
    sessions: number;
    days: number;
    minutes: number;
    minSessions: number;
    minDays: number;
    minMinutes: number;
  }): string =>
    `Only ${plural(o.sessions, "session")} on ${plural(o.days, "day")} (${plural(Math.round(o.minutes), "minute")} observed); a figure needs at least ${plural(o.minSessions, "session")} on ${plural(o.minDays, "day")} and ${o.minMinutes} minutes.`,

  evidence: (sessions: number, days: number): string =>
    `Across ${plural(sessions, "session")} on ${plural(days, "day")}`,

  ratio: (label: string, r: Estimate, peers: string): string =>
    `the estimates show ${lower(label)} about ${ratioText(r.value)} times as often as in ${peers} on the same units. The plausible range is ${ratioRangeText(r)}${r.high === Number.POSITIVE_INFINITY ? `, with no upper end, because the level in ${peers} is itself uncertain` : ""}`,

  noRatio: (label: string, peers: string): string =>
    `${peers} on the same units showed too little ${lower(label)} for a comparison`,

  share: (s: Estimate): string =>
    `about ${percentText(s.value)} of observed time (range ${percentText(s.low)} to ${percentText(s.high)})`,

  flagged: (direction: "higher" | "lower", line: number): string =>
    `The whole range is ${direction === "higher" ? "above" : "below"} ${ratioText(direction === "higher" ? line : 1 / line)}, the line for a check-in.`,

  nearLine: (direction: "higher" | "lower"): string =>
    `May be ${direction}; not enough yet to suggest a check-in.`,

  usual: "This is in the usual range.",

  sustained: (perHour: number, peerPerHour: number, seconds: number): string =>
    `Long runs of ${duration(seconds)} or more: ${perHour.toFixed(1)} an hour; others on the same units: ${peerPerHour.toFixed(1)} an hour.`,

  relative:
    "Relative mode: the detector card has no check figures. So no share of time is shown, and the ratio shows less than the real gap.",
};
