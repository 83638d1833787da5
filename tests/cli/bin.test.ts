/**
 * README's first command runs the package's bin through npx, which executes dist/cli/main.js
 * directly: the file must be executable and start with its shebang.
 */
import { spawnSync } from "node:child_process";
import { readFileSync, statSync } from "node:fs";
import { join } from "node:path";
import { describe, expect, it } from "vitest";
import { VERSION } from "../../src/version.js";

const ROOT = join(import.meta.dirname, "..", "..");
const BIN = join(ROOT, "dist", "cli", "main.js");

describe("the engagement-report bin", () => {
  it("is executable with a node shebang", () => {
    expect(statSync(BIN).mode & 0o111).not.toBe(0);
    expect(readFileSync(BIN, "utf8").startsWith("#!/usr/bin/env node\n")).toBe(true);
  });

  it("runs through npx from the project, as the README says", () => {
    const r = spawnSync("npx", ["--no-install", "engagement-report", "--version"], {
      cwd: ROOT,
      encoding: "utf8",
    });
    expect(r.status, r.stderr).toBe(0);
    expect(r.stdout.trim()).toBe(VERSION);
  }, 60_000);
});
