import { closeSync, openSync, writeSync } from "node:fs";
import { CONSTRUCT_KEYS } from "./constructs.js";
import type { SimSession, SimWindow } from "./simulate-windows.js";

const CHUNK_BYTES = 1 << 22;

/**
 * Appends text to a file through one reused 4 MiB buffer, written with fs.writeSync when full, so
 * memory stays flat however many rows pass through. Call close() in a finally block.
 */
export class ChunkedFileWriter {
  private readonly fd: number;
  private readonly buffer = Buffer.allocUnsafe(CHUNK_BYTES);
  private used = 0;

  constructor(path: string) {
    this.fd = openSync(path, "w");
  }

  write(text: string): void {
    // A UTF-16 code unit takes at most 3 bytes in UTF-8.
    if (this.used + text.length * 3 > this.buffer.length) this.flush();
    if (text.length * 3 > this.buffer.length) {
      const bytes = Buffer.from(text, "utf8");
      this.writeAll(bytes, bytes.length);
    } else {
      this.used += this.buffer.write(text, this.used, "utf8");
    }
  }

  close(): void {
    try {
      this.flush();
    } finally {
      closeSync(this.fd);
    }
  }

  private flush(): void {
    this.writeAll(this.buffer, this.used);
    this.used = 0;
  }

  private writeAll(bytes: Buffer, length: number): void {
    let offset = 0;
    while (offset < length) offset += writeSync(this.fd, bytes, offset, length - offset);
  }
}

export const WINDOW_COLUMNS = [
  "student_id",
  "class_id",
  "school_id",
  "unit_id",
  "activity_id",
  "session_id",
  "window_start",
  ...CONSTRUCT_KEYS,
] as const;

let fourDecimals: string[] | undefined;

/** "0.0000" … "1.0000" for a probability already rounded to 4 decimals. */
function formatProbability(p: number): string {
  fourDecimals ??= Array.from({ length: 10001 }, (_, k) => (k / 10000).toFixed(4));
  return fourDecimals[Math.round(p * 10000)]!;
}

/**
 * Formats windows as CSV lines (LF endings). The ids the demo writes never need quoting, but any
 * field is quoted per RFC 4180 if it would.
 */
export class WindowLineFormatter {
  private session: SimSession | undefined;
  private prefix = "";

  line(window: SimWindow): string {
    if (window.session !== this.session) {
      const s = window.session;
      this.session = s;
      this.prefix = [s.studentId, s.classId, s.schoolId, s.unitId, s.activityId, s.sessionId]
        .map(csvField)
        .join(",");
    }
    let line = `${this.prefix},${window.windowStart}`;
    for (const p of window.probabilities) line += p === null ? "," : `,${formatProbability(p)}`;
    return `${line}\n`;
  }
}

export function csvField(value: string): string {
  return /[",\r\n]/.test(value) ? `"${value.replaceAll('"', '""')}"` : value;
}

export function csvLine(fields: readonly string[]): string {
  return `${fields.map(csvField).join(",")}\n`;
}
