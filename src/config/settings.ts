/**
 * Settings: YAML as written (`SettingsInput`) → schema check → `Settings` as used, with every
 * default from defaults.ts filled in. An empty value (null) means "not set", so the settings as
 * used (the manifest's `settings`) can be pasted back as a settings file.
 */
import { SettingsError } from "../errors.js";
import { msg } from "../messages.js";
import { DEFAULT_SETTINGS } from "./defaults.js";
import type { Audience, Settings } from "./types.js";
import { type Locator, loadYaml, validateWithSchema } from "./yaml-schema.js";

export interface SettingsInput {
  title?: string;
  period?: { from?: string | null; to?: string | null };
  confidence?: number;
  strict?: boolean;
  audiences?: Audience[];
  evidence?: { min_minutes?: number; min_sessions?: number; min_days?: number; min_students?: number };
  suppression_size?: number;
  flags?: { student_ratio?: number; group_ratio?: number; unit_q?: number };
  all_student_pages?: boolean;
  replicates?: number;
  pseudonymise?: { key_env?: string | null; key_file?: string | null };
  build_time?: string | null;
  seed?: number;
  examples_per_reason?: number;
  max_field_chars?: number;
}

function validDate(text: string): boolean {
  const [y, m, d] = text.split("-").map(Number) as [number, number, number];
  const date = new Date(Date.UTC(y, m - 1, d));
  return date.getUTCFullYear() === y && date.getUTCMonth() === m - 1 && date.getUTCDate() === d;
}

/** `where` names the source in messages: a fixed text, or a locator giving file:line:col of a key path. */
export function settingsFromInput(input: SettingsInput, where: string | Locator = "settings"): Settings {
  const at = (path: readonly string[], keyItself = false): string =>
    typeof where === "string" ? where : where(path, keyItself);
  const d = DEFAULT_SETTINGS;
  const period = { from: input.period?.from ?? d.period.from, to: input.period?.to ?? d.period.to };
  for (const [key, value] of Object.entries(period)) {
    if (value !== null && !validDate(value))
      throw new SettingsError(`${at(["period", key])}: ${msg.badDate(`period.${key}`, value)}`);
  }
  if (period.from !== null && period.to !== null && period.from > period.to) {
    throw new SettingsError(`${at(["period", "from"])}: ${msg.periodReversed(period.from, period.to)}`);
  }
  if (input.pseudonymise?.key_env != null && input.pseudonymise.key_file != null) {
    throw new SettingsError(`${at(["pseudonymise", "key_file"], true)}: ${msg.twoKeySources()}`);
  }
  // The schema checks the form; this the calendar (Date.parse alone takes February 30 for March 2).
  const buildTime = input.build_time;
  if (buildTime != null && (Number.isNaN(Date.parse(buildTime)) || !validDate(buildTime.slice(0, 10)))) {
    throw new SettingsError(`${at(["build_time"])}: ${msg.badDateTime("build_time", buildTime)}`);
  }
  return {
    title: input.title ?? d.title,
    period,
    confidence: input.confidence ?? d.confidence,
    strict: input.strict ?? d.strict,
    audiences: input.audiences ?? d.audiences,
    evidence: {
      minMinutes: input.evidence?.min_minutes ?? d.evidence.minMinutes,
      minSessions: input.evidence?.min_sessions ?? d.evidence.minSessions,
      minDays: input.evidence?.min_days ?? d.evidence.minDays,
      minStudents: input.evidence?.min_students ?? d.evidence.minStudents,
    },
    suppressionSize: input.suppression_size ?? d.suppressionSize,
    flags: {
      studentRatio: input.flags?.student_ratio ?? d.flags.studentRatio,
      groupRatio: input.flags?.group_ratio ?? d.flags.groupRatio,
      unitQ: input.flags?.unit_q ?? d.flags.unitQ,
    },
    allStudentPages: input.all_student_pages ?? d.allStudentPages,
    replicates: input.replicates ?? d.replicates,
    pseudonymise: {
      keyEnv: input.pseudonymise?.key_env ?? d.pseudonymise.keyEnv,
      keyFile: input.pseudonymise?.key_file ?? d.pseudonymise.keyFile,
    },
    buildTime: input.build_time ?? d.buildTime,
    seed: input.seed ?? d.seed,
    examplesPerReason: input.examples_per_reason ?? d.examplesPerReason,
    maxFieldChars: input.max_field_chars ?? d.maxFieldChars,
  };
}

export function loadSettings(path: string | undefined): Settings {
  if (path === undefined) return DEFAULT_SETTINGS;
  const loaded = loadYaml(path, "settings");
  if (loaded.data === null || loaded.data === undefined) return DEFAULT_SETTINGS;
  validateWithSchema(loaded, "settings.schema.json", "the settings");
  return settingsFromInput(loaded.data as SettingsInput, loaded.locate);
}

/** The settings as used, in the file's own key names (for the manifest). */
export function settingsAsUsed(s: Settings): Record<string, unknown> {
  return {
    title: s.title,
    period: { from: s.period.from, to: s.period.to },
    confidence: s.confidence,
    strict: s.strict,
    audiences: [...s.audiences],
    evidence: {
      min_minutes: s.evidence.minMinutes,
      min_sessions: s.evidence.minSessions,
      min_days: s.evidence.minDays,
      min_students: s.evidence.minStudents,
    },
    suppression_size: s.suppressionSize,
    flags: { student_ratio: s.flags.studentRatio, group_ratio: s.flags.groupRatio, unit_q: s.flags.unitQ },
    all_student_pages: s.allStudentPages,
    replicates: s.replicates,
    pseudonymise: { key_env: s.pseudonymise.keyEnv, key_file: s.pseudonymise.keyFile },
    build_time: s.buildTime,
    seed: s.seed,
    examples_per_reason: s.examplesPerReason,
    max_field_chars: s.maxFieldChars,
  };
}
