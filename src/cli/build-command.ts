/**
 * The `build` command (also the end of `demo`): read → validate → summarise → estimate → model the
 * report → render → print, inside one atomic output folder. A module of its own so that the light
 * commands (`summarize`, `check`, `sql`, `--help`) do not load the indicators, charts and browser code.
 */
import { mkdirSync } from "node:fs";
import { join, resolve } from "node:path";
import type { Effects } from "../effects.js";
import { computeIndicators } from "../indicators/index.js";
import { checkOutputDir, writeChunks, writeFolderAtomically } from "../output/atomic.js";
import { activitiesCsv, groupsCsv, studentsCsv, trendsCsv, unitsCsv } from "../output/indicator-csv.js";
import { manifestFor } from "../output/manifest.js";
import { type InputPaths, loadInputs, requireSessions } from "../pipeline/inputs.js";
import { createChartRenderer } from "../reports/charts.js";
import { findChromium, printPdfs } from "../reports/pdf.js";
import { buildSite } from "../reports/site.js";
import { pdfJobs, writeSite } from "../reports/write.js";
import { sessionsCsv } from "../summaries/sessions-csv.js";
import { VERSION } from "../version.js";

export interface BuildOptions {
  readonly pdf: boolean;
  readonly command: string;
}

/**
 * read → validate → summarise → estimate → model the report → render → print, inside one atomic
 * output folder. The browser is looked for before anything is written, so a missing one fails early.
 */
export async function build(
  paths: InputPaths,
  out: string,
  effects: Effects,
  options: BuildOptions,
): Promise<void> {
  checkOutputDir(out);
  const chromium = options.pdf ? findChromium() : null;
  const inputs = loadInputs(paths, effects);
  requireSessions(inputs);
  const indicators = computeIndicators(inputs);
  const buildTime = inputs.settings.buildTime ?? effects.now().toISOString();
  const pages = await buildSite({ inputs, indicators, builtAt: buildTime }, createChartRenderer());
  await writeFolderAtomically(out, async (tmp) => {
    mkdirSync(join(tmp, "data"));
    const data = (name: string) => join(tmp, "data", name);
    writeChunks(data("sessions.csv"), sessionsCsv(inputs.summaries, inputs.hasActivity));
    writeChunks(data("quality.json"), `${JSON.stringify(inputs.quality, null, 2)}\n`);
    writeChunks(data("students.csv"), studentsCsv(indicators.students));
    writeChunks(data("units.csv"), unitsCsv(indicators.units));
    if (inputs.hasActivity) writeChunks(data("activities.csv"), activitiesCsv(indicators.activities));
    writeChunks(data("groups.csv"), groupsCsv(indicators.groups));
    writeChunks(data("trends.csv"), trendsCsv(indicators.trends));
    writeSite(tmp, pages);
    if (chromium) {
      const fixed = inputs.settings.buildTime ? new Date(inputs.settings.buildTime) : undefined;
      await printPdfs(
        pdfJobs(tmp, pages, inputs.settings.title, inputs.settings.allStudentPages),
        chromium,
        fixed,
      );
    }
    // Last: the manifest lists every file written before it.
    writeChunks(
      join(tmp, "manifest.json"),
      manifestFor(tmp, {
        version: VERSION,
        buildTime,
        inputs: inputs.files,
        card: inputs.card,
        settings: inputs.settings,
        command: options.command,
      }),
    );
  });
  for (const w of effects.warnings.list) effects.err(`warning: ${w}`);
  effects.out(`wrote ${resolve(out)}`);
}
