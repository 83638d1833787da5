/**
 * The demo district's term: weekdays from Monday 2026-02-02 (an invented spring term), local
 * times written with the district's fixed UTC offset, as in 2026-02-03T09:15:20-06:00.
 */
export const TERM_START_UTC = Date.UTC(2026, 1, 2);
export const TERM_WEEKDAYS = 40;
export const UTC_OFFSET = "-06:00";

const DAY_MS = 86_400_000;

/** The first `count` weekdays of the term as YYYY-MM-DD. */
export function termDays(count: number = TERM_WEEKDAYS): string[] {
  const days: string[] = [];
  for (let t = TERM_START_UTC; days.length < count; t += DAY_MS) {
    const weekday = new Date(t).getUTCDay();
    if (weekday !== 0 && weekday !== 6) days.push(new Date(t).toISOString().slice(0, 10));
  }
  return days;
}

const TWO_DIGITS = Array.from({ length: 60 }, (_, i) => String(i).padStart(2, "0"));

/** Local date-time with offset for a time of day given in seconds after local midnight (< 24 h). */
export function localTimestamp(day: string, secondsOfDay: number): string {
  const hours = Math.floor(secondsOfDay / 3600);
  const minutes = Math.floor((secondsOfDay % 3600) / 60);
  const seconds = secondsOfDay % 60;
  return `${day}T${TWO_DIGITS[hours]}:${TWO_DIGITS[minutes]}:${TWO_DIGITS[seconds]}${UTC_OFFSET}`;
}
