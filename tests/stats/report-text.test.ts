import { describe, expect, it } from "vitest";
import { contrastRatio } from "../../src/stats/contrast-ratio.js";
import { countSyllables } from "../../src/stats/count-syllables.js";
import { fleschKincaidGrade } from "../../src/stats/flesch-kincaid-grade.js";
import { fleschReadingEase } from "../../src/stats/flesch-reading-ease.js";
import { relativeLuminance } from "../../src/stats/relative-luminance.js";
import { textCounts } from "../../src/stats/text-counts.js";
import { expectClose } from "./close.js";

describe("readability", () => {
  describe("Flesch formulas (Flesch 1948; Kincaid et al. 1975)", () => {
    it("100 words, 5 sentences, 140 syllables → Ease 68.095, Grade 8.73 (REFERENCE-VALUES.md [re]; 1e-9)", () => {
      const counts = { words: 100, sentences: 5, syllables: 140 };
      expectClose(fleschReadingEase(counts), 68.095, { abs: 1e-9 });
      expectClose(fleschKincaidGrade(counts), 8.73, { abs: 1e-9 });
    });

    it("rejects zero words or sentences", () => {
      expect(() => fleschReadingEase({ words: 0, sentences: 1, syllables: 0 })).toThrow(RangeError);
      expect(() => fleschKincaidGrade({ words: 3, sentences: 0, syllables: 3 })).toThrow(RangeError);
    });
  });

  describe("countSyllables heuristic", () => {
    // Dictionary syllable counts as divided in Merriam-Webster's entries, from memory [mem]; each
    // word is unambiguous in the common US pronunciation.
    const dictionary: [string, number][] = [
      ["the", 1],
      ["cat", 1],
      ["make", 1],
      ["time", 1],
      ["school", 1],
      ["free", 1],
      ["there", 1],
      ["they", 1],
      ["jumped", 1],
      ["likes", 1],
      ["table", 2],
      ["simple", 2],
      ["people", 2],
      ["little", 2],
      ["reading", 2],
      ["students", 2],
      ["teacher", 2],
      ["session", 2],
      ["wanted", 2],
      ["boxes", 2],
      ["places", 2],
      ["confused", 2],
      ["because", 2],
      ["before", 2],
      ["water", 2],
      ["yellow", 2],
      ["happy", 2],
      ["likely", 2],
      ["careful", 2],
      ["statement", 2],
      ["engagement", 3],
      ["interval", 3],
      ["frustrated", 3],
      ["evidence", 3],
      ["typical", 3],
      ["beautiful", 3],
      ["education", 4],
      ["concentrating", 4],
      ["probability", 5],
    ];
    it.each(dictionary)("%s has %i syllable(s)", (word, syllables) => {
      expect(countSyllables(word)).toBe(syllables);
    });

    it("ignores case and punctuation, and gives 0 for no letters", () => {
      expect(countSyllables("Table,")).toBe(2);
      expect(countSyllables("42")).toBe(0);
      expect(countSyllables("")).toBe(0);
    });
  });

  describe("textCounts", () => {
    it("counts words, sentences and syllables of a short passage (hand count)", () => {
      expect(textCounts("The cat sat. It was happy!")).toEqual({ words: 6, sentences: 2, syllables: 7 });
    });

    it("keeps decimals, contractions and hyphenated words as one word and ends an unpunctuated last sentence", () => {
      // Words: about, 2.1, times, the, well-known, rate, it, doesn't, change → 9 words.
      // Syllables: a-bout 2, 2.1 → 2 digit groups, times 1, the 1, well-known 2, rate 1, it 1,
      // does-n't 1 (the heuristic counts the letters "doesnt" as one vowel group) , change 1 → 12.
      expect(textCounts("About 2.1 times the well-known rate. It doesn't change")).toEqual({
        words: 9,
        sentences: 2,
        syllables: 12,
      });
    });

    it("gives zeros for empty text", () => {
      expect(textCounts("   ")).toEqual({ words: 0, sentences: 0, syllables: 0 });
    });
  });
});

describe("colour contrast", () => {
  describe("WCAG 2.x relative luminance and contrast ratio", () => {
    it("black on white is 21:1 (WCAG 2.x definition [pub])", () => {
      expect(relativeLuminance("#000000")).toBe(0);
      expect(relativeLuminance("#ffffff")).toBe(1);
      expectClose(contrastRatio("#000", "#fff"), 21, { abs: 1e-12 });
    });

    it("greys on white: #767676 4.542225, #777777 4.478089, #595959 7.004729 (REFERENCE-VALUES.md [re]; 1e-6)", () => {
      expectClose(contrastRatio("#767676", "#ffffff"), 4.542225, { abs: 1e-6 });
      expectClose(contrastRatio("#777777", "#FFFFFF"), 4.478089, { abs: 1e-6 });
      expectClose(contrastRatio("#ffffff", "#595959"), 7.004729, { abs: 1e-6 });
    });

    it("Okabe–Ito colours: #0072B2, #D55E00, #009E73, #CC79A7 reach 3:1 on white; #56B4E9, #E69F00, #F0E442 do not (REFERENCE-VALUES.md [re])", () => {
      for (const c of ["#0072B2", "#D55E00", "#009E73", "#CC79A7"])
        expect(contrastRatio(c, "#fff")).toBeGreaterThanOrEqual(3);
      for (const c of ["#56B4E9", "#E69F00", "#F0E442"]) expect(contrastRatio(c, "#fff")).toBeLessThan(3);
    });

    it("rejects anything but 3 or 6 hex digits", () => {
      expect(() => relativeLuminance("#12345")).toThrow(RangeError);
      expect(() => relativeLuminance("white")).toThrow(RangeError);
      expect(() => contrastRatio("#fff", "#ggg")).toThrow(RangeError);
    });
  });
});
