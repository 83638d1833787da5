import { join } from "node:path";
import { Document } from "yaml";
import { buildCard, type DemoCard } from "./card.js";
import { buildDistrict, type DemoDistrict, demoStreams } from "./district.js";
import { ChunkedFileWriter, csvLine, WINDOW_COLUMNS, WindowLineFormatter } from "./files.js";
import { DISTRICT_NAME } from "./names.js";
import { type DemoOptions, validateDemoOptions } from "./options.js";
import { type SimWindow, simulateWindows } from "./simulate-windows.js";
import type { DemoTruth } from "./truth.js";

/**
 * The demo district simulator: an invented district (Larkmoor Unified) with known truth, written
 * as the four files of the data contract. Stages: validate options → derive seeded streams →
 * build the district's structure → stream windows (truth counted on the way) → write files.
 */
export type { DemoCard, DemoCardConstruct } from "./card.js";
export type { DemoMode, DemoOptions } from "./options.js";
export type { SimSession, SimWindow } from "./simulate-windows.js";
export type { ClassTruth, DemoTruth, PlantedTruth, SchoolTruth, StudentTruth, UnitTruth } from "./truth.js";

export interface DemoPaths {
  windows: string;
  card: string;
  roster: string;
  truth: string;
}

export interface DemoRosterRow {
  student_id: string;
  display_name: string;
  school_id: string;
  grade: string;
  counselor: string;
  setting: string;
}

export const ROSTER_COLUMNS = [
  "student_id",
  "display_name",
  "school_id",
  "grade",
  "counselor",
  "setting",
] as const;

/**
 * Pure and synchronous: calls onWindow for every window in the windows file's order (student,
 * session, time) and returns the truth. Throws UsageError on invalid options.
 */
export function simulateDistrict(options: DemoOptions, onWindow: (window: SimWindow) => void): DemoTruth {
  const valid = validateDemoOptions(options);
  const streams = demoStreams(valid.seed);
  const district = buildDistrict(valid, streams.structure);
  return simulateWindows(district, streams.students, onWindow);
}

/** The detector card; depends on the seed only, not on the number of students or the mode. */
export function demoCard(options: DemoOptions): DemoCard {
  const valid = validateDemoOptions(options);
  return buildCard(demoStreams(valid.seed).card);
}

export function demoRoster(options: DemoOptions): DemoRosterRow[] {
  const valid = validateDemoOptions(options);
  return rosterRows(buildDistrict(valid, demoStreams(valid.seed).structure));
}

/**
 * Writes windows.csv, card.yaml, roster.csv, truth.json into dir (which exists). The windows and
 * truth files are written in chunks as they are produced: memory does not grow with the rows.
 */
export async function writeDemoDistrict(dir: string, options: DemoOptions): Promise<DemoPaths> {
  const valid = validateDemoOptions(options);
  const streams = demoStreams(valid.seed);
  const paths: DemoPaths = {
    windows: join(dir, "windows.csv"),
    card: join(dir, "card.yaml"),
    roster: join(dir, "roster.csv"),
    truth: join(dir, "truth.json"),
  };
  writeText(paths.card, cardYaml(buildCard(streams.card)));
  const district = buildDistrict(valid, streams.structure);
  writeText(
    paths.roster,
    rosterRows(district).map((row) => csvLine(ROSTER_COLUMNS.map((k) => row[k]))),
    ROSTER_COLUMNS,
  );
  const truth = withWriter(paths.windows, (writer) => {
    writer.write(csvLine(WINDOW_COLUMNS));
    const formatter = new WindowLineFormatter();
    return simulateWindows(district, streams.students, (window) => writer.write(formatter.line(window)));
  });
  withWriter(paths.truth, (writer) => writeTruth(truth, writer));
  return paths;
}

function rosterRows(district: DemoDistrict): DemoRosterRow[] {
  return district.students.map((student) => {
    const klass = district.classes[student.classIndex]!;
    const school = district.schools[klass.schoolIndex]!;
    return {
      student_id: student.studentId,
      display_name: student.displayName,
      school_id: school.schoolId,
      grade: String(klass.grade),
      counselor: student.counselor,
      setting: school.setting,
    };
  });
}

function cardYaml(card: DemoCard): string {
  const document = new Document(card);
  document.commentBefore =
    ` Detector card of the ${DISTRICT_NAME} demo district (invented). Figures come from a simulated\n` +
    " validation sample; threshold = the construct's base rate, where sensitivity equals specificity.";
  return document.toString();
}

function writeText(path: string, lines: string | readonly string[], header?: readonly string[]): void {
  withWriter(path, (writer) => {
    if (header) writer.write(csvLine(header));
    for (const line of typeof lines === "string" ? [lines] : lines) writer.write(line);
  });
}

function withWriter<T>(path: string, body: (writer: ChunkedFileWriter) => T): T {
  const writer = new ChunkedFileWriter(path);
  try {
    return body(writer);
  } finally {
    writer.close();
  }
}

/** truth.json: the small parts at once, then one student per line. */
function writeTruth(truth: DemoTruth, writer: ChunkedFileWriter): void {
  const { students, ...head } = truth;
  const opening = JSON.stringify(head);
  writer.write(`${opening.slice(0, -1)},"students":[\n`);
  students.forEach((student, i) => {
    writer.write(`${i === 0 ? "" : ",\n"}${JSON.stringify(student)}`);
  });
  writer.write("\n]}\n");
}
