import { trusted } from "../html.js";
import { checkChartId, labelSvg } from "./accessible-svg.js";
import { type Domain, linearDomain, logDomain } from "./domain.js";
import { formatRange, formatValue } from "./format.js";
import { INTERVAL_DATA, INTERVAL_SIGNALS, intervalSpec } from "./interval-spec.js";
import { type DrawnMarker, MARKER_STYLES, WITHHELD_NAME } from "./palette.js";
import { renderSvg } from "./render-view.js";
import { runtimeFor } from "./runtime-cache.js";
import type { Chart, DataTable, IntervalChartOptions, IntervalRow, Marker } from "./types.js";

const NO_ESTIMATE = "no estimate";
const EMPTY_NOTE = "No rows to show";

type DrawnRow = IntervalRow & { readonly value: number; readonly marker: DrawnMarker };

/** A row is drawn (rule and mark) only with an estimate and when it is not withheld. */
function isDrawn(row: IntervalRow): row is DrawnRow {
  return row.marker !== "withheld" && row.value !== null;
}

/** The marker's words, as in the key and the table. */
function readingOf(marker: Marker): string {
  return marker === "withheld" ? WITHHELD_NAME : MARKER_STYLES[marker].name;
}

function checkNumber(value: number | null, what: string): void {
  if (value !== null && !Number.isFinite(value))
    throw new RangeError(`${what} must be a finite number or null`);
}

/** A high end may also be +∞: a range with no upper end (a ratio whose denominator is uncertain). */
function checkHigh(value: number | null, what: string): void {
  if (value !== Number.POSITIVE_INFINITY) checkNumber(value, what);
}

function checkOptions(options: IntervalChartOptions): void {
  checkChartId(options.id);
  options.rows.forEach((row, index) => {
    checkNumber(row.value, `rows[${index}].value`);
    checkNumber(row.low, `rows[${index}].low`);
    checkHigh(row.high, `rows[${index}].high`);
    if (row.low !== null && row.high !== null && row.low > row.high) {
      throw new RangeError(`rows[${index}]: low (${row.low}) is above high (${row.high})`);
    }
  });
  for (const guide of [options.reference, options.line]) {
    if (guide === undefined) continue;
    checkNumber(guide.value, "a reference or line value");
    if (options.scale === "log" && guide.value <= 0) {
      throw new RangeError(`a reference or line on a log scale must be above 0, got ${guide.value}`);
    }
  }
}

function chartDomain(options: IntervalChartOptions): Domain {
  const values: number[] = [];
  for (const row of options.rows.filter(isDrawn)) {
    values.push(row.value);
    if (row.low !== null && row.high !== null) values.push(row.low);
    if (row.high !== null && Number.isFinite(row.high)) values.push(row.high);
  }
  for (const guide of [options.reference, options.line]) if (guide !== undefined) values.push(guide.value);
  if (options.scale === "log") return logDomain(values);
  const unit = options.format === "percent" && values.every((value) => value >= 0 && value <= 1);
  return linearDomain(values, { unit });
}

/** Guide rows: the lower guide's label sits left of its line, the higher one's right of it. */
function guideRows(options: IntervalChartOptions): object[] {
  const guides = [
    ...(options.reference === undefined ? [] : [{ ...options.reference, kind: "reference" }]),
    ...(options.line === undefined ? [] : [{ ...options.line, kind: "line" }]),
  ];
  const highest = Math.max(...guides.map((guide) => guide.value));
  return guides.map((guide, index) => {
    const left = guides.length === 2 && (guide.value < highest || (guide.value === highest && index === 0));
    return {
      value: guide.value,
      label: guide.label,
      kind: guide.kind,
      align: left ? "right" : "left",
      dx: left ? -4 : 4,
    };
  });
}

function noteText(row: IntervalRow): string {
  if (row.marker === "withheld") return row.note === undefined ? "withheld" : `withheld: ${row.note}`;
  return row.note ?? NO_ESTIMATE;
}

function viewData(options: IntervalChartOptions, domain: Domain): Record<string, object[]> {
  // A log scale cannot place 0 or less: such ends are drawn at the left edge, and an open upper end
  // at the right edge (the table has the values).
  const place = (value: number): number =>
    Math.min(domain.hi, options.scale === "log" ? Math.max(value, domain.lo) : value);
  const intervals: object[] = [];
  const points: object[] = [];
  const notes: object[] = [];
  options.rows.forEach((row, index) => {
    if (!isDrawn(row)) {
      notes.push({ row: index, text: noteText(row) });
      return;
    }
    points.push({ row: index, value: place(row.value), marker: readingOf(row.marker) });
    if (row.low !== null && row.high !== null)
      intervals.push({ row: index, low: place(row.low), high: place(row.high) });
  });
  if (options.rows.length === 0) notes.push({ row: 0, text: EMPTY_NOTE });
  return {
    [INTERVAL_DATA.guides]: guideRows(options),
    [INTERVAL_DATA.intervals]: intervals,
    [INTERVAL_DATA.points]: points,
    [INTERVAL_DATA.notes]: notes,
  };
}

function valueText(row: IntervalRow, format: IntervalChartOptions["format"]): [string, string] {
  // Withheld rows never show a number, even if the caller passed one.
  if (row.marker === "withheld") return ["withheld", "withheld"];
  if (row.value === null) return [NO_ESTIMATE, formatRange(row.low, row.high, format)];
  return [formatValue(row.value, format), formatRange(row.low, row.high, format)];
}

/** One table row per chart row, in the same order; a "Note" column only when some row has a note. */
export function intervalTable(options: IntervalChartOptions): DataTable {
  const withNotes = options.rows.some((row) => row.note !== undefined);
  const columns = ["Name", options.axisTitle, "Plausible range", "Reading", ...(withNotes ? ["Note"] : [])];
  const rows = options.rows.map((row) => {
    return [
      row.label,
      ...valueText(row, options.format),
      readingOf(row.marker),
      ...(withNotes ? [row.note ?? ""] : []),
    ];
  });
  return { caption: options.title, columns, rows };
}

export async function renderIntervalChart(options: IntervalChartOptions): Promise<Chart> {
  checkOptions(options);
  const runtime = runtimeFor(`intervals-${options.scale}`, () => intervalSpec(options.scale));
  const domain = chartDomain(options);
  const rowCount = Math.max(options.rows.length, 1);
  const S = INTERVAL_SIGNALS;
  const svg = await renderSvg(runtime, {
    signals: {
      [S.rowIndexes]: Array.from({ length: rowCount }, (_, index) => index),
      [S.rowLabels]: options.rows.length === 0 ? [""] : options.rows.map((row) => row.label),
      [S.domainLo]: domain.lo,
      [S.domainHi]: domain.hi,
      [S.ticks]: [...domain.ticks],
      [S.axisTitle]: options.axisTitle,
      [S.valueFormat]: options.format,
    },
    data: viewData(options, domain),
  });
  return {
    svg: trusted(labelSvg(svg, options)),
    description: options.description,
    table: intervalTable(options),
  };
}
