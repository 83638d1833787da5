import type { Random } from "../stats/random.js";

/**
 * Invented names for the demo district. Nothing here names a real district, school, place,
 * person or learning platform: school names join a made-up word to a landscape feature, and
 * people's names are built from made-up syllables.
 */
export const DISTRICT_NAME = "Larkmoor Unified";

const SCHOOL_WORDS = [
  "Brindlewick",
  "Quillfen",
  "Tarrowvale",
  "Osselmark",
  "Wennibrook",
  "Corrowmere",
  "Fennatch",
  "Halvessy",
  "Ibberlin",
  "Jossamy",
  "Kestrowan",
  "Lumbrisk",
  "Marrowind",
  "Nettlequay",
  "Orrinhall",
  "Pellisand",
  "Rusherby",
  "Sallowick",
  "Thistlemoy",
  "Umberlane",
  "Varrowby",
  "Wickenthal",
  "Yarrowgate",
  "Zennimore",
  "Amberquill",
  "Bracklewen",
  "Cindervale",
  "Drovenny",
  "Emberlish",
  "Flintamoor",
  "Gorselby",
  "Hobbleskern",
] as const;

const FEATURES = [
  "Hollow",
  "Ridge",
  "Fen",
  "Knoll",
  "Brook",
  "Crossing",
  "Heath",
  "Vale",
  "Spring",
  "Meadow",
  "Bluff",
  "Cove",
  "Grove",
  "Terrace",
  "Falls",
  "Reach",
  "Hill",
  "Marsh",
  "Point",
  "Glen",
  "Prairie",
  "Mesa",
  "Bend",
  "Shoal",
] as const;

export interface SchoolName {
  readonly name: string;
  readonly schoolId: string;
}

/**
 * The i-th school's name. Word and feature are paired by a bijection over all 768 pairs, so
 * names never repeat below 768 schools; past that a numeral keeps them distinct. `words` is a
 * seeded shuffle of the word list, so each seed names its schools differently.
 */
export function schoolName(index: number, words: readonly string[]): SchoolName {
  const w = words.length;
  const f = FEATURES.length;
  const word = words[index % w]!;
  const feature = FEATURES[((index % w) + Math.floor(index / w)) % f]!;
  const cycle = Math.floor(index / (w * f));
  const suffix = cycle === 0 ? "" : ` ${cycle + 1}`;
  const name = `${word} ${feature}${suffix} Middle School`;
  const schoolId = `${word}-${feature}${cycle === 0 ? "" : `-${cycle + 1}`}`.toLowerCase();
  return { name, schoolId };
}

export function shuffledSchoolWords(random: Random): string[] {
  return shuffle([...SCHOOL_WORDS], random);
}

/** Fisher–Yates shuffle of the given (fresh) array, in place; returns it. */
export function shuffle<T>(items: T[], random: Random): T[] {
  for (let i = items.length - 1; i > 0; i--) {
    const j = random.int(i + 1);
    const held = items[i]!;
    items[i] = items[j]!;
    items[j] = held;
  }
  return items;
}

const ONSETS = ["b", "d", "f", "k", "l", "m", "n", "p", "r", "s", "t", "v", "z", "br", "th", "qu", "sh", "w"];
const VOWELS = ["a", "e", "i", "o", "u", "ai", "ea", "y"];
const CODAS = ["", "", "n", "l", "r", "s", "th", "sk", "m", "x"];
const FAMILY_ENDINGS = ["wick", "ley", "more", "ton", "worth", "by", "ell", "ard", "quist", "ren"];

function syllable(random: Random): string {
  return pick(ONSETS, random) + pick(VOWELS, random) + pick(CODAS, random);
}

function pick(list: readonly string[], random: Random): string {
  return list[random.int(list.length)]!;
}

function capitalise(word: string): string {
  return word.charAt(0).toUpperCase() + word.slice(1);
}

/** An invented person's name from made-up syllables, e.g. "Tavel Brosquist". */
export function inventedName(random: Random): string {
  const given = capitalise(syllable(random) + syllable(random));
  const family = capitalise(syllable(random) + pick(FAMILY_ENDINGS, random));
  return `${given} ${family}`;
}

export interface UnitName {
  readonly unitId: string;
  readonly name: string;
}

/** The eight content units of the district's shared mathematics sequence, in teaching order. */
export const UNITS: readonly UnitName[] = [
  { unitId: "u01-number-lines", name: "Number lines and distance" },
  { unitId: "u02-ratio-tables", name: "Ratio tables" },
  { unitId: "u03-fraction-bridges", name: "Fraction bridges" },
  { unitId: "u04-signed-numbers", name: "Signed numbers" },
  { unitId: "u05-expressions", name: "Writing expressions" },
  { unitId: "u06-one-step-equations", name: "One-step equations" },
  { unitId: "u07-area-and-nets", name: "Area and nets" },
  { unitId: "u08-data-displays", name: "Data displays" },
];
