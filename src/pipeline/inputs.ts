/**
 * read → validate → summarise: the inputs of a build or a check, from files to session summaries
 * with their data-quality account. Shared by `check`, `build` and `demo`.
 */
import { createHash } from "node:crypto";
import { readFileSync } from "node:fs";
import { basename } from "node:path";
import { loadCard } from "../config/card.js";
import { loadSettings } from "../config/settings.js";
import type { Card, Settings } from "../config/types.js";
import type { Effects } from "../effects.js";
import { InputError } from "../errors.js";
import { buildQuality, type FileAccount, fileAccount, type Quality } from "../ingest/quality-report.js";
import { type Roster, readRoster } from "../ingest/roster.js";
import { readSessionsFile } from "../ingest/sessions-file.js";
import { summarizeWindowsFile } from "../ingest/windows.js";
import { msg } from "../messages.js";
import { SummaryStore } from "../summaries/summary-store.js";
import type { SessionSummary } from "../summaries/types.js";
import { pseudonymise, pseudonymKey } from "./pseudonymise.js";

export interface InputPaths {
  readonly windows?: string | undefined;
  readonly sessions?: string | undefined;
  readonly card: string;
  readonly roster?: string | undefined;
  readonly settings?: string | undefined;
}

export interface InputFile {
  readonly role: "windows" | "sessions" | "card" | "roster" | "settings";
  readonly name: string;
  readonly sha256: string;
  readonly bytes: number;
}

export interface LoadedInputs {
  readonly card: Card;
  readonly settings: Settings;
  readonly roster: Roster | null;
  /** Within the settings' period, schools filled from the roster where the data has none. */
  readonly summaries: readonly SessionSummary[];
  readonly hasActivity: boolean;
  readonly quality: Quality;
  readonly files: readonly InputFile[];
}

/** Summaries as read: an array, or the windows reader's columns (iterated in the same order). */
export type SummaryRows = Iterable<SessionSummary> & { readonly length: number };

/** LoadedInputs with the summaries as read, for `summarize`, which writes them without making objects. */
export interface StreamedInputs extends Omit<LoadedInputs, "summaries"> {
  readonly summaries: SummaryRows;
}

function hashFile(role: InputFile["role"], path: string): InputFile {
  const data = readFileSync(path);
  return {
    role,
    name: basename(path),
    sha256: createHash("sha256").update(data).digest("hex"),
    bytes: data.length,
  };
}

/**
 * `hash: false` skips the SHA-256 of the data file (about 1 s per GB): `summarize` writes no
 * manifest, so it has no use for it.
 */
export function loadInputs(
  paths: InputPaths,
  effects: Effects,
  options: { hash?: boolean; threads?: number | undefined } = {},
): LoadedInputs {
  const inputs = streamInputs(paths, effects, options);
  const summaries = inputs.summaries;
  return {
    ...inputs,
    summaries: summaries instanceof SummaryStore ? summaries.toArray() : Array.from(summaries),
  };
}

/**
 * loadInputs, with the summaries left as the reader gave them: from a windows file, a
 * SummaryStore (about 40 bytes a row rather than 200 as objects), unless a roster or
 * pseudonymisation needs them as objects.
 */
