import { describe, expect, it } from "vitest";
import { validateDemoOptions } from "../../src/demo/options.js";
import { demoCard, simulateDistrict, writeDemoDistrict } from "../../src/demo/simulate.js";
import { UsageError } from "../../src/errors.js";

const base = Object.freeze({ students: 50, seed: 1, mode: "planted" as const });

describe("demo options", () => {
  it("accepts the bounds 50 and 100000 and any whole seed", () => {
    expect(validateDemoOptions({ ...base, students: 50 }).students).toBe(50);
    expect(validateDemoOptions({ ...base, students: 100_000 }).students).toBe(100_000);
    expect(validateDemoOptions({ ...base, seed: -3, mode: "null" }).seed).toBe(-3);
  });

  it.each([
    ["too few students", { students: 49 }],
    ["too many students", { students: 100_001 }],
    ["a fractional number of students", { students: 60.5 }],
    ["NaN students", { students: Number.NaN }],
    ["a fractional seed", { seed: 1.5 }],
    ["an infinite seed", { seed: Number.POSITIVE_INFINITY }],
    ["an unknown mode", { mode: "strong" }],
  ])("rejects %s with a UsageError naming the value", (_, change) => {
    const options = { ...base, ...change } as Parameters<typeof validateDemoOptions>[0];
    expect(() => validateDemoOptions(options)).toThrow(UsageError);
    expect(() => simulateDistrict(options, () => {})).toThrow(UsageError);
    expect(() => demoCard(options)).toThrow(UsageError);
  });

  it("says what is wrong and the range", () => {
    expect(() => validateDemoOptions({ ...base, students: 49 })).toThrow(/from 50 to 100000; got 49/);
  });

  it("rejects before writing anything", async () => {
    await expect(writeDemoDistrict("/nonexistent-dir", { ...base, students: 10 })).rejects.toBeInstanceOf(
      UsageError,
    );
  });
});
