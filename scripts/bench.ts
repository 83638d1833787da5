/**
 * The scale benchmark: how fast and in how much memory `summarize` and `build` run on large
 * inputs, against the floor of reading the file and against DuckDB doing the same reduction.
 * A script, not a test: it times, it does not pass or fail (bar a wrong result, which stops it).
 *
 *   npm run bench                 full run: 1M and 10M rows (about 145 MB and 1.45 GB), 3 repetitions,
 *                                 demo districts of 1,000 and 10,000 students (15–40 minutes on 2 cores)
 *   npm run bench -- --quick      smoke run: 1M rows, 1 repetition, 1,000 students (2–3 minutes)
 *   options: --reps N (repetitions of each timing), --no-build (skip the build part),
 *            --out FILE (default bench/RESULTS.md; a quick run overwrites it too unless given)
 *
 * The first run generates about 4 GB of input in bench/data/ (about a minute); later runs reuse
 * it. Delete bench/data/ to start afresh (for instance after a change to the demo simulator).
 *
 * For each windows file (the demo simulator's rows, cut at exactly 1M or 10M; generated once and
 * kept in bench/data/, which git ignores, named by size and seed), each timing a child process whose
 * wall time and peak memory (RSS high-water mark) are recorded, medians over the repetitions:
 *   - the read floor: node -e reading the file in 4 MiB chunks and counting newlines;
 *   - `engagement-report summarize` (dist/cli/main.js) on the sorted file, and on the same rows
 *     shuffled (a cached copy), whose sessions.csv must be byte-identical to the sorted run's;
 *   - DuckDB (@duckdb/node-api, scripts/bench/duckdb-child.mjs): read_csv + GROUP BY for the
 *     counts and sums, and the same plus window functions for the sustained runs, with 1 and 2
 *     threads; on the 1M file its tables are checked against summarize's.
 * Then: `engagement-report --version` (start-up alone), the warm chart speed
 * (scripts/chart-speed.ts), and `build` on demo districts of 1,000 and 10,000 students, with and
 * without PDFs, plus a stage split (scripts/bench/stages.ts) and Chromium's own printing time for
 * the same HTML. Results and the targets, met or not, go to bench/RESULTS.md; anything below the
 * notes marker of that file is kept. The compiled code is copied to bench/data/snapshot/ when the
 * run starts and timed from there, so a rebuild of dist/ during the run changes nothing; its
 * fingerprint goes into the results.
 */
import { createHash } from "node:crypto";
import { mkdirSync, readdirSync, readFileSync, rmSync, writeFileSync } from "node:fs";
import { loadavg } from "node:os";
import { join } from "node:path";
import { parseArgs } from "node:util";
import { compareSessions } from "./bench/compare.js";
import { demoDistrict, shuffledFile, type WindowsFile, windowsFile } from "./bench/data.js";
import { cardModule, cliPath, distDir, pdfModule, ROOT, snapshotDist } from "./bench/dist.js";
import { describeMachine } from "./bench/machine.js";
import { memorySource, type Repeated, repeat, runNode } from "./bench/measure.js";
import { type BuildResult, type SizeResult, writeResults } from "./bench/report.js";
import type { StageTimes } from "./bench/stages.js";

const SEED = 1;
const SHUFFLE_SEED = 2;
const started = Date.now();
const loadAtStart = loadavg();
const { values } = parseArgs({
  options: {
    quick: { type: "boolean", default: false },
    reps: { type: "string" },
    "no-build": { type: "boolean", default: false },
    out: { type: "string", default: join(ROOT, "bench", "RESULTS.md") },
  },
});
const quick = values.quick === true;
const reps = values.reps === undefined ? (quick ? 1 : 3) : Number(values.reps);
if (!Number.isInteger(reps) || reps < 1)
  throw new Error(`--reps must be a whole number ≥ 1, got ${values.reps}`);
const sizes = quick ? [1_000_000] : [1_000_000, 10_000_000];
const districts = values["no-build"] ? [] : quick ? [1_000] : [1_000, 10_000];

const dataDir = join(ROOT, "bench", "data");
const work = join(dataDir, "work");
rmSync(work, { recursive: true, force: true });
mkdirSync(work, { recursive: true });
snapshotDist(join(dataDir, "snapshot"));
const CLI = cliPath();
const codeId = fingerprint(distDir());
const log = (line: string) => process.stderr.write(`${line}\n`);

let chromium: string | null = null;
try {
  chromium = (await pdfModule()).findChromium();
} catch {
  log("no Chromium found: the PDF timings are left out");
}

const READ_FLOOR = [
  'const fs = require("node:fs");',
  'const fd = fs.openSync(process.argv[1], "r");',
  "const buf = Buffer.allocUnsafe(4 << 20);",
  "let lines = 0;",
  "for (let n = fs.readSync(fd, buf); n > 0; n = fs.readSync(fd, buf)) {",
  "  const view = n === buf.length ? buf : buf.subarray(0, n);",
  "  for (let i = view.indexOf(10); i !== -1; i = view.indexOf(10, i + 1)) lines++;",
  "}",
  "process.stdout.write(String(lines));",
].join("\n");

function readFloor(file: WindowsFile): Repeated {
  const r = repeat(reps, () => ["-e", READ_FLOOR, file.path]);
  if (Number(r.last.stdout) !== file.rows + 1) throw new Error(`read floor counted ${r.last.stdout} lines`);
  return r;
}

function summarize(file: WindowsFile, out: string): Repeated {
  return repeat(reps, () => [CLI, "summarize", "--windows", file.path, "--card", file.card, "--out", out]);
}

const sha256 = (path: string) => createHash("sha256").update(readFileSync(path)).digest("hex");

