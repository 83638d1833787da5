import { describe, expect, it } from "vitest";
import { isoWeek } from "../../src/indicators/collect.js";

/**
 * ISO 8601 week dates (ISO 8601:2004, §3.2.2 "week" and §4.1.4 "calendar week"; from memory):
 * weeks run Monday to Sunday, week 01 of a year is the week that holds its first Thursday, and a
 * week belongs to the year its Thursday falls in.
 */
describe("isoWeek: the commonly published examples (ISO 8601:2004 §4.1.4; from memory)", () => {
  it.each([
    ["2005-01-01", "2004-W53"], // a Saturday; the week's Thursday is 2004-12-30
    ["2005-01-02", "2004-W53"], // Sunday
    ["2005-12-31", "2005-W52"],
    ["2007-01-01", "2007-W01"], // a Monday: 2007 starts with week 1
    ["2007-12-30", "2007-W52"],
    ["2007-12-31", "2008-W01"], // Monday of the week that holds 2008-01-03
    ["2008-12-28", "2008-W52"], // Sunday
    ["2008-12-29", "2009-W01"], // Monday
    ["2009-12-31", "2009-W53"],
    ["2010-01-03", "2009-W53"], // Sunday
    ["2010-01-04", "2010-W01"],
  ])("%s is %s", (day, week) => {
    expect(isoWeek(day)).toBe(week);
  });
});

/**
 * A naive reference written for this test: a day-by-day calendar (Gregorian leap rule) with the
 * weekday carried from one known date, 1999-01-01, a Friday (2000-01-01 is a Saturday and 1999 has
 * 365 = 52·7 + 1 days; checked below). A day's ISO week is found by going to the Thursday of its
 * Monday–Sunday week and counting the Thursdays of that Thursday's calendar year up to it.
 */
interface CalendarDay {
  readonly text: string;
  readonly year: number;
  /** Monday 0 … Sunday 6. */
  readonly weekday: number;
}

function isLeap(year: number): boolean {
  return (year % 4 === 0 && year % 100 !== 0) || year % 400 === 0;
}

function calendar(fromYear: number, toYear: number, startWeekday: number): CalendarDay[] {
  const lengths = (y: number) => [31, isLeap(y) ? 29 : 28, 31, 30, 31, 30, 31, 31, 30, 31, 30, 31];
  const out: CalendarDay[] = [];
  let weekday = startWeekday;
  for (let year = fromYear; year <= toYear; year++) {
    lengths(year).forEach((days, month) => {
      for (let d = 1; d <= days; d++) {
        const text = `${year}-${String(month + 1).padStart(2, "0")}-${String(d).padStart(2, "0")}`;
        out.push({ text, year, weekday });
        weekday = (weekday + 1) % 7;
      }
    });
  }
  return out;
}

describe("isoWeek agrees with counting Thursdays, every day 2000-01-01 … 2040-12-31", () => {
  const FRIDAY = 4;
  const THURSDAY = 3;
  const days = calendar(1999, 2041, FRIDAY);
  // Thursday count within its calendar year, by index.
  const thursdayNumber = new Map<number, number>();
  let count = 0;
  let countYear = 0;
  days.forEach((d, i) => {
    if (d.weekday !== THURSDAY) return;
    if (d.year !== countYear) {
      countYear = d.year;
      count = 0;
    }
    count++;
    thursdayNumber.set(i, count);
  });

  it("the calendar is anchored right: 2000-01-01 is a Saturday, 2040-12-31 a Monday", () => {
    const find = (text: string) => days.find((d) => d.text === text);
    expect(find("2000-01-01")?.weekday).toBe(5);
    expect(find("2040-12-31")?.weekday).toBe(0);
  });

  it("matches on all 14,976 days", () => {
    let checked = 0;
    const mismatches: string[] = [];
    days.forEach((d, i) => {
      if (d.year < 2000 || d.year > 2040) return;
      const thursdayIndex = i - d.weekday + THURSDAY;
      const thursday = days[thursdayIndex]!;
      const expected = `${thursday.year}-W${String(thursdayNumber.get(thursdayIndex)).padStart(2, "0")}`;
      if (isoWeek(d.text) !== expected) mismatches.push(`${d.text}: ${isoWeek(d.text)} ≠ ${expected}`);
      checked++;
    });
    expect(mismatches.slice(0, 5)).toEqual([]);
    expect(checked).toBe(14_976);
  });

  it("has 53 weeks exactly in the years whose 1 January is a Thursday, or a Wednesday in a leap year", () => {
    // The same rule stated in ISO 8601's terms (from memory): a long year starts on a Thursday, or
    // is a leap year starting on a Wednesday. 2004, 2009, 2015, 2020, 2026, 2032, 2037 in 2000–2040.
    const byRule: number[] = [];
    const long: number[] = [];
    for (let year = 2000; year <= 2040; year++) {
      const first = days.find((d) => d.text === `${year}-01-01`)!;
      if (first.weekday === THURSDAY || (isLeap(year) && first.weekday === THURSDAY - 1)) byRule.push(year);
      // 28 December always lies in the last week of its year
      if (isoWeek(`${year}-12-28`) === `${year}-W53`) long.push(year);
    }
    expect(byRule).toEqual([2004, 2009, 2015, 2020, 2026, 2032, 2037]);
    expect(long).toEqual(byRule);
  });
});
