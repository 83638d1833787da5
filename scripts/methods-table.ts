/**
 * The methods table: how the indicators fare against known truth in two simulated districts, the
 * demo (src/demo) and an independent one (tests/indicators/independent-district.ts), each over many
 * seeds, planted and null. Prints a markdown table and, when README.md holds the markers
 * `<!-- methods-table:start -->` and `<!-- methods-table:end -->`, replaces what lies between them
 * (nothing else in the file is touched).
 *
 * Usage: npm run methods-table [-- --seeds 10 --students 300]
 *
 * Figures, per usable construct, pooled over seeds:
 * - coverage: share of students past the evidence gate whose 95% share interval holds their true
 *   (realized) share, all runs; mean width of those intervals; ratio coverage: the same for the
 *   range of the ratio to peers, over rows that have one;
 * - recall: planted students (high boredom) with status check-in;
 * - false flags: check-in among rows whose true ratio to peers is below 1.2 in the concern
 *   direction (above 1/1.2 where higher is good), all runs;
 * - null check-in: check-in among all rows of the null runs (nothing planted, students
 *   exchangeable; in brackets: of them, rows whose true ratio is below 1.2);
 * - for the independent district also its "varied" runs (nothing planted, students truly differ):
 *   check-ins, false flags below a true ratio of 1.2, classes elevated (a line under the table);
 * - planted unit / class: runs in which the planted unit got `review` (gaming) and the planted
 *   class `elevated` (off task).
 */
import { mkdtempSync, readFileSync, rmSync, writeFileSync } from "node:fs";
import { tmpdir } from "node:os";
import { dirname, join } from "node:path";
import { fileURLToPath } from "node:url";
import { loadCard } from "../src/config/card.js";
import { DEFAULT_SETTINGS } from "../src/config/defaults.js";
import { type DemoTruth, writeDemoDistrict } from "../src/demo/simulate.js";
import { computeIndicators } from "../src/indicators/index.js";
import { summarizeWindowsFile } from "../src/ingest/windows.js";
import {
  emptyFigures,
  type Figures,
  type KnownTruth,
  pooledCounts,
  scoreRun,
  writeQuarryDistrict,
} from "../tests/indicators/independent-district.js";

const START = "<!-- methods-table:start -->";
const END = "<!-- methods-table:end -->";

function option(name: string, fallback: number): number {
  const i = process.argv.indexOf(`--${name}`);
  const value = i >= 0 ? Number(process.argv[i + 1]) : fallback;
  if (!Number.isInteger(value) || value < 1) throw new Error(`--${name} must be a whole number ≥ 1`);
  return value;
}

type Mode = "planted" | "null" | "varied";
type Simulation = "demo" | "independent";

interface Written {
  readonly windows: string;
  readonly card: string;
  readonly truth: KnownTruth;
}

async function write(
  sim: Simulation,
  dir: string,
  options: { students: number; seed: number; mode: Mode },
): Promise<Written> {
  if (sim === "independent") return writeQuarryDistrict(dir, options);
  if (options.mode === "varied") throw new Error("the demo district has no varied scenario");
  const paths = await writeDemoDistrict(dir, { ...options, mode: options.mode });
  const truth = JSON.parse(readFileSync(paths.truth, "utf8")) as DemoTruth;
  return { windows: paths.windows, card: paths.card, truth };
}

async function runAll(
  sim: Simulation,
  mode: Mode,
  seeds: readonly number[],
  students: number,
  into: Figures,
) {
  for (const seed of seeds) {
    const dir = mkdtempSync(join(tmpdir(), "er-methods-"));
    try {
      const written = await write(sim, dir, { students, seed, mode });
      const card = loadCard(written.card);
      const ingest = summarizeWindowsFile(written.windows, card, DEFAULT_SETTINGS);
      const indicators = computeIndicators({
        card,
        settings: DEFAULT_SETTINGS,
        summaries: ingest.summaries,
        hasActivity: ingest.columns.hasActivity,
      });
      scoreRun(into, { card, indicators, truth: written.truth });
    } finally {
      rmSync(dir, { recursive: true, force: true });
    }
    process.stderr.write(".");
  }
}

const pct = (num: number, den: number, digits = 1) =>
  den > 0 ? `${((100 * num) / den).toFixed(digits)}%` : "—";

