/** sessions.csv, the seam of the data contract, written in chunks. */
import { csvLine, numberCell, textCell } from "../output/csv-write.js";
import { SESSION_COLUMNS, type SessionSummary } from "./types.js";

export function sessionColumns(withActivity: boolean): string[] {
  return SESSION_COLUMNS.filter((c) => withActivity || c !== "activity_id");
}

export function* sessionsCsv(summaries: readonly SessionSummary[], withActivity: boolean): Generator<string> {
  yield csvLine(sessionColumns(withActivity));
  let chunk = "";
  for (const s of summaries) {
    const ids = [textCell(s.studentId), textCell(s.classId), textCell(s.schoolId), textCell(s.unitId)];
    if (withActivity) ids.push(textCell(s.activityId));
    ids.push(textCell(s.sessionId), s.day, textCell(s.construct));
    chunk += csvLine([
      ...ids,
      numberCell(s.windows),
      numberCell(s.sumP),
      numberCell(s.sumP2),
      numberCell(s.above),
      numberCell(s.sustainedEpisodes),
      numberCell(s.longestRun),
    ]);
    if (chunk.length > 1 << 20) {
      yield chunk;
      chunk = "";
    }
  }
  if (chunk.length > 0) yield chunk;
}
