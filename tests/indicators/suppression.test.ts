import fc from "fast-check";
import { describe, expect, it } from "vitest";
import { type GroupSize, suppressionFor } from "../../src/indicators/suppression.js";
import type { GroupLevel } from "../../src/indicators/types.js";

/**
 * Small-cell suppression with complementary suppression (NCES 2011-603, SLDS Technical Brief 3,
 * "Statistical Methods for Protecting Personally Identifiable Information in Aggregate Reporting",
 * 2010: a minimum group size, 10 the most common; REFERENCE-VALUES.md "Privacy thresholds").
 * The complementary rule is the common practice of at least two withheld cells in any shown
 * total, so that no withheld figure is the difference of shown ones. Here the totals are the
 * district (over its schools) and each school (over its classes); a withheld total whose parts are
 * all shown could be rebuilt from them, so at least one part of a withheld total is withheld as well.
 */
const PRIMARY = /^Fewer than \d+ students/;
const COMPLEMENTARY = /worked out from the totals/;

function district(students: number): GroupSize {
  return { level: "district", id: "district", parentId: "", students };
}
function school(id: string, students: number): GroupSize {
  return { level: "school", id, parentId: "district", students };
}
function klass(id: string, schoolId: string, students: number): GroupSize {
  return { level: "class", id, parentId: schoolId, students };
}

function withheldIds(groups: readonly GroupSize[], size: number): string[] {
  const s = suppressionFor(groups, size);
  return groups.filter((g) => s.withheld(g.level, g.id)).map((g) => `${g.level}:${g.id}`);
}

describe("primary suppression (fewer students than the size)", () => {
  it("withholds 9 of size 10, shows exactly 10, and says why", () => {
    const groups = Object.freeze([
      district(100),
      school("north", 100),
      klass("n-1", "north", 9),
      klass("n-2", "north", 10),
      klass("n-3", "north", 9),
      klass("n-4", "north", 72),
    ]);
    const s = suppressionFor(groups, 10);
    expect(s.withheld("class", "n-1")).toBe(true);
    expect(s.withheld("class", "n-3")).toBe(true);
    expect(s.withheld("class", "n-2")).toBe(false);
    expect(s.withheld("class", "n-4")).toBe(false);
    expect(s.reason("class", "n-1")).toMatch(PRIMARY);
    expect(s.reason("class", "n-1")).toContain("10");
    expect(s.reason("class", "n-2")).toBeNull();
    expect(s.withheld("school", "north")).toBe(false);
  });

  it("does not confuse a class and a school that share an id", () => {
    const groups = [
      district(50),
      school("x", 50),
      klass("x", "x", 4),
      klass("y", "x", 4),
      klass("z", "x", 42),
    ];
    const s = suppressionFor(groups, 5);
    expect(s.withheld("class", "x")).toBe(true);
    expect(s.withheld("school", "x")).toBe(false);
  });
});

describe("complementary suppression", () => {
  it("one withheld class in a shown school: the smallest shown sibling is withheld too", () => {
    const groups = [
      district(60),
      school("s", 60),
      klass("a", "s", 4),
      klass("b", "s", 25),
      klass("c", "s", 31),
    ];
    const s = suppressionFor(groups, 10);
    expect(s.reason("class", "a")).toMatch(PRIMARY);
    expect(s.reason("class", "b")).toMatch(COMPLEMENTARY);
    expect(s.withheld("class", "c")).toBe(false);
  });

  it("ties in size go to the first id in sorted order", () => {
    const groups = [
      district(54),
      school("s", 54),
      klass("a", "s", 4),
      klass("q", "s", 25),
      klass("p", "s", 25),
    ];
    expect(withheldIds(groups, 10)).toEqual(["class:a", "class:p"]);
  });

  it("two withheld classes already protect each other: nothing more is withheld", () => {
    const groups = [
      district(70),
      school("s", 70),
      klass("a", "s", 4),
      klass("b", "s", 6),
      klass("c", "s", 60),
    ];
    expect(withheldIds(groups, 10)).toEqual(["class:a", "class:b"]);
  });

  it("one withheld school in the shown district: the smallest other school is withheld too", () => {
    const groups = [
      district(120),
      school("s1", 6),
      school("s2", 44),
      school("s3", 70),
      klass("s1-a", "s1", 6),
      klass("s2-a", "s2", 4),
      klass("s2-b", "s2", 40),
      klass("s3-a", "s3", 35),
      klass("s3-b", "s3", 35),
    ];
    const s = suppressionFor(groups, 10);
    expect(s.reason("school", "s1")).toMatch(PRIMARY);
    expect(s.reason("school", "s2")).toMatch(COMPLEMENTARY);
    expect(s.withheld("school", "s3")).toBe(false);
  });

  it("cascades: a school withheld for complementarity gets a withheld class, else it is their sum", () => {
    // s2 is withheld only to protect s1; with both its classes shown, s2 could be rebuilt from
    // them and s1 from the district. So one class of s2 (the smaller) is withheld as well.
    const groups = [
      district(120),
      school("s1", 6),
      school("s2", 44),
      school("s3", 70),
      klass("s1-a", "s1", 6),
      klass("s2-a", "s2", 20),
      klass("s2-b", "s2", 24),
      klass("s3-a", "s3", 35),
      klass("s3-b", "s3", 35),
    ];
    const s = suppressionFor(groups, 10);
    expect(s.withheld("school", "s2")).toBe(true);
    expect(s.reason("class", "s2-a")).toMatch(COMPLEMENTARY);
    expect(s.withheld("class", "s2-b")).toBe(false);
    expect(s.withheld("class", "s3-a")).toBe(false);
    expect(s.withheld("school", "s3")).toBe(false);
  });

  it("withholds no class that a withheld school already protects", () => {
    // s2's class p is withheld on its own; s2 is withheld for s1. Then p alone keeps s2 from being
    // rebuilt, and s2's other class x need not be withheld.
    const groups = [
      district(200),
      school("s1", 5),
      school("s2", 30),
      school("s3", 165),
      klass("s1-a", "s1", 5),
      klass("p", "s2", 4),
      klass("x", "s2", 26),
      klass("s3-a", "s3", 80),
      klass("s3-b", "s3", 85),
    ];
    expect(withheldIds(groups, 10)).toEqual(["school:s1", "school:s2", "class:s1-a", "class:p"]);
  });

  it("a withheld district withholds everything below it (all are smaller)", () => {
    const groups = [district(8), school("s", 8), klass("a", "s", 5), klass("b", "s", 3)];
    expect(withheldIds(groups, 10)).toEqual(["district:district", "school:s", "class:a", "class:b"]);
  });
});

