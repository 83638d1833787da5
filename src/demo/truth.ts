import { CONSTRUCT_KEYS, CONSTRUCTS, type ConstructKey, PLANTED, WINDOW_SECONDS } from "./constructs.js";
import type { DemoDistrict } from "./district.js";
import { DISTRICT_NAME } from "./names.js";
import type { DemoMode } from "./options.js";

/**
 * The known truth behind a demo district, for tests only (truth.json). Every per-construct array
 * follows the order of `constructs`. Counts are over windows with an estimate for that construct
 * (the cell is not empty), as the tool sees them.
 *
 * - share: in_state / windows, the share of the student's observed windows in which the state held.
 * - expected: in-state windows expected if each of the student's windows had the in-state rate that
 *   the other students (the student left out) showed in the same unit; ratio = in_state / expected.
 * - sustained_episodes: runs of consecutive in-state windows at least sustained_min_windows long,
 *   where consecutive means the next estimated window starts within 1.5 window lengths (so a gap
 *   or an empty cell ends a run); longest_run is the longest such run.
 * - logit_effect: the generating effect on the logit scale (random plus planted; 0 in null mode).
 * `share` and `ratio` are null only when there is nothing to divide by (no estimated window, or no
 * peer window on the same units), which the demo's sizes make practically impossible.
 */
export interface DemoTruth {
  format: "engagement-report demo truth";
  version: 1;
  district: string;
  mode: DemoMode;
  seed: number;
  window_seconds: number;
  constructs: ConstructKey[];
  sustained_min_windows: number[];
  rows: number;
  sessions: number;
  planted: PlantedTruth;
  schools: SchoolTruth[];
  units: UnitTruth[];
  classes: ClassTruth[];
  students: StudentTruth[];
}

export interface PlantedTruth {
  student_construct: ConstructKey;
  student_ids: string[];
  unit_construct: ConstructKey;
  unit_ids: string[];
  class_construct: ConstructKey;
  class_ids: string[];
  logit_shift: { student: number; unit: number; class: number };
}

export interface SchoolTruth {
  school_id: string;
  name: string;
  setting: string;
  classes: number;
  students: number;
}

export interface UnitTruth {
  unit_id: string;
  name: string;
  planted: boolean[];
  logit_effect: number[];
  windows: number[];
  in_state: number[];
  share: (number | null)[];
}

export interface ClassTruth extends Omit<UnitTruth, "unit_id" | "name"> {
  class_id: string;
  school_id: string;
  grade: number;
  students: number;
}

export interface StudentTruth {
  student_id: string;
  class_id: string;
  school_id: string;
  low_data: boolean;
  sessions: number;
  planted: boolean[];
  logit_effect: number[];
  windows: number[];
  in_state: number[];
  share: (number | null)[];
  expected: number[];
  ratio: (number | null)[];
  sustained_episodes: number[];
  longest_run: number[];
}

const C = CONSTRUCT_KEYS.length;
const CONSECUTIVE_SECONDS = 1.5 * WINDOW_SECONDS;

/**
 * Counts truth while windows stream past, in typed arrays sized by students × units × constructs
 * (not by windows), and turns them into a DemoTruth at the end.
 */
export class TruthAccumulator {
  private readonly district: DemoDistrict;
  private readonly unitCount: number;
  private readonly windows: Uint32Array;
  private readonly inState: Uint32Array;
  private readonly episodes: Uint32Array;
  private readonly longest: Uint32Array;
  private readonly sessionCounts: Uint32Array;
  /** Per student × unit × construct; at most 16 sessions × 90 windows = 1440 per cell, within Uint16. */
  private readonly unitWindows: Uint16Array;
  private readonly unitInState: Uint16Array;
  private readonly classWindows: Float64Array;
  private readonly classInState: Float64Array;
  private readonly runs = new Array<number>(C).fill(0);
  private readonly lastSeen = new Array<number>(C).fill(Number.NEGATIVE_INFINITY);
  private readonly minimum = CONSTRUCTS.map((c) => c.sustainedMinWindows);
  private rows = 0;
  private sessions = 0;

  constructor(district: DemoDistrict) {
    const n = district.students.length;
    this.district = district;
    this.unitCount = district.units.length;
    this.windows = new Uint32Array(n * C);
    this.inState = new Uint32Array(n * C);
    this.episodes = new Uint32Array(n * C);
    this.longest = new Uint32Array(n * C);
    this.sessionCounts = new Uint32Array(n);
    this.unitWindows = new Uint16Array(n * this.unitCount * C);
    this.unitInState = new Uint16Array(n * this.unitCount * C);
    this.classWindows = new Float64Array(district.classes.length * C);
    this.classInState = new Float64Array(district.classes.length * C);
  }

  beginSession(student: number): void {
    this.sessions++;
    this.sessionCounts[student]!++;
    this.runs.fill(0);
    this.lastSeen.fill(Number.NEGATIVE_INFINITY);
  }

  /** One window at `seconds` (any clock that increases within the session). */
  addWindow(
    at: { student: number; unit: number; klass: number; seconds: number },
    states: readonly boolean[],
    probabilities: readonly (number | null)[],
  ): void {
    this.rows++;
    const s = at.student * C;
    const su = (at.student * this.unitCount + at.unit) * C;
    const k = at.klass * C;
    for (let c = 0; c < C; c++) {
      if (probabilities[c] === null) continue;
      const inState = states[c]!;
      this.windows[s + c]!++;
      this.unitWindows[su + c]!++;
      this.classWindows[k + c]!++;
      const consecutive = at.seconds - this.lastSeen[c]! <= CONSECUTIVE_SECONDS;
      this.lastSeen[c] = at.seconds;
      if (!inState) {
        this.runs[c] = 0;
        continue;
      }
      this.inState[s + c]!++;
      this.unitInState[su + c]!++;
      this.classInState[k + c]!++;
      const run = consecutive ? this.runs[c]! + 1 : 1;
      this.runs[c] = run;
      if (run === this.minimum[c]) this.episodes[s + c]!++;
      if (run > this.longest[s + c]!) this.longest[s + c] = run;
    }
  }

