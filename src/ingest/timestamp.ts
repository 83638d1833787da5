/**
 * ISO 8601 / RFC 3339 date-times with a UTC offset, read straight from bytes:
 * `YYYY-MM-DDTHH:MM:SS[.fraction](Z|±HH:MM|±HHMM|±HH)`, with `T` or a space between date and time.
 * The result is milliseconds since 1970-01-01T00:00:00Z (fractions below a millisecond kept) and
 * the local date as written, which is the session's `day`.
 */

export type TimestampProblem = "bad-time" | "no-offset" | "bad-date";

/** Days from 1970-01-01 to y-m-d in the proleptic Gregorian calendar (Hinnant's days_from_civil). */
export function daysFromCivil(y: number, m: number, d: number): number {
  const yy = m <= 2 ? y - 1 : y;
  const era = Math.floor(yy / 400);
  const yoe = yy - era * 400;
  const doy = Math.floor((153 * (m + (m > 2 ? -3 : 9)) + 2) / 5) + d - 1;
  const doe = yoe * 365 + Math.floor(yoe / 4) - Math.floor(yoe / 100) + doy;
  return era * 146097 + doe - 719468;
}

const DAYS_IN_MONTH = [31, 28, 31, 30, 31, 30, 31, 31, 30, 31, 30, 31];

export function validCalendarDate(y: number, m: number, d: number): boolean {
  if (m < 1 || m > 12 || d < 1) return false;
  const leap = (y % 4 === 0 && y % 100 !== 0) || y % 400 === 0;
  const max = m === 2 && leap ? 29 : (DAYS_IN_MONTH[m - 1] ?? 0);
  return d <= max;
}

function digits(buf: Uint8Array, at: number, n: number): number {
  let v = 0;
  for (let i = at; i < at + n; i++) {
    const c = buf[i]! - 48;
    if (c < 0 || c > 9) return -1;
    v = v * 10 + c;
  }
  return v;
}

/** Parsed time in ms, or a problem code. Callers read the local date from the first 10 bytes. */
export function parseTimestamp(
  buf: Uint8Array,
  start: number,
  end: number,
  out?: { offsetMinutes: number },
): number | TimestampProblem {
  // Trim spaces a spreadsheet may have left around the value.
  while (start < end && buf[start] === 32) start++;
  while (end > start && buf[end - 1] === 32) end--;
  // Too short for date, time with seconds and an offset: "no-offset" would send the reader to add
  // only an offset to a value such as 2026-02-03 or 2026-02-03T09:15 that also lacks the time or
  // its seconds, so the message with the full form is the one that helps.
  if (end - start < 19) return "bad-time";
  const y = digits(buf, start, 4);
  const mo = digits(buf, start + 5, 2);
  const d = digits(buf, start + 8, 2);
  const h = digits(buf, start + 11, 2);
  const mi = digits(buf, start + 14, 2);
  const s = digits(buf, start + 17, 2);
  const sep = buf[start + 10];
  if (
    y < 0 ||
    mo < 0 ||
    d < 0 ||
    h < 0 ||
    mi < 0 ||
    s < 0 ||
    buf[start + 4] !== 45 ||
    buf[start + 7] !== 45 ||
    (sep !== 84 && sep !== 116 && sep !== 32) ||
    buf[start + 13] !== 58 ||
    buf[start + 16] !== 58
  ) {
    return "bad-time";
  }
  let i = start + 19;
  let fraction = 0;
  if (i < end && (buf[i] === 46 || buf[i] === 44)) {
    i++;
    let scale = 0.1;
    const from = i;
    while (i < end && buf[i]! >= 48 && buf[i]! <= 57) {
      fraction += (buf[i]! - 48) * scale;
      scale /= 10;
      i++;
    }
    if (i === from) return "bad-time";
  }
  if (i === end) return "no-offset";
  let offsetMinutes = 0;
  const z = buf[i];
  if (z === 90 || z === 122) {
    if (i + 1 !== end) return "bad-time";
  } else if (z === 43 || z === 45) {
    const rest = end - i - 1;
    const oh = digits(buf, i + 1, 2);
    let om = 0;
    if (rest === 5 && buf[i + 3] === 58) om = digits(buf, i + 4, 2);
    else if (rest === 4) om = digits(buf, i + 3, 2);
    else if (rest !== 2) return "bad-time";
    if (oh < 0 || om < 0 || oh > 23 || om > 59) return "bad-time";
    offsetMinutes = (z === 45 ? -1 : 1) * (oh * 60 + om);
  } else {
    return "bad-time";
  }
  if (!validCalendarDate(y, mo, d) || h > 23 || mi > 59 || s > 60) return "bad-date";
  if (out) out.offsetMinutes = offsetMinutes;
  const days = daysFromCivil(y, mo, d);
  return ((days * 24 + h) * 60 + mi - offsetMinutes) * 60000 + s * 1000 + fraction * 1000;
}

