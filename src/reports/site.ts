/**
 * The report site: one page model per page, built from the indicators, rendered with the eta
 * templates in templates/. Pages are returned, not written: the caller writes them (and prints the
 * PDFs) inside the atomic output folder.
 *   index → check-ins (caseload lists, student pages) → content → support → about
 */
import { createHash } from "node:crypto";
import { readFileSync } from "node:fs";
import { dirname, join } from "node:path";
import { fileURLToPath } from "node:url";
import { Eta } from "eta";
import type { Audience, ConstructCard } from "../config/types.js";
import { percentText, ratioRangeText, ratioText } from "../indicators/reasons.js";
import type {
  GroupIndicator,
  Indicators,
  StudentIndicator,
  TrendRow,
  UnitIndicator,
} from "../indicators/types.js";
import type { LoadedInputs } from "../pipeline/inputs.js";
import { hanleyMcNeilStandardError } from "../stats/hanley-mcneil-standard-error.js";
import type { Chart, ChartRenderer, IntervalRow, Marker } from "./charts.js";
import { FOLDERS, frame, href, type PageFrame, type SiteFacts, siteFacts } from "./frame.js";
import { render, trusted } from "./html.js";
import { band, text } from "./text.js";
import { statusWord } from "./vocabulary.js";

export interface SitePage {
  /** Path below the output folder, with "/" separators. */
  readonly path: string;
  readonly audience: Audience | "index";
  readonly title: string;
  readonly html: string;
  /** For check-ins: the caseload this page belongs to. */
  readonly caseload?: string;
  /** Student pages only. */
  readonly student?: boolean;
  /** Student pages: at least one suggested check-in (these go into the caseload's PDF). */
  readonly checkIn?: boolean;
}

export interface SiteInput {
  readonly inputs: LoadedInputs;
  readonly indicators: Indicators;
  readonly builtAt: string;
}

const TEMPLATES = join(dirname(fileURLToPath(import.meta.url)), "..", "..", "templates");

export function createEta(): Eta {
  return new Eta({
    views: TEMPLATES,
    autoEscape: true,
    escapeFunction: render,
    cache: true,
    autoTrim: false,
  });
}

interface Table {
  caption: string;
  columns: string[];
  rows: string[][];
  numeric?: boolean[];
  rowHeaders?: boolean;
}

export async function buildSite(input: SiteInput, charts: ChartRenderer): Promise<SitePage[]> {
  const { inputs } = input;
  const eta = createEta();
  const css = readFileSync(join(TEMPLATES, "style.css"), "utf8");
  const facts = siteFacts(inputs, input.builtAt);
  const pages: SitePage[] = [];
  const page = (
    path: string,
    audience: SitePage["audience"],
    f: PageFrame,
    view: string,
    model: object,
    extra: Partial<SitePage> = {},
  ) => {
    const body = eta.render(view, { ...model, page: f });
    const html = eta.render("layout", { page: f, css: trusted(css), body });
    pages.push({ path, audience, title: f.title, html, ...extra });
  };
  const ctx: Ctx = { input, facts, charts, page, index: lookups(input) };
  indexPage(ctx);
  if (facts.audiences.includes("counselors")) await checkInPages(ctx);
  if (facts.audiences.includes("content")) await contentPage(ctx);
  if (facts.audiences.includes("support")) await supportPage(ctx);
  if (facts.audiences.includes("about")) await aboutPage(ctx);
  return pages;
}

interface Ctx {
  readonly input: SiteInput;
  readonly facts: SiteFacts;
  readonly charts: ChartRenderer;
  readonly index: Lookups;
  page(
    path: string,
    audience: SitePage["audience"],
    f: PageFrame,
    view: string,
    model: object,
    extra?: Partial<SitePage>,
  ): void;
}

/**
 * Lookups built once, so that a student page costs the same in a district of 100 students as in one
 * of 100,000 (no scan of every summary, trend or group per page).
 */
