/**
 * The indicator tables as CSV (src/output/indicator-csv.ts). Output is read back with csv-parse
 * (an independent RFC 4180 parser, which also fails on a row with the wrong number of cells).
 */
import { parse } from "csv-parse/sync";
import { describe, expect, it } from "vitest";
import type {
  GroupIndicator,
  StudentIndicator,
  TrendRow,
  UnitIndicator,
} from "../../src/indicators/types.js";
import { unneutralise } from "../../src/output/csv-write.js";
import {
  fixedCell,
  GROUP_COLUMNS,
  groupsCsv,
  probabilityCell,
  STUDENT_COLUMNS,
  studentsCsv,
  trendsCsv,
  UNIT_COLUMNS,
  unitsCsv,
} from "../../src/output/indicator-csv.js";

// Column lists copied from DATA-CONTRACT.md, "outputs (<out>/data/)" (students.csv, units.csv,
// groups.csv), in the contract's order. Kept here as text so that a change on either side fails.
const CONTRACT_STUDENTS =
  "student_id, construct, status, windows, sessions, days, share, share_low, share_high, peer_share, ratio, ratio_low, ratio_high, sustained_per_hour, reason";
const CONTRACT_UNITS =
  "unit_id, construct, status, students, classes, windows, share, effect, effect_low, effect_high, effect_shrunk, p_value, q_value, schools_consistent, reason";
const CONTRACT_GROUPS =
  "level, group_id, construct, status, students, share, share_low, share_high, ratio, ratio_low, ratio_high, reason";

const columns = (text: string) => text.split(", ");

function table(chunks: Iterable<string>): string[][] {
  return parse([...chunks].join(""), { bom: true }) as string[][];
}

/** Rows as objects keyed by the header. */
function records(chunks: Iterable<string>): Record<string, string>[] {
  const [header, ...rows] = table(chunks);
  return rows.map((row) => Object.fromEntries(header!.map((h, i) => [h, row[i]!])));
}

function student(over: Partial<StudentIndicator> = {}): StudentIndicator {
  return {
    studentId: "lm-0412",
    construct: "bored",
    status: "typical",
    windows: 540,
    sessions: 11,
    days: 7,
    share: { value: 0.2, low: 0.15, high: 0.25 },
    peerShare: 0.18,
    ratio: { value: 1.1, low: 0.9, high: 1.3 },
    nearLine: false,
    sustainedPerHour: 0.5,
    peerSustainedPerHour: 0.4,
    sustainedEpisodes: 2,
    minutes: 180,
    classId: "larkmoor-7a",
    schoolId: "larkmoor-west",
    reason: "Across 11 sessions on 7 days, about as bored as classmates on the same units.",
    ...over,
  };
}

function unit(over: Partial<UnitIndicator> = {}): UnitIndicator {
  return {
    unitId: "fractions-2",
    activityId: "",
    construct: "confused",
    status: "typical",
    students: 40,
    classes: 3,
    windows: 9000,
    share: 0.12,
    effect: { value: 0.03, low: -0.01, high: 0.07 },
    effectShrunk: 0.02,
    pValue: 0.2,
    qValue: 0.6,
    schoolsAgreeing: 2,
    schoolsCompared: 3,
    reason: "No clear difference from the same students' other units.",
    ...over,
  };
}

function group(over: Partial<GroupIndicator> = {}): GroupIndicator {
  return {
    level: "class",
    groupId: "larkmoor-7a",
    parentId: "larkmoor-west",
    construct: "bored",
    status: "typical",
    students: 24,
    share: { value: 0.2, low: 0.1, high: 0.3 },
    ratio: { value: 1, low: 0.8, high: 1.2 },
    reason: "Across 24 students, about as bored as other classes on the same units.",
    ...over,
  };
}

