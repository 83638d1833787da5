/**
 * An independent simulated district with known truth, for checking the indicators on data the
 * product's own demo (src/demo) never produces. Nothing here comes from src/demo or src/stats: the
 * random source, the state process, the detector, the validation sample behind the detector card,
 * the truth and the scoring are all written in this file, from DESIGN.md ("What is computed") and
 * DATA-CONTRACT.md alone.
 *
 * The district (invented): Quarry Vale Schools, three schools, classes of 16 to 32 students, six
 * content units that two schools take in different orders, 30-second windows.
 *
 * How it differs from the demo's model, on purpose:
 * - True states follow a semi-Markov process per construct and session: spells in and out of state
 *   alternate, each spell 1 + NegBin(2, ·) windows long (a sum of two geometric draws), with the
 *   mean spell in state fixed per construct and the mean spell out of state set so that the
 *   long-run share is the session's target share π = logistic(base + student + unit + class +
 *   session effect). Being off task ends engaged concentration in the same window.
 * - Students differ (a random logit effect per student and construct, sd 0.3) in the planted
 *   scenario and in a third, "varied" one with nothing planted; in the null scenario they are
 *   exchangeable. The draws are made in every mode, so one seed gives one schedule.
 * - The detector writes p = logistic(logit(b) + δ), where b ~ Beta(a₁, b₁) in state and
 *   Beta(a₀, b₀) out of state, and δ ~ N(0, 0.15²) is one shift per session and construct (a mild
 *   error shared by all windows of a sitting). Probabilities are rounded to 4 decimals; about 1.5%
 *   of cells are left empty. The Beta pairs give AUCs of about 0.69 to 0.78 (within the 0.6 to 0.85
 *   that published detectors show), and about 0.51 for frustration, which must fall below the floor.
 * - Sessions last from 6 to 100 windows (log-normal, median 30), with short unrecorded gaps; how
 *   often a student attends differs by student; a few students have only one or two sessions.
 * - The windows file is written in time order across the district (an export log, not sorted by
 *   student), with its own column order, an extra column the tool must ignore, no activity_id, and
 *   each session written in one of two UTC offsets (-05:00 or +02:00) chosen at random.
 * - The card comes from its own validation sample (same detector model, windows grouped in
 *   validation sessions that share a shift): means, sample sds, sensitivity and specificity at a
 *   threshold, AUC by Mann–Whitney (ties counted ½) with its counts, Cohen's kappa.
 *
 * Truth (per student × construct, over windows whose cell is not empty): the realized share of
 * windows in state, and the ratio to peers on the same content, in-state windows over those
 * expected if each of the student's windows had the in-state rate the other students showed in
 * the same unit (indirect standardisation, student left out).
 */
import { writeFileSync } from "node:fs";
import { join } from "node:path";
import type { Card } from "../../src/config/types.js";
import type { Indicators } from "../../src/indicators/types.js";

// ---------------------------------------------------------------------------------------------
// Random source: xoshiro128** (Blackman and Vigna 2018), seeded through splitmix32.

function rotl(v: number, k: number): number {
  return ((v << k) | (v >>> (32 - k))) >>> 0;
}

export class Rng {
  private spare: number | null = null;
  private a: number;
  private b: number;
  private c: number;
  private d: number;

  constructor(seed: number) {
    let x = seed >>> 0;
    const mix = () => {
      x = (x + 0x9e3779b9) >>> 0;
      let z = x;
      z = Math.imul(z ^ (z >>> 16), 0x85ebca6b) >>> 0;
      z = Math.imul(z ^ (z >>> 13), 0xc2b2ae35) >>> 0;
      return (z ^ (z >>> 16)) >>> 0;
    };
    this.a = mix();
    this.b = mix();
    this.c = mix();
    this.d = mix() | 1;
  }

  next32(): number {
    const result = Math.imul(rotl(Math.imul(this.b, 5) >>> 0, 7), 9) >>> 0;
    const t = (this.b << 9) >>> 0;
    this.c = (this.c ^ this.a) >>> 0;
    this.d = (this.d ^ this.b) >>> 0;
    this.b = (this.b ^ this.c) >>> 0;
    this.a = (this.a ^ this.d) >>> 0;
    this.c = (this.c ^ t) >>> 0;
    this.d = rotl(this.d, 11);
    return result;
  }

  /** Uniform on the open interval (0, 1). */
  uniform(): number {
    return (this.next32() + 0.5) / 4294967296;
  }

  int(n: number): number {
    return Math.floor(this.uniform() * n);
  }

  /** Standard normal by Marsaglia's polar method (Marsaglia and Bray 1964), the pair's second draw kept. */
  normal(): number {
    if (this.spare !== null) {
      const x = this.spare;
      this.spare = null;
      return x;
    }
    for (;;) {
      const u = 2 * this.uniform() - 1;
      const v = 2 * this.uniform() - 1;
      const s = u * u + v * v;
      if (s > 0 && s < 1) {
        const f = Math.sqrt((-2 * Math.log(s)) / s);
        this.spare = v * f;
        return u * f;
      }
    }
  }

