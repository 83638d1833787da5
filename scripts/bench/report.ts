/**
 * bench/RESULTS.md from one benchmark run: the machine, the targets with met / not met, and the
 * tables. Everything below the notes marker of an existing file is kept, so written diagnosis
 * survives a rerun.
 */
import { existsSync, readFileSync, writeFileSync } from "node:fs";
import type { Machine } from "./machine.js";
import type { Repeated } from "./measure.js";
import type { StageTimes } from "./stages.js";

export const NOTES_MARKER = "<!-- notes: the benchmark keeps everything below this line -->";

export interface SizeResult {
  readonly rows: number;
  readonly bytes: number;
  readonly floor: Repeated;
  readonly summarize: Repeated;
  readonly shuffled: Repeated | null;
  /** sessions.csv of the shuffled rows byte-identical to the sorted rows'. */
  readonly identical: boolean | null;
  readonly duck: {
    readonly aggregate1: Repeated;
    readonly aggregate2: Repeated;
    readonly runs1: Repeated;
    readonly runs2: Repeated;
  };
  /** DuckDB's tables against summarize's: null = same; a string says what differs; undefined = not checked. */
  readonly duckCheck?: { readonly aggregate: string | null; readonly runs: string | null };
}

export interface BuildResult {
  readonly students: number;
  readonly rows: number;
  readonly bytes: number;
  readonly html: Repeated;
  readonly withPdf: Repeated | null;
  readonly stages: StageTimes;
}

export interface BenchResults {
  readonly quick: boolean;
  readonly reps: number;
  readonly command: string;
  readonly machine: Machine;
  readonly memorySource: string;
  readonly sizes: readonly SizeResult[];
  readonly startup: Repeated;
  readonly charts: { readonly perSecond: number; readonly line: string } | null;
  readonly builds: readonly BuildResult[];
  readonly totalMinutes: number;
  /** 1-, 5- and 15-minute load averages when the run started and when it ended. */
  readonly load: { readonly start: readonly number[]; readonly end: readonly number[] };
  /** Fingerprint of the compiled code timed. */
  readonly code: string;
}

const s = (ms: number) => (ms / 1000).toFixed(2);
const mb = (kb: number) => ((kb * 1024) / 1e6).toFixed(0);
const rate = (n: number, ms: number) => Math.round(n / (ms / 1000)).toLocaleString("en-US");
const mbps = (bytes: number, ms: number) => (bytes / 1e6 / (ms / 1000)).toFixed(0);
const ratio = (a: number, b: number) => `${(a / b).toFixed(2)}×`;
const count = (n: number) => n.toLocaleString("en-US");
const runs = (r: Repeated) => r.runs.map(s).join(", ");

interface Target {
  readonly target: string;
  readonly measured: string;
  readonly met: boolean | null;
}

function verdict(met: boolean | null, partial: boolean): string {
  if (met === null) return "not measured";
  return `${met ? "met" : "**not met**"}${partial ? " (at a smaller size than the target's)" : ""}`;
}

