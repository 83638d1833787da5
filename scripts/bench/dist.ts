/**
 * The compiled modules the benchmark runs, typed by their sources. The benchmark times the code
 * users run, so it imports compiled code rather than src/: a snapshot of dist/ taken when the run
 * starts (see snapshotDist), so that a rebuild during a long run does not change what is timed.
 * Children find the snapshot through the environment variable below; without it, dist/ itself.
 */
import { cpSync, existsSync, mkdirSync, rmSync } from "node:fs";
import { join } from "node:path";
import { fileURLToPath, pathToFileURL } from "node:url";

export const ROOT = fileURLToPath(new URL("../../", import.meta.url));
const ENV = "ENGAGEMENT_REPORT_BENCH_DIST";

export const distDir = (): string => process.env[ENV] ?? join(ROOT, "dist");
export const cliPath = (): string => join(distDir(), "cli", "main.js");

/**
 * Copies dist/ with what it reads beside it (templates/, schemas/, package.json) into `dir`, and
 * points this process and its children at the copy. Packages still resolve from the project's
 * node_modules, a few folders up.
 */
export function snapshotDist(dir: string): void {
  rmSync(dir, { recursive: true, force: true });
  mkdirSync(dir, { recursive: true });
  for (const name of ["dist", "templates", "schemas", "package.json"])
    cpSync(join(ROOT, name), join(dir, name), { recursive: true });
  process.env[ENV] = join(dir, "dist");
}

async function dist<T>(path: string): Promise<T> {
  const file = join(distDir(), path);
  if (!existsSync(file)) throw new Error(`${file} is missing: run npm run build first.`);
  return (await import(pathToFileURL(file).href)) as T;
}

export const demoSimulate = () => dist<typeof import("../../src/demo/simulate.js")>("demo/simulate.js");
export const demoFiles = () => dist<typeof import("../../src/demo/files.js")>("demo/files.js");
export const cardModule = () => dist<typeof import("../../src/config/card.js")>("config/card.js");
export const randomModule = () => dist<typeof import("../../src/stats/random.js")>("stats/random.js");
export const effectsModule = () => dist<typeof import("../../src/effects.js")>("effects.js");
export const inputsModule = () => dist<typeof import("../../src/pipeline/inputs.js")>("pipeline/inputs.js");
export const indicatorsModule = () =>
  dist<typeof import("../../src/indicators/index.js")>("indicators/index.js");
export const siteModule = () => dist<typeof import("../../src/reports/site.js")>("reports/site.js");
export const chartsModule = () => dist<typeof import("../../src/reports/charts.js")>("reports/charts.js");
export const pdfModule = () => dist<typeof import("../../src/reports/pdf.js")>("reports/pdf.js");
export const writeModule = () => dist<typeof import("../../src/reports/write.js")>("reports/write.js");
export const atomicModule = () => dist<typeof import("../../src/output/atomic.js")>("output/atomic.js");
export const indicatorCsvModule = () =>
  dist<typeof import("../../src/output/indicator-csv.js")>("output/indicator-csv.js");
export const sessionsCsvModule = () =>
  dist<typeof import("../../src/summaries/sessions-csv.js")>("summaries/sessions-csv.js");
