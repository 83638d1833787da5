import { execFileSync, spawnSync } from "node:child_process";
import { existsSync, mkdtempSync, readFileSync } from "node:fs";
import { tmpdir } from "node:os";
import { join } from "node:path";
import { describe, expect, it } from "vitest";

// Runs the compiled CLI, as a user would (npm test builds dist/ first).
const cli = join(import.meta.dirname, "..", "..", "dist", "cli", "main.js");

describe("engagement-report command line", () => {
  it("builds the demo district into a folder with sessions, quality and manifest", () => {
    const out = join(mkdtempSync(join(tmpdir(), "er-cli-")), "report");
    execFileSync("node", [cli, "demo", "--out", out, "--students", "50", "--seed", "3"], { stdio: "pipe" });
    for (const f of ["data/sessions.csv", "data/quality.json", "manifest.json"])
      expect(existsSync(join(out, f))).toBe(true);
    const manifest = JSON.parse(readFileSync(join(out, "manifest.json"), "utf8")) as {
      tool: string;
      files: { path: string }[];
    };
    expect(manifest.tool).toBe("engagement-report");
    expect(manifest.files.map((f) => f.path)).toContain("data/sessions.csv");
    const check = spawnSync("node", [
      cli,
      "check",
      "--windows",
      "/nonexistent.csv",
      "--card",
      "/nonexistent.yaml",
    ]);
    expect(check.status).toBe(1);
    expect(check.stderr.toString()).toContain("cannot read the detector card /nonexistent.yaml");
    expect(check.stderr.toString()).not.toContain("    at ");
  });

  it("answers a wrong command line with exit code 2", () => {
    const r = spawnSync("node", [cli, "build", "--card"]);
    expect(r.status).toBe(2);
    expect(spawnSync("node", [cli, "nosuch"]).status).toBe(2);
  });
});
