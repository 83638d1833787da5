import { createRandom, type Random } from "../stats/random.js";
import { TERM_WEEKDAYS, termDays } from "./calendar.js";
import { CONSTRUCT_KEYS, constructIndex, EFFECT_SD, LOW_DATA_SHARE, PLANTED } from "./constructs.js";
import { inventedName, type SchoolName, schoolName, shuffle, shuffledSchoolWords, UNITS } from "./names.js";
import type { DemoOptions } from "./options.js";

/**
 * The demo district's fixed structure: schools, classes, content units, students, their random
 * and planted effects, and each class's pacing through the units. Everything per window is
 * simulated later, student by student (simulate-windows.ts).
 *
 * Sizes scale with the number of students: classes of about 25 (at least 2 classes), about 5.5
 * classes per school (at least 2 schools). At 50 students: 2 schools of one class each.
 */
export type Setting = "urban" | "suburban" | "rural";

export interface DemoSchool extends SchoolName {
  readonly index: number;
  readonly setting: Setting;
  readonly counselors: readonly string[];
}

export interface DemoUnit {
  readonly index: number;
  readonly unitId: string;
  readonly name: string;
  readonly activityIds: readonly string[];
  /** Per construct (CONSTRUCT_KEYS order): planted here? */
  readonly planted: readonly boolean[];
  /** Per construct: the unit's logit effect, random plus planted (all 0 in null mode). */
  readonly effects: readonly number[];
}

export interface DemoClass {
  readonly index: number;
  readonly classId: string;
  readonly schoolIndex: number;
  readonly grade: number;
  /** 1-based period of the school day in which the class meets. */
  readonly period: number;
  /** Number of term weekdays the class takes for the whole unit sequence (30 to 40). */
  readonly days: number;
  /** First term-day index of each unit, then `days`: unit u runs on [unitStarts[u], unitStarts[u+1]). */
  readonly unitStarts: readonly number[];
  readonly students: number;
  readonly planted: readonly boolean[];
  readonly effects: readonly number[];
}

export interface DemoStudent {
  readonly index: number;
  readonly studentId: string;
  readonly displayName: string;
  readonly classIndex: number;
  readonly counselor: string;
  readonly lowData: boolean;
  readonly planted: readonly boolean[];
  readonly effects: readonly number[];
}

export interface DemoDistrict {
  readonly options: Readonly<DemoOptions>;
  readonly termDays: readonly string[];
  readonly schools: readonly DemoSchool[];
  readonly units: readonly DemoUnit[];
  readonly classes: readonly DemoClass[];
  readonly students: readonly DemoStudent[];
}

/**
 * Independent generator streams derived from the seed: the card's validation sample, the
 * district's structure, and the students' sessions. Forked in this fixed order, so that the card
 * does not change with the number of students.
 */
export function demoStreams(seed: number): { card: Random; structure: Random; students: Random } {
  const root = createRandom(seed);
  const card = root.fork();
  const structure = root.fork();
  const students = root.fork();
  return { card, structure, students };
}

/**
 * Builds the structure. Every random draw is made in both modes, so that the same seed gives the
 * same schools, classes, students and schedules in planted and null mode; null mode then sets
 * every student, unit and class effect to 0 and plants nothing.
 */
export function buildDistrict(options: Readonly<DemoOptions>, random: Random): DemoDistrict {
  const classCount = Math.max(2, Math.round(options.students / 25));
  const schoolCount = Math.max(2, Math.round(classCount / 5.5));
  const schools = buildSchools(schoolCount, random);
  const units = buildUnits(random);
  const classes = buildClasses({ classCount, schools, students: options.students }, random);
  const students = buildStudents({ options, classes, schools }, random);
  const plantedUnit = random.int(units.length);
  const eligible = classes.filter((k) => k.students >= PLANTED.classMinimumSize);
  const plantedClass = eligible[random.int(eligible.length)]!.index;
  const district = { options, termDays: termDays(TERM_WEEKDAYS), schools, units, classes, students };
  return options.mode === "null"
    ? withoutEffects(district)
    : withPlanted(district, { plantedUnit, plantedClass });
}

function buildSchools(count: number, random: Random): DemoSchool[] {
  const words = shuffledSchoolWords(random);
  return Array.from({ length: count }, (_, index) => {
    const draw = random.uniform();
    // One rural school (outside the card's validated settings), the first urban, the rest mixed.
    const setting: Setting = index === 1 ? "rural" : index === 0 || draw < 0.5 ? "urban" : "suburban";
    const counselors = Array.from({ length: 2 + random.int(2) }, () => inventedName(random));
    return { index, ...schoolName(index, words), setting, counselors };
  });
}

function buildUnits(random: Random): DemoUnit[] {
  return UNITS.map((unit, index) => {
    const activities = 2 + random.int(3);
    const code = unit.unitId.slice(0, 3);
    return {
      index,
      ...unit,
      activityIds: Array.from({ length: activities }, (_, k) => `${code}-a${k + 1}`),
      planted: CONSTRUCT_KEYS.map(() => false),
      effects: CONSTRUCT_KEYS.map(() => random.normal() * EFFECT_SD.unit),
    };
  });
}

