/**
 * Profiles `engagement-report summarize` on a windows file and prints the functions with the most
 * self time. Run `npm run build` first; the profile is of dist/, as users run it.
 *
 *   npx tsx scripts/profile-summarize.ts --windows W.csv --card card.yaml [--top 25]
 *
 * Writes the V8 CPU profile (.cpuprofile, which Chrome DevTools opens) into a temporary folder and
 * names it; the table below sums each function's self time over the whole run, start-up included.
 */
import { spawnSync } from "node:child_process";
import { mkdtempSync, readdirSync, readFileSync } from "node:fs";
import { tmpdir } from "node:os";
import { join, resolve } from "node:path";
import { parseArgs } from "node:util";

interface ProfileNode {
  readonly id: number;
  readonly callFrame: { functionName: string; url: string; lineNumber: number };
}

interface CpuProfile {
  readonly nodes: readonly ProfileNode[];
  readonly samples: readonly number[];
  readonly timeDeltas: readonly number[];
}

const { values } = parseArgs({
  options: { windows: { type: "string" }, card: { type: "string" }, top: { type: "string" } },
});
if (!values.windows || !values.card) {
  console.error("usage: tsx scripts/profile-summarize.ts --windows FILE --card FILE [--top N]");
  process.exit(2);
}
const dir = mkdtempSync(join(tmpdir(), "engagement-report-profile-"));
const main = resolve("dist/cli/main.js");
const args = ["--cpu-prof", "--cpu-prof-dir", dir, main, "summarize"];
args.push("--windows", values.windows, "--card", values.card, "--out", join(dir, "sessions.csv"));
const run = spawnSync(process.execPath, args, { stdio: ["ignore", "inherit", "inherit"] });
if (run.status !== 0) process.exit(run.status ?? 1);

const file = readdirSync(dir).find((f) => f.endsWith(".cpuprofile"))!;
const profile = JSON.parse(readFileSync(join(dir, file), "utf8")) as CpuProfile;
const byId = new Map(profile.nodes.map((n) => [n.id, n]));
const self = new Map<string, number>();
let total = 0;
profile.samples.forEach((id, i) => {
  const dt = profile.timeDeltas[i] ?? 0;
  total += dt;
  const frame = byId.get(id)!.callFrame;
  const where = `${frame.url.split("/").slice(-2).join("/")}:${frame.lineNumber + 1}`;
  const key = `${frame.functionName || "(anonymous)"} ${where}`;
  self.set(key, (self.get(key) ?? 0) + dt);
});
console.log(`profile: ${join(dir, file)}`);
console.log(`sampled ${(total / 1e3).toFixed(0)} ms`);
const top = Number(values.top ?? 25);
for (const [key, us] of [...self].sort((a, b) => b[1] - a[1]).slice(0, top)) {
  console.log(
    `${(us / 1e3).toFixed(0).padStart(7)} ms ${((100 * us) / total).toFixed(1).padStart(5)}%  ${key}`,
  );
}
