/**
 * Estimated number of syllables in an English word, for readability formulas.
 *
 * Definition: the number of spoken syllables, estimated from spelling by counting groups of
 * consecutive vowels after removing common silent letters.
 *
 * Variant (a heuristic of our own, in this order):
 * 1. Lower-case and keep only the letters a–z; no letters gives 0. Words of 1–3 letters count 1.
 * 2. Silent endings: a final "e" is dropped unless the word ends in consonant + "le" (ta-ble) or
 *    "ee" (free); "es" is dropped unless it follows s, x, z, c, g, ch or sh (box-es, pla-ces);
 *    "ed" is dropped unless it follows t or d (want-ed).
 * 3. A silent e inside vowel–consonant–e before the suffixes -ly, -ful, -ness, -ment is dropped
 *    (like-ly, care-ful, state-ment).
 * 4. A leading "y" is a consonant (yel-low); elsewhere y is a vowel (hap-py).
 * 5. Each maximal run of vowels (a, e, i, o, u, y) counts one syllable; at least 1.
 *
 * Fails when: never throws (non-words give 0). Known misses: vowel pairs spoken as two syllables
 * (cre-at-ed, i-de-a, ra-ti-o, a-re-a count one short), final e that is sounded (rec-i-pe), and
 * "-ement" after a single vowel (el-e-ment counts 2). Good enough for a reading-level estimate,
 * which averages over many words; not for poetry.
 *
 * Example: `countSyllables("table")` = 2; `countSyllables("probability")` = 5;
 * `countSyllables("jumped")` = 1.
 *
 * Source: counting vowel groups with silent-e rules is the usual approach since R. Flesch (1948),
 * "A new readability yardstick", Journal of Applied Psychology 32:221–233, who counted syllables by
 * hand; the rules above are this project's own.
 */
export function countSyllables(word: string): number {
  if (typeof word !== "string") throw new TypeError(`word must be a string, got ${typeof word}`);
  let w = word.toLowerCase().replace(/[^a-z]/g, "");
  if (w.length === 0) return 0;
  if (w.length <= 3) return 1;
  w = dropSilentEnding(w);
  w = w.replace(/([aeiouy][^aeiouy])e(ly|ful|ness|ment)/g, "$1$2");
  w = w.replace(/^y/, "");
  const groups = w.match(/[aeiouy]+/g);
  return Math.max(1, groups?.length ?? 0);
}

function dropSilentEnding(w: string): string {
  if (/[^aeiouy]le$/.test(w) || w.endsWith("ee")) return w;
  if (w.endsWith("es")) return /(?:[sxzcg]|[cs]h)es$/.test(w) ? w : w.slice(0, -2);
  if (w.endsWith("ed")) return /[td]ed$/.test(w) ? w : w.slice(0, -2);
  if (w.endsWith("e")) return w.slice(0, -1);
  return w;
}
