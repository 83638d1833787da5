/**
 * Golden output: the demo district built as `npm run sample` builds it (200 students, the sample
 * settings with a fixed build time) must give exactly the committed sample-output/ (every page
 * and table; the PDFs and the manifest that lists them are left to `npm run sample`, since this
 * build skips the browser). A change of output is a change to review: regenerate with
 * `npm run sample` and commit the diff. On a mismatch the new build is left in place for diffing.
 */
import { spawnSync } from "node:child_process";
import { mkdtempSync, readdirSync, readFileSync, rmSync, statSync } from "node:fs";
import { tmpdir } from "node:os";
import { join, relative } from "node:path";
import { describe, expect, it } from "vitest";

const ROOT = join(import.meta.dirname, "..", "..");

function list(dir: string): string[] {
  const out: string[] = [];
  const walk = (d: string) => {
    for (const n of readdirSync(d)) {
      const p = join(d, n);
      if (statSync(p).isDirectory()) walk(p);
      else if (!n.endsWith(".pdf") && n !== "manifest.json") out.push(relative(dir, p));
    }
  };
  walk(dir);
  return out.sort();
}

describe("sample-output", () => {
  it("is what the demo builds today", () => {
    const dir = join(mkdtempSync(join(tmpdir(), "er-golden-")), "out");
    const r = spawnSync(
      process.execPath,
      [
        join(ROOT, "dist", "cli", "main.js"),
        "demo",
        "--out",
        dir,
        "--students",
        "200",
        "--settings",
        join(ROOT, "tests", "fixtures", "sample-settings.yaml"),
        "--no-pdf",
      ],
      { encoding: "utf8" },
    );
    expect(r.status, r.stderr).toBe(0);
    const golden = join(ROOT, "sample-output");
    const built = list(dir);
    expect(built, `files differ; new build left in ${dir}`).toEqual(list(golden));
    for (const f of built) {
      const same = readFileSync(join(dir, f)).equals(readFileSync(join(golden, f)));
      expect(
        same,
        `${f} differs from sample-output; new build left in ${dir} (run npm run sample to accept)`,
      ).toBe(true);
    }
    rmSync(dir, { recursive: true, force: true });
  }, 120_000);
});
