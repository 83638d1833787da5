/** What every page carries: purpose, audience, period, data source, "based on", the caution, navigation. */
import type { Audience } from "../config/types.js";
import type { LoadedInputs } from "../pipeline/inputs.js";
import { text } from "./text.js";

export interface NavLink {
  readonly label: string;
  readonly href: string;
  readonly current: boolean;
}

export interface PageFrame {
  readonly siteTitle: string;
  readonly title: string;
  readonly heading: string;
  readonly purpose: string;
  readonly audience: string;
  readonly period: string;
  readonly source: string;
  readonly built: string;
  readonly basedOn: string;
  readonly caution: string;
  readonly confidential: boolean;
  readonly footer: string;
  readonly nav: readonly NavLink[];
}

export const FOLDERS: readonly { audience: Audience; label: string; who: string }[] = [
  { audience: "counselors", label: "Conversations", who: "Counselors" },
  { audience: "content", label: "Content", who: "Curriculum designers" },
  { audience: "support", label: "Support planning", who: "District coordinators" },
  { audience: "about", label: "About the figures", who: "Everyone" },
];

export interface SiteFacts {
  readonly siteTitle: string;
  readonly period: string;
  readonly source: string;
  readonly built: string;
  readonly basedOn: string;
  readonly audiences: readonly Audience[];
}

function longDate(day: string): string {
  const [y, m, d] = day.split("-").map(Number) as [number, number, number];
  const months = [
    "January",
    "February",
    "March",
    "April",
    "May",
    "June",
    "July",
    "August",
    "September",
    "October",
    "November",
    "December",
  ];
  return `${d} ${months[m - 1]} ${y}`;
}

export function siteFacts(inputs: LoadedInputs, builtAt: string): SiteFacts {
  const q = inputs.quality;
  const first = q.period.first_day;
  const last = q.period.last_day;
  const period = first && last ? `${longDate(first)} to ${longDate(last)}` : "no dates in the data";
  const data = inputs.files.find((f) => f.role === "windows" || f.role === "sessions");
  const source = data
    ? `${data.name} (${q.students.toLocaleString("en-US")} students, ${q.sessions.toLocaleString("en-US")} sessions${inputs.roster ? `; roster ${inputs.roster.file}` : ""})`
    : "not recorded";
  const usable = inputs.card.constructs.filter((c) => c.auc >= inputs.card.aucFloor);
  const weak = inputs.card.constructs.filter((c) => c.auc < inputs.card.aucFloor);
  const validated = inputs.card.validatedSettings;
  const local = new Set<string>();
  if (inputs.roster)
    for (const e of inputs.roster.entries.values()) if (e.setting !== "") local.add(e.setting);
  const missing = [...local].filter((s) => !validated.includes(s)).sort();
  let basedOn = `Detectors for ${usable.map((c) => c.label.toLowerCase()).join(", ")}`;
  basedOn +=
    usable.length > 0
      ? ` (A' from ${Math.min(...usable.map((c) => c.auc)).toFixed(2)} to ${Math.max(...usable.map((c) => c.auc)).toFixed(2)}).`
      : ".";
  if (weak.length > 0)
    basedOn += ` Not used: ${weak.map((c) => c.label.toLowerCase()).join(", ")} (detector too weak).`;
  basedOn +=
    validated.length > 0
      ? ` Checked on students in ${validated.join(", ")} settings.`
      : " The card does not say which students the detectors were checked on.";
  if (missing.length > 0)
    basedOn += ` Some students here are in ${missing.join(", ")} settings, which were not among them: read with extra care.`;
  return {
    siteTitle: inputs.settings.title,
    period,
    source,
    built: builtAt.slice(0, 10),
    basedOn,
    audiences: inputs.settings.audiences,
  };
}

/** A relative link from a page `depth` folders below the site root to a site path. */
export function href(depth: number, target: string): string {
  return `${"../".repeat(depth)}${target}`;
}

export function frame(
  facts: SiteFacts,
  page: {
    title: string;
    heading?: string;
    purpose: string;
    audience: string;
    confidential?: boolean;
    depth: number;
    current: Audience | "index";
  },
): PageFrame {
  const nav: NavLink[] = [
    { label: "Overview", href: href(page.depth, "index.html"), current: page.current === "index" },
  ];
  for (const f of FOLDERS) {
    if (!facts.audiences.includes(f.audience)) continue;
    nav.push({
      label: f.label,
      href: href(page.depth, `${f.audience}/index.html`),
      current: page.current === f.audience,
    });
  }
  return {
    siteTitle: facts.siteTitle,
    title: page.title,
    heading: page.heading ?? page.title,
    purpose: page.purpose,
    audience: page.audience,
    period: facts.period,
    source: facts.source,
    built: facts.built,
    basedOn: facts.basedOn,
    caution: text.caution,
    confidential: page.confidential ?? false,
    footer: text.footer,
    nav,
  };
}
