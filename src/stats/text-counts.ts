import { countSyllables } from "./count-syllables.js";

/** Word, sentence and syllable counts of a text. */
export interface TextCounts {
  readonly words: number;
  readonly sentences: number;
  readonly syllables: number;
}

/**
 * Counts the words, sentences and (estimated) syllables of a plain-text passage, as inputs to the
 * Flesch formulas.
 *
 * Definition: a word is a run of letters or digits, possibly joined by an apostrophe, hyphen,
 * period or comma inside it ("don't", "well-known", "2.1", "1,200"); a sentence ends at ".", "!"
 * or "?" (one or more) followed by white space or the end of the text, and a final fragment
 * without end punctuation counts as a sentence too; syllables are summed over words with
 * `countSyllables` (hyphenated parts counted separately; a word with no letters, such as a number,
 * counts one syllable per group of digits).
 *
 * Variant: plain text only (strip markup first). Abbreviations such as "e.g." followed by a space
 * end a sentence; headings without punctuation run into the next sentence unless separated by a
 * blank line, which also ends a sentence.
 *
 * Fails when: text is not a string (TypeError). Empty text gives zeros.
 *
 * Example: `textCounts("The cat sat. It was happy!")` gives 6 words, 2 sentences, 7 syllables.
 *
 * Source: R. Flesch (1948), "A new readability yardstick", Journal of Applied Psychology 32:221–233
 * (counting rules, adapted).
 */
export function textCounts(text: string): TextCounts {
  if (typeof text !== "string") throw new TypeError(`text must be a string, got ${typeof text}`);
  const words = text.match(/[\p{L}\p{N}]+(?:['’.,-][\p{L}\p{N}]+)*/gu) ?? [];
  let syllables = 0;
  for (const word of words) {
    for (const part of word.split(/[-.,]/)) {
      const letters = countSyllables(part);
      syllables += letters > 0 ? letters : /\p{N}/u.test(part) ? 1 : 0;
    }
  }
  const sentences = text
    .split(/[.!?]+(?=\s|$)|\n\s*\n/u)
    .filter((chunk) => /[\p{L}\p{N}]/u.test(chunk)).length;
  return { words: words.length, sentences, syllables };
}
