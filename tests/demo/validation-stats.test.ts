import { describe, expect, it } from "vitest";
import { cohenKappa } from "../../src/demo/cohen-kappa.js";
import { rankAuc } from "../../src/demo/rank-auc.js";

function ratings(countsByRating: readonly number[]): number[] {
  return countsByRating.flatMap((count, i) => new Array<number>(count).fill(i + 1));
}

describe("rankAuc (Mann–Whitney, ties ½)", () => {
  it("reproduces Hanley & McNeil (1982) 5-point rating data: AUC 2642/2958 = 0.8931710615 (1e-10)", () => {
    // REFERENCE-VALUES.md [pub]: non-diseased 33, 6, 6, 11, 2; diseased 3, 2, 2, 11, 33 by rating 1..5.
    const negatives = Object.freeze(ratings([33, 6, 6, 11, 2]));
    const positives = Object.freeze(ratings([3, 2, 2, 11, 33]));
    expect(rankAuc({ positives, negatives })).toBeCloseTo(0.8931710615, 10);
  });

  it("gives 8/9 on the toy example of REFERENCE-VALUES.md (exact)", () => {
    expect(rankAuc({ positives: [0.8, 0.7, 0.4], negatives: [0.5, 0.3, 0.2] })).toBeCloseTo(8 / 9, 15);
  });

  it("throws when a group is empty", () => {
    expect(() => rankAuc({ positives: [], negatives: [0.1] })).toThrow(RangeError);
  });
});

describe("cohenKappa (Cohen 1960)", () => {
  it("gives .40 for [[20, 5], [10, 15]] (REFERENCE-VALUES.md, textbook example from memory; 1e-12)", () => {
    expect(
      cohenKappa({
        table: [
          [20, 5],
          [10, 15],
        ],
      }),
    ).toBeCloseTo(0.4, 12);
  });

  it("throws on an empty table", () => {
    expect(() =>
      cohenKappa({
        table: [
          [0, 0],
          [0, 0],
        ],
      }),
    ).toThrow(RangeError);
  });
});
