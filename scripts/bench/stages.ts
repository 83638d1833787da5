/**
 * One build, stage by stage, in its own process: the same calls as `engagement-report build`, from
 * the compiled modules, each timed. Then, when asked, the PDFs twice more as references for
 * printPdfs: Chromium printing the same bundled HTML through puppeteer, with as many tabs at once
 * as printPdfs uses, with page.pdf's defaults (Letter, backgrounds), and with our options
 * (tagged, outline, running header and footer).
 *
 *   node --import tsx scripts/bench/stages.ts JOB.json   → one JSON line on stdout
 *
 * JOB.json: { windows, card, roster, out, chromium (null: no PDFs) }
 */
import { mkdirSync, readFileSync, rmSync, statSync, writeFileSync } from "node:fs";
import { join } from "node:path";
import { performance } from "node:perf_hooks";
import { pathToFileURL } from "node:url";
import type { Chart, ChartRenderer } from "../../src/reports/charts.js";
import type { PdfJob } from "../../src/reports/pdf.js";
import {
  atomicModule,
  chartsModule,
  effectsModule,
  indicatorCsvModule,
  indicatorsModule,
  inputsModule,
  pdfModule,
  sessionsCsvModule,
  siteModule,
  writeModule,
} from "./dist.js";

interface Job {
  windows: string;
  card: string;
  roster: string;
  out: string;
  chromium: string | null;
}

export interface StageTimes {
  ingestMs: number;
  indicatorsMs: number;
  chartsMs: number;
  charts: number;
  htmlMs: number;
  writeMs: number;
  pages: number;
  htmlBytes: number;
  pdf: null | {
    printPdfsMs: number;
    jobs: number;
    /** Tabs printing at once, in printPdfs and in the two references. */
    tabs: number;
    pdfBytes: number;
    bundleBytes: number;
    /** Chromium alone, page.pdf defaults: launch, then load and print each bundle. */
    chromiumPlainMs: number;
    /** Chromium alone, with the options printPdfs passes. */
    chromiumSameOptionsMs: number;
  };
  maxRssKb: number;
}

const job = JSON.parse(readFileSync(process.argv[2]!, "utf8")) as Job;
const time = async <T>(body: () => T | Promise<T>): Promise<[T, number]> => {
  const start = performance.now();
  const value = await body();
  return [value, performance.now() - start];
};

const { Warnings } = await effectsModule();
const { loadInputs, requireSessions } = await inputsModule();
const { computeIndicators } = await indicatorsModule();
const { buildSite } = await siteModule();
const { createChartRenderer } = await chartsModule();
const { writeSite, pdfJobs } = await writeModule();
const pdfApi = await pdfModule();
const { printPdfs, bundle, LAUNCH_ARGS } = pdfApi;
/** Tabs printPdfs prints with at once (1 when the module does not say). */
const tabs = (pdfApi as { PRINTING_TABS?: number }).PRINTING_TABS ?? 1;
const { writeChunks } = await atomicModule();
const csv = await indicatorCsvModule();
const { sessionsCsv } = await sessionsCsvModule();

const effects = { now: () => new Date(), out: () => {}, err: () => {}, warnings: new Warnings() };
const [inputs, ingestMs] = await time(() =>
  loadInputs({ windows: job.windows, card: job.card, roster: job.roster }, effects),
);
requireSessions(inputs);
const [indicators, indicatorsMs] = await time(() => computeIndicators(inputs));

/** The renderer the build uses, with the time spent inside it added up (buildSite awaits charts one by one). */
let chartsMs = 0;
let charts = 0;
const base = createChartRenderer();
const timed =
  <O>(render: (options: O) => Promise<Chart>) =>
  async (options: O): Promise<Chart> => {
    const start = performance.now();
    const chart = await render(options);
    chartsMs += performance.now() - start;
    charts++;
    return chart;
  };
const renderer: ChartRenderer = { intervals: timed(base.intervals), trend: timed(base.trend) };
const [pages, siteMs] = await time(() =>
  buildSite({ inputs, indicators, builtAt: "2026-01-15T12:00:00Z" }, renderer),
);