  finish(): DemoTruth {
    const { district } = this;
    const { options } = district;
    const unitTotals = this.unitTotals();
    return {
      format: "engagement-report demo truth",
      version: 1,
      district: DISTRICT_NAME,
      mode: options.mode,
      seed: options.seed,
      window_seconds: WINDOW_SECONDS,
      constructs: [...CONSTRUCT_KEYS],
      sustained_min_windows: [...this.minimum],
      rows: this.rows,
      sessions: this.sessions,
      planted: this.plantedTruth(),
      schools: district.schools.map((school) => ({
        school_id: school.schoolId,
        name: school.name,
        setting: school.setting,
        classes: district.classes.filter((k) => k.schoolIndex === school.index).length,
        students: district.classes
          .filter((k) => k.schoolIndex === school.index)
          .reduce((sum, k) => sum + k.students, 0),
      })),
      units: district.units.map((unit) => ({
        unit_id: unit.unitId,
        name: unit.name,
        planted: [...unit.planted],
        logit_effect: unit.effects.map(round4),
        ...counted(unitTotals.windows, unitTotals.inState, unit.index),
      })),
      classes: district.classes.map((klass) => ({
        class_id: klass.classId,
        school_id: district.schools[klass.schoolIndex]!.schoolId,
        grade: klass.grade,
        students: klass.students,
        planted: [...klass.planted],
        logit_effect: klass.effects.map(round4),
        ...counted(this.classWindows, this.classInState, klass.index),
      })),
      students: district.students.map((student) => this.studentTruth(student.index, unitTotals)),
    };
  }

  private plantedTruth(): PlantedTruth {
    const { district } = this;
    const ids = <T>(items: readonly T[], planted: (item: T) => boolean, id: (item: T) => string) =>
      items.filter(planted).map(id);
    return {
      student_construct: PLANTED.studentConstruct,
      student_ids: ids(
        district.students,
        (s) => s.planted.includes(true),
        (s) => s.studentId,
      ),
      unit_construct: PLANTED.unitConstruct,
      unit_ids: ids(
        district.units,
        (u) => u.planted.includes(true),
        (u) => u.unitId,
      ),
      class_construct: PLANTED.classConstruct,
      class_ids: ids(
        district.classes,
        (k) => k.planted.includes(true),
        (k) => k.classId,
      ),
      logit_shift: { student: PLANTED.studentShift, unit: PLANTED.unitShift, class: PLANTED.classShift },
    };
  }

  private unitTotals(): { windows: Float64Array; inState: Float64Array } {
    const windows = new Float64Array(this.unitCount * C);
    const inState = new Float64Array(this.unitCount * C);
    for (let i = 0; i < this.unitWindows.length; i++) {
      const cell = i % (this.unitCount * C);
      windows[cell]! += this.unitWindows[i]!;
      inState[cell]! += this.unitInState[i]!;
    }
    return { windows, inState };
  }

  private studentTruth(
    index: number,
    unitTotals: { windows: Float64Array; inState: Float64Array },
  ): StudentTruth {
    const student = this.district.students[index]!;
    const klass = this.district.classes[student.classIndex]!;
    const base = index * C;
    const windows = Array.from(this.windows.subarray(base, base + C));
    const inState = Array.from(this.inState.subarray(base, base + C));
    const expected = CONSTRUCT_KEYS.map((_, c) => this.expectedInState(index, c, unitTotals));
    return {
      student_id: student.studentId,
      class_id: klass.classId,
      school_id: this.district.schools[klass.schoolIndex]!.schoolId,
      low_data: student.lowData,
      sessions: this.sessionCounts[index]!,
      planted: [...student.planted],
      logit_effect: student.effects.map(round4),
      windows,
      in_state: inState,
      share: windows.map((w, c) => (w > 0 ? round6(inState[c]! / w) : null)),
      expected: expected.map(round4),
      ratio: expected.map((e, c) => (e > 0 ? round6(inState[c]! / e) : null)),
      sustained_episodes: Array.from(this.episodes.subarray(base, base + C)),
      longest_run: Array.from(this.longest.subarray(base, base + C)),
    };
  }

  /** Indirect standardisation with the student left out of each unit's rate. */
  private expectedInState(
    student: number,
    c: number,
    totals: { windows: Float64Array; inState: Float64Array },
  ): number {
    let expected = 0;
    for (let u = 0; u < this.unitCount; u++) {
      const cell = (student * this.unitCount + u) * C + c;
      const own = this.unitWindows[cell]!;
      if (own === 0) continue;
      const otherWindows = totals.windows[u * C + c]! - own;
      const otherInState = totals.inState[u * C + c]! - this.unitInState[cell]!;
      if (otherWindows > 0) expected += (own * otherInState) / otherWindows;
    }
    return expected;
  }
}

function counted(
  windows: Float64Array,
  inState: Float64Array,
  index: number,
): { windows: number[]; in_state: number[]; share: (number | null)[] } {
  const w = Array.from(windows.subarray(index * C, index * C + C));
  const s = Array.from(inState.subarray(index * C, index * C + C));
  return { windows: w, in_state: s, share: w.map((n, c) => (n > 0 ? round6(s[c]! / n) : null)) };
}

function round4(x: number): number {
  return Math.round(x * 1e4) / 1e4;
}

function round6(x: number): number {
  return Math.round(x * 1e6) / 1e6;
}
