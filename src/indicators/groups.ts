import { empiricalBayesNormal } from "../stats/empirical-bayes-normal.js";
import { type ClusterParts, clusterParts } from "./cluster-mean.js";
import type { Cell, GroupPart, StudentData } from "./collect.js";
import { beyondLine, type ConstructContext } from "./context.js";
import { correctedShare, correctedShareVariance } from "./correction.js";
import { peerRatio, unitMeanVariances } from "./peer-ratio.js";
import { percentText, plural, ratioText, reasons } from "./reasons.js";
import type { Suppression } from "./suppression.js";
import type { Estimate, GroupIndicator, GroupLevel } from "./types.js";

/**
 * Group patterns per class, school and the whole district: the share of time (students as
 * clusters: Var of the group's mean by the ratio-estimator linearisation over students, t with
 * K − 1 degrees of freedom, plus the correction's uncertainty), shrunk toward the district by
 * empirical Bayes across the groups of one level (Morris 1983), and the content-adjusted ratio
 * to the other groups of the same level on the same units (peer-ratio.ts). Withheld groups
 * (suppression.ts) get no figures at all.
 */
export const DISTRICT_ID = "district";

interface Members {
  readonly level: GroupLevel;
  readonly id: string;
  readonly parentId: string;
  /** Per student: the student's windows in this group. */
  readonly students: Map<string, GroupPart>;
}

export function groupMembers(ctx: ConstructContext): Members[] {
  const out: Members[] = [];
  const district: Members = { level: "district", id: DISTRICT_ID, parentId: "", students: new Map() };
  const schools = new Map<string, Members>();
  const classes = new Map<string, Members>();
  for (const [studentId, s] of ctx.data.students) {
    for (const [id, part] of s.schools) {
      let m = schools.get(id);
      if (!m) {
        m = { level: "school", id, parentId: DISTRICT_ID, students: new Map() };
        schools.set(id, m);
      }
      m.students.set(studentId, part);
    }
    for (const [id, part] of s.classes) {
      let m = classes.get(id);
      if (!m) {
        m = { level: "class", id, parentId: ctx.data.classSchool.get(id) ?? "", students: new Map() };
        classes.set(id, m);
      }
      m.students.set(studentId, part);
    }
    const all: GroupPart = { n: s.n, s: s.s, s2: s.s2, units: s.units, weeks: weeksOf(s) };
    district.students.set(studentId, all);
  }
  out.push(district);
  for (const key of [...schools.keys()].sort()) out.push(schools.get(key) as Members);
  for (const key of [...classes.keys()].sort()) out.push(classes.get(key) as Members);
  return out;
}

/** A student's windows by ISO week, with the sessions in each (the district's part of the student). */
function weeksOf(student: StudentData): GroupPart["weeks"] {
  const weeks: GroupPart["weeks"] = new Map();
  for (const [sessionId, session] of student.sessions) {
    let w = weeks.get(session.week);
    if (!w) {
      w = { n: 0, s: 0, s2: 0, sessions: new Set() };
      weeks.set(session.week, w);
    }
    w.n += session.n;
    w.s += session.s;
    w.s2 += session.s2;
    w.sessions.add(sessionId);
  }
  return weeks;
}

function robustMean(parts: ClusterParts): { mean: number; variance: number; df: number } {
  // With one student the group is withheld anyway; the window-level variance keeps the maths finite.
  return {
    mean: parts.mean,
    variance: parts.clusters > 1 ? parts.robust : parts.srs,
    df: Math.max(1, parts.clusters - 1),
  };
}

function unitsOf(m: Members): Map<string, Cell> {
  const units = new Map<string, Cell>();
  for (const part of m.students.values()) {
    for (const [unitId, c] of part.units) {
      const u = units.get(unitId) ?? { n: 0, s: 0, s2: 0 };
      u.n += c.n;
      u.s += c.s;
      u.s2 += c.s2;
      units.set(unitId, u);
    }
  }
  return units;
}