interface Lookups {
  /** student → unit → windows, over the first construct of the card with data. */
  readonly windowsByUnit: ReadonlyMap<string, ReadonlyMap<string, number>>;
  /** `construct\u0000student` → the student's weekly trend rows. */
  readonly studentTrends: ReadonlyMap<string, readonly TrendRow[]>;
  /** `construct\u0000unit` → unit row; `construct\u0000class` → class row. */
  readonly units: ReadonlyMap<string, UnitIndicator>;
  readonly classes: ReadonlyMap<string, GroupIndicator>;
}

const key2 = (a: string, b: string) => `${a}\u0000${b}`;

function lookups(input: SiteInput): Lookups {
  const first = input.inputs.card.constructs.find((c) =>
    input.inputs.summaries.some((s) => s.construct === c.key),
  )?.key;
  const windowsByUnit = new Map<string, Map<string, number>>();
  for (const s of input.inputs.summaries) {
    if (s.construct !== first) continue;
    let m = windowsByUnit.get(s.studentId);
    if (!m) {
      m = new Map();
      windowsByUnit.set(s.studentId, m);
    }
    m.set(s.unitId, (m.get(s.unitId) ?? 0) + s.windows);
  }
  const studentTrends = new Map<string, TrendRow[]>();
  for (const t of input.indicators.trends) {
    if (t.level !== "student" || !t.share) continue;
    const k = key2(t.construct, t.id);
    const list = studentTrends.get(k);
    if (list) list.push(t);
    else studentTrends.set(k, [t]);
  }
  const units = new Map(input.indicators.units.map((u) => [key2(u.construct, u.unitId), u]));
  const classes = new Map(
    input.indicators.groups.filter((g) => g.level === "class").map((g) => [key2(g.construct, g.groupId), g]),
  );
  return { windowsByUnit, studentTrends, units, classes };
}

function cards(ctx: Ctx): readonly ConstructCard[] {
  return ctx.input.inputs.card.constructs;
}

function usable(ctx: Ctx): ConstructCard[] {
  const floor = ctx.input.inputs.card.aucFloor;
  return cards(ctx).filter((c) => c.auc >= floor);
}

function lowerLabel(c: ConstructCard): string {
  return c.label.charAt(0).toLowerCase() + c.label.slice(1);
}

// ── index ────────────────────────────────────────────────────────────────────────────────────────

function indexPage(ctx: Ctx): void {
  const f = frame(ctx.facts, {
    title: "Overview",
    heading: ctx.facts.siteTitle,
    purpose: "Say what this report holds and where each part is.",
    audience: "Everyone who uses this report",
    depth: 0,
    current: "index",
  });
  const folders = FOLDERS.filter((x) => ctx.facts.audiences.includes(x.audience)).map((x) => ({
    label: x.label,
    who: x.who,
    href: `${x.audience}/index.html`,
    what: FOLDER_WHAT[x.audience],
  }));
  ctx.page("index.html", "index", f, "index", { folders, files: ctx.input.inputs.files });
}

const FOLDER_WHAT: Record<Audience, string> = {
  counselors: "Students a counselor may want to check in with, and why. Confidential.",
  content:
    "Units where many students showed more boredom, confusion or other states than in the rest of their work.",
  support: "Patterns by school and class, to plan training and support. Not for judging teachers.",
  about: "How good the detectors are, the data checks, how to read the figures, methods and limits.",
};

// ── check-ins ────────────────────────────────────────────────────────────────────────────────────

interface Caseload {
  readonly name: string;
  readonly slug: string;
  readonly students: string[];
}

function slug(text: string): string {
  const base = text
    .toLowerCase()
    .normalize("NFKD")
    .replace(/[^a-z0-9]+/g, "-")
    .replace(/^-+|-+$/g, "")
    .slice(0, 40);
  const hash = createHash("sha256").update(text).digest("hex").slice(0, 6);
  return base === "" ? `x-${hash}` : `${base}-${hash}`;
}

