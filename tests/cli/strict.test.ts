/**
 * Strict mode (settings `strict: true`): the first rejected row stops build and summarize with
 * exit code 1, a message naming file:line:col, and nothing written. Runs the compiled CLI as a user
 * would (npm test builds dist/ first); src/cli/main.ts runs main() when imported, so it is not
 * imported here.
 */
import { spawnSync } from "node:child_process";
import { existsSync, mkdtempSync, readdirSync, readFileSync, writeFileSync } from "node:fs";
import { tmpdir } from "node:os";
import { join } from "node:path";
import { describe, expect, it } from "vitest";

const cli = join(import.meta.dirname, "..", "..", "dist", "cli", "main.js");

const CARD = `window_seconds: 20
constructs:
  bored:
    label: Boredom
    kind: affect
    higher_is: concern
    auc: 0.71
    auc_positives: 140
    auc_negatives: 1100
    threshold: 0.5
`;

const HEADER = "student_id,class_id,unit_id,session_id,window_start,bored";
const GOOD = [
  "s1,c1,u1,x,2026-02-03T09:00:00-06:00,0.6",
  "s1,c1,u1,x,2026-02-03T09:00:20-06:00,0.7",
  "s2,c1,u1,y,2026-02-03T09:00:00-06:00,0.2",
];

const SESSIONS_HEADER =
  "student_id,class_id,school_id,unit_id,session_id,day,construct,windows,sum_p,sum_p2,above,sustained_episodes,longest_run";
const SESSION_ROW = "s1,c1,,u1,x,2026-02-03,bored,3,1.5,0.9,2,0,2";

/** A folder holding the card, a strict and a lenient settings file, and the given files. */
function workspace(files: Record<string, string>): string {
  const dir = mkdtempSync(join(tmpdir(), "er-strict-"));
  writeFileSync(join(dir, "card.yaml"), CARD);
  writeFileSync(join(dir, "strict.yaml"), "strict: true\n");
  writeFileSync(join(dir, "lenient.yaml"), "strict: false\n");
  for (const [name, text] of Object.entries(files)) writeFileSync(join(dir, name), text);
  return dir;
}

const csv = (...lines: string[]) => `${lines.join("\n")}\n`;

function run(dir: string, args: string[]) {
  const r = spawnSync("node", [cli, ...args], { cwd: dir, encoding: "utf8" });
  return { status: r.status, stdout: r.stdout, stderr: r.stderr };
}

/** The run stopped with exit 1 on the row at `at` (file:line:col), printed no stack, wrote nothing. */
function expectStopped(r: ReturnType<typeof run>, at: string | RegExp, dir: string, before: string[]): void {
  expect(r.status).toBe(1);
  const first = r.stderr.split("\n")[0]!;
  if (typeof at === "string") expect(first).toContain(`engagement-report: ${at}: `);
  else expect(first).toMatch(at);
  expect(first).toContain("strict: true");
  expect(r.stderr).not.toContain("    at ");
  expect(r.stdout).toBe("");
  expect(readdirSync(dir).sort()).toEqual(before);
}

