/**
 * Indicators: pure functions from session summaries (+ card, settings) to the indicator tables.
 *
 *   1. per construct: correction from the card → regroup the summaries → pooled within-session
 *      correlation (context.ts)
 *   2. which groups are withheld, over all constructs at once (suppression.ts)
 *   3. per construct: students → unit and activity effects (raw) → groups → trends
 *   4. across constructs: Benjamini–Hochberg q-values and statuses of the content effects
 *
 * No I/O; resampling draws from a generator seeded by the settings, forked in a fixed order, so the
 * same inputs and settings give the same tables.
 */
import type { Card, Settings } from "../config/types.js";
import { createRandom } from "../stats/random.js";
import { twoSidedZ } from "../stats/two-sided-z.js";
import type { SessionSummary } from "../summaries/types.js";
import { collectConstruct } from "./collect.js";
import { activityEffects, finishEffects, type RawEffect, unitEffects } from "./content-effects.js";
import { type ConstructContext, constructContext } from "./context.js";
import { correctionFor } from "./correction.js";
import { groupIndicators, groupMembers } from "./groups.js";
import { studentIndicators } from "./students.js";
import { type GroupSize, suppressionFor } from "./suppression.js";
import { groupTrends, studentTrends } from "./trends.js";
import type { ConstructMethod, GroupIndicator, Indicators, StudentIndicator, TrendRow } from "./types.js";

export interface IndicatorInputs {
  readonly card: Card;
  readonly settings: Settings;
  readonly summaries: readonly SessionSummary[];
  readonly hasActivity: boolean;
}

export function computeIndicators(inputs: IndicatorInputs): Indicators {
  const { card, settings, summaries } = inputs;
  const contexts: ConstructContext[] = card.constructs.map((construct) => {
    const correction = correctionFor(construct);
    return constructContext(
      card,
      construct,
      settings,
      correction,
      collectConstruct(construct.key, summaries, correction),
    );
  });
  const members = contexts.map((ctx) => groupMembers(ctx));
  // Needs every construct's group sizes first: a group is withheld for all constructs alike.
  const sizes = new Map<string, GroupSize>();
  for (const list of members) {
    for (const m of list) {
      const key = `${m.level}\u0000${m.id}`;
      const prior = sizes.get(key);
      const students = Math.min(prior?.students ?? Number.POSITIVE_INFINITY, m.students.size);
      sizes.set(key, { level: m.level, id: m.id, parentId: m.parentId, students });
    }
  }
  const suppression = suppressionFor([...sizes.values()], settings.suppressionSize);
  const random = createRandom(settings.seed);
  const students: StudentIndicator[] = [];
  const groups: GroupIndicator[] = [];
  const trends: TrendRow[] = [];
  const rawUnits: RawEffect[] = [];
  const rawActivities: RawEffect[] = [];
  const methods: ConstructMethod[] = [];
  contexts.forEach((ctx, i) => {
    const rows = studentIndicators(ctx);
    students.push(...rows);
    rawUnits.push(...unitEffects(ctx, random.fork()));
    if (inputs.hasActivity) rawActivities.push(...activityEffects(ctx, random.fork()));
    const list = members[i] ?? [];
    groups.push(...groupIndicators(ctx, list, suppression));
    trends.push(...studentTrends(ctx, rows), ...groupTrends(ctx, list, suppression));
    methods.push({
      construct: ctx.construct.key,
      label: ctx.construct.label,
      mode: ctx.correction.mode,
      usable: ctx.usable,
      withinSessionCorrelation: ctx.correlation,
      note: ctx.usable ? "" : "A' below the card's floor: no figures.",
    });
  });
  const z = twoSidedZ(settings.confidence);
  return {
    students,
    units: finishEffects(rawUnits, z),
    activities: finishEffects(rawActivities, z),
    groups,
    trends,
    methods,
  };
}
