#!/usr/bin/env node
/**
 * engagement-report: the command line. Each command is one short function:
 *   summarize: read → validate → summarise → write sessions.csv
 *   check:     read → validate → summarise → print the data-quality account
 *   build:     read → validate → summarise → estimate → model the report → render → print (build-command.ts)
 *   demo:      simulate the demo district → build
 *   sql:       print the same aggregation as SQL for another engine
 * The heavy stages (indicators, charts, browser) are loaded only by build and demo.
 */
import { join, resolve } from "node:path";
import { parseArgs } from "node:util";
import { type Effects, processEffects } from "../effects.js";
import { EXIT, ReportError, UsageError } from "../errors.js";
import { formatQuality } from "../ingest/quality-report.js";
import { msg } from "../messages.js";
import { checkOutputDir, writeFileAtomicallyOverlapped } from "../output/atomic.js";
import { type InputPaths, requireSessions, streamInputs } from "../pipeline/inputs.js";
import { sqlCommand } from "../sql/sql-command.js";
import { sessionsCsv } from "../summaries/sessions-csv.js";
import { VERSION } from "../version.js";
import { demoModeFrom } from "./demo-mode.js";

interface OptionSpec {
  readonly name: string;
  readonly value?: string;
  readonly help: string;
}

const COMMON: OptionSpec[] = [
  { name: "help", help: "show this help" },
  { name: "debug", help: "print the stack trace of an error" },
];

const COMMANDS: Record<string, { summary: string; options: OptionSpec[] }> = {
  summarize: {
    summary: "reduce a windows file to the sessions file of the data contract",
    options: [
      { name: "windows", value: "FILE", help: "detector windows (CSV), required" },
      { name: "card", value: "FILE", help: "detector card (YAML), required" },
      { name: "settings", value: "FILE", help: "settings (YAML)" },
      { name: "out", value: "FILE", help: "sessions file to write, required" },
      {
        name: "threads",
        value: "N",
        help: "1, or 2 to parse part of the windows file in a second thread (default: 2 for a file of 32 MiB or more on 2 or more cores, else 1)",
      },
    ],
  },
  check: {
    summary: "validate the inputs and print a data-quality account; writes nothing",
    options: [
      { name: "windows", value: "FILE", help: "detector windows (CSV)" },
      { name: "sessions", value: "FILE", help: "session summaries (CSV), instead of --windows" },
      { name: "card", value: "FILE", help: "detector card (YAML), required" },
      { name: "roster", value: "FILE", help: "roster (CSV)" },
      { name: "settings", value: "FILE", help: "settings (YAML)" },
    ],
  },
  build: {
    summary:
      "build the output folder: data/ (sessions, quality, students, units, groups, trends) and manifest.json",
    options: [
      { name: "windows", value: "FILE", help: "detector windows (CSV)" },
      { name: "sessions", value: "FILE", help: "session summaries (CSV), instead of --windows" },
      { name: "card", value: "FILE", help: "detector card (YAML), required" },
      { name: "roster", value: "FILE", help: "roster (CSV)" },
      { name: "settings", value: "FILE", help: "settings (YAML)" },
      { name: "out", value: "DIR", help: "output folder, required" },
      { name: "no-pdf", help: "skip the PDFs (HTML and data only; no browser needed)" },
    ],
  },
  sql: {
    summary:
      "print the SQL query that turns a windows table into the sessions file, for an engine of your own",
    options: [
      { name: "dialect", value: "NAME", help: "duckdb, postgres or spark, required" },
      { name: "card", value: "FILE", help: "detector card (YAML), required" },
      { name: "table", value: "NAME", help: "table with the windows file's columns (default: windows)" },
      { name: "with-activity", help: "keep activity_id (the table has that column)" },
    ],
  },
  demo: {
    summary: "generate the invented demo district and build it",
    options: [
      { name: "out", value: "DIR", help: "output folder (default: demo-report)" },
      { name: "students", value: "N", help: "students, 50 to 100000 (default 300)" },
      { name: "seed", value: "S", help: "random seed (default 1)" },
      { name: "null", help: "plant nothing (every student alike)" },
      { name: "no-pdf", help: "skip the PDFs (HTML and data only; no browser needed)" },
      { name: "settings", value: "FILE", help: "settings (YAML); fix build_time for repeatable output" },
    ],
  },
};

function help(command?: string): string {
  if (!command) {
    const lines = [
      `engagement-report ${VERSION}`,
      "",
      "Usage: engagement-report COMMAND [options]",
      "",
      "Commands:",
    ];
    for (const [name, c] of Object.entries(COMMANDS)) lines.push(`  ${name.padEnd(10)} ${c.summary}`);
    lines.push(
      "",
      "Run engagement-report COMMAND --help for its options. Exit codes: 0 success, 1 unusable input, 2 wrong command line.",
    );
    return lines.join("\n");
  }
  const c = COMMANDS[command]!;
  const lines = [`engagement-report ${command}: ${c.summary}`, "", "Options:"];
  for (const o of [...c.options, ...COMMON])
    lines.push(`  --${`${o.name}${o.value ? ` ${o.value}` : ""}`.padEnd(18)} ${o.help}`);
  return lines.join("\n");
}

