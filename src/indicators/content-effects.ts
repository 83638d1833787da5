import { benjaminiHochberg } from "../stats/benjamini-hochberg.js";
import { empiricalBayesNormal } from "../stats/empirical-bayes-normal.js";
import { normalCdf } from "../stats/normal-cdf.js";
import type { Random } from "../stats/random.js";
import { activityKey, largest, type StudentData } from "./collect.js";
import type { ConstructContext } from "./context.js";
import { lower, plural, reasons } from "./reasons.js";
import type { Estimate, UnitIndicator } from "./types.js";

/**
 * Content effect: how much more (or less) of the state the same students show in one unit (or one
 * activity) than in the rest of their work, on the corrected share scale.
 *
 * Within-student: each student k with windows both here and elsewhere contributes
 * d_k = (m_here − m_else)/(μ₁ − μ₀), weighted by w_k = n_here·n_else/(n_here + n_else) (the inverse of
 * the variance factor 1/n_here + 1/n_else of a difference of means), so students who were mostly
 * elsewhere or mostly here count less. Students are the resampling unit: the standard error is the
 * spread of the weighted mean over `replicates` resamples of students with replacement (seeded;
 * Efron and Tibshirani 1993, ch. 6), and above BOOTSTRAP_LIMIT students its large-sample equal, the
 * cluster-robust variance K/(K − 1)·Σw²(d − ē)²/(Σw)² (with hundreds of clusters the two agree closely,
 * and the resampling would cost replicates × students for every unit and activity). The uncertainty of μ₁ − μ₀ adds
 * effect²·(v₀ + v₁)/(μ₁ − μ₀)² (μ₀ itself cancels in a difference). Interval: effect ± z·SE; p-value:
 * two-sided normal on effect/SE; q-values by Benjamini–Hochberg (1995) across every unit × construct
 * compared (activities form their own family); the value for display is shrunk toward the
 * construct's mean effect by empirical Bayes (Morris 1983) across units.
 */
export const BOOTSTRAP_LIMIT = 500;

interface Pair {
  readonly d: number;
  readonly w: number;
  readonly school: string;
}

export interface RawEffect {
  readonly unitId: string;
  readonly activityId: string;
  readonly construct: string;
  readonly ctx: ConstructContext;
  readonly students: number;
  readonly classes: number;
  readonly windows: number;
  readonly share: number | null;
  readonly effect: number | null;
  readonly se: number | null;
  readonly p: number | null;
  readonly schoolsAgreeing: number;
  readonly schoolsCompared: number;
}

function weightedMean(pairs: readonly Pair[]): number {
  let sw = 0;
  let swd = 0;
  for (const x of pairs) {
    sw += x.w;
    swd += x.w * x.d;
  }
  return swd / sw;
}

function standardError(pairs: readonly Pair[], effect: number, replicates: number, random: Random): number {
  const k = pairs.length;
  if (k > BOOTSTRAP_LIMIT) {
    let sw = 0;
    let s = 0;
    for (const x of pairs) {
      sw += x.w;
      s += x.w * x.w * (x.d - effect) * (x.d - effect);
    }
    return Math.sqrt(((k / (k - 1)) * s) / (sw * sw));
  }
  let sum = 0;
  let sum2 = 0;
  for (let b = 0; b < replicates; b++) {
    let sw = 0;
    let swd = 0;
    for (let i = 0; i < k; i++) {
      const x = pairs[random.int(k)] as Pair;
      sw += x.w;
      swd += x.w * x.d;
    }
    const e = swd / sw;
    sum += e;
    sum2 += e * e;
  }
  const mean = sum / replicates;
  return Math.sqrt(Math.max(0, (sum2 - replicates * mean * mean) / (replicates - 1)));
}

interface Part {
  n: number;
  s: number;
}