  /** Gamma(shape, 1) by Marsaglia and Tsang (2000), shape ≥ 1. */
  gamma(shape: number): number {
    const d = shape - 1 / 3;
    const c = 1 / Math.sqrt(9 * d);
    for (;;) {
      let x: number;
      let v: number;
      do {
        x = this.normal();
        v = 1 + c * x;
      } while (v <= 0);
      v = v * v * v;
      const u = this.uniform();
      // The squeeze first, then the exact test (both from Marsaglia and Tsang 2000).
      if (u < 1 - 0.0331 * x * x * x * x) return d * v;
      if (Math.log(u) < 0.5 * x * x + d - d * v + d * Math.log(v)) return d * v;
    }
  }

  beta(a: number, b: number): number {
    const x = this.gamma(a);
    return x / (x + this.gamma(b));
  }

  /** Failures before the first success, with the given mean (geometric on 0, 1, 2, ...). */
  geometric(mean: number): number {
    if (mean <= 0) return 0;
    const q = 1 / (1 + mean);
    return Math.floor(Math.log(this.uniform()) / Math.log(1 - q));
  }

  split(): Rng {
    return new Rng(this.next32() ^ Math.imul(this.next32(), 0x27d4eb2d));
  }
}

// ---------------------------------------------------------------------------------------------
// The model's constants.

/**
 * "planted": random unit, class and student effects plus the planted ones. "null": nothing planted
 * and students exchangeable (no student, unit or class effect; sessions and states still vary), the
 * scenario in which every check-in is a chance finding. "varied": nothing planted, but students
 * differ (sd 0.3 on the logit), so some of them truly show much more of a state than their peers.
 */
export type QuarryMode = "planted" | "null" | "varied";

export interface QuarryOptions {
  readonly students: number;
  readonly seed: number;
  readonly mode: QuarryMode;
}

interface ConstructModel {
  readonly key: string;
  readonly label: string;
  readonly kind: "affect" | "behaviour";
  readonly higherIs: "concern" | "good";
  /** Target share of a typical student on typical content. */
  readonly base: number;
  /** Mean length of a spell in state, in windows. */
  readonly spell: number;
  /** Beta parameters of the detector's probability in state and out of state. */
  readonly inState: readonly [number, number];
  readonly outState: readonly [number, number];
  readonly threshold: number;
  readonly sustained: number;
}

/** In the order the windows file lists them (the card lists them in another order). */
const MODELS: readonly ConstructModel[] = [
  m("gaming", "Gaming the system", "behaviour", "concern", 0.06, 3, [3, 4], [2, 6], 0.35, 3),
  m("concentrating", "Engaged concentration", "affect", "good", 0.5, 10, [4.5, 3], [3.5, 4], 0.53, 4),
  m("bored", "Boredom", "affect", "concern", 0.18, 6, [2.8, 5.2], [2.2, 6.8], 0.3, 4),
  m("off_task", "Off task", "behaviour", "concern", 0.12, 5, [3.5, 4], [2.2, 5.5], 0.38, 3),
  m("confused", "Confusion", "affect", "concern", 0.12, 4, [3, 5], [2, 6.5], 0.3, 4),
  m("frustrated", "Frustration", "affect", "concern", 0.06, 4, [2.15, 6.85], [2.1, 6.9], 0.24, 4),
];

const CARD_ORDER = ["bored", "concentrating", "confused", "frustrated", "gaming", "off_task"] as const;

function m(
  key: string,
  label: string,
  kind: ConstructModel["kind"],
  higherIs: ConstructModel["higherIs"],
  base: number,
  spell: number,
  inState: readonly [number, number],
  outState: readonly [number, number],
  threshold: number,
  sustained: number,
): ConstructModel {
  return { key, label, kind, higherIs, base, spell, inState, outState, threshold, sustained };
}

const C = MODELS.length;
const WINDOW_SECONDS = 30;
const SD = { student: 0.3, session: 0.35, unit: 0.2, klass: 0.15, detectorShift: 0.15 } as const;
const PLANTED = {
  student: "bored",
  studentShift: 1.5,
  unit: "gaming",
  unitShift: 1,
  klass: "off_task",
  klassShift: 1,
};
const PLANTED_SHARE = 0.04;
const LOW_DATA_SHARE = 0.04;
const MISSING_RATE = 0.015;
const GAP_RATE = 0.02;
const UNITS = [
  "qv-u1-patterns",
  "qv-u2-percent",
  "qv-u3-angles",
  "qv-u4-inequalities",
  "qv-u5-volume",
  "qv-u6-probability",
];
/** Unit order per school (indices into UNITS): the third school takes the first school's order. */
const UNIT_ORDERS = [
  [0, 1, 2, 3, 4, 5],
  [2, 0, 1, 4, 3, 5],
];
const SCHOOLS = ["qv-north", "qv-ridge", "qv-millpond"];
const OFFSETS = [
  { text: "-05:00", minutes: -300 },
  { text: "+02:00", minutes: 120 },
];
/** Monday 2027-01-11; classes meet three weekdays a week for 10 weeks. */
const TERM_START_UTC = Date.UTC(2027, 0, 11);

