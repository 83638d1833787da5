/** sessions.csv, the seam of the data contract, written in chunks. */
import { csvLine, numberCell, textCell } from "../output/csv-write.js";
import { SESSION_COLUMNS, type SessionSummary } from "./types.js";

export function sessionColumns(withActivity: boolean): string[] {
  return SESSION_COLUMNS.filter((c) => withActivity || c !== "activity_id");
}

/**
 * textCell of each text column, remembered from the row before: rows come sorted by student and
 * session, so most ids repeat the previous row's and need no escaping again (a million rows for
 * ten million windows).
 */
class TextCells {
  private readonly last: string[] = [];
  private readonly cells: string[] = [];

  cell(column: number, value: string): string {
    if (this.last[column] !== value || this.cells[column] === undefined) {
      this.last[column] = value;
      this.cells[column] = textCell(value);
    }
    return this.cells[column]!;
  }
}

export function* sessionsCsv(summaries: readonly SessionSummary[], withActivity: boolean): Generator<string> {
  yield csvLine(sessionColumns(withActivity));
  const text = new TextCells();
  let chunk = "";
  for (const s of summaries) {
    const activity = withActivity ? `${text.cell(4, s.activityId)},` : "";
    chunk +=
      `${text.cell(0, s.studentId)},${text.cell(1, s.classId)},${text.cell(2, s.schoolId)},` +
      `${text.cell(3, s.unitId)},${activity}${text.cell(5, s.sessionId)},${s.day},` +
      `${text.cell(6, s.construct)},${numberCell(s.windows)},${numberCell(s.sumP)},` +
      `${numberCell(s.sumP2)},${numberCell(s.above)},${numberCell(s.sustainedEpisodes)},` +
      `${numberCell(s.longestRun)}\n`;
    if (chunk.length > 1 << 20) {
      yield chunk;
      chunk = "";
    }
  }
  if (chunk.length > 0) yield chunk;
}
