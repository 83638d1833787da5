/**
 * Bad input gets a clear answer and loses nothing. Each case runs the compiled command line (as a
 * user would; `npm test` builds dist/ first) on a broken input from tests/fixtures/broken/, or one
 * written here when bytes are easier to make in code, and checks:
 * - the exit code documented in `engagement-report --help`: 1 for an unusable input, 2 for a wrong
 *   command line, 0 when some rows are rejected but others are good;
 * - the message names the file and, where there is one, the line and column, and says what to do;
 * - no stack trace unless --debug is given;
 * - a failed `build --out DIR` leaves neither DIR nor a temporary folder beside it;
 * - rejected rows are counted by reason and every valid row is kept.
 * The expected counts, lines and columns were counted by hand from the fixture files (columns are
 * 1-based characters; e.g. "s1,c1,u1,x1," is 12 characters, so window_start starts at column 13).
 */
import { spawnSync } from "node:child_process";
import { mkdtempSync, readdirSync, readFileSync, rmSync, writeFileSync } from "node:fs";
import { tmpdir } from "node:os";
import { join } from "node:path";
import { afterAll, describe, expect, it } from "vitest";

const root = join(import.meta.dirname, "..", "..");
const cli = join(root, "dist", "cli", "main.js");
const fx = (name: string): string => join(root, "tests", "fixtures", "broken", name);
const card = fx("card.yaml");
const scratch = mkdtempSync(join(tmpdir(), "er-broken-"));
afterAll(() => rmSync(scratch, { recursive: true, force: true }));

const HEADER = "student_id,class_id,unit_id,session_id,window_start,bored";

interface Run {
  readonly status: number | null;
  readonly stdout: string;
  readonly stderr: string;
}

function run(...args: string[]): Run {
  const r = spawnSync(process.execPath, [cli, ...args], { encoding: "utf8" });
  return { status: r.status, stdout: r.stdout, stderr: r.stderr };
}

/** A stack frame as Node prints it: four spaces, "at ". (Examples in `check` output are indented six.) */
const STACK_FRAME = /^ {4}at /m;

function expectNoStack(r: Run): void {
  expect(r.stderr).not.toMatch(STACK_FRAME);
  expect(r.stdout).not.toMatch(STACK_FRAME);
  expect(r.stderr).not.toContain("internal error");
}

/** A fresh, empty parent folder; `build --out <parent>/report`. */
function outDir(): { parent: string; out: string } {
  const parent = mkdtempSync(join(scratch, "out-"));
  return { parent, out: join(parent, "report") };
}

/**
 * An unusable input: `check` and `build` both exit 1 with a message (on stderr) holding every
 * expected piece, no stack, and `build` leaves its parent folder empty (no output, no temporary).
 */
function expectFatal(inputs: readonly string[], says: readonly (string | RegExp)[]): void {
  const check = run("check", ...inputs);
  const { parent, out } = outDir();
  const build = run("build", ...inputs, "--out", out);
  for (const r of [check, build]) {
    expect(r.status).toBe(1);
    for (const s of says) {
      if (typeof s === "string") expect(r.stderr).toContain(s);
      else expect(r.stderr).toMatch(s);
    }
    expectNoStack(r);
  }
  expect(readdirSync(parent)).toEqual([]);
}

interface ReasonCount {
  readonly reason: string;
  readonly text: string;
  readonly count: number;
  readonly examples: readonly { at: string; column?: string; value?: string; detail?: string }[];
}

interface FileAccount {
  readonly file: string;
  readonly rows_read: number;
  readonly rows_accepted: number;
  readonly rows_rejected: number;
  readonly duplicates: number;
  readonly rejected_by_reason: readonly ReasonCount[];
  readonly duplicate_examples: readonly { at: string; value?: string }[];
}

interface Built {
  readonly check: Run;
  readonly account: FileAccount;
  readonly reasons: Record<string, number>;
  /** Examples' locations by reason. */
  readonly at: Record<string, string[]>;
  /** data/sessions.csv: windows per student (bored is the only construct). */
  readonly windows: Record<string, number>;
}

/**
 * Rows rejected, others good: `check` exits 0 and prints the account; `build` exits 0 and writes
 * quality.json and sessions.csv, read back here.
 */
