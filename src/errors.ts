/**
 * The small error tree. Every error a user can cause carries the exit code the CLI returns:
 * 1 when an input (file, card, settings, roster) is unusable, 2 when the command line is wrong.
 * Anything else that escapes is a bug in the tool (exit code 70, the stack printed).
 */
export const EXIT = { ok: 0, input: 1, usage: 2, internal: 70 } as const;

export abstract class ReportError extends Error {
  abstract readonly exitCode: number;
}

/** A file cannot be read or has the wrong shape (missing column, empty, not CSV/YAML). */
export class InputError extends ReportError {
  readonly exitCode = EXIT.input;
  override readonly name = "InputError";
}

/** The detector card or the settings break their schema or a rule between keys. */
export class SettingsError extends ReportError {
  readonly exitCode = EXIT.input;
  override readonly name = "SettingsError";
}

/** The command line is wrong: unknown command or option, missing value, conflicting options. */
export class UsageError extends ReportError {
  readonly exitCode = EXIT.usage;
  override readonly name = "UsageError";
}

/** A row was rejected and the settings ask for strictness (`strict: true`). */
export class StrictRowError extends ReportError {
  readonly exitCode = EXIT.input;
  override readonly name = "StrictRowError";
}