/** One unit (or activity) of one construct: the within-student pairs and their summary. */
function rawEffect(
  ctx: ConstructContext,
  ids: { unitId: string; activityId: string },
  here: (s: StudentData) => Part | undefined,
  whole: (s: StudentData) => Part,
  random: Random,
): RawEffect {
  const { correction, settings } = ctx;
  const pairs: Pair[] = [];
  let windows = 0;
  let signal = 0;
  for (const id of ctx.data.order) {
    const student = ctx.data.students.get(id) as StudentData;
    const h = here(student);
    if (!h || h.n === 0) continue;
    windows += h.n;
    signal += h.s;
    const all = whole(student);
    const nElse = all.n - h.n;
    if (nElse <= 0) continue;
    const d = (h.s / h.n - (all.s - h.s) / nElse) / correction.scale;
    pairs.push({ d, w: (h.n * nElse) / (h.n + nElse), school: largest(student.schools) });
  }
  const classes = ctx.data.units.get(ids.unitId)?.classes.size ?? 0;
  const share =
    correction.mode === "relative" || windows === 0
      ? null
      : Math.min(1, Math.max(0, (signal / windows - correction.offset) / correction.scale));
  const base = { ...ids, construct: ctx.construct.key, ctx, students: pairs.length, classes, windows, share };
  if (!ctx.usable || pairs.length < Math.max(2, settings.evidence.minStudents)) {
    return { ...base, effect: null, se: null, p: null, schoolsAgreeing: 0, schoolsCompared: 0 };
  }
  const effect = weightedMean(pairs);
  const seBoot = standardError(pairs, effect, settings.replicates, random);
  const scaleVar =
    (correction.offsetVariance + correction.inStateVariance) / (correction.scale * correction.scale);
  const se = Math.sqrt(seBoot * seBoot + effect * effect * scaleVar);
  const p = se > 0 ? 2 * normalCdf(-Math.abs(effect) / se) : effect === 0 ? 1 : 0;
  // Consistency across schools: each school with enough students gives its own weighted effect.
  const bySchool = new Map<string, Pair[]>();
  for (const x of pairs) {
    const list = bySchool.get(x.school);
    if (list) list.push(x);
    else bySchool.set(x.school, [x]);
  }
  let compared = 0;
  let agreeing = 0;
  for (const list of bySchool.values()) {
    if (list.length < settings.evidence.minStudents) continue;
    compared++;
    if (Math.sign(weightedMean(list)) === Math.sign(effect)) agreeing++;
  }
  return { ...base, effect, se, p, schoolsAgreeing: agreeing, schoolsCompared: compared };
}

/** Raw effects of every unit of one construct (sorted by unit id). */
export function unitEffects(ctx: ConstructContext, random: Random): RawEffect[] {
  return [...ctx.data.units.keys()].sort().map((unitId) =>
    rawEffect(
      ctx,
      { unitId, activityId: "" },
      (s) => s.units.get(unitId),
      (s) => s,
      random.fork(),
    ),
  );
}

/** Raw effects of every activity against the rest of its own unit. */
export function activityEffects(ctx: ConstructContext, random: Random): RawEffect[] {
  const keys = new Set<string>();
  for (const s of ctx.data.students.values()) for (const k of s.activities.keys()) keys.add(k);
  return [...keys].sort().map((key) => {
    const [unitId, activityId] = key.split("\u0000") as [string, string];
    return rawEffect(
      ctx,
      { unitId, activityId },
      (s) => s.activities.get(activityKey(unitId, activityId)),
      (s) => s.units.get(unitId) ?? { n: 0, s: 0 },
      random.fork(),
    );
  });
}