function buildWithRejects(inputs: readonly string[]): Built {
  const check = run("check", ...inputs);
  expect(check.status).toBe(0);
  expectNoStack(check);
  const { out } = outDir();
  const build = run("build", ...inputs, "--out", out);
  expect(build.status).toBe(0);
  expectNoStack(build);
  const quality = JSON.parse(readFileSync(join(out, "data", "quality.json"), "utf8")) as {
    inputs: FileAccount[];
  };
  const account = quality.inputs[0]!;
  const [head, ...rows] = readFileSync(join(out, "data", "sessions.csv"), "utf8")
    .trim()
    .split(/\r?\n/);
  const names = head!.split(",");
  const windows: Record<string, number> = {};
  for (const row of rows) {
    const cells = row.split(",");
    const student = cells[names.indexOf("student_id")]!;
    windows[student] = (windows[student] ?? 0) + Number(cells[names.indexOf("windows")]);
  }
  return {
    check,
    account,
    reasons: Object.fromEntries(account.rejected_by_reason.map((r) => [r.reason, r.count])),
    at: Object.fromEntries(account.rejected_by_reason.map((r) => [r.reason, r.examples.map((e) => e.at)])),
    windows,
  };
}

function expectAccount(b: Built, read: number, accepted: number, rejected: number, duplicates = 0): void {
  expect(b.account.rows_read).toBe(read);
  expect(b.account.rows_accepted).toBe(accepted);
  expect(b.account.rows_rejected).toBe(rejected);
  expect(b.account.duplicates).toBe(duplicates);
  // Nothing is lost: every row read is accepted, rejected or a counted duplicate.
  expect(accepted + rejected + duplicates).toBe(read);
}

describe("unusable windows files: exit 1, a clear message, no output folder", () => {
  it("missing required columns: names them, shows the header, says what to do", () => {
    expectFatal(
      ["--windows", fx("windows-missing-columns.csv"), "--card", card],
      [
        "windows-missing-columns.csv:1: missing required columns unit_id, window_start",
        "The header has: student_id, class_id, session_id, bored",
        "Add them to the header row",
      ],
    );
  });

  it("an empty file (0 bytes) and a header with no rows", () => {
    expectFatal(
      ["--windows", fx("windows-empty.csv"), "--card", card],
      ["windows-empty.csv: the windows file is empty. It needs a header row and at least one data row."],
    );
    expectFatal(
      ["--windows", fx("windows-header-only.csv"), "--card", card],
      [
        "windows-header-only.csv: the windows file has a header row but no data rows",
        "Check that the export",
      ],
    );
  });

  it("a stray quote in the header row: line 1, the column of the quote, what to do", () => {
    // student_id,class"_id: the quote is the 17th character.
    expectFatal(
      ["--windows", fx("windows-header-quote.csv"), "--card", card],
      ["windows-header-quote.csv:1:17: the header row: a quote inside an unquoted field", "double the quote"],
    );
  });

  it("a file that does not exist: names it and says to check the path", () => {
    const missing = join(scratch, "no-such-windows.csv");
    expectFatal(
      ["--windows", missing, "--card", card],
      [`cannot read the windows file ${missing}: no such file. Check the path`],
    );
    expectFatal(
      ["--windows", fx("windows-bad-numbers.csv"), "--card", join(scratch, "no-such-card.yaml")],
      ["cannot read the detector card", "no-such-card.yaml: no such file"],
    );
  });

  it("every row rejected: check prints the account and says so on stderr; build writes nothing", () => {
    const path = join(scratch, "all-rejected.csv");
    writeFileSync(path, `${HEADER}\ns1,c1,u1,x1,2026-02-03T09:00:00,0.5\n`);
    const check = run("check", "--windows", path, "--card", card);
    expect(check.status).toBe(1);
    expect(check.stdout).toContain("at all-rejected.csv:2:13  window_start");
    expect(check.stderr).toContain("no usable rows: every data row was rejected");
    expectNoStack(check);
    const { parent, out } = outDir();
    const build = run("build", "--windows", path, "--card", card, "--out", out);
    expect(build.status).toBe(1);
    expect(build.stderr).toContain("no usable rows");
    expect(readdirSync(parent)).toEqual([]);
  });
});