const index = (key: string) => MODELS.findIndex((c) => c.key === key);
const logit = (p: number) => Math.log(p / (1 - p));
const logistic = (x: number) => 1 / (1 + Math.exp(-x));

// ---------------------------------------------------------------------------------------------
// Structure.

interface Klass {
  readonly id: string;
  readonly school: number;
  /** Local start of the class's period, minutes after midnight in the school's zone. */
  readonly periodMinutes: number;
  /** Term day numbers (0-based weekdays) on which the class meets. */
  readonly meetings: readonly number[];
  /** Unit index per meeting. */
  readonly unitOfMeeting: readonly number[];
  readonly effects: readonly number[];
  readonly planted: readonly boolean[];
}

interface Student {
  readonly id: string;
  readonly klass: number;
  readonly attendance: number;
  readonly lowData: boolean;
  readonly effects: readonly number[];
  readonly planted: readonly boolean[];
}

interface District {
  readonly classes: readonly Klass[];
  readonly units: readonly { readonly effects: readonly number[]; readonly planted: readonly boolean[] }[];
  readonly students: readonly Student[];
}

function buildDistrict(options: QuarryOptions, rng: Rng): District {
  const planted = options.mode === "planted";
  const none = MODELS.map(() => false);
  const plantedUnit = rng.int(UNITS.length);
  const units = UNITS.map((_, u) => {
    const flags = MODELS.map((c) => planted && u === plantedUnit && c.key === PLANTED.unit);
    const effects = MODELS.map((_, k) => {
      const random = rng.normal() * SD.unit;
      if (!planted) return 0;
      return flags[k] ? PLANTED.unitShift : random;
    });
    return { effects, planted: flags };
  });
  // Classes of 16 to 32 students until every student has a seat.
  const sizes: number[] = [];
  for (let left = options.students; left > 0; ) {
    const size = Math.min(left, 16 + rng.int(17));
    sizes.push(size);
    left -= size;
  }
  const perSchool = SCHOOLS.map(() => 0);
  const classes: Klass[] = sizes.map((_, k) => {
    const school = k % SCHOOLS.length;
    const period = perSchool[school]!++ % 7;
    const pattern = rng.int(2) === 0 ? [0, 2, 4] : [1, 3, 4];
    const meetings: number[] = [];
    for (let week = 0; week < 10; week++) for (const day of pattern) meetings.push(week * 5 + day);
    const order = UNIT_ORDERS[school % UNIT_ORDERS.length]!;
    const weights = order.map(() => 0.7 + 0.6 * rng.uniform());
    const total = weights.reduce((x, y) => x + y, 0);
    const unitOfMeeting = meetings.map((_, j) => {
      let cumulative = 0;
      for (let u = 0; u < order.length; u++) {
        cumulative += weights[u]! / total;
        if ((j + 0.5) / meetings.length <= cumulative) return order[u]!;
      }
      return order[order.length - 1]!;
    });
    const effects = MODELS.map(() => {
      const random = rng.normal() * SD.klass;
      return planted ? random : 0;
    });
    return {
      id: `${SCHOOLS[school]}-c${period + 1}`,
      school,
      periodMinutes: 8 * 60 + 55 * period + (period >= 4 ? 30 : 0),
      meetings,
      unitOfMeeting,
      effects,
      planted: none,
    };
  });
  const eligible = classes.map((_, k) => k).filter((k) => sizes[k]! >= 20);
  const plantedClass = eligible.length > 0 ? eligible[rng.int(eligible.length)]! : 0;
  const withClass = classes.map((klass, k) => {
    if (!planted || k !== plantedClass) return klass;
    const flags = MODELS.map((c) => c.key === PLANTED.klass);
    return {
      ...klass,
      planted: flags,
      effects: klass.effects.map((e, c) => (flags[c] ? PLANTED.klassShift : e)),
    };
  });
  const seats = sizes.flatMap((size, k) => new Array<number>(size).fill(k));
  const order = seats.map((_, i) => i);
  for (let i = order.length - 1; i > 0; i--) {
    const j = rng.int(i + 1);
    [order[i], order[j]] = [order[j]!, order[i]!];
  }
  const lowCount = Math.max(1, Math.round(options.students * LOW_DATA_SHARE));
  const plantedCount = planted ? Math.max(3, Math.round(options.students * PLANTED_SHARE)) : 0;
  const low = new Set(order.slice(0, lowCount));
  const plantedStudents = new Set(order.slice(lowCount, lowCount + plantedCount));
  const bored = index(PLANTED.student);
  const width = String(options.students).length + 1;
  const students: Student[] = seats.map((klass, i) => {
    const flags = MODELS.map((_, c) => plantedStudents.has(i) && c === bored);
    return {
      id: `qv${String(i + 1).padStart(width, "0")}`,
      klass,
      attendance: 0.2 + 0.35 * rng.uniform(),
      lowData: low.has(i),
      effects: MODELS.map((_, c) => {
        const random = rng.normal() * SD.student;
        return options.mode === "null" ? 0 : (flags[c] ? PLANTED.studentShift : 0) + random;
      }),
      planted: flags,
    };
  });
  return { classes: withClass, units, students };
}

