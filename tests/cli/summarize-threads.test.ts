/**
 * summarize --threads: the compiled CLI (npm run build first) writes the same sessions.csv and
 * the same data-quality account (on standard error) with one thread and with two, and refuses any
 * other value with exit code 2 and a message naming the option and the value.
 */
import { spawnSync } from "node:child_process";
import { mkdtempSync, readFileSync } from "node:fs";
import { tmpdir } from "node:os";
import { join } from "node:path";
import { describe, expect, it } from "vitest";
import { writeDemoDistrict } from "../../src/demo/simulate.js";

const cli = join(import.meta.dirname, "..", "..", "dist", "cli", "main.js");

describe("summarize --threads", () => {
  it("writes the same file and account with one thread and with two", async () => {
    const dir = mkdtempSync(join(tmpdir(), "er-cli-threads-"));
    const paths = await writeDemoDistrict(dir, { students: 60, seed: 4, mode: "planted" });
    const run = (threads: string) => {
      const out = join(dir, `sessions-${threads}.csv`);
      const r = spawnSync("node", [
        cli,
        "summarize",
        "--windows",
        paths.windows,
        "--card",
        paths.card,
        "--out",
        out,
        "--threads",
        threads,
      ]);
      expect(r.status).toBe(0);
      return { csv: readFileSync(out, "utf8"), account: r.stderr.toString() };
    };
    const one = run("1");
    expect(one.csv.split("\n").length).toBeGreaterThan(1000);
    expect(run("2")).toEqual(one);
  });

  it("refuses a value other than 1 or 2", () => {
    const r = spawnSync("node", [
      cli,
      "summarize",
      "--windows",
      "w.csv",
      "--card",
      "c.yaml",
      "--out",
      "o.csv",
      "--threads",
      "3",
    ]);
    expect(r.status).toBe(2);
    expect(r.stderr.toString()).toContain(
      '--threads must be 1 or 2; got "3". Give 1 to read in one thread, or leave it out to let summarize choose.',
    );
  });
});