function caseloads(ctx: Ctx, studentIds: readonly string[]): Caseload[] {
  const roster = ctx.input.inputs.roster;
  const named = roster ? [...roster.entries.values()].some((e) => e.counselor !== "") : false;
  if (!named) return [{ name: "All students", slug: "all-students", students: [...studentIds] }];
  const by = new Map<string, string[]>();
  for (const id of studentIds) {
    const c = roster?.entries.get(id)?.counselor || "No counselor named";
    const list = by.get(c);
    if (list) list.push(id);
    else by.set(c, [id]);
  }
  return [...by.keys()]
    .sort()
    .map((name) => ({ name, slug: slug(name), students: by.get(name) as string[] }));
}

function displayName(ctx: Ctx, id: string): string {
  const name = ctx.input.inputs.roster?.entries.get(id)?.displayName ?? "";
  return name === "" ? id : `${name} (${id})`;
}

function marker(row: StudentIndicator): Marker {
  if (row.status === "suggested") return "concern";
  if (row.nearLine) return "near";
  return "typical";
}

async function checkInPages(ctx: Ctx): Promise<void> {
  const rows = ctx.input.indicators.students;
  const byStudent = new Map<string, StudentIndicator[]>();
  for (const r of rows) {
    const list = byStudent.get(r.studentId);
    if (list) list.push(r);
    else byStudent.set(r.studentId, [r]);
  }
  const ids = [...byStudent.keys()].sort();
  const loads = caseloads(ctx, ids);
  const top = frame(ctx.facts, {
    title: "Check-ins",
    purpose: "Help counselors choose whom to check in with, and see why.",
    audience: "Counselors",
    confidential: true,
    depth: 1,
    current: "counselors",
  });
  ctx.page("counselors/index.html", "counselors", top, "check-ins-index", {
    caseloads: loads.map((c) => ({
      name: c.name,
      href: `${c.slug}/index.html`,
      checkIns: c.students.filter((id) => byStudent.get(id)?.some((r) => r.status === "suggested")).length,
      students: c.students.length,
    })),
  });
  const usableKeys = new Set(usable(ctx).map((c) => c.key));
  for (const load of loads) {
    const flagged: { id: string; name: string; href: string; items: string[] }[] = [];
    const near: { id: string; name: string; href: string; items: string[] }[] = [];
    const little: { name: string; detail: string }[] = [];
    for (const id of load.students) {
      const list = (byStudent.get(id) ?? []).filter((r) => usableKeys.has(r.construct));
      const checkIns = list.filter((r) => r.status === "suggested");
      const nearLine = list.filter((r) => r.nearLine);
      const page = `${studentSlug(id)}.html`;
      if (checkIns.length > 0) {
        flagged.push({
          id,
          name: displayName(ctx, id),
          href: page,
          items: checkIns.map((r) => `${label(ctx, r.construct)}: ${r.reason}`),
        });
        await studentPage(ctx, load, id, list);
        continue;
      }
      if (ctx.input.inputs.settings.allStudentPages && list.some((r) => r.status !== "too-little-data")) {
        await studentPage(ctx, load, id, list);
      }
      if (nearLine.length > 0) {
        // Listed with the states near the line, without a page: a page is for a suggested check-in.
        near.push({
          id,
          name: displayName(ctx, id),
          href: "",
          items: nearLine.map((r) => label(ctx, r.construct)),
        });
      } else if (list.length > 0 && list.every((r) => r.status === "too-little-data")) {
        little.push({ name: displayName(ctx, id), detail: list[0]?.reason ?? "" });
      }
    }
    const f = frame(ctx.facts, {
      title: `Check-ins: ${load.name}`,
      purpose: "List the students whose figures suggest a check-in, with the evidence for each.",
      audience: `Counselors (caseload: ${load.name})`,
      confidential: true,
      depth: 2,
      current: "counselors",
    });
    ctx.page(
      `counselors/${load.slug}/index.html`,
      "counselors",
      f,
      "check-ins-list",
      { load, flagged, near, little, line: ctx.input.inputs.settings.flags.studentRatio },
      { caseload: load.slug },
    );
  }
}