// ---------------------------------------------------------------------------------------------
// States, detector and windows.

/** A sequence of `length` states: alternating spells, each 1 + NegBin(2) windows long. */
function semiMarkov(length: number, share: number, spellIn: number, rng: Rng): boolean[] {
  const pi = Math.min(0.995, Math.max(0.005, share));
  const spellOut = (spellIn * (1 - pi)) / pi;
  const out: boolean[] = [];
  let state = rng.uniform() < pi;
  while (out.length < length) {
    const mean = state ? spellIn : spellOut;
    const spell = 1 + rng.geometric((mean - 1) / 2) + rng.geometric((mean - 1) / 2);
    for (let k = 0; k < spell && out.length < length; k++) out.push(state);
    state = !state;
  }
  return out;
}

function detectorProbability(model: ConstructModel, inState: boolean, shift: number, rng: Rng): number {
  const [a, b] = inState ? model.inState : model.outState;
  const raw = rng.beta(a, b);
  const p = logistic(logit(Math.min(1 - 1e-9, Math.max(1e-9, raw))) + shift);
  return Math.round(p * 10000) / 10000;
}

interface Row {
  readonly instant: number;
  readonly line: string;
}

function two(n: number): string {
  return String(n).padStart(2, "0");
}

/** Local date-time written in the given offset, for an instant in ms. */
function written(instant: number, offset: (typeof OFFSETS)[number]): string {
  const local = new Date(instant + offset.minutes * 60_000);
  return (
    `${local.getUTCFullYear()}-${two(local.getUTCMonth() + 1)}-${two(local.getUTCDate())}` +
    `T${two(local.getUTCHours())}:${two(local.getUTCMinutes())}:${two(local.getUTCSeconds())}${offset.text}`
  );
}

function termDayUtc(day: number): number {
  const week = Math.floor(day / 5);
  return TERM_START_UTC + (week * 7 + (day % 5)) * 86_400_000;
}

/** Truth counters per student × unit × construct. */
class Counts {
  readonly windows: Uint32Array;
  readonly inState: Uint32Array;
  constructor(
    readonly students: number,
    readonly units: number,
  ) {
    this.windows = new Uint32Array(students * units * C);
    this.inState = new Uint32Array(students * units * C);
  }
  add(student: number, unit: number, c: number, inState: boolean): void {
    const i = (student * this.units + unit) * C + c;
    this.windows[i]!++;
    if (inState) this.inState[i]!++;
  }
}