describe("broken cards and settings: exit 1, file:line:column, no output folder", () => {
  const windows = ["--windows", fx("windows-bad-numbers.csv")];

  it("a card value of the wrong type (auc: high)", () => {
    expectFatal(
      [...windows, "--card", fx("card-wrong-type.yaml")],
      ['card-wrong-type.yaml:7:10: constructs.bored.auc: expected a number, found "high"'],
    );
  });

  it("a card with an unknown key: where it is, the keys allowed, check the spelling", () => {
    expectFatal(
      [...windows, "--card", fx("card-unknown-key.yaml")],
      [
        'card-unknown-key.yaml:11:5: unknown key "constructs.bored.colour"',
        /allowed here: label, kind, higher_is, auc, .*threshold/,
        "Check the spelling.",
      ],
    );
  });

  it("a settings file that is not YAML (`: : [`)", () => {
    expectFatal(
      [...windows, "--card", card, "--settings", fx("settings-not-yaml.yaml")],
      [/settings-not-yaml\.yaml:\d+:\d+: not valid YAML: /],
    );
  });

  it("a settings file of binary junk", () => {
    const path = join(scratch, "settings-binary.yaml");
    writeFileSync(path, Buffer.from(Array.from({ length: 256 }, (_, i) => (i * 151 + 7) % 256)));
    // Byte 2 is 0x9E (1 × 151 + 7 = 158), a continuation byte with no lead: not UTF-8 from there.
    expectFatal(
      [...windows, "--card", card, "--settings", path],
      ["settings-binary.yaml:1:2: the settings is not UTF-8 text", "Give a YAML file saved as UTF-8."],
    );
  });
});