function studentSlug(id: string): string {
  return `student-${slug(id)}`;
}

function label(ctx: Ctx, key: string): string {
  return cards(ctx).find((c) => c.key === key)?.label ?? key;
}

function inEvery(share: number): string {
  const tenths = Math.round(share * 10);
  if (tenths <= 0) return "less than 1 of every 10";
  if (tenths >= 10) return "nearly all";
  return `about ${tenths} of every 10`;
}

async function studentPage(
  ctx: Ctx,
  load: Caseload,
  id: string,
  list: readonly StudentIndicator[],
): Promise<void> {
  const { inputs } = ctx.input;
  const name = displayName(ctx, id);
  const chartId = `p-${studentSlug(id)}`;
  const shown = list.filter((r) => r.status !== "too-little-data" && r.ratio !== null);
  const profile = await ctx.charts.intervals({
    id: `${chartId}-profile`,
    title: "Compared with other students on the same units",
    description: `Ratio to other students on the same units for each state, with plausible ranges. A ratio of 1 means the same as others. The check-in line is at ${ratioText(inputs.settings.flags.studentRatio)}.`,
    axisTitle: "Times as often as other students (log scale)",
    rows: shown.map(
      (r): IntervalRow => ({
        label: label(ctx, r.construct),
        value: r.ratio?.value ?? null,
        low: r.ratio?.low ?? null,
        high: r.ratio?.high ?? null,
        marker: marker(r),
      }),
    ),
    format: "ratio",
    scale: "log",
    reference: { value: 1, label: "same as others" },
    line: { value: inputs.settings.flags.studentRatio, label: "check-in line" },
  });
  const flagged = list.filter((r) => r.status === "suggested" || r.nearLine);
  const trends: Chart[] = [];
  for (const r of flagged.slice(0, 3)) {
    const points = (ctx.index.studentTrends.get(key2(r.construct, id)) ?? []).map((t) => ({
      week: t.week,
      value: t.share!.value,
      low: t.share!.low,
      high: t.share!.high,
    }));
    if (points.length === 0) continue;
    trends.push(
      await ctx.charts.trend({
        id: `${chartId}-trend-${r.construct}`,
        title: `${label(ctx, r.construct)} by week`,
        description: `Share of observed time with ${lowerLabel(cardOf(ctx, r.construct))}, week by week, with plausible ranges.`,
        axisTitle: "Share of observed time",
        series: [{ label: label(ctx, r.construct), points }],
        format: "percent",
      }),
    );
  }
  const shares: Table = {
    caption: "Share of observed time, by state",
    columns: [
      "State",
      "This student",
      "Plausible range",
      "Other students on the same units",
      "What it means",
    ],
    rows: list.map((r) => [
      label(ctx, r.construct),
      r.share ? percentText(r.share.value) : "not shown",
      r.share ? `${percentText(r.share.low)} to ${percentText(r.share.high)}` : "",
      r.peerShare !== null ? percentText(r.peerShare) : "",
      statusWord("student", r.status),
    ]),
    rowHeaders: true,
  };
  const units = unitContext(ctx, id, flagged);
  const classContext = flagged.map((r) => classNote(ctx, r));
  const openers = flagged
    .filter((r) => r.share)
    .map(
      (r) =>
        `The estimates suggest ${lowerLabel(cardOf(ctx, r.construct))} in ${inEvery(r.share!.value)} observed minutes. How have your recent lessons felt?`,
    );
  const f = frame(ctx.facts, {
    title: `Student page ${id}`,
    heading: name,
    purpose:
      "Show why a check-in may help this student, how sure the figures are, and what they cannot tell.",
    audience: `Counselors (caseload: ${load.name})`,
    confidential: true,
    depth: 2,
    current: "counselors",
  });
  ctx.page(
    `counselors/${load.slug}/${studentSlug(id)}.html`,
    "counselors",
    f,
    "student",
    {
      summary: flagged.map((r) => ({
        label: label(ctx, r.construct),
        reason: r.reason,
        status: statusWord("student", r.status),
        near: r.nearLine,
      })),
      profile,
      trends,
      shares,
      units,
      classContext,
      openers,
      check: text.checkBeforeActing,
      back: "index.html",
    },
    { caseload: load.slug, student: true, checkIn: list.some((r) => r.status === "suggested") },
  );
}