function simulateStudent(
  district: District,
  s: number,
  rng: Rng,
  counts: Counts,
  rows: Row[],
): { sessions: number } {
  const student = district.students[s]!;
  const klass = district.classes[student.klass]!;
  const homeOffset = OFFSETS[klass.school === 1 ? 1 : 0]!;
  let attended = klass.meetings.map((_, j) => j).filter(() => rng.uniform() < student.attendance);
  if (student.lowData)
    attended = [rng.int(klass.meetings.length), rng.int(klass.meetings.length)].slice(0, 1 + rng.int(2));
  attended = [...new Set(attended)].sort((x, y) => x - y);
  attended.forEach((j, number) => {
    const unit = klass.unitOfMeeting[j]!;
    const start =
      termDayUtc(klass.meetings[j]!) +
      (klass.periodMinutes - homeOffset.minutes) * 60_000 +
      rng.int(20) * 30_000;
    const length = Math.min(100, Math.max(6, Math.round(Math.exp(Math.log(30) + 0.5 * rng.normal()))));
    const shown = OFFSETS[rng.int(OFFSETS.length)]!;
    // The timeline: recorded windows with short unrecorded gaps, states running through the gaps.
    const recorded: number[] = [];
    for (let tick = 0; recorded.length < length; tick++) {
      recorded.push(tick);
      if (rng.uniform() < GAP_RATE) tick += 1 + rng.int(4);
    }
    const ticks = recorded[recorded.length - 1]! + 1;
    const states = MODELS.map((model, c) => {
      const eta =
        logit(model.base) +
        student.effects[c]! +
        district.units[unit]!.effects[c]! +
        klass.effects[c]! +
        rng.normal() * SD.session;
      return semiMarkov(ticks, logistic(eta), model.spell, rng);
    });
    const offTask = index("off_task");
    const concentrating = index("concentrating");
    for (let t = 0; t < ticks; t++) if (states[offTask]![t]) states[concentrating]![t] = false;
    const shifts = MODELS.map(() => rng.normal() * SD.detectorShift);
    const sessionId = `${student.id}-${String.fromCharCode(97 + (number % 26))}${Math.floor(number / 26)}`;
    const prefix = `${sessionId},${student.id},${UNITS[unit]},${klass.id},${SCHOOLS[klass.school]}`;
    for (const tick of recorded) {
      const instant = start + tick * WINDOW_SECONDS * 1000;
      const cells: string[] = [];
      MODELS.forEach((model, c) => {
        const inState = states[c]![tick]!;
        const p = detectorProbability(model, inState, shifts[c]!, rng);
        if (rng.uniform() < MISSING_RATE) {
          cells.push("");
          return;
        }
        counts.add(s, unit, c, inState);
        cells.push(p.toFixed(4));
      });
      const device = rng.uniform() < 0.5 ? "tablet" : "laptop";
      rows.push({ instant, line: `${written(instant, shown)},${prefix},${device},${cells.join(",")}\n` });
    }
  });
  return { sessions: attended.length };
}

// ---------------------------------------------------------------------------------------------
// The detector card from its own validation sample.

/** AUC by Mann–Whitney: the share of (positive, negative) pairs ordered correctly, ties ½. */
export function naiveAuc(positives: readonly number[], negatives: readonly number[]): number {
  const all = [
    ...positives.map((v) => ({ v, pos: true })),
    ...negatives.map((v) => ({ v, pos: false })),
  ].sort((x, y) => x.v - y.v);
  let rankSum = 0;
  for (let i = 0; i < all.length; ) {
    let j = i;
    while (j < all.length && all[j]!.v === all[i]!.v) j++;
    const midRank = (i + 1 + j) / 2;
    for (let k = i; k < j; k++) if (all[k]!.pos) rankSum += midRank;
    i = j;
  }
  const n1 = positives.length;
  return (rankSum - (n1 * (n1 + 1)) / 2) / (n1 * negatives.length);
}

function validationSample(model: ConstructModel, inState: boolean, n: number, rng: Rng): number[] {
  const out: number[] = [];
  let shift = 0;
  for (let i = 0; i < n; i++) {
    if (i % 20 === 0) shift = rng.normal() * SD.detectorShift;
    out.push(detectorProbability(model, inState, shift, rng));
  }
  return out;
}

const mean = (xs: readonly number[]) => xs.reduce((a, b) => a + b, 0) / xs.length;
const sampleSd = (xs: readonly number[]) => {
  const mu = mean(xs);
  return Math.sqrt(xs.reduce((a, b) => a + (b - mu) ** 2, 0) / (xs.length - 1));
};
const r4 = (x: number) => Math.round(x * 10000) / 10000;

function cardYaml(rng: Rng): string {
  const lines = [
    "# Detector card of Quarry Vale Schools (invented), from a simulated validation sample.",
    `window_seconds: ${WINDOW_SECONDS}`,
    "validated_settings: [suburban]",
    "auc_floor: 0.6",
    "constructs:",
  ];
  for (const key of CARD_ORDER) {
    const model = MODELS[index(key)]!;
    const pos = validationSample(model, true, 120 + rng.int(141), rng);
    const neg = validationSample(model, false, 800 + rng.int(801), rng);
    const tp = pos.filter((p) => p >= model.threshold).length;
    const fp = neg.filter((p) => p >= model.threshold).length;
    const fn = pos.length - tp;
    const tn = neg.length - fp;
    const total = pos.length + neg.length;
    const observed = (tp + tn) / total;
    const chance = ((tp + fp) * (tp + fn) + (fn + tn) * (fp + tn)) / (total * total);
    lines.push(
      `  ${key}:`,
      `    label: ${model.label}`,
      `    kind: ${model.kind}`,
      `    higher_is: ${model.higherIs}`,
      `    auc: ${r4(naiveAuc(pos, neg))}`,
      `    auc_positives: ${pos.length}`,
      `    auc_negatives: ${neg.length}`,
      `    kappa: ${r4((observed - chance) / (1 - chance))}`,
      `    threshold: ${model.threshold}`,
      `    sensitivity: ${r4(tp / pos.length)}`,
      `    specificity: ${r4(tn / neg.length)}`,
      `    mean_p_in_state: ${r4(mean(pos))}`,
      `    mean_p_not_in_state: ${r4(mean(neg))}`,
      `    sd_p_in_state: ${r4(sampleSd(pos))}`,
      `    sd_p_not_in_state: ${r4(sampleSd(neg))}`,
      `    sustained_min_windows: ${model.sustained}`,
      "    calibration: none",
    );
  }
  return `${lines.join("\n")}\n`;
}