// ---------------------------------------------------------------------------------------------
// Property test over random hierarchies.

interface Hierarchy {
  readonly groups: readonly GroupSize[];
  readonly size: number;
}

/**
 * A district of 1–5 schools of 1–5 classes. A school has at least as many students as its largest
 * class and at most their sum (students may take several classes); the same for the district.
 */
const hierarchy: fc.Arbitrary<Hierarchy> = fc
  .record({
    size: fc.integer({ min: 5, max: 15 }),
    schools: fc.array(
      fc.record({
        classes: fc.array(fc.integer({ min: 1, max: 40 }), { minLength: 1, maxLength: 5 }),
        overlap: fc.double({ min: 0, max: 1, noNaN: true }),
      }),
      { minLength: 1, maxLength: 5 },
    ),
    overlap: fc.double({ min: 0, max: 1, noNaN: true }),
  })
  .map(({ size, schools, overlap }) => {
    const between = (values: number[], t: number) => {
      const max = Math.max(...values);
      const sum = values.reduce((x, y) => x + y, 0);
      return max + Math.floor(t * (sum - max));
    };
    const groups: GroupSize[] = [];
    const schoolSizes: number[] = [];
    schools.forEach((s, i) => {
      const id = `s${i}`;
      const students = between(s.classes, s.overlap);
      schoolSizes.push(students);
      groups.push(school(id, students));
      s.classes.forEach((n, j) => {
        groups.push(klass(`${id}-c${j}`, id, n));
      });
    });
    groups.unshift(district(between(schoolSizes, overlap)));
    return { groups, size };
  });

const key = (level: GroupLevel, id: string) => `${level}:${id}`;

/** Totals that would give a withheld figure away, for a given withheld set. */
function leaks(groups: readonly GroupSize[], hidden: ReadonlySet<string>): string[] {
  const out: string[] = [];
  for (const parent of groups) {
    if (parent.level === "class") continue;
    const childLevel: GroupLevel = parent.level === "district" ? "school" : "class";
    const children = groups.filter((g) => g.level === childLevel && g.parentId === parent.id);
    if (children.length === 0) continue;
    const withheldChildren = children.filter((g) => hidden.has(key(g.level, g.id))).length;
    const parentHidden = hidden.has(key(parent.level, parent.id));
    if (!parentHidden && withheldChildren === 1)
      out.push(`shown ${parent.level} ${parent.id} has one withheld part`);
    if (parentHidden && withheldChildren === 0)
      out.push(`withheld ${parent.level} ${parent.id} has all parts shown`);
  }
  return out;
}

describe("suppression over random hierarchies (fast-check)", () => {
  it("withholds every group below the size, leaves no total that gives a figure away, withholds nothing unneeded", () => {
    fc.assert(
      fc.property(hierarchy, ({ groups, size }) => {
        const s = suppressionFor(groups, size);
        const hidden = new Set(
          groups.filter((g) => s.withheld(g.level, g.id)).map((g) => key(g.level, g.id)),
        );
        for (const g of groups) {
          const why = s.reason(g.level, g.id);
          if (g.students < size) {
            if (why === null || !PRIMARY.test(why)) return false;
          } else if (why !== null) {
            if (!COMPLEMENTARY.test(why)) return false;
            // needed: showing it alone would open a leak
            const without = new Set(hidden);
            without.delete(key(g.level, g.id));
            if (leaks(groups, without).length === 0) return false;
          }
        }
        return leaks(groups, hidden).length === 0;
      }),
      { numRuns: 2000, seed: 2011_603 },
    );
  });

  it("does not depend on the order of the groups, and leaves its input unchanged", () => {
    fc.assert(
      fc.property(hierarchy, fc.integer(), ({ groups, size }, seed) => {
        const frozen = Object.freeze(groups.map((g) => Object.freeze({ ...g })));
        const copy = JSON.stringify(frozen);
        const shuffled = [...frozen];
        let x = seed >>> 0;
        for (let i = shuffled.length - 1; i > 0; i--) {
          x = (Math.imul(x, 1_103_515_245) + 12_345) >>> 0;
          const j = x % (i + 1);
          [shuffled[i], shuffled[j]] = [shuffled[j]!, shuffled[i]!];
        }
        const a = suppressionFor(frozen, size);
        const b = suppressionFor(shuffled, size);
        for (const g of frozen) expect(b.reason(g.level, g.id)).toBe(a.reason(g.level, g.id));
        expect(JSON.stringify(frozen)).toBe(copy);
      }),
      { numRuns: 500, seed: 42 },
    );
  });
});