function targets(r: BenchResults): { rows: Target[]; partial: { data: boolean; build: boolean } } {
  const big = r.sizes[r.sizes.length - 1]!;
  const small = r.sizes[0]!;
  const partialData = big.rows < 10_000_000;
  const build = r.builds[r.builds.length - 1];
  const partialBuild = build !== undefined && build.students < 10_000;
  const at = `${count(big.rows)} rows`;
  const rows: Target[] = [
    {
      target: "summarize wall ≤ DuckDB 2-thread aggregate (no runs)",
      measured: `${at}: ${s(big.summarize.ms)} s against ${s(big.duck.aggregate2.ms)} s (${ratio(big.summarize.ms, big.duck.aggregate2.ms)})`,
      met: big.summarize.ms <= big.duck.aggregate2.ms,
    },
    {
      target: "summarize wall ≤ 4× the read floor",
      measured: `${at}: ${ratio(big.summarize.ms, big.floor.ms)} (${s(big.summarize.ms)} s against ${s(big.floor.ms)} s)`,
      met: big.summarize.ms <= 4 * big.floor.ms,
    },
    {
      target: "summarize peak memory ≤ 250 MB",
      measured: r.sizes.map((x) => `${count(x.rows)} rows: ${mb(x.summarize.maxRssKb)} MB`).join("; "),
      met: r.sizes.every((x) => (x.summarize.maxRssKb * 1024) / 1e6 <= 250),
    },
    {
      target: "summarize memory flat: 10M rows within 20% of 1M",
      measured:
        r.sizes.length > 1
          ? `${mb(small.summarize.maxRssKb)} → ${mb(big.summarize.maxRssKb)} MB (${ratio(big.summarize.maxRssKb, small.summarize.maxRssKb)})`
          : "one size only",
      met: r.sizes.length > 1 ? big.summarize.maxRssKb <= 1.2 * small.summarize.maxRssKb : null,
    },
    {
      target: "shuffled rows: output byte-identical to sorted",
      measured: r.sizes
        .filter((x) => x.identical !== null)
        .map((x) => `${count(x.rows)} rows: ${x.identical ? "identical" : "DIFFERENT"}`)
        .join("; "),
      met: r.sizes.every((x) => x.identical !== false),
    },
    {
      target: "shuffled rows within 3× of sorted",
      measured: r.sizes
        .filter((x) => x.shuffled)
        .map(
          (x) =>
            `${count(x.rows)} rows: ${ratio(x.shuffled!.ms, x.summarize.ms)}; ${mb(x.shuffled!.maxRssKb)} MB peak`,
        )
        .join("; "),
      met: r.sizes.every((x) => !x.shuffled || x.shuffled.ms <= 3 * x.summarize.ms),
    },
  ];
  if (build) {
    rows.push({
      target: "demo of 10,000 students: build (HTML, --no-pdf) under a minute",
      measured: r.builds.map((b) => `${count(b.students)} students: ${s(b.html.ms)} s`).join("; "),
      met: build.html.ms < 60_000,
    });
  }
  rows.push({
    target: "charts ≥ 300 per second, warm",
    measured: r.charts ? r.charts.line : "not run",
    met: r.charts ? r.charts.perSecond >= 300 : null,
  });
  const withPdf = r.builds.filter((b) => b.stages.pdf);
  rows.push({
    target: "PDF printing within 1.3× of Chromium's own time for the same HTML",
    measured: withPdf.length
      ? withPdf
          .map(
            (b) =>
              `${count(b.students)} students: ${s(b.stages.pdf!.printPdfsMs)} s against ${s(b.stages.pdf!.chromiumPlainMs)} s (${ratio(b.stages.pdf!.printPdfsMs, b.stages.pdf!.chromiumPlainMs)})`,
          )
          .join("; ")
      : "no Chromium",
    met: withPdf.length
      ? withPdf.every((b) => b.stages.pdf!.printPdfsMs <= 1.3 * b.stages.pdf!.chromiumPlainMs)
      : null,
  });
  return { rows, partial: { data: partialData, build: partialBuild } };
}

