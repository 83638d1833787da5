import { UsageError } from "../errors.js";

export type DemoMode = "planted" | "null";

export interface DemoOptions {
  /** Number of students in the district, a whole number from 50 to 100000. */
  students: number;
  /** Seed of the generator: the same seed gives byte-identical files. */
  seed: number;
  /** "planted": random effects and planted effects; "null": every student exchangeable, nothing planted. */
  mode: DemoMode;
}

export const MIN_STUDENTS = 50;
export const MAX_STUDENTS = 100_000;

/** Throws UsageError when an option is out of range; returns a frozen copy otherwise. */
export function validateDemoOptions(options: DemoOptions): Readonly<DemoOptions> {
  const { students, seed, mode } = options;
  if (!Number.isInteger(students) || students < MIN_STUDENTS || students > MAX_STUDENTS) {
    throw new UsageError(
      `The demo's number of students must be a whole number from ${MIN_STUDENTS} to ${MAX_STUDENTS}; got ${String(students)}. Choose a district size in that range.`,
    );
  }
  if (!Number.isInteger(seed)) {
    throw new UsageError(
      `The demo's seed must be a whole number; got ${String(seed)}. Pass an integer such as 7.`,
    );
  }
  if (mode !== "planted" && mode !== "null") {
    throw new UsageError(`The demo's mode must be "planted" or "null"; got ${JSON.stringify(mode)}.`);
  }
  return Object.freeze({ students, seed, mode });
}