describe("headers equal the data contract (DATA-CONTRACT.md, outputs)", () => {
  it("students.csv", () => {
    expect([...STUDENT_COLUMNS]).toEqual(columns(CONTRACT_STUDENTS));
    expect(table(studentsCsv([]))).toEqual([columns(CONTRACT_STUDENTS)]);
  });
  it("units.csv", () => {
    expect([...UNIT_COLUMNS]).toEqual(columns(CONTRACT_UNITS));
    expect(table(unitsCsv([]))).toEqual([columns(CONTRACT_UNITS)]);
  });
  it("groups.csv", () => {
    expect([...GROUP_COLUMNS]).toEqual(columns(CONTRACT_GROUPS));
    expect(table(groupsCsv([]))).toEqual([columns(CONTRACT_GROUPS)]);
  });
  it("every data row has as many cells as the header (csv-parse rejects a ragged row)", () => {
    expect(table(studentsCsv([student(), student({ share: null, ratio: null })]))).toHaveLength(3);
    expect(table(unitsCsv([unit(), unit({ effect: null, pValue: null, qValue: null })]))).toHaveLength(3);
    expect(table(groupsCsv([group(), group({ status: "withheld", share: null, ratio: null })]))).toHaveLength(
      3,
    );
  });
});

describe("formula injection is neutralised (OWASP, CSV injection: prefix = + - @ tab CR with ')", () => {
  const hostile = ['=HYPERLINK("http://x.invalid","a")', "+1+2", "-3", "@SUM(A1:A2)", "\tcell", "\rcell"];

  it.each(hostile)(
    "student_id, construct and reason %j start with an apostrophe and read back intact",
    (text) => {
      const [row] = records(studentsCsv([student({ studentId: text, construct: text, reason: text })]));
      for (const column of ["student_id", "construct", "reason"]) {
        expect(row![column]!.startsWith("'"), column).toBe(true);
        expect(unneutralise(row![column]!)).toBe(text);
      }
    },
  );

  it("unit_id, group_id and reason in units.csv and groups.csv; commas, quotes and newlines survive", () => {
    const reason = '=A1, said "the unit"\nand more';
    const [u] = records(unitsCsv([unit({ unitId: "=cmd|' /C calc'!A0", reason })]));
    expect(u!.unit_id).toBe("'=cmd|' /C calc'!A0");
    expect(u!.reason).toBe(`'${reason}`);
    const [g] = records(groupsCsv([group({ groupId: "@class", reason: "-minus" })]));
    expect(g!.group_id).toBe("'@class");
    expect(g!.reason).toBe("'-minus");
    expect(unneutralise(g!.group_id!)).toBe("@class");
  });

  it("harmless text is left as it is (no apostrophe)", () => {
    const [row] = records(
      studentsCsv([student({ studentId: "lm-0412", reason: "About 2.1 times, plausible 1.6 to 2.7" })]),
    );
    expect(row!.student_id).toBe("lm-0412");
    expect(row!.reason).toBe("About 2.1 times, plausible 1.6 to 2.7");
  });
});

describe("withheld and missing figures are empty cells", () => {
  it("a suppressed group has status 'suppressed', its reason, and empty share and ratio cells", () => {
    const why = "Fewer than 10 students: withheld to protect the students' privacy.";
    const [row] = records(
      groupsCsv([group({ status: "withheld", share: null, ratio: null, reason: why, students: 4 })]),
    );
    expect(row!.status).toBe("withheld");
    expect(row!.reason).toBe(why);
    for (const c of ["share", "share_low", "share_high", "ratio", "ratio_low", "ratio_high"]) {
      expect(row![c], c).toBe("");
    }
  });

  it("relative mode: share, its range and the peers' share are empty; the ratio is still written", () => {
    const [row] = records(studentsCsv([student({ share: null, peerShare: null })]));
    for (const c of ["share", "share_low", "share_high", "peer_share"]) expect(row![c], c).toBe("");
    expect(row!.ratio).toBe("1.1");
    const [u] = records(unitsCsv([unit({ share: null })]));
    expect(u!.share).toBe("");
  });

  it("units: no p, q, effect or school agreement when not computed; '2/3' when compared in 3 schools", () => {
    const [empty] = records(
      unitsCsv([unit({ effect: null, effectShrunk: null, pValue: null, qValue: null, schoolsCompared: 1 })]),
    );
    for (const c of [
      "effect",
      "effect_low",
      "effect_high",
      "effect_shrunk",
      "p_value",
      "q_value",
      "schools_consistent",
    ]) {
      expect(empty![c], c).toBe("");
    }
    const [full] = records(unitsCsv([unit()]));
    expect(full!.schools_consistent).toBe("2/3");
  });

  it("trends: a withheld week has no counts and no share", () => {
    const row: TrendRow = {
      level: "class",
      id: "larkmoor-7a",
      construct: "bored",
      week: "2026-W37",
      windows: 300,
      sessions: 9,
      share: null,
      withheld: true,
    };
    const [r] = records(trendsCsv([row]));
    expect(r).toMatchObject({
      status: "withheld",
      windows: "",
      sessions: "",
      share: "",
      share_low: "",
      share_high: "",
    });
  });
});