function cardOf(ctx: Ctx, key: string): ConstructCard {
  return cards(ctx).find((c) => c.key === key) as ConstructCard;
}

function unitContext(ctx: Ctx, id: string, flagged: readonly StudentIndicator[]): Table {
  const seconds = ctx.input.inputs.card.windowSeconds;
  const minutesByUnit = new Map<string, number>();
  for (const [unitId, windows] of ctx.index.windowsByUnit.get(id) ?? [])
    minutesByUnit.set(unitId, (windows * seconds) / 60);
  const rows: string[][] = [];
  for (const unitId of [...minutesByUnit.keys()].sort()) {
    const notes = flagged.map((r) => {
      const u = ctx.index.units.get(key2(r.construct, unitId));
      return u?.status === "review" ? `${label(ctx, r.construct)}: many students showed more here` : "";
    });
    rows.push([
      unitId,
      String(Math.round(minutesByUnit.get(unitId) ?? 0)),
      notes.filter((x) => x).join("; ") || "nothing unusual",
    ]);
  }
  return {
    caption: "Units this student worked on",
    columns: ["Unit", "Minutes observed", "Unit note"],
    rows,
    numeric: [false, true, false],
    rowHeaders: true,
  };
}

function classNote(ctx: Ctx, r: StudentIndicator): string {
  const g = ctx.index.classes.get(key2(r.construct, r.classId));
  const what = label(ctx, r.construct);
  if (!g || g.status === "withheld")
    return `${what}: the class figure is withheld (small class), so there is no class context.`;
  if (g.status === "concern")
    return `${what}: many classmates show the same. The cause may be the content or the setting, not this student alone.`;
  return `${what}: the class as a whole is in the usual range.`;
}

// ── content ──────────────────────────────────────────────────────────────────────────────────────

