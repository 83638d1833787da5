/**
 * Keyed pseudonymisation: every student id becomes "p-" and the first 12 hex digits of
 * HMAC-SHA-256(key, id) (RFC 2104; NIST FIPS 198-1), the same for the same key and id, so that a
 * district can link runs without the tool ever writing a real id; names are replaced by the
 * pseudonym. The key comes from an environment variable or a file named in the settings, and is
 * never written anywhere. 12 hex digits (48 bits) make a clash between two of a district's students
 * vanishingly unlikely (about 1 in 10⁵ for 100,000 students); a clash is checked and refused.
 * Session ids are replaced too ("q-" and 16 hex digits), since they often embed the student id.
 */
import { createHmac } from "node:crypto";
import { readFileSync } from "node:fs";
import type { Settings } from "../config/types.js";
import { SettingsError } from "../errors.js";
import type { Quality } from "../ingest/quality-report.js";
import type { Roster, RosterEntry } from "../ingest/roster.js";
import type { SessionSummary } from "../summaries/types.js";

export function pseudonymKey(settings: Settings, env: NodeJS.ProcessEnv = process.env): Buffer | null {
  const { keyEnv, keyFile } = settings.pseudonymise;
  if (keyEnv) {
    const v = env[keyEnv];
    if (!v)
      throw new SettingsError(
        `settings: pseudonymise.key_env names ${keyEnv}, but that environment variable is empty or not set. Set it to a secret of at least 16 characters.`,
      );
    if (v.length < 16)
      throw new SettingsError(
        `settings: the pseudonymisation key in ${keyEnv} is shorter than 16 characters; use a longer secret.`,
      );
    return Buffer.from(v, "utf8");
  }
  if (keyFile) {
    let data: Buffer;
    try {
      data = readFileSync(keyFile);
    } catch {
      throw new SettingsError(
        `settings: pseudonymise.key_file ${keyFile} cannot be read. Check the path and its permissions.`,
      );
    }
    const trimmed = Buffer.from(data.toString("utf8").trim(), "utf8");
    if (trimmed.length < 16)
      throw new SettingsError(
        `settings: the key in ${keyFile} is shorter than 16 characters; use a longer secret.`,
      );
    return trimmed;
  }
  return null;
}

export function pseudonymFor(key: Buffer, id: string): string {
  return `p-${createHmac("sha256", key).update(id, "utf8").digest("hex").slice(0, 12)}`;
}

export interface Pseudonymised {
  readonly summaries: SessionSummary[];
  readonly roster: Roster | null;
  readonly quality: Quality;
}

export function pseudonymise(
  key: Buffer,
  input: { summaries: readonly SessionSummary[]; roster: Roster | null; quality: Quality },
): Pseudonymised {
  const map = new Map<string, string>();
  const seen = new Map<string, string>();
  const of = (id: string): string => {
    let p = map.get(id);
    if (p === undefined) {
      p = pseudonymFor(key, id);
      const other = seen.get(p);
      if (other !== undefined && other !== id)
        throw new SettingsError("settings: two student ids gave the same pseudonym; use a different key.");
      seen.set(p, id);
      map.set(id, p);
    }
    return p;
  };
  // Session ids are often built from student ids (as in the demo), so they are replaced as well.
  const sessions = new Map<string, string>();
  const session = (id: string): string => {
    let p = sessions.get(id);
    if (p === undefined) {
      p = `q-${createHmac("sha256", key).update(`session\u0000${id}`, "utf8").digest("hex").slice(0, 16)}`;
      sessions.set(id, p);
    }
    return p;
  };
  const summaries = input.summaries.map((s) => ({
    ...s,
    studentId: of(s.studentId),
    sessionId: session(s.sessionId),
  }));
  let roster: Roster | null = null;
  if (input.roster) {
    const entries = new Map<string, RosterEntry>();
    for (const e of input.roster.entries.values()) {
      const id = of(e.studentId);
      entries.set(id, { ...e, studentId: id, displayName: "" });
    }
    roster = { ...input.roster, entries };
  }
  // Example values in the data-quality account may quote an id: they are dropped, the locations kept.
  const quality = JSON.parse(
    JSON.stringify(input.quality, (k, v) =>
      k === "value"
        ? undefined
        : k === "examples" && Array.isArray(v) && v.every((x) => typeof x === "string")
          ? v.map(of)
          : v,
    ),
  ) as Quality;
  return { summaries, roster, quality };
}
