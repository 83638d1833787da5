import type { Random } from "../stats/random.js";
import { localTimestamp } from "./calendar.js";
import {
  CONSTRUCT_KEYS,
  CONSTRUCTS,
  EFFECT_SD,
  GAP_RATE,
  MISSING_RATE,
  PERSISTENCE,
  WINDOW_SECONDS,
} from "./constructs.js";
import { detectorModel, probabilityFromScore } from "./detector.js";
import type { DemoClass, DemoDistrict, DemoStudent } from "./district.js";
import { type DemoTruth, TruthAccumulator } from "./truth.js";

/** What a session's windows share; one object per session, referenced by each of its windows. */
export interface SimSession {
  readonly studentId: string;
  readonly classId: string;
  readonly schoolId: string;
  readonly unitId: string;
  readonly activityId: string;
  readonly sessionId: string;
  /** Local date of the session, YYYY-MM-DD. */
  readonly day: string;
}

/** One detector window: the row of the windows file plus the true state behind it. */
export interface SimWindow {
  readonly session: SimSession;
  /** ISO 8601 local date-time with the district's UTC offset. */
  readonly windowStart: string;
  /** Per construct (CONSTRUCT_KEYS order): probability rounded to 4 decimals, or null when not estimated. */
  readonly probabilities: readonly (number | null)[];
  /** Per construct: whether the state truly held in this window. */
  readonly states: readonly boolean[];
}

const C = CONSTRUCT_KEYS.length;
const DETECTORS = CONSTRUCTS.map((c) => detectorModel({ auc: c.auc, baseRate: c.baseRate }));
const BASE_LOGITS = CONSTRUCTS.map((c) => Math.log(c.baseRate / (1 - c.baseRate)));

/** Period p of the school day starts at 08:10 + 52 (p − 1) minutes, local time. */
function periodStartSeconds(period: number): number {
  return (8 * 60 + 10 + 52 * (period - 1)) * 60;
}

/**
 * Streams every window of the district, student by student, session by session, in time order
 * (the windows file's sort order), and returns the truth counted along the way. Memory depends on
 * the numbers of students and units, never on the number of windows.
 *
 * Each student draws from a forked stream split in two: `schedule` (days, start times, lengths,
 * gaps, empty cells) and `chain` (session effects, states, scores). The schedule's draws never
 * depend on the states, so planted and null mode with one seed share rows and timestamps.
 */
export function simulateWindows(
  district: DemoDistrict,
  random: Random,
  onWindow: (window: SimWindow) => void,
): DemoTruth {
  const truth = new TruthAccumulator(district);
  for (const student of district.students) {
    const own = random.fork();
    simulateStudent({ district, student, schedule: own.fork(), chain: own.fork(), truth, onWindow });
  }
  return truth.finish();
}

interface StudentRun {
  readonly district: DemoDistrict;
  readonly student: DemoStudent;
  readonly schedule: Random;
  readonly chain: Random;
  readonly truth: TruthAccumulator;
  readonly onWindow: (window: SimWindow) => void;
}

function simulateStudent(run: StudentRun): void {
  const { district, student, schedule } = run;
  const klass = district.classes[student.classIndex]!;
  const sessionCount = student.lowData ? 1 + schedule.int(2) : 8 + schedule.int(9);
  const days = distinctDays(klass.days, sessionCount, schedule);
  days.forEach((day, j) => {
    simulateSession(run, klass, { day, number: j + 1 });
  });
}

/** `count` distinct day indices in [0, days), ascending (partial Fisher–Yates). */
function distinctDays(days: number, count: number, random: Random): number[] {
  const pool = Array.from({ length: days }, (_, i) => i);
  for (let i = 0; i < count; i++) {
    const j = i + random.int(days - i);
    const held = pool[i]!;
    pool[i] = pool[j]!;
    pool[j] = held;
  }
  return pool.slice(0, count).sort((a, b) => a - b);
}

function unitOnDay(klass: DemoClass, day: number): number {
  let u = 0;
  while (day >= klass.unitStarts[u + 1]!) u++;
  return u;
}

function simulateSession(run: StudentRun, klass: DemoClass, at: { day: number; number: number }): void {
  const { district, student, schedule, chain, truth, onWindow } = run;
  const unitIndex = unitOnDay(klass, at.day);
  const unit = district.units[unitIndex]!;
  const unitDays = klass.unitStarts[unitIndex + 1]! - klass.unitStarts[unitIndex]!;
  const progress = (at.day - klass.unitStarts[unitIndex]!) / unitDays;
  const session: SimSession = {
    studentId: student.studentId,
    classId: klass.classId,
    schoolId: district.schools[klass.schoolIndex]!.schoolId,
    unitId: unit.unitId,
    activityId: unit.activityIds[Math.floor(progress * unit.activityIds.length)]!,
    sessionId: `${student.studentId}-${String(at.number).padStart(2, "0")}`,
    day: district.termDays[at.day]!,
  };
  let seconds = periodStartSeconds(klass.period) + schedule.int(480);
  const length = student.lowData ? 8 + schedule.int(18) : 30 + schedule.int(61);

  // Stationary share and transition probabilities of each construct's chain for this session.
  const enter: number[] = [];
  const stay: number[] = [];
  const states: boolean[] = [];
  for (let c = 0; c < C; c++) {
    const logit =
      BASE_LOGITS[c]! +
      student.effects[c]! +
      unit.effects[c]! +
      klass.effects[c]! +
      chain.normal() * EFFECT_SD.session;
    const share = 1 / (1 + Math.exp(-logit));
    enter.push(share * (1 - PERSISTENCE));
    stay.push(share + PERSISTENCE * (1 - share));
    states.push(chain.uniform() < share);
  }
  const step = () => {
    for (let c = 0; c < C; c++) states[c] = chain.uniform() < (states[c] ? stay[c]! : enter[c]!);
  };

  truth.beginSession(student.index);
  const where = { student: student.index, unit: unitIndex, klass: klass.index, seconds };
  for (let k = 0; k < length; k++) {
    if (k > 0) {
      seconds += WINDOW_SECONDS;
      step();
      if (schedule.uniform() < GAP_RATE) {
        // A short gap: 1 to 3 windows go unrecorded while the states keep evolving.
        const skipped = 1 + schedule.int(3);
        for (let g = 0; g < skipped; g++) step();
        seconds += skipped * WINDOW_SECONDS;
      }
    }
    const probabilities: (number | null)[] = [];
    for (let c = 0; c < C; c++) {
      const missing = schedule.uniform() < MISSING_RATE;
      const detector = DETECTORS[c]!;
      const score = chain.normal() + (states[c] ? detector.separation : 0);
      probabilities.push(missing ? null : probabilityFromScore(detector, score));
    }
    const window: SimWindow = {
      session,
      windowStart: localTimestamp(session.day, seconds),
      probabilities,
      states: [...states],
    };
    where.seconds = seconds;
    truth.addWindow(where, window.states, probabilities);
    onWindow(window);
  }
}