describe("strict mode on the command line", () => {
  it("build: one out-of-range probability stops the run; without strictness it is counted and skipped", () => {
    const dir = workspace({
      "windows.csv": csv(HEADER, GOOD[0]!, "s1,c1,u1,x,2026-02-03T09:00:20-06:00,1.7"),
    });
    const before = readdirSync(dir).sort();
    const args = ["build", "--windows", "windows.csv", "--card", "card.yaml", "--out", "report"];
    // Line 3; bored starts at character 38 (counted by hand).
    expectStopped(run(dir, [...args, "--settings", "strict.yaml"]), "windows.csv:3:38", dir, before);
    const lenient = run(dir, [...args, "--settings", "lenient.yaml"]);
    expect(lenient.status).toBe(0);
    expect(existsSync(join(dir, "report", "manifest.json"))).toBe(true);
  });

  it("build: a strict failure leaves an earlier output folder exactly as it was", () => {
    const dir = workspace({
      "good.csv": csv(HEADER, ...GOOD),
      "bad.csv": csv(HEADER, GOOD[0]!, "s1,c1,,x,2026-02-03T09:00:20-06:00,0.5"),
    });
    const base = ["build", "--card", "card.yaml", "--settings", "strict.yaml", "--out", "report"];
    expect(run(dir, [...base, "--windows", "good.csv"]).status).toBe(0);
    const manifest = readFileSync(join(dir, "report", "manifest.json"), "utf8");
    const sessions = readFileSync(join(dir, "report", "data", "sessions.csv"), "utf8");
    const before = readdirSync(dir).sort();
    // Line 3: unit_id is empty; its (empty) field starts at character 7.
    expectStopped(run(dir, [...base, "--windows", "bad.csv"]), "bad.csv:3:7", dir, before);
    expect(readFileSync(join(dir, "report", "manifest.json"), "utf8")).toBe(manifest);
    expect(readFileSync(join(dir, "report", "data", "sessions.csv"), "utf8")).toBe(sessions);
  });

  it("summarize: stops on a bad row, writes no sessions file and keeps an existing one", () => {
    const dir = workspace({
      "windows.csv": csv(HEADER, ...GOOD, "s3,c1,u1,z,2026-02-03T09:00:00,0.4"),
      "sessions.csv": "previous\n",
    });
    const before = readdirSync(dir).sort();
    const args = [
      "summarize",
      "--windows",
      "windows.csv",
      "--card",
      "card.yaml",
      "--settings",
      "strict.yaml",
    ];
    // Line 5: window_start without an offset, at character 12.
    expectStopped(run(dir, [...args, "--out", "sessions.csv"]), "windows.csv:5:12", dir, before);
    expect(readFileSync(join(dir, "sessions.csv"), "utf8")).toBe("previous\n");
    expectStopped(run(dir, [...args, "--out", "new.csv"]), "windows.csv:5:12", dir, before);
  });

  it("stops on broken structure: a row with an extra field, a broken quote", () => {
    const dir = workspace({
      "extra.csv": csv(HEADER, `${GOOD[0]},9`),
      "quote.csv": csv(HEADER, GOOD[0]!, 's1,c1,u1,x,2026-02-03T09:00:20-06:00,"0.6'),
    });
    const before = readdirSync(dir).sort();
    const args = (file: string) => [
      "build",
      "--windows",
      file,
      "--card",
      "card.yaml",
      "--settings",
      "strict.yaml",
      "--out",
      "report",
    ];
    // The extra field starts at character 42; the broken quote at 38.
    expectStopped(run(dir, args("extra.csv")), "extra.csv:2:42", dir, before);
    expectStopped(run(dir, args("quote.csv")), "quote.csv:3:38", dir, before);
  });

  it("stops on rows that disagree, found only when an unsorted sitting is replayed", () => {
    const dir = workspace({
      "windows.csv": csv(
        HEADER,
        "s1,c1,u1,x,2026-02-03T09:00:20-06:00,0.6",
        "s1,c1,u1,x,2026-02-03T09:00:00-06:00,0.6",
        "s1,c1,u1,x,2026-02-03T09:00:20-06:00,0.7",
      ),
    });
    const before = readdirSync(dir).sort();
    const r = run(dir, [
      "summarize",
      "--windows",
      "windows.csv",
      "--card",
      "card.yaml",
      "--settings",
      "strict.yaml",
      "--out",
      "sessions.csv",
    ]);
    // The earliest of the rows (line 2), at the first field where it differs from line 4: bored,
    // at character 38 (counted by hand), with its value and the other line.
    expectStopped(r, "windows.csv:2:38", dir, before);
    expect(r.stderr).toContain('column bored, value "0.6"; same key as line 4, with different values.');
  });

  it("build from a sessions file: a value that is not a number stops the run", () => {
    const dir = workspace({
      "sessions.csv": csv(SESSIONS_HEADER, SESSION_ROW, "s1,c1,,u1,y,2026-02-03,bored,3,x,0.9,2,0,2"),
    });
    const before = readdirSync(dir).sort();
    const r = run(dir, [
      "build",
      "--sessions",
      "sessions.csv",
      "--card",
      "card.yaml",
      "--settings",
      "strict.yaml",
      "--out",
      "report",
    ]);
    // Line 3: sum_p ("x") starts at character 32.
    expectStopped(r, "sessions.csv:3:32", dir, before);
  });

  it("build from a sessions file: a row with a missing field stops the run", () => {
    const dir = workspace({
      "sessions.csv": csv(SESSIONS_HEADER, SESSION_ROW, "s1,c1,,u1,y,2026-02-03,bored,3,1.5,0.9,2,0"),
    });
    const before = readdirSync(dir).sort();
    const r = run(dir, [
      "build",
      "--sessions",
      "sessions.csv",
      "--card",
      "card.yaml",
      "--settings",
      "strict.yaml",
      "--out",
      "report",
    ]);
    // The row ends after character 42 (counted by hand), so the missing longest_run would start at 43.
    expectStopped(r, "sessions.csv:3:43", dir, before);
    expect(r.stderr).toContain("the row ends after sustained_episodes, so longest_run is missing");
  });

  it("build from a sessions file: rows with the same key that disagree stop the run at the earlier", () => {
    const dir = workspace({
      "sessions.csv": csv(
        SESSIONS_HEADER,
        SESSION_ROW,
        "s2,c1,,u1,x,2026-02-03,bored,3,1.5,0.9,2,0,2",
        "s1,c1,,u1,x,2026-02-03,bored,3,1.6,0.9,2,0,2",
      ),
    });
    const before = readdirSync(dir).sort();
    const r = run(dir, [
      "build",
      "--sessions",
      "sessions.csv",
      "--card",
      "card.yaml",
      "--settings",
      "strict.yaml",
      "--out",
      "report",
    ]);
    // Lines 2 and 4 differ first in sum_p, which starts at character 32 of line 2.
    expectStopped(r, "sessions.csv:2:32", dir, before);
    expect(r.stderr).toContain('column sum_p, value "1.5"; same key as line 4, with different values.');
  });

  it("build with a roster: a roster row without a student_id stops the run", () => {
    const dir = workspace({
      "windows.csv": csv(HEADER, ...GOOD),
      "roster.csv": csv("student_id,display_name", "s1,Ann Example", ",Nobody"),
    });
    const before = readdirSync(dir).sort();
    const r = run(dir, [
      "build",
      "--windows",
      "windows.csv",
      "--roster",
      "roster.csv",
      "--card",
      "card.yaml",
      "--settings",
      "strict.yaml",
      "--out",
      "report",
    ]);
    expectStopped(r, "roster.csv:3:1", dir, before);
  });

  it("build with a roster: two rows for one student that disagree stop the run at the earlier", () => {
    const dir = workspace({
      "windows.csv": csv(HEADER, ...GOOD),
      "roster.csv": csv(
        "student_id,display_name,grade",
        "s1,Ann Example,5",
        "s2,Bo Example,6",
        "s1,Ann Example,6",
      ),
    });
    const before = readdirSync(dir).sort();
    const r = run(dir, [
      "build",
      "--windows",
      "windows.csv",
      "--roster",
      "roster.csv",
      "--card",
      "card.yaml",
      "--settings",
      "strict.yaml",
      "--out",
      "report",
    ]);
    // Lines 2 and 4 differ in grade, which starts at character 16 of line 2.
    expectStopped(r, "roster.csv:2:16", dir, before);
    expect(r.stderr).toContain('column grade, value "5"; same key as line 4, with different values.');
  });
});
