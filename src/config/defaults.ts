/**
 * Every default in one place, each with its reason. The card's optional keys and the settings
 * file's keys fall back to these; `manifest.json` records the values as used.
 */
import type { Settings } from "./types.js";

export const CARD_DEFAULTS = {
  /** DESIGN.md: A' below 0.60 is too close to chance (0.50) to judge a student, unit or group by. */
  aucFloor: 0.6,
  /** Two minutes of continuous state; shorter confusion or frustration is an ordinary part of learning. */
  sustainedMinutes: 2,
} as const;

export const DEFAULT_SETTINGS: Settings = {
  title: "Engagement report",
  period: { from: null, to: null },
  confidence: 0.95,
  strict: false,
  audiences: ["counselors", "content", "support", "about"],
  evidence: { minMinutes: 30, minSessions: 3, minDays: 2, minStudents: 10 },
  suppressionSize: 10,
  flags: { studentRatio: 1.2, groupRatio: 1.25, unitQ: 0.05 },
  allStudentPages: false,
  replicates: 1000,
  pseudonymise: { keyEnv: null, keyFile: null },
  buildTime: null,
  seed: 20260101,
  examplesPerReason: 20,
  maxFieldChars: 1024,
};

/** Why each default is what it is; a test checks every setting has a reason here. */
export const DEFAULT_REASONS: Readonly<Record<string, string>> = {
  title: "A neutral title; districts set their own.",
  "period.from": "Empty: the period starts with the first window in the data.",
  "period.to": "Empty: the period ends with the last window in the data.",
  confidence: "95% intervals are the convention readers know; the report calls them plausible ranges.",
  strict:
    "Off: one bad row should not stop a district's build; every rejected row is counted and shown. Turn on for pipelines that must fail fast.",
  audiences: "All four folders; leave out the ones a district does not use.",
  "evidence.minMinutes":
    "30 minutes of observed work (90 windows of 20 s): fewer gives intervals too wide to support a conversation. Our choice, not a published standard.",
  "evidence.minSessions":
    "3 sittings: one bad day should not produce a check-in. Our choice, not a published standard.",
  "evidence.minDays": "2 distinct days, for the same reason as the sittings minimum.",
  "evidence.minStudents":
    "10 students for a unit figure, the most common minimum group size in education statistics (NCES 2011-603).",
  suppressionSize:
    "10 students, the most common minimum group size in state practice (NCES 2011-603, SLDS Technical Brief 3, 2010); the tool refuses values below 5.",
  "flags.studentRatio":
    "1.2 times peers on the same content, for the whole plausible range (never the point alone): the range must rule out anything under a fifth more, so a student whose true ratio is below 1.2 is suggested only when the range misses the truth (at most 2.5% for a student right at 1.2, far less below it). In our simulations (README, methods) students whose true ratio was below 1.2 were flagged well under 1% of the time, while 6 to 7 in 10 students with planted high boredom were found. A higher line finds fewer of them: 1.3 found about 5.5 in 10 in the independent district. Our choice, not a published standard.",
  "flags.groupRatio":
    "1.25 times comparable groups on the same content, for the whole plausible range: a class is many students, so its range is narrow and a quarter more is already a pattern worth planning support around. In our simulations no class was marked in districts where nothing was planted. Our choice, not a published standard.",
  "flags.unitQ":
    "0.05: Benjamini and Hochberg's (1995) false-discovery rate, so that among units marked for review about 1 in 20 at most is expected to be a chance finding.",
  allStudentPages:
    "Off: pages and the caseload PDF hold the students with a suggested check-in, so that a counselor's attention goes where the evidence is. Turn on to print a page for every student with data.",
  replicates:
    "1000 resamples of students: the usual number for percentile intervals at 95% (Efron and Tibshirani 1993, section 13.3); more changes the limits only in the third digit.",
  "pseudonymise.keyEnv": "Off: identifiers are shown as given unless a key is supplied.",
  "pseudonymise.keyFile": "Off: identifiers are shown as given unless a key is supplied.",
  buildTime: "Empty: the manifest records the actual build time; set it to make builds byte-identical.",
  seed: "A fixed seed, so the same inputs and settings give byte-identical resampling results.",
  examplesPerReason: "DATA-CONTRACT.md: up to 20 examples of each rejection reason, with file and line.",
  maxFieldChars:
    "Identifiers longer than 1024 characters are almost surely a broken quote or a wrong column; such rows are rejected.",
};
