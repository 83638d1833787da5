/**
 * One vocabulary for every page, legend and table: each status code of the CSVs has exactly one
 * display word. Pages never spell a status themselves; they ask here.
 */
import type { GroupStatus, StudentStatus, UnitStatus } from "../indicators/types.js";

export const STUDENT_STATUS_WORDS: Readonly<Record<StudentStatus, string>> = {
  suggested: "Conversation suggested",
  near: "Close to the line",
  "class-wide": "Shared by the class",
  contacted: "Talked with recently",
  typical: "Within the usual range",
  unclear: "Cannot be placed",
  "too-little-data": "Too little data",
  "detector-too-weak": "Detector not strong enough",
};

export const UNIT_STATUS_WORDS: Readonly<Record<UnitStatus, string>> = {
  review: "Worth a review",
  better: "Doing better",
  typical: "Like the rest",
  "too-little-data": "Too little data",
  "detector-too-weak": "Detector not strong enough",
};

export const GROUP_STATUS_WORDS: Readonly<Record<GroupStatus, string>> = {
  concern: "Of concern",
  typical: "Within the usual range",
  withheld: "Withheld",
  "detector-too-weak": "Detector not strong enough",
};

export type StatusKind = "student" | "unit" | "group";

/** The display word of a status code; every page, legend and table goes through this. */
export function statusWord(kind: "student", code: StudentStatus): string;
export function statusWord(kind: "unit", code: UnitStatus): string;
export function statusWord(kind: "group", code: GroupStatus): string;
export function statusWord(kind: StatusKind, code: string): string {
  const words: Readonly<Record<string, string>> =
    kind === "student" ? STUDENT_STATUS_WORDS : kind === "unit" ? UNIT_STATUS_WORDS : GROUP_STATUS_WORDS;
  const word = words[code];
  if (word === undefined) throw new Error(`no display word for ${kind} status "${code}"`);
  return word;
}