/** Classes in contiguous, near-equal blocks per school; sizes differ by at most one student. */
function buildClasses(
  sizes: { classCount: number; schools: readonly DemoSchool[]; students: number },
  random: Random,
): DemoClass[] {
  const { classCount, schools, students } = sizes;
  const classes: DemoClass[] = [];
  const perSchool = new Array<number>(schools.length).fill(0);
  for (let index = 0; index < classCount; index++) {
    const schoolIndex = Math.floor((index * schools.length) / classCount);
    const period = ++perSchool[schoolIndex]!;
    const days = 30 + random.int(11);
    classes.push({
      index,
      classId: `${schools[schoolIndex]!.schoolId}-p${period}`,
      schoolIndex,
      grade: 6 + ((period - 1) % 3),
      period,
      days,
      unitStarts: unitStarts(days, random),
      students: Math.floor(students / classCount) + (index < students % classCount ? 1 : 0),
      planted: CONSTRUCT_KEYS.map(() => false),
      effects: CONSTRUCT_KEYS.map(() => random.normal() * EFFECT_SD.class),
    });
  }
  return classes;
}

/** Splits a class's days among the units in sequence, each unit getting 0.75 to 1.25 shares. */
function unitStarts(days: number, random: Random): number[] {
  const weights = UNITS.map(() => 0.75 + 0.5 * random.uniform());
  const total = weights.reduce((a, b) => a + b, 0);
  const starts = [0];
  let cumulative = 0;
  for (const weight of weights) {
    cumulative += weight;
    starts.push(Math.round((cumulative / total) * days));
  }
  return starts;
}

function buildStudents(
  context: { options: Readonly<DemoOptions>; classes: DemoClass[]; schools: DemoSchool[] },
  random: Random,
): DemoStudent[] {
  const { options, classes, schools } = context;
  const n = options.students;
  const seats = shuffle(
    classes.flatMap((k) => new Array<number>(k.students).fill(k.index)),
    random,
  );
  const order = shuffle(
    Array.from({ length: n }, (_, i) => i),
    random,
  );
  const lowDataCount = Math.max(1, Math.round(n * LOW_DATA_SHARE));
  const plantedCount = Math.max(PLANTED.studentMinimum, Math.round(n * PLANTED.studentShare));
  const lowData = new Set(order.slice(0, lowDataCount));
  const planted = new Set(order.slice(lowDataCount, lowDataCount + plantedCount));
  const width = Math.max(4, String(n).length);
  const bored = constructIndex(PLANTED.studentConstruct);
  return Array.from({ length: n }, (_, index) => {
    const classIndex = seats[index]!;
    const counselors = schools[classes[classIndex]!.schoolIndex]!.counselors;
    const displayName = inventedName(random);
    return {
      index,
      studentId: `s${String(index + 1).padStart(width, "0")}`,
      displayName,
      classIndex,
      counselor: counselors[caseload(displayName, counselors.length)]!,
      lowData: lowData.has(index),
      planted: CONSTRUCT_KEYS.map((_, c) => planted.has(index) && c === bored),
      effects: CONSTRUCT_KEYS.map(() => random.normal() * EFFECT_SD.student),
    };
  });
}

/** Caseloads split the alphabet of family names evenly (A–M and N–Z for two counselors). */
function caseload(displayName: string, counselors: number): number {
  const initial = displayName.slice(displayName.lastIndexOf(" ") + 1).charCodeAt(0) - 65;
  return Math.min(counselors - 1, Math.floor((Math.max(0, initial) * counselors) / 26));
}

function withoutEffects(district: DemoDistrict): DemoDistrict {
  const zero = CONSTRUCT_KEYS.map(() => 0);
  const none = CONSTRUCT_KEYS.map(() => false);
  return {
    ...district,
    units: district.units.map((u) => ({ ...u, effects: zero, planted: none })),
    classes: district.classes.map((k) => ({ ...k, effects: zero, planted: none })),
    students: district.students.map((s) => ({ ...s, effects: zero, planted: none })),
  };
}

function withPlanted(
  district: DemoDistrict,
  chosen: { plantedUnit: number; plantedClass: number },
): DemoDistrict {
  const gaming = constructIndex(PLANTED.unitConstruct);
  const offTask = constructIndex(PLANTED.classConstruct);
  // A planted cell takes exactly the planted effect in place of its random effect, so that it
  // stands clear of the random spread (3 to 4 standard deviations) whatever the seed.
  const shift = (effects: readonly number[], flags: readonly boolean[], amount: number) =>
    effects.map((e, c) => (flags[c] ? amount : e));
  const flagged = (c: number) => CONSTRUCT_KEYS.map((_, k) => k === c);
  const none = CONSTRUCT_KEYS.map(() => false);
  return {
    ...district,
    units: district.units.map((u) => {
      const planted = u.index === chosen.plantedUnit ? flagged(gaming) : none;
      return { ...u, planted, effects: shift(u.effects, planted, PLANTED.unitShift) };
    }),
    classes: district.classes.map((k) => {
      const planted = k.index === chosen.plantedClass ? flagged(offTask) : none;
      return { ...k, planted, effects: shift(k.effects, planted, PLANTED.classShift) };
    }),
    students: district.students.map((s) => ({
      ...s,
      effects: shift(s.effects, s.planted, PLANTED.studentShift),
    })),
  };
}
