import type { TextCounts } from "./text-counts.js";
import { assertInteger, assertNonNegative } from "./validate.js";

/**
 * Flesch Reading Ease score of a text from its counts.
 *
 * Definition: 206.835 − 1.015·(words/sentences) − 84.6·(syllables/words). Higher is easier:
 * 60–70 is plain English (about grade 8–9), 30–50 is college level, below 30 is very difficult.
 *
 * Variant: Flesch's 1948 formula on counts from `textCounts` (or hand counts); unrounded and not
 * clipped to 0–100.
 *
 * Fails when: words or sentences is not a whole number ≥ 1, or syllables is negative or not
 * finite (RangeError/TypeError). The score measures sentence and word length only, not
 * meaning; short texts (under about 100 words) give unstable scores.
 *
 * Example: 100 words in 5 sentences with 140 syllables score 68.095:
 * `fleschReadingEase({ words: 100, sentences: 5, syllables: 140 })`.
 *
 * Source: R. Flesch (1948), "A new readability yardstick", Journal of Applied Psychology
 * 32:221–233.
 */
export function fleschReadingEase(counts: TextCounts): number {
  const { words, sentences, syllables } = readCounts(counts);
  return 206.835 - 1.015 * (words / sentences) - 84.6 * (syllables / words);
}

/** Checks the counts of a readability formula. */
export function readCounts(counts: TextCounts): TextCounts {
  assertInteger("words", counts.words, 1);
  assertInteger("sentences", counts.sentences, 1);
  assertNonNegative("syllables", counts.syllables);
  return counts;
}