describe("rows rejected, the rest kept: exit 0, every row accounted for", () => {
  it("non-numeric and out-of-range probabilities (1.2, -0.1)", () => {
    const b = buildWithRejects(["--windows", fx("windows-bad-numbers.csv"), "--card", card]);
    // 7 rows: "high" (line 3), 1.2 (line 4), -0.1 (line 5) rejected; line 7 has no estimate but is kept.
    expectAccount(b, 7, 4, 3);
    expect(b.reasons).toEqual({ "not-number": 1, "out-of-range": 2 });
    // bored starts at character 39 ("s1,c1,u1,x1,2026-02-03T09:00:00-06:00," is 38 characters).
    expect(b.at["not-number"]).toEqual(["windows-bad-numbers.csv:3:39"]);
    expect(b.at["out-of-range"]).toEqual(["windows-bad-numbers.csv:4:39", "windows-bad-numbers.csv:5:39"]);
    // Estimates kept: s1 0.6 and 0.7, s2 0.2 (its empty cell counts no window for bored).
    expect(b.windows).toEqual({ s1: 2, s2: 1 });
    expect(b.check.stdout).toContain('at windows-bad-numbers.csv:3:39  bored "high"');
    expect(b.check.stdout).toContain("leave a probability empty when there is no estimate");
    expect(b.check.stdout).toContain('at windows-bad-numbers.csv:5:39  bored "-0.1"');
  });

  it("bad timestamps, and timestamps without an offset", () => {
    const b = buildWithRejects(["--windows", fx("windows-bad-timestamps.csv"), "--card", card]);
    expectAccount(b, 6, 2, 4);
    // Line 3 "03/02/2026 09:00:20" and line 6 "2026-02-03" (a date alone) are not date-times;
    // line 4 has no offset; line 5 is February 30.
    expect(b.reasons).toEqual({ "bad-time": 2, "no-offset": 1, "bad-date": 1 });
    expect(b.at["bad-time"]).toEqual(["windows-bad-timestamps.csv:3:13", "windows-bad-timestamps.csv:6:13"]);
    expect(b.at["no-offset"]).toEqual(["windows-bad-timestamps.csv:4:13"]);
    expect(b.at["bad-date"]).toEqual(["windows-bad-timestamps.csv:5:13"]);
    expect(b.windows).toEqual({ s1: 2 });
    expect(b.check.stdout).toContain("add Z or an offset such as -06:00");
    expect(b.check.stdout).toContain("such as 2026-02-03T09:15:20-06:00");
  });

  it("ragged rows: too few and too many fields, located where the row breaks", () => {
    const b = buildWithRejects(["--windows", fx("windows-ragged.csv"), "--card", card]);
    expectAccount(b, 4, 2, 2);
    // Line 3 "s1,c1,u1" ends at character 8; line 4's extra field starts after 42 characters.
    expect(b.at["wrong-field-count"]).toEqual(["windows-ragged.csv:3:9", "windows-ragged.csv:4:43"]);
    const examples = b.account.rejected_by_reason[0]!.examples;
    expect(examples[0]).toMatchObject({
      value: "3 fields, header has 6",
      detail: "the row ends after unit_id, so session_id, window_start, bored are missing",
    });
    expect(examples[1]).toMatchObject({ value: "7 fields, header has 6" });
    expect(b.windows).toEqual({ s1: 2 });
    expect(b.check.stdout).toContain("look for a comma inside a value that is not quoted");
  });

  it("a stray quote inside an unquoted field, and an unterminated quote", () => {
    const b = buildWithRejects(["--windows", fx("windows-quotes.csv"), "--card", card]);
    // Line 3: c"1 (the quote at character 5, in class_id). Line 5: a quote opened at character 13
    // (window_start) and never closed; only that line is given up, so line 6 is read and kept.
    // Line 4 quotes every field properly and is kept.
    expectAccount(b, 5, 3, 2);
    expect(b.at["bad-quote"]).toEqual(["windows-quotes.csv:3:5", "windows-quotes.csv:5:13"]);
    const [stray, open] = b.account.rejected_by_reason[0]!.examples;
    expect(stray).toMatchObject({ column: "class_id" });
    expect(stray!.detail).toContain("a quote inside an unquoted field");
    expect(open).toMatchObject({ column: "window_start" });
    expect(open!.detail).toContain("never closed");
    expect(b.windows).toEqual({ s1: 3 });
    expect(b.check.stdout).toContain("double each quote inside it");
  });

  it("duplicate rows: an exact one counted once and reported, conflicting ones all set aside", () => {
    const b = buildWithRejects(["--windows", fx("windows-duplicates.csv"), "--card", card]);
    // Line 4 repeats line 2 exactly; lines 5 and 6 give s2's 10:00:00 window different values.
    expectAccount(b, 6, 3, 2, 1);
    expect(b.account.duplicate_examples).toEqual([
      { at: "windows-duplicates.csv:4", value: "same window as line 2" },
    ]);
    expect(b.at.conflict).toEqual(["windows-duplicates.csv:5", "windows-duplicates.csv:6"]);
    expect(b.account.rejected_by_reason[0]!.examples[0]!.value).toBe(
      "same key as line 6, with different values",
    );
    // s1: 09:00:00 once and 09:00:20; s2: only 10:00:20.
    expect(b.windows).toEqual({ s1: 2, s2: 1 });
    expect(b.check.stdout).toContain("duplicate at windows-duplicates.csv:4: same window as line 2");
  });

  it("a field longer than max_field_chars (1024)", () => {
    const path = join(scratch, "huge-field.csv");
    const huge = `s${"A".repeat(2000)}`;
    writeFileSync(
      path,
      [
        HEADER,
        "s1,c1,u1,x1,2026-02-03T09:00:00-06:00,0.6",
        `${huge},c1,u1,x1,2026-02-03T09:00:20-06:00,0.4`,
        `s1,c1,u1,${huge},2026-02-03T09:00:40-06:00,0.4`,
        "s1,c1,u1,x1,2026-02-03T09:01:00-06:00,0.5",
        "",
      ].join("\n"),
    );
    const b = buildWithRejects(["--windows", path, "--card", card]);
    expectAccount(b, 4, 2, 2);
    expect(b.at["long-field"]).toEqual(["huge-field.csv:3:1", "huge-field.csv:4:10"]);
    const examples = b.account.rejected_by_reason[0]!.examples;
    expect(examples.map((e) => e.column)).toEqual(["student_id", "session_id"]);
    // The value is shortened for the report, not repeated in full.
    expect(examples[0]!.value!.length).toBeLessThanOrEqual(80);
    expect(b.windows).toEqual({ s1: 2 });
    expect(b.check.stdout).toContain("raise max_field_chars in the settings");
  });

  it("invalid UTF-8 bytes in an id, unquoted and quoted", () => {
    const path = join(scratch, "bad-utf8.csv");
    writeFileSync(
      path,
      Buffer.concat([
        Buffer.from(`${HEADER}\ns1,c1,u1,x1,2026-02-03T09:00:00-06:00,0.6\n`),
        Buffer.from([0x73, 0xff, 0xfe, 0x32]), // "s", two bytes that are never UTF-8, "2"
        Buffer.from(",c1,u1,x2,2026-02-03T09:00:00-06:00,0.4\ns3,"),
        Buffer.from([0x22, 0x63, 0xc3, 0x28, 0x22]), // "c\xC3(": a lead byte without its continuation
        Buffer.from(",u1,x3,2026-02-03T09:00:00-06:00,0.4\ns1,c1,u1,x1,2026-02-03T09:00:20-06:00,0.5\n"),
      ]),
    );
    const b = buildWithRejects(["--windows", path, "--card", card]);
    expectAccount(b, 4, 2, 2);
    expect(b.at["bad-utf8"]).toEqual(["bad-utf8.csv:3:1", "bad-utf8.csv:4:4"]);
    expect(b.account.rejected_by_reason[0]!.examples.map((e) => e.column)).toEqual([
      "student_id",
      "class_id",
    ]);
    expect(b.windows).toEqual({ s1: 2 });
    expect(b.check.stdout).toContain("save the file as UTF-8");
  });
});

