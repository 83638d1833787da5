import { type ClusterMean, clusterParts, observedMean } from "./cluster-mean.js";
import { largest, type SessionCell, type StudentData } from "./collect.js";
import { beyondLine, type ConstructContext, pointBeyond } from "./context.js";
import { correctedShare, correctedShareVariance, windowNoiseVariance } from "./correction.js";
import { peerRatio, unitMeanVariances } from "./peer-ratio.js";
import { reasons } from "./reasons.js";
import type { Estimate, StudentIndicator } from "./types.js";

/**
 * Per student × construct: share of time (corrected, with an interval that counts sessions as
 * clusters, detector noise and the correction's own uncertainty), ratio to peers on the same
 * content, sustained episodes per hour against peers, then the status by the gates in order:
 * detector → evidence → the flag rule on the interval.
 */
export function studentIndicators(ctx: ConstructContext): StudentIndicator[] {
  const { data } = ctx;
  const totals = data.units;
  // Needs every student's unit cells before any ratio: the peers' means leave the student out.
  const unitVariance = unitMeanVariances(
    [...data.students.values()].map((s) => s.units),
    totals,
  );
  const out: StudentIndicator[] = [];
  for (const id of data.order) {
    const student = data.students.get(id) as StudentData;
    out.push(oneStudent(ctx, student, unitVariance));
  }
  return out;
}

/** Share of time from a clustered mean, clamped to [0, 1] (estimates below 0 read as "none"). */
export function shareEstimate(ctx: ConstructContext, m: ClusterMean): Estimate | null {
  if (ctx.correction.mode === "relative" || m.n === 0) return null;
  const raw = correctedShare(ctx.correction, m.mean);
  const sd = Math.sqrt(correctedShareVariance(ctx.correction, m.variance, raw));
  const t = ctx.critical(m.degreesOfFreedom);
  const clamp = (x: number) => Math.min(1, Math.max(0, x));
  return { value: clamp(raw), low: clamp(raw - t * sd), high: clamp(raw + t * sd) };
}

/** The mean signal of a student's windows (all, or one week's), with its variance (cluster-mean.ts). */
export function sessionMean(ctx: ConstructContext, sessions: Iterable<SessionCell>): ClusterMean {
  const parts = clusterParts(sessions);
  const share = ctx.correction.mode === "relative" ? 0 : correctedShare(ctx.correction, parts.mean);
  return observedMean(parts, ctx.correlation, windowNoiseVariance(ctx.correction, share));
}

function oneStudent(
  ctx: ConstructContext,
  student: StudentData,
  unitVariance: ReadonlyMap<string, number>,
): StudentIndicator {
  const { settings, construct, card, data } = ctx;
  const sessions = student.sessions.size;
  const days = student.days.size;
  const minutes = (student.n * card.windowSeconds) / 60;
  const base = {
    studentId: student.studentId,
    construct: construct.key,
    windows: student.n,
    sessions,
    days,
    minutes,
    sustainedEpisodes: student.episodes,
    classId: largest(student.classes),
    schoolId: largest(student.schools),
  };
  const empty = {
    share: null,
    peerShare: null,
    ratio: null,
    nearLine: false,
    sustainedPerHour: null,
    peerSustainedPerHour: null,
  };
  if (!ctx.usable) {
    return {
      ...base,
      ...empty,
      status: "detector-too-weak",
      reason: reasons.detectorTooWeak(construct.label, construct.auc, card.aucFloor),
    };
  }
  const e = settings.evidence;
  if (sessions < e.minSessions || days < e.minDays || minutes < e.minMinutes) {
    return {
      ...base,
      ...empty,
      status: "too-little-data",
      reason: reasons.studentTooLittle({
        sessions,
        days,
        minutes,
        minSessions: e.minSessions,
        minDays: e.minDays,
        minMinutes: e.minMinutes,
      }),
    };
  }
  const m = sessionMean(ctx, student.sessions.values());
  const share = shareEstimate(ctx, m);
  const pr = peerRatio({
    own: student.units,
    ownMeanVariance: m.variance,
    totals: data.units,
    unitVariance,
    correction: ctx.correction,
    critical: ctx.critical(m.degreesOfFreedom),
  });
  const peerShare =
    pr.expectedMean === null || ctx.correction.mode === "relative"
      ? null
      : Math.min(1, Math.max(0, (pr.expectedMean - ctx.correction.offset) / ctx.correction.scale));
  // Sustained episodes: observed per hour against the peers' rate in the same units (student left out).
  const hours = (student.n * card.windowSeconds) / 3600;
  let expectedEpisodes = 0;
  for (const [unitId, c] of student.units) {
    const t = data.units.get(unitId);
    if (!t || t.n - c.n <= 0) continue;
    expectedEpisodes += (c.n * (t.episodes - c.episodes)) / (t.n - c.n);
  }
  const line = settings.flags.studentRatio;
  const r = pr.ratio;
  const flagged = r !== null && beyondLine(ctx.direction, r.low, r.high, line);
  const nearLine = r !== null && !flagged && pointBeyond(ctx.direction, r.value, line);
  const parts = [reasons.evidence(sessions, days)];
  parts.push(
    r
      ? reasons.ratio(construct.label, r, "other students")
      : reasons.noRatio(construct.label, "other students"),
  );
  let text = `${parts.join(", ")}.`;
  if (share) text += ` That is ${reasons.share(share)}.`;
  text += ` ${flagged ? reasons.flagged(ctx.direction, line) : nearLine ? reasons.nearLine(ctx.direction) : reasons.usual}`;
  if (student.episodes > 0 || expectedEpisodes > 0.05 * hours) {
    text += ` ${reasons.sustained(student.episodes / hours, expectedEpisodes / hours, construct.sustainedMinWindows * card.windowSeconds)}`;
  }
  if (ctx.correction.mode === "relative") text += ` ${reasons.relative}`;
  return {
    ...base,
    status: flagged ? "suggested" : "typical",
    share,
    peerShare,
    ratio: r,
    nearLine,
    sustainedPerHour: student.episodes / hours,
    peerSustainedPerHour: expectedEpisodes / hours,
    reason: text,
  };
}