async function contentPage(ctx: Ctx): Promise<void> {
  const { indicators } = ctx.input;
  const sections = [];
  for (const c of usable(ctx)) {
    const rows = indicators.units.filter((u) => u.construct === c.key);
    const chart = await ctx.charts.intervals({
      id: `content-${c.key}`,
      title: `${c.label}: each unit compared with the rest of the same students' work`,
      description: `For each unit, how many more (or fewer) minutes in every 100 the same students showed ${lowerLabel(c)} there than elsewhere, with plausible ranges. Zero means no difference.`,
      axisTitle: "Minutes in every 100, this unit minus elsewhere",
      rows: rows.map((u) => ({
        label: u.unitId,
        value: u.effect?.value ?? null,
        low: u.effect?.low ?? null,
        high: u.effect?.high ?? null,
        marker: u.status === "review" ? "concern" : u.effect ? "typical" : "withheld",
        note: u.effect ? undefined : statusWord("unit", u.status),
      })),
      format: "points",
      scale: "linear",
      reference: { value: 0, label: "no difference" },
    });
    const table: Table = {
      caption: `${c.label} by unit: details`,
      columns: ["Unit", "Status", "Students", "Classes", "Chance finding?", "Schools that agree"],
      rows: rows.map((u) => [
        u.unitId,
        statusWord("unit", u.status),
        band(u.students),
        band(u.classes).replace("fewer than 10", u.classes < 10 ? String(u.classes) : "fewer than 10"),
        u.qValue === null
          ? "not tested"
          : u.qValue < 0.05
            ? "unlikely"
            : u.qValue < 0.2
              ? "possible"
              : "likely",
        u.schoolsCompared >= 2 ? `${u.schoolsAgreeing} of ${u.schoolsCompared}` : "too few schools",
      ]),
      rowHeaders: true,
    };
    const reviews = rows
      .filter((u) => u.status === "review")
      .map((u) => ({
        unit: u.unitId,
        reason: u.reason,
        activities: indicators.activities
          .filter((a) => a.unitId === u.unitId && a.construct === c.key && a.effect)
          .map((a) => [
            a.activityId,
            `${(a.effect!.value * 100).toFixed(1)}`,
            `${(a.effect!.low * 100).toFixed(1)} to ${(a.effect!.high * 100).toFixed(1)}`,
            statusWord("unit", a.status),
          ]),
      }));
    sections.push({ label: c.label, key: c.key, chart, table, reviews });
  }
  const f = frame(ctx.facts, {
    title: "Content units",
    purpose:
      "Find units where students showed more of a state than in the rest of their own work, so the unit can be looked at again.",
    audience: "Curriculum designers",
    depth: 1,
    current: "content",
  });
  ctx.page("content/index.html", "content", f, "content", {
    sections,
    weak: cards(ctx)
      .filter((c) => !usable(ctx).includes(c))
      .map((c) => c.label),
  });
}

// ── support ──────────────────────────────────────────────────────────────────────────────────────

async function supportPage(ctx: Ctx): Promise<void> {
  const { indicators, inputs } = ctx.input;
  const sections = [];
  for (const c of usable(ctx)) {
    const schools = indicators.groups.filter((g) => g.level === "school" && g.construct === c.key);
    const chart = await ctx.charts.intervals({
      id: `support-${c.key}`,
      title: `${c.label}: share of observed time by school`,
      description: `Share of observed time with ${lowerLabel(c)} in each school, with plausible ranges, in alphabetical order. Withheld schools show no mark.`,
      axisTitle: "Share of observed time",
      rows: schools.map((g) => ({
        label: g.groupId,
        value: g.share?.value ?? null,
        low: g.share?.low ?? null,
        high: g.share?.high ?? null,
        marker: g.status === "withheld" ? "withheld" : g.status === "concern" ? "concern" : "typical",
        note: g.status === "withheld" ? "withheld" : undefined,
      })),
      format: "percent",
      scale: "linear",
    });
    const classes = indicators.groups.filter((g) => g.level === "class" && g.construct === c.key);
    const table: Table = {
      caption: `${c.label} by class, grouped by school in alphabetical order`,
      columns: ["Class", "School", "Status", "Share of time (range)", "Compared with other classes (range)"],
      rows: classes
        .slice()
        .sort((a, b) =>
          a.parentId === b.parentId ? (a.groupId < b.groupId ? -1 : 1) : a.parentId < b.parentId ? -1 : 1,
        )
        .map((g) => [
          g.groupId,
          g.parentId,
          statusWord("group", g.status),
          g.share
            ? `${percentText(g.share.value)} (${percentText(g.share.low)} to ${percentText(g.share.high)})`
            : "withheld",
          g.ratio
            ? `${ratioText(g.ratio.value)} (${ratioRangeText(g.ratio)})`
            : g.status === "withheld"
              ? "withheld"
              : "not available",
        ]),
      rowHeaders: true,
    };
    sections.push({ label: c.label, key: c.key, chart, table });
  }
  const f = frame(ctx.facts, {
    title: "Support planning",
    purpose: "Show patterns by school and class, to plan training and support for using the software well.",
    audience: "District coordinators",
    depth: 1,
    current: "support",
  });
  ctx.page("support/index.html", "support", f, "support", {
    sections,
    statement: text.teacherStatement,
    size: inputs.settings.suppressionSize,
    line: inputs.settings.flags.groupRatio,
  });
}

