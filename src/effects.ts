/**
 * Effects at the edge: the clock, the console and the warning collector enter through this one
 * object, so a whole build can run in a test with a fixed clock and read its own warnings.
 * File access stays with node:fs in the few modules that read and write files (ingest, output).
 */
export interface Effects {
  /** The current time; a build's manifest uses settings.build_time instead when it is set. */
  now(): Date;
  /** Normal output for the reader (the `check` account, the path written). */
  out(line: string): void;
  /** Progress and notices; never data. */
  err(line: string): void;
  /** Warnings are collected here and also printed; tests read them back. */
  warnings: Warnings;
}

export class Warnings {
  readonly list: string[] = [];
  add(message: string): void {
    this.list.push(message);
  }
}

export function processEffects(): Effects {
  return {
    now: () => new Date(),
    out: (line) => process.stdout.write(`${line}\n`),
    err: (line) => process.stderr.write(`${line}\n`),
    warnings: new Warnings(),
  };
}

/** Effects for tests: a fixed clock and captured output. */
export function memoryEffects(
  now = new Date("2026-01-15T12:00:00Z"),
): Effects & { stdout: string[]; stderr: string[] } {
  const stdout: string[] = [];
  const stderr: string[] = [];
  return {
    now: () => now,
    out: (line) => stdout.push(line),
    err: (line) => stderr.push(line),
    warnings: new Warnings(),
    stdout,
    stderr,
  };
}
