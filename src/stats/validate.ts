/**
 * Argument checks shared by the methods in this folder. A statistical routine called with an
 * argument outside its domain is a programming error in the caller, so these throw the built-in
 * `TypeError` (wrong kind of value) or `RangeError` (right kind, outside the allowed range), with a
 * message that names the argument, the rule and the value received.
 */

function show(value: unknown): string {
  if (typeof value === "number") return Number.isNaN(value) ? "NaN" : String(value);
  if (typeof value === "string") return JSON.stringify(value);
  if (Array.isArray(value)) return `an array of length ${value.length}`;
  return value === null ? "null" : typeof value;
}

/** A finite number (not NaN, not ±Infinity). */
export function assertFinite(name: string, value: unknown): asserts value is number {
  if (typeof value !== "number") throw new TypeError(`${name} must be a number, got ${show(value)}`);
  if (!Number.isFinite(value)) throw new RangeError(`${name} must be a finite number, got ${show(value)}`);
}

/** A finite number strictly greater than zero. */
export function assertPositive(name: string, value: unknown): asserts value is number {
  assertFinite(name, value);
  if (value <= 0) throw new RangeError(`${name} must be greater than 0, got ${show(value)}`);
}

/** A finite number greater than or equal to zero. */
export function assertNonNegative(name: string, value: unknown): asserts value is number {
  assertFinite(name, value);
  if (value < 0) throw new RangeError(`${name} must be 0 or more, got ${show(value)}`);
}

/** An integer greater than or equal to `min` (default 0). */
export function assertInteger(name: string, value: unknown, min = 0): asserts value is number {
  assertFinite(name, value);
  if (!Number.isInteger(value)) throw new RangeError(`${name} must be a whole number, got ${show(value)}`);
  if (value < min) throw new RangeError(`${name} must be ${min} or more, got ${show(value)}`);
}

/** A number in the closed interval [0, 1]. */
export function assertProbability(name: string, value: unknown): asserts value is number {
  assertFinite(name, value);
  if (value < 0 || value > 1) throw new RangeError(`${name} must be between 0 and 1, got ${show(value)}`);
}

/** A confidence level strictly between 0 and 1 (for example 0.95). */
export function assertLevel(name: string, value: unknown): asserts value is number {
  assertFinite(name, value);
  if (value <= 0 || value >= 1) {
    throw new RangeError(`${name} must be strictly between 0 and 1 (for example 0.95), got ${show(value)}`);
  }
}

/** An array (or read-only array) whose every element is a finite number. */
export function assertFiniteArray(name: string, value: unknown): asserts value is readonly number[] {
  if (!Array.isArray(value)) throw new TypeError(`${name} must be an array of numbers, got ${show(value)}`);
  for (let i = 0; i < value.length; i++) {
    const v: unknown = value[i];
    if (typeof v !== "number") throw new TypeError(`${name}[${i}] must be a number, got ${show(v)}`);
    if (!Number.isFinite(v)) throw new RangeError(`${name}[${i}] must be a finite number, got ${show(v)}`);
  }
}

/** A function. */
export function assertFunction(name: string, value: unknown): asserts value is (...args: never[]) => unknown {
  if (typeof value !== "function") throw new TypeError(`${name} must be a function, got ${show(value)}`);
}