function parse(command: string, args: string[]): Record<string, string | boolean | undefined> {
  const spec = COMMANDS[command]!;
  const options: Record<string, { type: "string" | "boolean" }> = {};
  for (const o of [...spec.options, ...COMMON]) options[o.name] = { type: o.value ? "string" : "boolean" };
  try {
    return parseArgs({ args, options, strict: true, allowPositionals: false }).values;
  } catch (error) {
    throw new UsageError(`${(error as Error).message}. Run engagement-report ${command} --help.`);
  }
}

function need(values: Record<string, unknown>, name: string, command: string): string {
  const v = values[name];
  if (typeof v !== "string" || v === "")
    throw new UsageError(`${command} needs --${name}. Run engagement-report ${command} --help.`);
  return v;
}

/** --threads: 1 or 2 (undefined: the ingest chooses). */
function threadsOption(value: unknown): number | undefined {
  if (value === undefined) return undefined;
  if (value !== "1" && value !== "2") throw new UsageError(msg.badThreads(String(value)));
  return Number(value);
}

function inputPaths(values: Record<string, unknown>, command: string): InputPaths {
  const windows = values.windows as string | undefined;
  const sessions = values.sessions as string | undefined;
  if ((windows === undefined) === (sessions === undefined)) {
    throw new UsageError(`${command} needs exactly one of --windows FILE or --sessions FILE.`);
  }
  return {
    windows,
    sessions,
    card: need(values, "card", command),
    roster: values.roster as string | undefined,
    settings: values.settings as string | undefined,
  };
}

export async function run(argv: string[], effects: Effects): Promise<number> {
  const [command, ...args] = argv;
  if (command === undefined || command === "--help" || command === "-h" || command === "help") {
    effects.out(help());
    return EXIT.ok;
  }
  if (command === "--version" || command === "-v") {
    effects.out(VERSION);
    return EXIT.ok;
  }
  if (!(command in COMMANDS))
    throw new UsageError(
      `unknown command ${JSON.stringify(command)}. Commands: ${Object.keys(COMMANDS).join(", ")}.`,
    );
  const values = parse(command, args);
  if (values.help) {
    effects.out(help(command));
    return EXIT.ok;
  }
  if (command === "summarize") {
    const out = need(values, "out", command);
    const inputs = streamInputs(
      {
        windows: need(values, "windows", command),
        card: need(values, "card", command),
        settings: values.settings as string | undefined,
      },
      effects,
      { hash: false, threads: threadsOption(values.threads) },
    );
    requireSessions(inputs);
    await writeFileAtomicallyOverlapped(out, sessionsCsv(inputs.summaries, inputs.hasActivity));
    for (const line of formatQuality(inputs.quality)) effects.err(line);
    effects.out(`wrote ${resolve(out)}`);
  } else if (command === "check") {
    const inputs = streamInputs(inputPaths(values, command), effects);
    for (const line of formatQuality(inputs.quality)) effects.out(line);
    if (inputs.summaries.length > 0) return EXIT.ok;
    // Exit 1 needs a sentence on stderr too: the account alone (on stdout) does not say it failed.
    effects.err(`engagement-report: ${msg.noUsableRows()}`);
    return EXIT.input;
  } else if (command === "build") {
    const { build } = await import("./build-command.js");
    await build(inputPaths(values, command), need(values, "out", command), effects, {
      pdf: values["no-pdf"] !== true,
      command: "build",
    });
  } else if (command === "sql") {
    effects.out(sqlCommand(values));
  } else {
    const out = (values.out as string | undefined) ?? "demo-report";
    const students = values.students === undefined ? 300 : Number(values.students);
    const seed = values.seed === undefined ? 1 : Number(values.seed);
    checkOutputDir(out);
    const { mkdtempSync, rmSync } = await import("node:fs");
    const { tmpdir } = await import("node:os");
    const { writeDemoDistrict } = await import("../demo/simulate.js");
    const { build } = await import("./build-command.js");
    const dir = mkdtempSync(join(tmpdir(), "engagement-report-demo-"));
    try {
      const paths = await writeDemoDistrict(dir, {
        students,
        seed,
        mode: demoModeFrom(values.null === true),
      });
      const settings = values.settings as string | undefined;
      const inputs = { windows: paths.windows, card: paths.card, roster: paths.roster, settings };
      await build(inputs, out, effects, {
        pdf: values["no-pdf"] !== true,
        command: "demo",
      });
    } finally {
      rmSync(dir, { recursive: true, force: true });
    }
  }
  return EXIT.ok;
}

async function main(): Promise<void> {
  const effects = processEffects();
  const argv = process.argv.slice(2);
  try {
    process.exitCode = await run(argv, effects);
  } catch (error) {
    if (error instanceof ReportError) {
      effects.err(`engagement-report: ${error.message}`);
      if (argv.includes("--debug")) effects.err(error.stack ?? "");
      process.exitCode = error.exitCode;
    } else {
      effects.err(`engagement-report: internal error: ${(error as Error).stack ?? String(error)}`);
      process.exitCode = EXIT.internal;
    }
  }
}

await main();