/** A short hash of the compiled code timed (every .js file under dir, by path and content). */
function fingerprint(dir: string): string {
  const hash = createHash("sha256");
  const files = (readdirSync(dir, { recursive: true }) as string[]).filter((f) => f.endsWith(".js")).sort();
  for (const f of files)
    hash
      .update(f)
      .update("\u0000")
      .update(readFileSync(join(dir, f)))
      .update("\u0000");
  return `${hash.digest("hex").slice(0, 12)} (${files.length} files)`;
}

async function duckdb(file: WindowsFile, query: "aggregate" | "runs", threads: number): Promise<Repeated> {
  const card = (await cardModule()).loadCard(file.card);
  const job = join(work, `duckdb-${query}-${threads}.json`);
  writeFileSync(
    job,
    JSON.stringify({
      windows: file.path,
      out: join(work, `duckdb-${query}-${threads}.csv`),
      threads,
      query,
      windowSeconds: card.windowSeconds,
      tempDir: join(work, "duckdb-tmp"),
      constructs: card.constructs.map((c) => ({
        key: c.key,
        threshold: c.threshold,
        minRun: c.sustainedMinWindows,
      })),
    }),
  );
  log(`  DuckDB ${query}, ${threads} thread${threads > 1 ? "s" : ""}`);
  return repeat(reps, () => [join(ROOT, "scripts", "bench", "duckdb-child.mjs"), job]);
}

async function measureSize(rows: number): Promise<SizeResult> {
  const file = await windowsFile(dataDir, rows, SEED);
  const shuffled = await shuffledFile(file, SHUFFLE_SEED);
  log(`${rows.toLocaleString("en-US")} rows: read floor`);
  runNode(["-e", READ_FLOOR, file.path]); // warm the page cache
  const floor = readFloor(file);
  log("  summarize, sorted");
  const sortedOut = join(work, `sessions-${rows}-sorted.csv`);
  const sorted = summarize(file, sortedOut);
  log("  summarize, shuffled");
  runNode(["-e", READ_FLOOR, shuffled.path]);
  const shuffledOut = join(work, `sessions-${rows}-shuffled.csv`);
  const shuffledRun = summarize(shuffled, shuffledOut);
  const identical = sha256(sortedOut) === sha256(shuffledOut);
  if (!identical)
    log(`  sessions.csv differs between sorted and shuffled rows (${sortedOut}, ${shuffledOut})`);
  const duck = {
    aggregate1: await duckdb(file, "aggregate", 1),
    aggregate2: await duckdb(file, "aggregate", 2),
    runs1: await duckdb(file, "runs", 1),
    runs2: await duckdb(file, "runs", 2),
  };
  const duckCheck =
    rows === sizes[0]
      ? {
          aggregate: compareSessions(sortedOut, join(work, "duckdb-aggregate-2.csv")),
          runs: compareSessions(sortedOut, join(work, "duckdb-runs-2.csv")),
        }
      : undefined;
  return {
    rows,
    bytes: file.bytes,
    floor,
    summarize: sorted,
    shuffled: shuffledRun,
    identical,
    duck,
    ...(duckCheck ? { duckCheck } : {}),
  };
}

function chartSpeed(): { perSecond: number; line: string } {
  log("charts");
  const r = runNode(["--import", "tsx", join(ROOT, "scripts", "chart-speed.ts"), "1000"]);
  const line = r.stdout.trim();
  const match = /([\d.]+) charts per second/.exec(line);
  if (!match) throw new Error(`chart-speed printed: ${line}`);
  return { perSecond: Number(match[1]), line };
}

async function measureBuild(students: number): Promise<BuildResult> {
  const d = await demoDistrict(dataDir, students, SEED);
  const out = join(work, `build-${students}`);
  const args = (pdf: boolean) => [
    CLI,
    "build",
    "--windows",
    d.windows,
    "--card",
    d.card,
    "--roster",
    d.roster,
    "--out",
    out,
    ...(pdf ? [] : ["--no-pdf"]),
  ];
  const clear = () => rmSync(out, { recursive: true, force: true });
  log(`build, ${students.toLocaleString("en-US")} students: HTML only`);
  runNode(["-e", READ_FLOOR, d.windows]);
  const html = repeat(reps, () => args(false), clear);
  log("  with PDFs");
  const withPdf = chromium ? repeat(1, () => args(true), clear) : null;
  clear();
  log("  stages");
  const job = join(work, `stages-${students}.json`);
  writeFileSync(
    job,
    JSON.stringify({
      windows: d.windows,
      card: d.card,
      roster: d.roster,
      out: join(work, `stages-${students}`),
      chromium,
    }),
  );
  const stages = JSON.parse(
    runNode(["--import", "tsx", join(ROOT, "scripts", "bench", "stages.ts"), job]).stdout,
  ) as StageTimes;
  rmSync(join(work, `stages-${students}`), { recursive: true, force: true });
  return { students, rows: d.rows, bytes: d.bytes, html, withPdf, stages };
}

const sizeResults: SizeResult[] = [];
for (const rows of sizes) sizeResults.push(await measureSize(rows));
log("start-up");
const startup = repeat(reps, () => [CLI, "--version"]);
const charts = chartSpeed();
const builds: BuildResult[] = [];
for (const students of districts) builds.push(await measureBuild(students));

const argv = process.argv.slice(2).join(" ");
writeResults(values.out, {
  quick,
  reps,
  command: `npm run bench${argv ? ` -- ${argv}` : ""}`,
  machine: describeMachine(chromium),
  memorySource,
  sizes: sizeResults,
  startup,
  charts,
  builds,
  totalMinutes: (Date.now() - started) / 60000,
  load: { start: loadAtStart, end: loadavg() },
  code: codeId,
});
rmSync(work, { recursive: true, force: true });
log(`wrote ${values.out}`);
