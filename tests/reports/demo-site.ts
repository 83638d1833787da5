/**
 * Builds the demo district once per test run (compiled CLI, as a user would) and lists its pages.
 * The build is shared by the report tests through a promise cached on globalThis.
 */
import { spawnSync } from "node:child_process";
import { mkdirSync, mkdtempSync, readdirSync, readFileSync, statSync } from "node:fs";
import { tmpdir } from "node:os";
import { join, relative } from "node:path";
import { parse } from "csv-parse/sync";
import { writeDemoDistrict } from "../../src/demo/simulate.js";

const ROOT = join(import.meta.dirname, "..", "..");
export const CLI = join(ROOT, "dist", "cli", "main.js");

export interface DemoSite {
  readonly dir: string;
  readonly files: readonly string[];
  readonly roster: readonly { id: string; name: string }[];
}

export async function buildDemo(options: {
  pdf: boolean;
  students?: number;
  seed?: number;
}): Promise<DemoSite> {
  const parent = mkdtempSync(join(tmpdir(), "er-site-"));
  const inputs = join(parent, "inputs");
  mkdirSync(inputs);
  const paths = await writeDemoDistrict(inputs, {
    students: options.students ?? 120,
    seed: options.seed ?? 3,
    mode: "planted",
  });
  const dir = join(parent, "out");
  const args = [
    CLI,
    "build",
    "--windows",
    paths.windows,
    "--card",
    paths.card,
    "--roster",
    paths.roster,
    "--out",
    dir,
  ];
  if (!options.pdf) args.push("--no-pdf");
  const r = spawnSync(process.execPath, args, { encoding: "utf8" });
  if (r.status !== 0) throw new Error(`build failed (${r.status}): ${r.stderr}`);
  const files: string[] = [];
  const walk = (d: string) => {
    for (const name of readdirSync(d)) {
      const p = join(d, name);
      if (statSync(p).isDirectory()) walk(p);
      else files.push(relative(dir, p).split("\\").join("/"));
    }
  };
  walk(dir);
  const roster = parse(readFileSync(paths.roster, "utf8"), { columns: true }) as {
    student_id: string;
    display_name: string;
  }[];
  return {
    dir,
    files: files.sort(),
    roster: roster.map((r) => ({ id: r.student_id, name: r.display_name })),
  };
}

/** The prose of a page: tables, figures, navigation, header and footer removed, tags and numbers stripped. */
export function prose(html: string): string {
  return html
    .replace(/<head>[\s\S]*?<\/head>/g, " ")
    .replace(/<(table|svg|figure|nav|header|footer|dl)[\s\S]*?<\/\1>/g, " ")
    .replace(/<[^>]+>/g, " ")
    .replace(/&[a-z#0-9]+;/g, " ")
    .replace(/[0-9][0-9.,%]*/g, " ")
    .replace(/\s+/g, " ")
    .trim();
}