export function streamInputs(
  paths: InputPaths,
  effects: Effects,
  options: { hash?: boolean; threads?: number | undefined } = {},
): StreamedInputs {
  const hashing = options.hash ?? true;
  // Order: settings and card first, because parsing the data needs the card's constructs and the settings' limits.
  const settings = loadSettings(paths.settings);
  const card = loadCard(paths.card);
  const files: InputFile[] = [hashFile("card", paths.card)];
  if (paths.settings) files.push(hashFile("settings", paths.settings));
  const roster = paths.roster ? readRoster(paths.roster, settings) : null;
  if (paths.roster) files.push(hashFile("roster", paths.roster));

  let summaries: SummaryRows;
  let hasActivity: boolean;
  const accounts: FileAccount[] = [];
  let extra: Pick<
    Parameters<typeof buildQuality>[0],
    | "estimates"
    | "rowsWithoutEstimate"
    | "sittingsSpanning"
    | "replayed"
    | "unknownConstructs"
    | "constructsInData"
  >;
  if (paths.windows) {
    const hash = createHash("sha256");
    let bytes = 0;
    const w = summarizeWindowsFile(paths.windows, card, settings, {
      // Hashing sees every byte in order, so it keeps the reading in one thread.
      onBytes: hashing
        ? (chunk) => {
            hash.update(chunk);
            bytes += chunk.length;
          }
        : undefined,
      threads: options.threads,
    });
    files.push({ role: "windows", name: w.file, sha256: hashing ? hash.digest("hex") : "", bytes });
    summaries = w.store;
    hasActivity = w.columns.hasActivity;
    accounts.push(fileAccount("windows", w.account, w.columns.ignored));
    extra = {
      estimates: w.estimates,
      rowsWithoutEstimate: w.rowsWithoutEstimate,
      sittingsSpanning: w.sittingsSpanningParts,
      replayed: w.replayedSittings,
      unknownConstructs: [],
      constructsInData: w.columns.constructs,
    };
    if (w.columns.ignored.length > 0)
      effects.warnings.add(`${w.file}: ${msg.unknownColumns(w.columns.ignored)}`);
    if (w.columns.constructsWithoutColumn.length > 0) {
      effects.warnings.add(`${w.file}: ${msg.constructsWithoutColumn(w.columns.constructsWithoutColumn)}`);
    }
  } else if (paths.sessions) {
    const s = readSessionsFile(paths.sessions, card, settings);
    files.push(hashFile("sessions", paths.sessions));
    summaries = s.summaries;
    hasActivity = s.hasActivity;
    accounts.push(fileAccount("sessions", s.account, s.ignoredColumns));
    const inData = new Set(s.summaries.map((x) => x.construct));
    extra = {
      estimates: null,
      rowsWithoutEstimate: null,
      sittingsSpanning: null,
      replayed: null,
      unknownConstructs: s.unknownConstructs,
      constructsInData: card.constructs.filter((c) => inData.has(c.key)).map((c) => c.key),
    };
    if (s.unknownConstructs.length > 0) {
      effects.warnings.add(
        `${s.file}: constructs not in the card, rows set aside: ${s.unknownConstructs.join(", ")}`,
      );
    }
  } else {
    throw new InputError("no data file: give --windows FILE or --sessions FILE.");
  }
  if (roster) accounts.push(fileAccount("roster", roster.account, roster.ignoredColumns));

  // Schools from the roster where the data names none (DATA-CONTRACT.md: else one unnamed school).
  let schoolFromRoster = 0;
  const withoutRoster = new Set<string>();
  if (roster) {
    summaries = Array.from(summaries, (s) => {
      const entry = roster.entries.get(s.studentId);
      if (!entry) withoutRoster.add(s.studentId);
      if (s.schoolId === "" && entry && entry.schoolId !== "") {
        schoolFromRoster++;
        return { ...s, schoolId: entry.schoolId };
      }
      return s;
    });
  }
  const { from, to } = settings.period;
  const inPeriod =
    from === null && to === null
      ? summaries
      : Array.from(summaries).filter((s) => (from === null || s.day >= from) && (to === null || s.day <= to));
  const outside = summaries.length - inPeriod.length;
  const notes: string[] = [];
  for (const f of accounts) {
    if (f.rows_rejected > 0) {
      notes.push(
        `${f.file}: ${f.rows_rejected} of ${f.rows_read} rows were rejected; see the reasons above.`,
      );
    }
  }
  for (const note of notes) effects.warnings.add(note);
  const quality = buildQuality({
    card,
    files: accounts,
    summaries: inPeriod,
    ...extra,
    roster,
    schoolFromRoster,
    studentsWithoutRoster: [...withoutRoster].sort(),
    period: { from, to, outside },
    notes: [],
  });
  // Last: pseudonyms replace ids everywhere downstream, the key never leaves this step.
  const key = pseudonymKey(settings);
  if (key) {
    const p = pseudonymise(key, { summaries: Array.from(inPeriod), roster, quality });
    return {
      card,
      settings,
      roster: p.roster,
      summaries: p.summaries,
      hasActivity,
      quality: p.quality,
      files,
    };
  }
  return { card, settings, roster, summaries: inPeriod, hasActivity, quality, files };
}

/** A build needs at least one usable session; `check` reports the account either way. */
export function requireSessions(inputs: Pick<StreamedInputs, "summaries" | "settings" | "quality">): void {
  if (inputs.summaries.length > 0) return;
  const { from, to } = inputs.settings.period;
  const outside = inputs.quality.period_filter.session_rows_outside;
  throw new InputError(
    outside > 0
      ? `no session falls within the period ${from ?? "start"} to ${to ?? "end"} set in the settings; ${outside} session rows lie outside it.`
      : "no usable rows: every data row was rejected. Run `engagement-report check` to see why.",
  );
}