/** q-values across the whole family, shrunken values per construct, statuses and reasons. */
export function finishEffects(raw: readonly RawEffect[], z: number): UnitIndicator[] {
  const tested = raw.filter((r) => r.p !== null);
  const q = new Map<RawEffect, number>();
  if (tested.length > 0) {
    const bh = benjaminiHochberg({ pValues: tested.map((r) => r.p as number) });
    for (const [i, r] of tested.entries()) q.set(r, bh.adjusted[i] as number);
  }
  const shrunk = new Map<RawEffect, number>();
  const byConstruct = new Map<string, RawEffect[]>();
  for (const r of tested) {
    const list = byConstruct.get(r.construct);
    if (list) list.push(r);
    else byConstruct.set(r.construct, [r]);
  }
  for (const list of byConstruct.values()) {
    const usable = list.filter((r) => (r.se as number) > 0);
    if (usable.length < 2) {
      for (const r of list) shrunk.set(r, r.effect as number);
      continue;
    }
    const eb = empiricalBayesNormal({
      estimates: usable.map((r) => r.effect as number),
      variances: usable.map((r) => (r.se as number) ** 2),
    });
    for (const [i, r] of usable.entries()) shrunk.set(r, eb.shrunk[i] as number);
  }
  return raw.map((r) => finishOne(r, z, q.get(r) ?? null, shrunk.get(r) ?? null, tested.length));
}

function finishOne(
  r: RawEffect,
  z: number,
  q: number | null,
  shrunk: number | null,
  family: number,
): UnitIndicator {
  const { ctx } = r;
  const label = ctx.construct.label;
  const base = {
    unitId: r.unitId,
    activityId: r.activityId,
    construct: r.construct,
    students: r.students,
    classes: r.classes,
    windows: r.windows,
    share: r.share,
    schoolsAgreeing: r.schoolsAgreeing,
    schoolsCompared: r.schoolsCompared,
  };
  const none = { effect: null, effectShrunk: null, pValue: null, qValue: null };
  if (!ctx.usable) {
    return {
      ...base,
      ...none,
      status: "detector-too-weak",
      reason: reasons.detectorTooWeak(label, ctx.construct.auc, ctx.card.aucFloor),
    };
  }
  if (r.effect === null || r.se === null || q === null) {
    return {
      ...base,
      ...none,
      status: "too-little-data",
      reason: `Only ${plural(r.students, "student")} worked both here and elsewhere; a content effect needs at least ${ctx.settings.evidence.minStudents}.`,
    };
  }
  const effect: Estimate = { value: r.effect, low: r.effect - z * r.se, high: r.effect + z * r.se };
  const concernSide = ctx.direction === "higher" ? effect.low > 0 : effect.high < 0;
  const review = concernSide && q < ctx.settings.flags.unitQ;
  const relative = ctx.correction.mode === "relative";
  const amount = (x: number) =>
    relative
      ? `${Math.abs(x * 100).toFixed(1)} points of mean probability`
      : `${Math.abs(x * 100).toFixed(1)} minutes in every 100`;
  const more = effect.value >= 0 ? "more" : "less";
  const range = relative
    ? `${(effect.low * 100).toFixed(1)} to ${(effect.high * 100).toFixed(1)} points`
    : `${(effect.low * 100).toFixed(1)} to ${(effect.high * 100).toFixed(1)} minutes in every 100`;
  let text = `The same ${plural(r.students, "student")} showed ${more} ${lower(label)} here than in the rest of their work. The gap is about ${amount(effect.value)} (range ${range}).`;
  text += ` ${chanceText(q, family)}`;
  if (r.schoolsCompared >= 2)
    text += ` ${r.schoolsAgreeing} of ${r.schoolsCompared} schools point the same way.`;
  text += review
    ? " Worth a review of the content."
    : concernSide
      ? " This could still be chance, so no review is suggested."
      : " No review is suggested.";
  if (relative) text += ` ${reasons.relative}`;
  return {
    ...base,
    status: review ? "review" : "typical",
    effect,
    effectShrunk: shrunk,
    pValue: r.p,
    qValue: q,
    reason: text,
  };
}

function chanceText(q: number, family: number): string {
  const shown = q < 0.001 ? "under 0.001" : q.toFixed(3);
  return `We made ${family} such tests. The q-value, a chance measure that allows for that, is ${shown}${q < 0.05 ? ", so chance is not a likely cause" : ""}.`;
}
