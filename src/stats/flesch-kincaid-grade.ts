import { readCounts } from "./flesch-reading-ease.js";
import type { TextCounts } from "./text-counts.js";

/**
 * Flesch–Kincaid grade level of a text from its counts.
 *
 * Definition: 0.39·(words/sentences) + 11.8·(syllables/words) − 15.59, the US school grade whose
 * readers can usually follow the text (8 means an eighth-grade reader).
 *
 * Variant: the formula of Kincaid et al. (1975), unrounded and not clipped (very simple text can
 * score below 0).
 *
 * Fails when: words or sentences is not a whole number ≥ 1, or syllables is negative or not
 * finite (RangeError/TypeError). Like the Reading Ease score it reflects only sentence and word
 * length.
 *
 * Example: 100 words in 5 sentences with 140 syllables give grade 8.73:
 * `fleschKincaidGrade({ words: 100, sentences: 5, syllables: 140 })`.
 *
 * Source: J. P. Kincaid, R. P. Fishburne, R. L. Rogers & B. S. Chissom (1975), "Derivation of new
 * readability formulas (Automated Readability Index, Fog Count and Flesch Reading Ease formula) for
 * Navy enlisted personnel", Research Branch Report 8-75, Naval Technical Training Command.
 */
export function fleschKincaidGrade(counts: TextCounts): number {
  const { words, sentences, syllables } = readCounts(counts);
  return 0.39 * (words / sentences) + 11.8 * (syllables / words) - 15.59;
}