// ---------------------------------------------------------------------------------------------
// Truth.

/** The known truth, in the field names of the demo's truth.json so that one scorer reads both. */
export interface KnownTruth {
  readonly constructs: readonly string[];
  readonly planted: {
    readonly student_construct: string;
    readonly student_ids: readonly string[];
    readonly unit_construct: string;
    readonly unit_ids: readonly string[];
    readonly class_construct: string;
    readonly class_ids: readonly string[];
  };
  readonly students: readonly {
    readonly student_id: string;
    readonly planted: readonly boolean[];
    readonly share: readonly (number | null)[];
    readonly ratio: readonly (number | null)[];
  }[];
}

export interface QuarryTruth extends KnownTruth {
  readonly mode: QuarryMode;
  readonly seed: number;
  readonly rows: number;
  readonly students: readonly {
    readonly student_id: string;
    readonly class_id: string;
    readonly low_data: boolean;
    readonly sessions: number;
    readonly planted: readonly boolean[];
    readonly windows: readonly number[];
    readonly in_state: readonly number[];
    readonly share: readonly (number | null)[];
    readonly ratio: readonly (number | null)[];
  }[];
}

function truthOf(
  options: QuarryOptions,
  district: District,
  counts: Counts,
  sessions: number[],
  rows: number,
): QuarryTruth {
  const U = UNITS.length;
  const unitWindows = new Float64Array(U * C);
  const unitIn = new Float64Array(U * C);
  for (let s = 0; s < district.students.length; s++) {
    for (let u = 0; u < U; u++) {
      for (let c = 0; c < C; c++) {
        const i = (s * U + u) * C + c;
        unitWindows[u * C + c]! += counts.windows[i]!;
        unitIn[u * C + c]! += counts.inState[i]!;
      }
    }
  }
  const students = district.students.map((student, s) => {
    const windows = MODELS.map(() => 0);
    const inState = MODELS.map(() => 0);
    const expected = MODELS.map(() => 0);
    for (let u = 0; u < U; u++) {
      for (let c = 0; c < C; c++) {
        const i = (s * U + u) * C + c;
        const own = counts.windows[i]!;
        windows[c]! += own;
        inState[c]! += counts.inState[i]!;
        const otherN = unitWindows[u * C + c]! - own;
        if (own > 0 && otherN > 0) expected[c]! += (own * (unitIn[u * C + c]! - counts.inState[i]!)) / otherN;
      }
    }
    return {
      student_id: student.id,
      class_id: district.classes[student.klass]!.id,
      low_data: student.lowData,
      sessions: sessions[s]!,
      planted: [...student.planted],
      windows,
      in_state: inState,
      share: windows.map((w, c) => (w > 0 ? inState[c]! / w : null)),
      ratio: expected.map((e, c) => (e > 0 ? inState[c]! / e : null)),
    };
  });
  const plantedUnits = UNITS.filter((_, u) => district.units[u]!.planted.some(Boolean));
  const plantedClasses = district.classes.filter((k) => k.planted.some(Boolean)).map((k) => k.id);
  return {
    mode: options.mode,
    seed: options.seed,
    rows,
    constructs: MODELS.map((c) => c.key),
    planted: {
      student_construct: PLANTED.student,
      student_ids: students.filter((s) => s.planted.some(Boolean)).map((s) => s.student_id),
      unit_construct: PLANTED.unit,
      unit_ids: plantedUnits,
      class_construct: PLANTED.klass,
      class_ids: plantedClasses,
    },
    students,
  };
}

// ---------------------------------------------------------------------------------------------
// Writing the district.

export interface QuarryDistrict {
  readonly windows: string;
  readonly card: string;
  readonly truth: QuarryTruth;
}

/**
 * Writes windows.csv and card.yaml into `dir` (which exists) and returns their paths with the
 * truth. The same options give byte-identical files. Planted and null mode with one seed share
 * the district's structure and schedule draws up to the effects.
 */