export function groupIndicators(
  ctx: ConstructContext,
  members: readonly Members[],
  suppression: Suppression,
): GroupIndicator[] {
  const { construct, correction, settings } = ctx;
  const unitVariance = unitMeanVariances(
    [...ctx.data.students.values()].map((s) => s.units),
    ctx.data.units,
  );
  interface Raw {
    m: Members;
    share: { value: number; variance: number; df: number } | null;
    ratio: Estimate | null;
  }
  const raw: Raw[] = members.map((m) => {
    const parts = clusterParts(m.students.values());
    const r = robustMean(parts);
    const share = groupShare(ctx, parts);
    const ratio =
      m.level === "district"
        ? null
        : peerRatio({
            own: unitsOf(m),
            ownMeanVariance: r.variance,
            totals: ctx.data.units,
            unitVariance,
            correction,
            critical: ctx.critical(r.df),
            // A group's own excess rests on many students: keep "r₂ or more" (peer-ratio.ts).
            openEnded: true,
          }).ratio;
    return { m, share, ratio };
  });
  // Shrink each level's shown shares toward their precision-weighted mean (the district's pattern).
  const shrunk = new Map<Raw, Estimate>();
  for (const level of ["school", "class"] as const) {
    const list = raw.filter((x) => x.m.level === level && x.share && !suppression.withheld(level, x.m.id));
    const eligible = list.filter((x) => (x.share as NonNullable<Raw["share"]>).variance > 0);
    if (eligible.length < 2) continue;
    const eb = empiricalBayesNormal({
      estimates: eligible.map((x) => x.share!.value),
      variances: eligible.map((x) => x.share!.variance),
    });
    eligible.forEach((x, i) => {
      const posterior = {
        value: eb.shrunk[i] as number,
        variance: eb.posteriorVariances[i] as number,
        df: x.share!.df,
      };
      shrunk.set(x, shareInterval(ctx, posterior));
    });
  }
  return raw.map((x) => {
    const students = x.m.students.size;
    const base = {
      level: x.m.level,
      groupId: x.m.id,
      parentId: x.m.parentId,
      construct: construct.key,
      students,
    };
    if (!ctx.usable) {
      return {
        ...base,
        status: "detector-too-weak" as const,
        share: null,
        ratio: null,
        reason: reasons.detectorTooWeak(construct.label, construct.auc, ctx.card.aucFloor),
      };
    }
    const why = suppression.reason(x.m.level, x.m.id);
    if (why !== null) return { ...base, status: "withheld" as const, share: null, ratio: null, reason: why };
    let share: Estimate | null = shrunk.get(x) ?? null;
    if (!share && x.share) share = shareInterval(ctx, x.share);
    const r = x.ratio;
    const elevated = r !== null && beyondLine(ctx.direction, r.low, r.high, settings.flags.groupRatio);
    const peers = x.m.level === "class" ? "other classes" : "other schools";
    let text = `Across ${plural(students, "student")}`;
    if (x.m.level === "district") text += ", the whole district";
    text += r
      ? `, ${reasons.ratio(construct.label, r, peers)}.`
      : x.m.level === "district"
        ? "."
        : `: ${reasons.noRatio(construct.label, peers)}.`;
    if (share)
      text += ` About ${boundedPercent(share.value, students, settings.suppressionSize)} of observed time (range ${boundedPercent(share.low, students, settings.suppressionSize)} to ${boundedPercent(share.high, students, settings.suppressionSize)}).`;
    if (elevated)
      text += ` The whole range lies ${ctx.direction === "higher" ? "above" : "below"} ${ratioText(settings.flags.groupRatio)} times: a pattern worth planning support around, not a judgement of the teacher.`;
    if (correction.mode === "relative") text += ` ${reasons.relative}`;
    return {
      ...base,
      status: elevated ? ("concern" as const) : ("typical" as const),
      share,
      ratio: r,
      reason: text,
    };
  });
}

export interface GroupShare {
  readonly value: number;
  readonly variance: number;
  readonly df: number;
}

/**
 * A group's corrected share (unclamped) with its variance: students as clusters, plus the
 * correction's uncertainty; t with K − 1 degrees of freedom. Null in relative mode. Shared by the
 * whole-period figures and the weekly trends.
 */
export function groupShare(ctx: ConstructContext, parts: ClusterParts): GroupShare | null {
  if (ctx.correction.mode === "relative") return null;
  const r = robustMean(parts);
  const value = correctedShare(ctx.correction, r.mean);
  return { value, variance: correctedShareVariance(ctx.correction, r.variance, value), df: r.df };
}

/** The plausible range of a group share, every end kept within [0, 1]. */
export function shareInterval(ctx: ConstructContext, share: GroupShare): Estimate {
  const t = ctx.critical(share.df);
  const sd = Math.sqrt(share.variance);
  return clampEstimate(share.value, share.value - t * sd, share.value + t * sd);
}

function clampEstimate(value: number, low: number, high: number): Estimate {
  const c = (x: number) => Math.min(1, Math.max(0, x));
  return { value: c(value), low: c(low), high: c(high) };
}

/**
 * Extreme percentages in small groups as bounds: in a group of fewer than twice the suppression
 * size, a share under 5% or over 95% is written "under 5%" / "over 95%", so that a figure near 0
 * or 100% does not tell that (nearly) every student in a small class showed, or did not show, it.
 */
export function boundedPercent(x: number, students: number, suppressionSize: number): string {
  if (students < 2 * suppressionSize) {
    if (x < 0.05) return "under 5%";
    if (x > 0.95) return "over 95%";
  }
  return percentText(x);
}
