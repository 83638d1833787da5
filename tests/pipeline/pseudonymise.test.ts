/**
 * Keyed pseudonymisation, end to end: with a key in the settings no roster id or name reaches any
 * output file (HTML, CSV, JSON), the key itself is written nowhere, and the pseudonyms are
 * HMAC-SHA-256 as published.
 */
import { spawnSync } from "node:child_process";
import { mkdirSync, mkdtempSync, readdirSync, readFileSync, statSync, writeFileSync } from "node:fs";
import { tmpdir } from "node:os";
import { join } from "node:path";
import { parse } from "csv-parse/sync";
import { beforeAll, describe, expect, it } from "vitest";
import { writeDemoDistrict } from "../../src/demo/simulate.js";
import { pseudonymFor } from "../../src/pipeline/pseudonymise.js";

const CLI = join(import.meta.dirname, "..", "..", "dist", "cli", "main.js");
const KEY = "a-long-test-secret-for-pseudonyms";

describe("pseudonymFor", () => {
  it("is HMAC-SHA-256 (RFC 4231, test case 2: key 'Jefe')", () => {
    // RFC 4231 §4.3: HMAC-SHA-256("Jefe", "what do ya want for nothing?") = 5bdcc146bf60754e…
    expect(pseudonymFor(Buffer.from("Jefe"), "what do ya want for nothing?")).toBe("p-5bdcc146bf60");
  });
});

describe("a build with a pseudonymisation key", () => {
  let out: string;
  let roster: { student_id: string; display_name: string }[];
  let files: string[];
  let card: string;
  beforeAll(async () => {
    const dir = mkdtempSync(join(tmpdir(), "er-pseudo-"));
    const inputs = join(dir, "in");
    mkdirSync(inputs);
    const paths = await writeDemoDistrict(inputs, { students: 60, seed: 4, mode: "planted" });
    card = paths.card;
    const settings = join(dir, "settings.yaml");
    writeFileSync(settings, "pseudonymise:\n  key_env: ER_TEST_PSEUDONYM_KEY\n");
    out = join(dir, "out");
    const r = spawnSync(
      process.execPath,
      [
        CLI,
        "build",
        "--windows",
        paths.windows,
        "--card",
        paths.card,
        "--roster",
        paths.roster,
        "--settings",
        settings,
        "--out",
        out,
        "--no-pdf",
      ],
      { encoding: "utf8", env: { ...process.env, ER_TEST_PSEUDONYM_KEY: KEY } },
    );
    expect(r.status, r.stderr).toBe(0);
    roster = parse(readFileSync(paths.roster, "utf8"), { columns: true });
    files = [];
    const walk = (d: string) => {
      for (const n of readdirSync(d)) {
        const p = join(d, n);
        if (statSync(p).isDirectory()) walk(p);
        else files.push(p);
      }
    };
    walk(out);
  }, 120_000);

  it("writes no roster id or name and not the key, in any file", () => {
    expect(files.length).toBeGreaterThan(5);
    for (const f of files) {
      const text = readFileSync(f, "utf8");
      expect(text.includes(KEY), f).toBe(false);
      for (const s of roster) {
        expect(new RegExp(`\\b${s.student_id}\\b`).test(text), `${f} holds ${s.student_id}`).toBe(false);
        expect(text.includes(s.display_name), `${f} holds ${s.display_name}`).toBe(false);
      }
    }
  });

  it("uses the keyed pseudonyms in the student table", () => {
    const rows = parse(readFileSync(join(out, "data", "students.csv"), "utf8"), { columns: true }) as {
      student_id: string;
    }[];
    const expected = new Set(roster.map((s) => pseudonymFor(Buffer.from(KEY), s.student_id)));
    for (const r of rows) expect(expected.has(r.student_id)).toBe(true);
  });

  it("refuses a key variable that is not set", () => {
    const dir = mkdtempSync(join(tmpdir(), "er-pseudo-bad-"));
    const settings = join(dir, "settings.yaml");
    writeFileSync(settings, "pseudonymise:\n  key_env: ER_TEST_UNSET_KEY_VARIABLE\n");
    const r = spawnSync(
      process.execPath,
      [CLI, "check", "--sessions", join(out, "data", "sessions.csv"), "--card", card, "--settings", settings],
      { encoding: "utf8" },
    );
    expect(r.status).toBe(1);
    expect(r.stderr).toMatch(/ER_TEST_UNSET_KEY_VARIABLE/);
  });
});