rmSync(job.out, { recursive: true, force: true });
mkdirSync(join(job.out, "data"), { recursive: true });
const [, writeMs] = await time(() => {
  const data = (name: string) => join(job.out, "data", name);
  writeChunks(data("sessions.csv"), sessionsCsv(inputs.summaries, inputs.hasActivity));
  writeChunks(data("quality.json"), `${JSON.stringify(inputs.quality, null, 2)}\n`);
  writeChunks(data("students.csv"), csv.studentsCsv(indicators.students));
  writeChunks(data("units.csv"), csv.unitsCsv(indicators.units));
  if (inputs.hasActivity) writeChunks(data("activities.csv"), csv.activitiesCsv(indicators.activities));
  writeChunks(data("groups.csv"), csv.groupsCsv(indicators.groups));
  writeChunks(data("trends.csv"), csv.trendsCsv(indicators.trends));
  writeSite(job.out, pages);
});

let pdf: StageTimes["pdf"] = null;
if (job.chromium) {
  const jobs = pdfJobs(job.out, pages, inputs.settings.title);
  const bundles = jobs.map((j, i) => {
    const file = join(job.out, `bench-bundle-${i}.html`);
    writeFileSync(file, bundle(j.title, j.pages));
    return file;
  });
  const sizes = bundles.map((f) => statSync(f).size);
  const bundleBytes = sizes.reduce((sum, n) => sum + n, 0);
  // Untimed: one small print first, so that no timing pays for the first launch (binary, fonts).
  const smallest = sizes.indexOf(Math.min(...sizes));
  await printDirect([jobs[smallest]!], [bundles[smallest]!], job.chromium, "plain");
  const [, printPdfsMs] = await time(() => printPdfs(jobs, job.chromium!));
  const pdfBytes = jobs.reduce((sum, j) => sum + statSync(j.path).size, 0);
  const [, chromiumPlainMs] = await time(() => printDirect(jobs, bundles, job.chromium!, "plain"));
  const [, chromiumSameOptionsMs] = await time(() => printDirect(jobs, bundles, job.chromium!, "same"));
  for (const f of bundles) rmSync(f);
  pdf = {
    printPdfsMs,
    jobs: jobs.length,
    tabs,
    pdfBytes,
    bundleBytes,
    chromiumPlainMs,
    chromiumSameOptionsMs,
  };
}

const result: StageTimes = {
  ingestMs,
  indicatorsMs,
  chartsMs,
  charts,
  htmlMs: siteMs - chartsMs,
  writeMs,
  pages: pages.length,
  htmlBytes: pages.reduce((sum, p) => sum + Buffer.byteLength(p.html), 0),
  pdf,
  maxRssKb: process.resourceUsage().maxRSS,
};
process.stdout.write(`${JSON.stringify(result)}\n`);

/**
 * Chromium printing the already-bundled HTML files: one launch, then as many tabs as printPdfs
 * uses (PRINTING_TABS), each taking the next bundle from one queue, biggest first, as printPdfs
 * does; each tab loads a bundle and prints it.
 */
async function printDirect(
  jobs: readonly PdfJob[],
  bundles: readonly string[],
  chromium: string,
  options: "plain" | "same",
): Promise<void> {
  const { default: puppeteer } = await import("puppeteer");
  const profile = join(job.out, `bench-profile-${options}`);
  const browser = await puppeteer.launch({
    executablePath: chromium,
    args: [...LAUNCH_ARGS, `--user-data-dir=${profile}`],
  });
  const queue = bundles
    .map((file, i) => ({ file, path: `${jobs[i]!.path}.${options}.pdf`, size: statSync(file).size }))
    .sort((a, b) => b.size - a.size);
  const tab = async () => {
    const page = await browser.newPage();
    for (let next = queue.shift(); next; next = queue.shift()) {
      await page.goto(pathToFileURL(next.file).href, { waitUntil: "load" });
      await page.pdf(
        options === "plain"
          ? { path: next.path, format: "Letter", printBackground: true }
          : {
              path: next.path,
              format: "Letter",
              printBackground: true,
              tagged: true,
              outline: true,
              displayHeaderFooter: true,
              headerTemplate: '<div style="font-size:8px;width:100%;text-align:center;">header</div>',
              footerTemplate:
                '<div style="font-size:8px;width:100%;text-align:center;">Page <span class="pageNumber"></span> of <span class="totalPages"></span></div>',
              margin: { top: "12mm", bottom: "11mm", left: "10mm", right: "10mm" },
            },
      );
      rmSync(next.path);
    }
    await page.close();
  };
  try {
    await Promise.all(Array.from({ length: Math.min(tabs, bundles.length) }, tab));
  } finally {
    await browser.close();
    rmSync(profile, { recursive: true, force: true });
  }
}