describe("broken sessions files", () => {
  it("missing required columns is fatal", () => {
    expectFatal(
      ["--sessions", fx("sessions-missing-columns.csv"), "--card", card],
      [
        "sessions-missing-columns.csv:1: missing required columns school_id, sum_p, sum_p2, above, sustained_episodes, longest_run",
        "Add them to the header row",
      ],
    );
  });

  it("an empty sessions file is fatal", () => {
    expectFatal(
      ["--sessions", fx("windows-empty.csv"), "--card", card],
      ["windows-empty.csv: the sessions file is empty"],
    );
  });

  it("rows breaking the contract are rejected by reason with line:column; good rows kept", () => {
    const b = buildWithRejects(["--sessions", fx("sessions-bad-rows.csv"), "--card", card]);
    expectAccount(b, 9, 2, 7);
    // Columns from the header order: day starts at 14 on line 3 ("s2,c1,,u1,x2," is 13 characters).
    expect(b.at).toEqual({
      "bad-day": ["sessions-bad-rows.csv:3:14"],
      "unknown-construct": ["sessions-bad-rows.csv:4:25"],
      "not-number": ["sessions-bad-rows.csv:5:31"],
      "bad-integer": ["sessions-bad-rows.csv:6:31"],
      "inconsistent-sums": ["sessions-bad-rows.csv:7:31"],
      "empty-id": ["sessions-bad-rows.csv:8:1"],
      "wrong-field-count": ["sessions-bad-rows.csv:9:38"],
    });
    const sums = b.account.rejected_by_reason.find((r) => r.reason === "inconsistent-sums")!;
    expect(sums.examples[0]!.value).toBe(
      "windows 2, sum_p 3, sum_p2 0.5, above 1, sustained_episodes 0, longest_run 1",
    );
    expect(b.windows).toEqual({ s1: 2, s9: 3 });
    expect(b.check.stdout).toContain('at sessions-bad-rows.csv:5:31  windows "two"');
  });

  it("an exact duplicate counts once; conflicting rows are all set aside", () => {
    const b = buildWithRejects(["--sessions", fx("sessions-duplicates.csv"), "--card", card]);
    expectAccount(b, 5, 2, 2, 1);
    expect(b.account.duplicate_examples).toEqual([
      { at: "sessions-duplicates.csv:4", value: "same row as line 2" },
    ]);
    expect(b.at.conflict).toEqual(["sessions-duplicates.csv:5", "sessions-duplicates.csv:6"]);
    expect(b.windows).toEqual({ s1: 2, s2: 1 });
  });
});

describe("the command line itself", () => {
  it("a wrong command line exits 2 and says how to get help", () => {
    const noCard = run("build", "--windows", fx("windows-bad-numbers.csv"), "--out", join(scratch, "x"));
    expect(noCard.status).toBe(2);
    expect(noCard.stderr).toContain("build needs --card. Run engagement-report build --help.");
    const both = run("check", "--windows", "a.csv", "--sessions", "b.csv", "--card", card);
    expect(both.status).toBe(2);
    expect(both.stderr).toContain("exactly one of --windows FILE or --sessions FILE");
    for (const r of [noCard, both]) expectNoStack(r);
  });

  it("--debug adds the stack trace to the same message", () => {
    const args = ["check", "--windows", fx("windows-empty.csv"), "--card", card];
    const plain = run(...args);
    const debug = run(...args, "--debug");
    expect(plain.status).toBe(1);
    expect(debug.status).toBe(1);
    expect(plain.stderr).not.toMatch(STACK_FRAME);
    expect(debug.stderr).toContain("the windows file is empty");
    expect(debug.stderr).toMatch(STACK_FRAME);
    expect(debug.stderr).toContain("InputError");
  });
});
