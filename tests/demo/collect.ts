import {
  type DemoOptions,
  type DemoTruth,
  type SimWindow,
  simulateDistrict,
} from "../../src/demo/simulate.js";

/**
 * Runs the demo generator in memory and tallies, independently of the generator's own truth
 * accounting, what the model tests need: per student, per session and per student × unit counts
 * over estimated cells, window-probability histograms by true state, and spells in state.
 */
export interface Tally {
  truth: DemoTruth;
  /** [construct][state ? 1 : 0][k] = cells with probability k / 10000. */
  histogram: number[][][];
  students: Map<string, StudentTally>;
  /** Per session: [construct] = [estimated windows, in state]. */
  sessions: Map<string, { student: string; counts: [number, number][] }>;
  /** Per construct: lengths of spells of consecutive in-state windows (empty cells ignored, gaps end them). */
  spells: number[][];
  windows: SimWindow[] | undefined;
}

export interface StudentTally {
  windows: number[];
  inState: number[];
  sumP: number[];
  /** unit id → [construct] = [estimated windows, in state] */
  units: Map<string, [number, number][]>;
  /** Sustained episodes over estimated cells, with the data contract's consecutiveness rule. */
  episodes: number[];
}

const C = 6;
const zeros = () => Array.from({ length: C }, () => 0);
const pairs = () => Array.from({ length: C }, (): [number, number] => [0, 0]);

export function tally(options: DemoOptions, keepWindows = false): Tally {
  const histogram = Array.from({ length: C }, () => [
    new Array<number>(10001).fill(0),
    new Array<number>(10001).fill(0),
  ]);
  const students = new Map<string, StudentTally>();
  const sessions = new Map<string, { student: string; counts: [number, number][] }>();
  const spells: number[][] = Array.from({ length: C }, () => []);
  const kept: SimWindow[] = [];
  const minimum = [6, 6, 6, 6, 4, 4];
  let currentSession = "";
  let lastTime = 0;
  const spell = zeros();
  const estimatedRun = zeros();
  const lastEstimated = zeros();
  const closeSpells = () => {
    for (let c = 0; c < C; c++) {
      if (spell[c]! > 0) spells[c]!.push(spell[c]!);
      spell[c] = 0;
    }
  };
  const truth = simulateDistrict(options, (w) => {
    if (keepWindows) kept.push(w);
    const s = w.session;
    const time = Date.parse(w.windowStart) / 1000;
    const student =
      students.get(s.studentId) ??
      ({
        windows: zeros(),
        inState: zeros(),
        sumP: zeros(),
        units: new Map(),
        episodes: zeros(),
      } as StudentTally);
    students.set(s.studentId, student);
    const session = sessions.get(s.sessionId) ?? { student: s.studentId, counts: pairs() };
    sessions.set(s.sessionId, session);
    const unit = student.units.get(s.unitId) ?? pairs();
    student.units.set(s.unitId, unit);
    if (s.sessionId !== currentSession || time - lastTime > 30) closeSpells();
    if (s.sessionId !== currentSession) {
      estimatedRun.fill(0);
      lastEstimated.fill(Number.NEGATIVE_INFINITY);
    }
    currentSession = s.sessionId;
    lastTime = time;
    for (let c = 0; c < C; c++) {
      const state = w.states[c]!;
      if (state) spell[c]!++;
      else if (spell[c]! > 0) {
        spells[c]!.push(spell[c]!);
        spell[c] = 0;
      }
      const p = w.probabilities[c];
      if (p === null || p === undefined) continue;
      histogram[c]![state ? 1 : 0]![Math.round(p * 10000)]!++;
      student.windows[c]!++;
      student.sumP[c]! += p;
      session.counts[c]![0]++;
      unit[c]![0]++;
      const consecutive = time - lastEstimated[c]! <= 30;
      lastEstimated[c] = time;
      if (state) {
        student.inState[c]!++;
        session.counts[c]![1]++;
        unit[c]![1]++;
        estimatedRun[c] = consecutive ? estimatedRun[c]! + 1 : 1;
        if (estimatedRun[c] === minimum[c]) student.episodes[c]!++;
      } else {
        estimatedRun[c] = 0;
      }
    }
  });
  closeSpells();
  return { truth, histogram, students, sessions, spells, windows: keepWindows ? kept : undefined };
}

/** Exact AUC (ties ½) from histograms of probabilities on the 4-decimal grid. */
export function histogramAuc(negatives: readonly number[], positives: readonly number[]): number {
  let below = 0;
  let pairsOrdered = 0;
  let totalNegatives = 0;
  let totalPositives = 0;
  for (let k = 0; k < negatives.length; k++) {
    pairsOrdered += positives[k]! * (below + negatives[k]! / 2);
    below += negatives[k]!;
    totalNegatives += negatives[k]!;
    totalPositives += positives[k]!;
  }
  return pairsOrdered / (totalNegatives * totalPositives);
}

/** One-way ANOVA F of session shares grouped by student (Fisher; any statistics text). */
export function anovaF(groups: readonly (readonly number[])[]): { f: number; df1: number; df2: number } {
  const all = groups.flat();
  const grand = all.reduce((a, b) => a + b, 0) / all.length;
  let between = 0;
  let within = 0;
  for (const group of groups) {
    const m = group.reduce((a, b) => a + b, 0) / group.length;
    between += group.length * (m - grand) ** 2;
    for (const x of group) within += (x - m) ** 2;
  }
  const df1 = groups.length - 1;
  const df2 = all.length - groups.length;
  return { f: between / df1 / (within / df2), df1, df2 };
}