/** Convenience for strings (the sessions file, tests). */
export function parseTimestampText(text: string): number | TimestampProblem {
  const buf = Buffer.from(text, "utf8");
  return parseTimestamp(buf, 0, buf.length);
}

/**
 * Reads many window starts in a row, as parseTimestamp does, faster when a value repeats the
 * previous one's date and UTC offset byte for byte (the windows of one sitting): then only the clock
 * (HH:MM:SS) is read, and added to the previous value's midnight. Both are whole numbers of
 * milliseconds below 2^53, so the sum is exactly the double parseTimestamp computes.
 */
export class TimestampReader {
  /** UTC offset of the last value read, in minutes. */
  offsetMinutes = 0;
  private readonly prev = Buffer.alloc(64);
  /** Length of the remembered value; 0 when none is remembered. */
  private prevLen = 0;
  /** The remembered value's local midnight as an instant, in ms. */
  private midnight = 0;
  private prevOffset = 0;

  /** Length of the remembered value (0 when none): where a repeat of its form would end. */
  get length(): number {
    return this.prevLen;
  }

  /**
   * The instant of buf[start..end), when it has the remembered value's length, date and offset and
   * a valid clock; NaN otherwise (then use `read`).
   */
  sameDay(buf: Uint8Array, start: number, end: number): number {
    const n = this.prevLen;
    if (n === 0 || end - start !== n) return Number.NaN;
    const prev = this.prev;
    for (let i = 0; i < 11; i++) if (buf[start + i] !== prev[i]) return Number.NaN;
    for (let i = 19; i < n; i++) if (buf[start + i] !== prev[i]) return Number.NaN;
    if (buf[start + 13] !== 58 || buf[start + 16] !== 58) return Number.NaN;
    const h = digits(buf, start + 11, 2);
    const mi = digits(buf, start + 14, 2);
    const s = digits(buf, start + 17, 2);
    if (h < 0 || mi < 0 || s < 0 || h > 23 || mi > 59 || s > 60) return Number.NaN;
    this.offsetMinutes = this.prevOffset;
    return this.midnight + (h * 60 + mi) * 60000 + s * 1000;
  }

  /** parseTimestamp, remembering a plain value (no spaces, no fraction) for `sameDay`. */
  read(buf: Uint8Array, start: number, end: number): number | TimestampProblem {
    const out = { offsetMinutes: 0 };
    const time = parseTimestamp(buf, start, end, out);
    if (typeof time === "string") return time;
    this.offsetMinutes = out.offsetMinutes;
    const n = end - start;
    const z = buf[start + 19];
    const plain =
      n >= 20 &&
      n <= this.prev.length &&
      buf[start] !== 32 &&
      buf[end - 1] !== 32 &&
      (z === 90 || z === 122 || z === 43 || z === 45);
    if (!plain) {
      this.prevLen = 0;
      return time;
    }
    for (let i = 0; i < n; i++) this.prev[i] = buf[start + i]!;
    this.prevLen = n;
    this.prevOffset = out.offsetMinutes;
    const clock =
      (digits(buf, start + 11, 2) * 60 + digits(buf, start + 14, 2)) * 60000 +
      digits(buf, start + 17, 2) * 1000;
    this.midnight = time - clock;
    return time;
  }
}