export function renderResults(r: BenchResults): string {
  const m = r.machine;
  const { rows: goals, partial } = targets(r);
  const out: string[] = [];
  out.push(
    "# Benchmark results",
    "",
    `Written by \`${r.command}\` (${r.quick ? "quick run: 1M rows, 1 repetition, 1,000 students" : `full run: ${r.reps} repetitions, medians`}) in ${r.totalMinutes.toFixed(1)} minutes. Rerun to refresh; see scripts/bench.ts for what each line measures.`,
    "",
    "## Machine",
    "",
    `- CPU: ${m.cpu}, ${m.cores} cores available`,
    `- Memory: ${m.memoryGb.toFixed(1)} GB; ${m.kernel}`,
    `- Node ${m.node}; ${m.duckdb}; ${m.chromium}`,
    `- Date: ${m.date}; compiled code timed: dist/ snapshot ${r.code}`,
    `- Load average (1, 5, 15 min) at the start: ${r.load.start.map((x) => x.toFixed(2)).join(", ")}; at the end: ${r.load.end.map((x) => x.toFixed(2)).join(", ")}. ` +
      "Other work on the machine slows wall times; CPU time (user + system of the child) is less affected.",
    `- Peak memory: ${r.memorySource}, the largest single process of the child's tree. Input files are read warm (from the page cache): each file is read once before it is timed.`,
    "",
    "## Targets",
    "",
    "| target | measured | verdict |",
    "| --- | --- | --- |",
  );
  for (const g of goals) {
    const isBuild = g.target.startsWith("demo") || g.target.startsWith("PDF");
    const isData = g.target.startsWith("summarize") || g.target.startsWith("shuffled");
    out.push(
      `| ${g.target} | ${g.measured} | ${verdict(g.met, (isData && partial.data) || (isBuild && partial.build))} |`,
    );
  }
  out.push(
    "",
    "## Windows file → sessions table",
    "",
    "Wall time is from spawning the child process to its exit (Node's start-up included: " +
      `\`engagement-report --version\` alone takes ${s(r.startup.ms)} s and ${mb(r.startup.maxRssKb)} MB). ` +
      "MB = 10^6 bytes. The read floor is `node -e` reading the file in 4 MiB chunks with fs.readSync and counting newlines. " +
      "DuckDB reads the same CSV with read_csv (column types given) and writes the sessions table with COPY; " +
      "*aggregate* is GROUP BY for windows, sum_p, sum_p2 and above; *runs* adds the sustained episodes and longest run " +
      "with window functions (gaps and islands), which is the whole of what `summarize` computes.",
    "",
    "| rows | file | run | median wall (s) | runs (s) | CPU (s) | rows/s | MB/s | peak memory (MB) | vs read floor | vs DuckDB aggregate 2 threads |",
    "| --- | --- | --- | --- | --- | --- | --- | --- | --- | --- | --- |",
  );
  for (const x of r.sizes) {
    const line = (name: string, rep: Repeated) =>
      `| ${count(x.rows)} | ${(x.bytes / 1e6).toFixed(0)} MB | ${name} | ${s(rep.ms)} | ${runs(rep)} | ${s(rep.cpuMs)} | ${rate(x.rows, rep.ms)} | ${mbps(x.bytes, rep.ms)} | ${mb(rep.maxRssKb)} | ${ratio(rep.ms, x.floor.ms)} | ${ratio(rep.ms, x.duck.aggregate2.ms)} |`;
    out.push(line("read floor", x.floor), line("**summarize** (sorted)", x.summarize));
    if (x.shuffled) out.push(line("**summarize** (shuffled)", x.shuffled));
    out.push(
      line("DuckDB aggregate, 1 thread", x.duck.aggregate1),
      line("DuckDB aggregate, 2 threads", x.duck.aggregate2),
      line("DuckDB aggregate + runs, 1 thread", x.duck.runs1),
      line("DuckDB aggregate + runs, 2 threads", x.duck.runs2),
    );
  }
  out.push("");
  for (const x of r.sizes) {
    if (x.identical !== null)
      out.push(
        `- ${count(x.rows)} rows: sessions.csv from the shuffled rows is ${x.identical ? "byte-identical to" : "**different from**"} the sorted run's; shuffled / sorted = ${ratio(x.shuffled!.ms, x.summarize.ms)}.`,
      );
    if (x.duckCheck) {
      const say = (name: string, d: string | null) =>
        d === null ? `${name}: same rows and values` : `${name}: **differs** (${d})`;
      out.push(
        `- ${count(x.rows)} rows, DuckDB's tables against summarize's (counts exact, sums within 1e-9): ${say("aggregate", x.duckCheck.aggregate)}; ${say("aggregate + runs", x.duckCheck.runs)}.`,
      );
    }
  }
  if (r.builds.length > 0) {
    out.push(
      "",
      "## build on the demo district",
      "",
      "`engagement-report build --windows --card --roster` on the demo district's files (generated beforehand), as a child process. " +
        "The stage split comes from a separate run of the same calls from dist/ in one process (scripts/bench/stages.ts): " +
        "ingest = loadInputs (read, validate, summarise), indicators = computeIndicators, charts = time inside the chart renderer during buildSite, " +
        "HTML = the rest of buildSite (templates), write = data tables and pages to disk, PDF = printPdfs.",
      "",
      "| students | windows rows | build --no-pdf (s) | runs (s) | CPU (s) | peak memory (MB) | build with PDFs (s) | peak memory (MB) |",
      "| --- | --- | --- | --- | --- | --- | --- | --- |",
    );
    for (const b of r.builds) {
      out.push(
        `| ${count(b.students)} | ${count(b.rows)} (${(b.bytes / 1e6).toFixed(0)} MB) | ${s(b.html.ms)} | ${runs(b.html)} | ${s(b.html.cpuMs)} | ${mb(b.html.maxRssKb)} | ${b.withPdf ? s(b.withPdf.ms) : "–"} | ${b.withPdf ? mb(b.withPdf.maxRssKb) : "–"} |`,
      );
    }
    out.push(
      "",
      "| students | ingest (s) | indicators (s) | charts (s) | charts | charts/s in the build | HTML (s) | write (s) | pages | HTML MB | PDF (s) | PDFs | peak memory (MB) |",
      "| --- | --- | --- | --- | --- | --- | --- | --- | --- | --- | --- | --- | --- |",
    );
    for (const b of r.builds) {
      const t = b.stages;
      out.push(
        `| ${count(b.students)} | ${s(t.ingestMs)} | ${s(t.indicatorsMs)} | ${s(t.chartsMs)} | ${count(t.charts)} | ${rate(t.charts, t.chartsMs)} | ${s(t.htmlMs)} | ${s(t.writeMs)} | ${count(t.pages)} | ${(t.htmlBytes / 1e6).toFixed(1)} | ${t.pdf ? s(t.pdf.printPdfsMs) : "–"} | ${t.pdf ? t.pdf.jobs : "–"} | ${mb(t.maxRssKb)} |`,
      );
    }
    const withPdf = r.builds.filter((b) => b.stages.pdf);
    if (withPdf.length > 0) {
      out.push(
        "",
        "PDF printing against Chromium's own time for the same HTML. *Chromium, defaults*: one puppeteer launch, then for each bundle " +
          "(the same bundled HTML printPdfs prints, written beforehand) page.goto and page.pdf with Letter and backgrounds only, " +
          "with as many tabs printing at once as printPdfs uses (queue biggest first, as printPdfs). " +
          "*Chromium, our options*: the same with printPdfs' options (tagged, outline, running header and footer, margins). " +
          "printPdfs includes its own launch, bundling and temporary files.",
        "",
        "| students | PDFs | tabs | bundled HTML MB | PDF MB | printPdfs (s) | Chromium, defaults (s) | Chromium, our options (s) | printPdfs / defaults | printPdfs / our options |",
        "| --- | --- | --- | --- | --- | --- | --- | --- | --- | --- |",
      );
      for (const b of withPdf) {
        const p = b.stages.pdf!;
        out.push(
          `| ${count(b.students)} | ${p.jobs} | ${p.tabs} | ${(p.bundleBytes / 1e6).toFixed(1)} | ${(p.pdfBytes / 1e6).toFixed(1)} | ${s(p.printPdfsMs)} | ${s(p.chromiumPlainMs)} | ${s(p.chromiumSameOptionsMs)} | ${ratio(p.printPdfsMs, p.chromiumPlainMs)} | ${ratio(p.printPdfsMs, p.chromiumSameOptionsMs)} |`,
        );
      }
    }
  }
  if (r.charts) out.push("", `Charts (scripts/chart-speed.ts, warm, one process): ${r.charts.line}`);
  out.push("", NOTES_MARKER, "");
  return out.join("\n");
}

/** Writes the results, keeping the notes below the marker of the file already there. */
export function writeResults(path: string, r: BenchResults): void {
  const old = existsSync(path) ? readFileSync(path, "utf8") : "";
  const at = old.indexOf(NOTES_MARKER);
  const notes = at >= 0 ? old.slice(at + NOTES_MARKER.length).replace(/^\n+/, "") : "";
  writeFileSync(path, `${renderResults(r)}${notes}`);
}
