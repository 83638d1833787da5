/**
 * CSV writing (RFC 4180). Text cells that a spreadsheet would run as a formula (starting with =, +,
 * -, @, a tab or a carriage return) get a leading apostrophe, the OWASP advice against CSV
 * injection; the readers of this tool remove that apostrophe again, so identifiers round-trip.
 */

const FORMULA_START = /^[=+\-@\t\r]/;
const NEEDS_QUOTES = /[",\r\n]|^\s|\s$/;

export function textCell(value: string): string {
  const safe = FORMULA_START.test(value) ? `'${value}` : value;
  return NEEDS_QUOTES.test(safe) ? `"${safe.replace(/"/g, '""')}"` : safe;
}

/** Numbers in their shortest round-trip form; empty for null, undefined or NaN. */
export function numberCell(value: number | null | undefined): string {
  if (value === null || value === undefined || Number.isNaN(value)) return "";
  return String(value);
}

/** Undoes textCell's apostrophe on reading. */
export function unneutralise(value: string): string {
  return value.length > 1 && value.charCodeAt(0) === 39 && FORMULA_START.test(value.slice(1))
    ? value.slice(1)
    : value;
}

export function csvLine(cells: readonly string[]): string {
  return `${cells.join(",")}\n`;
}