describe("rounding (decimal rounding worked by hand)", () => {
  it("shares to 4 decimals, ratios and sustained episodes per hour to 3, without trailing zeros", () => {
    const [row] = records(
      studentsCsv([
        student({
          share: { value: 0.123456, low: 0.1, high: 0.99995 },
          peerShare: 0.33333333,
          ratio: { value: 1.23456, low: 2, high: 2.0004 },
          sustainedPerHour: 0.0004,
        }),
      ]),
    );
    expect(row).toMatchObject({
      share: "0.1235",
      share_low: "0.1",
      share_high: "1", // 0.99995 → 1.0000
      peer_share: "0.3333",
      ratio: "1.235",
      ratio_low: "2",
      ratio_high: "2",
      sustained_per_hour: "0",
    });
  });

  it("never writes '-0'; non-finite figures are empty", () => {
    expect(fixedCell(-0.00001)).toBe("0");
    expect(fixedCell(-0)).toBe("0");
    expect(fixedCell(-0.00005 - 1e-12)).toBe("-0.0001");
    expect(fixedCell(Number.NaN)).toBe("");
    expect(fixedCell(Number.POSITIVE_INFINITY)).toBe("");
    expect(fixedCell(null)).toBe("");
  });

  it("p- and q-values keep 4 significant digits, small ones included", () => {
    expect(probabilityCell(0.0456789)).toBe("0.04568");
    expect(probabilityCell(0.000123456)).toBe("0.0001235");
    expect(probabilityCell(1)).toBe("1");
    expect(probabilityCell(0)).toBe("0");
    const tiny = Number(probabilityCell(1.23456e-8));
    expect(tiny).toBe(1.235e-8);
    const [u] = records(unitsCsv([unit({ pValue: 1.23456e-8, qValue: 0.98765 })]));
    expect(Number(u!.p_value)).toBe(1.235e-8);
    expect(u!.q_value).toBe("0.9877");
  });

  it("counts are whole numbers as written", () => {
    const [row] = records(studentsCsv([student({ windows: 12_345, sessions: 3, days: 2 })]));
    expect(row).toMatchObject({ windows: "12345", sessions: "3", days: "2" });
  });
});

describe("large tables", () => {
  it("students.csv written in several chunks still holds every row once, in order", () => {
    const rows = Array.from({ length: 8000 }, (_, i) =>
      student({ studentId: `lm-${String(i).padStart(5, "0")}`, reason: `${"x".repeat(200)} ${i}` }),
    );
    const chunks = [...studentsCsv(rows)];
    expect(chunks.length).toBeGreaterThan(2);
    const parsed = records(chunks);
    expect(parsed).toHaveLength(8000);
    expect(parsed[0]!.student_id).toBe("lm-00000");
    expect(parsed[7999]!.student_id).toBe("lm-07999");
    expect(parsed[7999]!.reason!.endsWith(" 7999")).toBe(true);
  });
});