// ── about ────────────────────────────────────────────────────────────────────────────────────────

async function aboutPage(ctx: Ctx): Promise<void> {
  const { inputs, indicators } = ctx.input;
  const card = inputs.card;
  const detectorRows: IntervalRow[] = card.constructs.map((c) => {
    const se = hanleyMcNeilStandardError({
      auc: c.auc,
      positiveCount: c.aucPositives,
      negativeCount: c.aucNegatives,
    });
    return {
      label: c.label,
      value: c.auc,
      low: Math.max(0.5, c.auc - 1.96 * se),
      high: Math.min(1, c.auc + 1.96 * se),
      marker: c.auc < card.aucFloor ? "concern" : "typical",
    };
  });
  const detectorChart = await ctx.charts.intervals({
    id: "about-detectors",
    title: "How well each detector tells the states apart (A')",
    description: `A' for each detector with plausible ranges. 0.5 is chance; 1 is perfect. Below the floor of ${card.aucFloor.toFixed(2)} a detector is not used.`,
    axisTitle: "A' (0.5 is chance, 1 is perfect)",
    rows: detectorRows,
    format: "ratio",
    scale: "linear",
    reference: { value: 0.5, label: "chance" },
    line: { value: card.aucFloor, label: "floor" },
  });
  const detectors: Table = {
    caption: "Detector evidence",
    columns: ["State", "A'", "Plain meaning", "Kappa", "Checked on", "Used?"],
    rows: card.constructs.map((c) => [
      c.label,
      c.auc.toFixed(2),
      `Picks the moment in the state over one not in it about ${Math.round(c.auc * 100)} times in 100 (${c.aucPositives.toLocaleString("en-US")} and ${c.aucNegatives.toLocaleString("en-US")} coded moments).`,
      c.kappa === undefined ? "not given" : c.kappa.toFixed(2),
      card.validatedSettings.join(", ") || "not stated",
      c.auc >= card.aucFloor ? "yes" : "no: too weak",
    ]),
    rowHeaders: true,
  };
  const q = inputs.quality;
  const quality: Table = {
    caption: "Data checks",
    columns: ["File", "Rows read", "Kept", "Set aside", "Duplicates counted once"],
    rows: q.inputs.map((f) => [
      f.file,
      String(f.rows_read),
      String(f.rows_accepted),
      String(f.rows_rejected),
      String(f.duplicates),
    ]),
    numeric: [false, true, true, true, true],
    rowHeaders: true,
  };
  const reasonsTable: Table = {
    caption: "Why rows were set aside",
    columns: ["File", "Reason", "Rows", "First example"],
    rows: q.inputs.flatMap((f) =>
      f.rejected_by_reason.map((r) => [f.file, r.text, String(r.count), r.examples[0]?.at ?? ""]),
    ),
    numeric: [false, false, true, false],
    rowHeaders: true,
  };
  const methods = indicators.methods.map((m) => ({
    label: m.label,
    mode:
      m.mode === "mean-probability"
        ? "corrected with the detector's mean probability in and out of the state"
        : m.mode === "threshold"
          ? "corrected with the detector's hit rates at its threshold"
          : "relative mode: no correction figures, so no shares are shown",
    used: m.usable,
  }));
  const f = frame(ctx.facts, {
    title: "About the figures",
    purpose:
      "Explain how good the detectors are, what the data checks found, how to read the figures, and their limits.",
    audience: "Everyone who uses this report",
    depth: 1,
    current: "about",
  });
  ctx.page("about/index.html", "about", f, "about", {
    detectorChart,
    detectors,
    quality,
    reasonsTable,
    methods,
    howToRead: text.howToRead,
    settings: inputs.settings,
  });
}

export { href };