function rows(sim: Simulation, planted: Figures, nulls: Figures, all: Figures): string[] {
  const out: string[] = [];
  for (const [construct, c] of [...all.coverage].sort(([a], [b]) => (a < b ? -1 : 1))) {
    const low = all.lowRatio.get(construct) ?? { total: 0, flagged: 0 };
    const rc = all.ratioCoverage.get(construct) ?? { covered: 0, total: 0, width: 0 };
    const n = nulls.checkIns.get(construct) ?? { rows: 0, gated: 0, flagged: 0 };
    const nLow = nulls.lowRatio.get(construct) ?? { total: 0, flagged: 0 };
    const isStudent = planted.studentConstructs.has(construct);
    const unit = planted.plantedUnits.filter((u) => u.construct === construct);
    const klass = planted.plantedClasses.filter((k) => k.construct === construct);
    const found = [
      unit.length > 0 ? `unit review ${unit.filter((u) => u.status === "review").length}/${unit.length}` : "",
      klass.length > 0
        ? `class elevated ${klass.filter((k) => k.status === "concern").length}/${klass.length}`
        : "",
    ]
      .filter(Boolean)
      .join("; ");
    out.push(
      `| ${sim} | ${construct} | ${(c.covered / c.total).toFixed(3)} (${c.total}) | ${(c.width / c.total).toFixed(3)} | ` +
        `${rc.total > 0 ? `${(rc.covered / rc.total).toFixed(3)} (${rc.total})` : "—"} | ` +
        `${isStudent ? `${pct(planted.planted.found, planted.planted.gated, 0)} (${planted.planted.found}/${planted.planted.gated})` : "—"} | ` +
        `${pct(low.flagged, low.total, 2)} (${low.flagged}/${low.total}) | ` +
        `${pct(n.flagged, n.rows, 2)} (${n.flagged}/${n.rows}; ${nLow.flagged} at true ratio < 1.2) | ${found || "—"} |`,
    );
  }
  return out;
}

async function main(): Promise<void> {
  const seeds = option("seeds", 10);
  const students = option("students", 300);
  const plantedSeeds = Array.from({ length: seeds }, (_, i) => i + 1);
  const nullSeeds = Array.from({ length: seeds }, (_, i) => i + 1001);
  const lines = [
    `Simulated districts of ${students} students, ${seeds} seeds planted and ${seeds} null each, default settings.`,
    "",
    "| simulation | construct | coverage (n) | mean width | ratio coverage (n) | recall | false flags, true ratio < 1.2 | null check-in | planted found |",
    "| --- | --- | --- | --- | --- | --- | --- | --- | --- |",
  ];
  const notes: string[] = [];
  for (const sim of ["demo", "independent"] as const) {
    const planted = emptyFigures();
    const nulls = emptyFigures();
    const all = emptyFigures();
    await runAll(sim, "planted", plantedSeeds, students, planted);
    await runAll(sim, "null", nullSeeds, students, nulls);
    // Coverage and false flags pool both scenarios: their tallies are added together.
    for (const f of [planted, nulls]) mergeInto(all, f);
    lines.push(...rows(sim, planted, nulls, all));
    notes.push(
      `- ${sim}, null runs (every unit effect 0): ${nulls.units.runsWithReview} of ${nulls.units.runs} with any unit review ` +
        `(${nulls.units.reviews} in all); unit p-values below 0.05 in ${pct(nulls.units.below05, nulls.units.tested)} ` +
        `of ${nulls.units.tested} tests; classes elevated in ${nulls.classes.elevated} of ${nulls.classes.shown} shown class rows.`,
    );
    if (sim === "independent") {
      const varied = emptyFigures();
      await runAll(
        sim,
        "varied",
        Array.from({ length: seeds }, (_, i) => i + 2001),
        students,
        varied,
      );
      const { total: rowsAll, flagged } = pooledCounts(varied, "checkIns");
      const { total: low, flagged: lowFlagged } = pooledCounts(varied, "lowRatio");
      notes.push(
        `- ${sim}, varied runs (nothing planted, students differ: logit sd 0.3): check-in ${pct(flagged, rowsAll, 2)} of ${rowsAll} rows; ` +
          `false flags at true ratio < 1.2 ${pct(lowFlagged, low, 2)} (${lowFlagged}/${low}); ` +
          `${varied.units.runsWithReview} of ${varied.units.runs} runs with any unit review; ` +
          `classes elevated in ${varied.classes.elevated} of ${varied.classes.shown} shown class rows.`,
      );
    }
  }
  process.stderr.write("\n");
  const table = `${[...lines, "", ...notes].join("\n")}\n`;
  process.stdout.write(table);
  const readme = join(dirname(fileURLToPath(import.meta.url)), "..", "README.md");
  const text = readFileSync(readme, "utf8");
  const start = text.indexOf(START);
  const end = text.indexOf(END);
  if (start >= 0 && end > start) {
    writeFileSync(readme, `${text.slice(0, start + START.length)}\n${table}${text.slice(end)}`);
    process.stderr.write("README.md: methods table updated between its markers.\n");
  } else {
    process.stderr.write("README.md has no methods-table markers; printed only.\n");
  }
}

/** Adds the counts of `from` into `into` (share and ratio coverage, low-ratio tallies). */
function mergeInto(into: Figures, from: Figures): void {
  for (const key of ["coverage", "ratioCoverage"] as const) {
    for (const [k, e] of from[key]) {
      const t = into[key].get(k) ?? { covered: 0, total: 0, width: 0 };
      into[key].set(k, {
        covered: t.covered + e.covered,
        total: t.total + e.total,
        width: t.width + e.width,
      });
    }
  }
  for (const [k, e] of from.lowRatio) {
    const t = into.lowRatio.get(k) ?? { total: 0, flagged: 0 };
    into.lowRatio.set(k, { total: t.total + e.total, flagged: t.flagged + e.flagged });
  }
}

await main();