export function writeQuarryDistrict(dir: string, options: QuarryOptions): QuarryDistrict {
  const root = new Rng(options.seed * 7919 + 17);
  const cardRng = root.split();
  const structureRng = root.split();
  const windowsRng = root.split();
  const district = buildDistrict(options, structureRng);
  const counts = new Counts(district.students.length, UNITS.length);
  const rows: Row[] = [];
  const sessions = district.students.map(
    (_, s) => simulateStudent(district, s, windowsRng.split(), counts, rows).sessions,
  );
  // An export log: every window of the district in time order (ties in the order they were made).
  const ordered = rows
    .map((row, i) => ({ row, i }))
    .sort((x, y) => x.row.instant - y.row.instant || x.i - y.i);
  const header = `window_start,session_id,student_id,unit_id,class_id,school_id,device,${MODELS.map((c) => c.key).join(",")}\n`;
  const paths = { windows: join(dir, "windows.csv"), card: join(dir, "card.yaml") };
  writeFileSync(paths.windows, header + ordered.map((x) => x.row.line).join(""));
  writeFileSync(paths.card, cardYaml(cardRng));
  return { ...paths, truth: truthOf(options, district, counts, sessions, rows.length) };
}

// ---------------------------------------------------------------------------------------------
// Scoring indicators against a known truth (the demo's truth.json or the truth above).

export interface CoverageTally {
  covered: number;
  total: number;
  width: number;
}

/** The acceptance figures of one or more runs; counts, so that runs can be pooled by adding. */
export interface Figures {
  /** Per usable construct: students past the evidence gate whose interval holds the true share. */
  readonly coverage: Map<string, CoverageTally>;
  /** The same for the ratio to peers, over rows with a ratio (width: of the log ratio, bounded rows). */
  readonly ratioCoverage: Map<string, CoverageTally>;
  /** Planted student × construct rows: past the gate, and of those, check-in. */
  readonly planted: { gated: number; total: number; found: number };
  /** The constructs in which students were planted. */
  readonly studentConstructs: Set<string>;
  /** Rows whose true ratio is below 1.2 in the concern direction (past the gate), and of those check-in. */
  readonly lowRatio: Map<string, { total: number; flagged: number }>;
  /** Rows of usable constructs: all, past the gate, check-in. */
  readonly checkIns: Map<string, { rows: number; gated: number; flagged: number }>;
  /** Planted unit × construct and class × construct rows with their status. */
  readonly plantedUnits: { unitId: string; construct: string; status: string; q: number | null }[];
  readonly plantedClasses: { classId: string; construct: string; status: string }[];
  /** Unit rows of usable constructs: tested (with a p-value), p < 0.05, review; reviews listed. */
  readonly units: { tested: number; below05: number; reviews: number; runsWithReview: number; runs: number };
  /** Class rows (shown, usable constructs) and elevated ones, outside the planted class × construct. */
  readonly classes: { shown: number; elevated: number };
}

export function emptyFigures(): Figures {
  return {
    coverage: new Map(),
    ratioCoverage: new Map(),
    planted: { gated: 0, total: 0, found: 0 },
    studentConstructs: new Set(),
    lowRatio: new Map(),
    checkIns: new Map(),
    plantedUnits: [],
    plantedClasses: [],
    units: { tested: 0, below05: 0, reviews: 0, runsWithReview: 0, runs: 0 },
    classes: { shown: 0, elevated: 0 },
  };
}

function bump<T>(map: Map<string, T>, key: string, make: () => T): T {
  let v = map.get(key);
  if (v === undefined) {
    v = make();
    map.set(key, v);
  }
  return v;
}

/** The concern line 1.2 on the truth: "below 1.2 in the concern direction". */
const TRUE_LINE = 1.2;

