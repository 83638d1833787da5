import { clusterParts } from "./cluster-mean.js";
import type { Cell } from "./collect.js";
import type { ConstructContext } from "./context.js";
import { type groupMembers, groupShare, shareInterval } from "./groups.js";
import { sessionMean, shareEstimate } from "./students.js";
import type { Suppression } from "./suppression.js";
import type { Estimate, StudentIndicator, TrendRow } from "./types.js";

/**
 * Weekly trends (ISO weeks). Students: the share of each week's observed time, by the same
 * estimator as the whole period (students.ts) on that week's sessions, for students whose whole
 * period passed the evidence gate. Groups: each week's students as clusters (groups.ts), withheld
 * when the group is withheld or the week has fewer students than the suppression size.
 * Relative mode and a detector below the floor give no trend.
 */
export function studentTrends(ctx: ConstructContext, rows: readonly StudentIndicator[]): TrendRow[] {
  if (!ctx.usable || ctx.correction.mode === "relative") return [];
  const out: TrendRow[] = [];
  for (const row of rows) {
    if (row.status === "too-little-data" || row.status === "detector-too-weak") continue;
    const student = ctx.data.students.get(row.studentId);
    if (!student) continue;
    const weeks = new Map<string, { sessions: (Cell & { day: string; week: string })[] }>();
    for (const s of student.sessions.values()) {
      const w = weeks.get(s.week) ?? { sessions: [] };
      w.sessions.push(s);
      weeks.set(s.week, w);
    }
    for (const week of [...weeks.keys()].sort()) {
      const list = (weeks.get(week) as { sessions: (Cell & { day: string; week: string })[] }).sessions;
      const m = sessionMean(ctx, list);
      out.push({
        level: "student",
        id: row.studentId,
        construct: ctx.construct.key,
        week,
        windows: m.n,
        sessions: list.length,
        share: shareEstimate(ctx, m),
        withheld: false,
      });
    }
  }
  return out;
}

export function groupTrends(
  ctx: ConstructContext,
  members: ReturnType<typeof groupMembers>,
  suppression: Suppression,
): TrendRow[] {
  if (!ctx.usable || ctx.correction.mode === "relative") return [];
  const out: TrendRow[] = [];
  const size = ctx.settings.suppressionSize;
  for (const m of members) {
    const weeks = new Map<string, { cells: Cell[]; sessions: number }>();
    for (const part of m.students.values()) {
      for (const [week, c] of part.weeks) {
        const w = weeks.get(week) ?? { cells: [], sessions: 0 };
        w.cells.push(c);
        w.sessions += c.sessions.size;
        weeks.set(week, w);
      }
    }
    const groupWithheld = suppression.withheld(m.level, m.id);
    for (const week of [...weeks.keys()].sort()) {
      const w = weeks.get(week) as { cells: Cell[]; sessions: number };
      const parts = clusterParts(w.cells);
      const withheld = groupWithheld || parts.clusters < size;
      let share: Estimate | null = null;
      const g = !withheld && parts.clusters > 1 ? groupShare(ctx, parts) : null;
      if (g) share = shareInterval(ctx, g);
      out.push({
        level: m.level,
        id: m.id,
        construct: ctx.construct.key,
        week,
        windows: withheld ? 0 : parts.n,
        sessions: withheld ? 0 : w.sessions,
        share,
        withheld,
      });
    }
  }
  return out;
}
