import { expect } from "vitest";

/**
 * Asserts |actual − expected| ≤ max(abs, rel·|expected|), with a message that names the check.
 * Both tolerances default to 0, so at least one must be given.
 */
export function expectClose(
  actual: number,
  expected: number,
  tolerance: { readonly rel?: number; readonly abs?: number },
  label = "",
): void {
  const allowed = Math.max(tolerance.abs ?? 0, (tolerance.rel ?? 0) * Math.abs(expected));
  const error = Math.abs(actual - expected);
  expect(
    error <= allowed,
    `${label} actual ${actual}, expected ${expected}, error ${error} > allowed ${allowed}`,
  ).toBe(true);
}