/** Adds one run's figures into `into` (a mutable accumulator the caller owns). */
export function scoreRun(
  into: Figures,
  input: { card: Card; indicators: Indicators; truth: KnownTruth },
): void {
  const { card, indicators, truth } = input;
  const usable = new Set(indicators.methods.filter((x) => x.usable).map((x) => x.construct));
  const good = new Set(card.constructs.filter((c) => c.higherIs === "good").map((c) => c.key));
  const byId = new Map(truth.students.map((s) => [s.student_id, s]));
  const k = new Map(truth.constructs.map((c, i) => [c, i]));
  if (truth.planted.student_ids.length > 0) into.studentConstructs.add(truth.planted.student_construct);
  for (const row of indicators.students) {
    if (!usable.has(row.construct)) continue;
    const t = byId.get(row.studentId);
    const c = k.get(row.construct);
    if (!t || c === undefined) throw new Error(`no truth for ${row.studentId} × ${row.construct}`);
    const gated = row.status !== "too-little-data";
    const flagged = row.status === "suggested";
    const ci = bump(into.checkIns, row.construct, () => ({ rows: 0, gated: 0, flagged: 0 }));
    ci.rows++;
    if (gated) ci.gated++;
    if (flagged) ci.flagged++;
    if (t.planted[c]) {
      into.planted.total++;
      if (gated) into.planted.gated++;
      if (gated && flagged) into.planted.found++;
    }
    if (!gated) continue;
    const share = t.share[c];
    if (row.share && share !== null && share !== undefined) {
      const e = bump(into.coverage, row.construct, () => ({ covered: 0, total: 0, width: 0 }));
      e.total++;
      e.width += row.share.high - row.share.low;
      if (share >= row.share.low - 1e-9 && share <= row.share.high + 1e-9) e.covered++;
    }
    const ratio = t.ratio[c];
    if (row.ratio && ratio !== null && ratio !== undefined) {
      const e = bump(into.ratioCoverage, row.construct, () => ({ covered: 0, total: 0, width: 0 }));
      e.total++;
      if (row.ratio.low > 0 && Number.isFinite(row.ratio.high))
        e.width += Math.log(row.ratio.high / row.ratio.low);
      if (ratio >= row.ratio.low - 1e-9 && ratio <= row.ratio.high + 1e-9) e.covered++;
    }
    if (ratio !== null && ratio !== undefined) {
      const low = good.has(row.construct) ? ratio > 1 / TRUE_LINE : ratio < TRUE_LINE;
      if (low) {
        const e = bump(into.lowRatio, row.construct, () => ({ total: 0, flagged: 0 }));
        e.total++;
        if (flagged) e.flagged++;
      }
    }
  }
  const plantedUnits = new Set(truth.planted.unit_ids);
  let reviews = 0;
  for (const u of indicators.units) {
    if (!usable.has(u.construct)) continue;
    if (plantedUnits.has(u.unitId) && u.construct === truth.planted.unit_construct) {
      into.plantedUnits.push({ unitId: u.unitId, construct: u.construct, status: u.status, q: u.qValue });
    }
    if (u.pValue !== null) {
      into.units.tested++;
      if (u.pValue < 0.05) into.units.below05++;
    }
    if (u.status === "review") reviews++;
  }
  into.units.reviews += reviews;
  into.units.runs++;
  if (reviews > 0) into.units.runsWithReview++;
  const plantedClasses = new Set(truth.planted.class_ids);
  for (const g of indicators.groups) {
    if (g.level !== "class" || !usable.has(g.construct)) continue;
    const isPlanted = plantedClasses.has(g.groupId) && g.construct === truth.planted.class_construct;
    if (isPlanted) into.plantedClasses.push({ classId: g.groupId, construct: g.construct, status: g.status });
    else if (g.status !== "withheld") {
      into.classes.shown++;
      if (g.status === "concern") into.classes.elevated++;
    }
  }
}

/** The counts of one tally summed over constructs: low-ratio rows (total, flagged) or all rows. */
export function pooledCounts(f: Figures, key: "lowRatio" | "checkIns"): { total: number; flagged: number } {
  let total = 0;
  let flagged = 0;
  if (key === "lowRatio") {
    for (const e of f.lowRatio.values()) {
      total += e.total;
      flagged += e.flagged;
    }
  } else {
    for (const e of f.checkIns.values()) {
      total += e.rows;
      flagged += e.flagged;
    }
  }
  return { total, flagged };
}

/** Pooled rates for reporting. */
export function rates(f: Figures): {
  coverage: { construct: string; coverage: number; n: number; width: number }[];
  recall: number;
  lowRatioFlagRate: number;
  checkInRate: number;
} {
  let lowTotal = 0;
  let lowFlagged = 0;
  for (const e of f.lowRatio.values()) {
    lowTotal += e.total;
    lowFlagged += e.flagged;
  }
  let gated = 0;
  let flagged = 0;
  for (const e of f.checkIns.values()) {
    gated += e.gated;
    flagged += e.flagged;
  }
  return {
    coverage: [...f.coverage].map(([construct, e]) => ({
      construct,
      coverage: e.covered / e.total,
      n: e.total,
      width: e.width / e.total,
    })),
    recall: f.planted.found / f.planted.gated,
    lowRatioFlagRate: lowFlagged / lowTotal,
    checkInRate: flagged / gated,
  };
}

/**
 * The smallest k with P(X ≤ k) ≥ level for X ~ Binomial(n, p), from the probability mass summed
 * term by term (pmf(k + 1) = pmf(k)·(n − k)/(k + 1)·p/(1 − p)). Used as a one-sided upper limit for
 * counts of chance events.
 */
export function binomialUpperCount(n: number, p: number, level: number): number {
  let pmf = (1 - p) ** n;
  let cdf = pmf;
  let k = 0;
  while (cdf < level && k < n) {
    pmf *= ((n - k) / (k + 1)) * (p / (1 - p));
    k++;
    cdf += pmf;
  }
  return k;
}

/** Freezes an object and everything reachable from it (arrays and plain objects). */
export function deepFreeze<T>(value: T): T {
  if (value !== null && typeof value === "object" && !Object.isFrozen(value)) {
    Object.freeze(value);
    for (const key of Object.keys(value)) deepFreeze((value as Record<string, unknown>)[key]);
  }
  return value;
}
