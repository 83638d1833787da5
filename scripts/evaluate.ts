/**
 * Simulation check of the indicators against the demo's known truth: interval coverage, recall of
 * planted students, false flags. Usage: tsx scripts/evaluate.ts [students] [seeds] [--null]
 */
import { mkdtempSync, readFileSync, rmSync } from "node:fs";
import { tmpdir } from "node:os";
import { join } from "node:path";
import { loadCard } from "../src/config/card.js";
import { DEFAULT_SETTINGS } from "../src/config/defaults.js";
import { type DemoTruth, writeDemoDistrict } from "../src/demo/simulate.js";
import { computeIndicators } from "../src/indicators/index.js";
import { summarizeWindowsFile } from "../src/ingest/windows.js";

const students = Number(process.argv[2] ?? 300);
const seeds = Number(process.argv[3] ?? 3);
const nullMode = process.argv.includes("--null");
const line = Number(process.env.LINE ?? DEFAULT_SETTINGS.flags.studentRatio);
const settings = { ...DEFAULT_SETTINGS, flags: { ...DEFAULT_SETTINGS.flags, studentRatio: line } };
const tally = new Map<string, { covered: number; total: number; width: number }>();
let planted = 0;
let recalled = 0;
let lowTrue = 0;
let lowFlagged = 0;
let rows = 0;
let checkins = 0;
for (let seed = 1; seed <= seeds; seed++) {
  const dir = mkdtempSync(join(tmpdir(), "er-eval-"));
  const paths = await writeDemoDistrict(dir, { students, seed, mode: nullMode ? "null" : "planted" });
  const card = loadCard(paths.card);
  const w = summarizeWindowsFile(paths.windows, card, settings);
  const truth = JSON.parse(readFileSync(paths.truth, "utf8")) as DemoTruth;
  const ind = computeIndicators({ card, settings, summaries: w.summaries, hasActivity: true });
  const byId = new Map(truth.students.map((s) => [s.student_id, s]));
  for (const row of ind.students) {
    const t = byId.get(row.studentId)!;
    const k = truth.constructs.indexOf(row.construct as never);
    if (row.status === "detector-too-weak") continue;
    rows++;
    if (row.status === "suggested") {
      checkins++;
      if (nullMode && process.env.SHOW)
        console.log(
          "null flag",
          seed,
          row.studentId,
          row.construct,
          "trueRatio",
          t.ratio[k]?.toFixed(2),
          "est",
          row.ratio?.value.toFixed(2),
          row.ratio?.low.toFixed(2),
          row.ratio?.high.toFixed(2),
          row.windows,
          row.sessions,
        );
    }
    if (row.status === "too-little-data") continue;
    const trueShare = t.share[k]!;
    const e = tally.get(row.construct) ?? { covered: 0, total: 0, width: 0 };
    if (row.share) {
      e.total++;
      e.width += row.share.high - row.share.low;
      if (trueShare >= row.share.low - 1e-12 && trueShare <= row.share.high + 1e-12) e.covered++;
    }
    tally.set(row.construct, e);
    const trueRatio = t.ratio[k]!;
    if (t.planted[k]) {
      planted++;
      if (row.status === "suggested") recalled++;
    } else if (
      card.constructs.find((c) => c.key === row.construct)?.higherIs === "good"
        ? trueRatio > 1 / 1.2
        : trueRatio < 1.2
    ) {
      lowTrue++;
      if (row.status === "suggested") {
        lowFlagged++;
        if (process.env.SHOW)
          console.log(
            "false flag",
            seed,
            row.studentId,
            row.construct,
            "true",
            trueRatio.toFixed(2),
            "share",
            trueShare.toFixed(3),
            "est",
            row.ratio?.value.toFixed(2),
            row.ratio?.low.toFixed(2),
            row.ratio?.high.toFixed(2),
            row.windows,
            row.sessions,
            "estshare",
            row.share?.value.toFixed(3),
            row.share?.low.toFixed(3),
            row.share?.high.toFixed(3),
          );
      }
    }
  }
  rmSync(dir, { recursive: true, force: true });
}
for (const [k, e] of tally)
  console.log(
    `${k.padEnd(14)} coverage ${(e.covered / e.total).toFixed(3)} (n=${e.total}) mean width ${(e.width / e.total).toFixed(3)}`,
  );
console.log(`planted recall ${recalled}/${planted} = ${(recalled / planted).toFixed(3)}`);
console.log(`flags among true ratio < 1.2: ${lowFlagged}/${lowTrue} = ${(lowFlagged / lowTrue).toFixed(4)}`);
console.log(`check-in rows ${checkins}/${rows} = ${(checkins / rows).toFixed(4)}`);
