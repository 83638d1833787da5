import type { Html } from "../html.js";

/** A chart's data as a table the page shows beside it: every value as text, in drawing order. */
export interface DataTable {
  readonly caption: string;
  readonly columns: readonly string[];
  readonly rows: readonly (readonly string[])[];
}

export interface Chart {
  /** Inline SVG markup with role="img", a <title> and a <desc>. */
  readonly svg: Html;
  /** The text alternative (the same words as the SVG's <desc>). */
  readonly description: string;
  readonly table: DataTable;
}

/**
 * How a row reads: concern (filled triangle), near the line (diamond with a black outline), typical
 * (filled circle), or withheld (no mark; the word "withheld" written in the row, no value shown).
 */
export type Marker = "concern" | "near" | "typical" | "withheld";

export interface IntervalRow {
  readonly label: string;
  readonly value: number | null;
  readonly low: number | null;
  readonly high: number | null;
  readonly marker: Marker;
  readonly note?: string;
}

export interface IntervalChartOptions {
  /** Unique on the page; prefixes the ids of the SVG's <title> and <desc>. */
  readonly id: string;
  /** Short; becomes the SVG's <title> and the table caption. */
  readonly title: string;
  /** One or two plain sentences: the text alternative. */
  readonly description: string;
  readonly axisTitle: string;
  /** Drawn top to bottom in the given order (never re-sorted). */
  readonly rows: readonly IntervalRow[];
  /** ratio: 1.3; percent: 0.23 → 23%; points: 0.034 → +3.4 (minutes in every 100). */
  readonly format: "ratio" | "percent" | "points";
  readonly scale: "log" | "linear";
  /** A solid vertical line, e.g. 1 "same as peers" or 0 "no difference". */
  readonly reference?: { readonly value: number; readonly label: string };
  /** A dashed vertical line, e.g. 1.3 "check-in line". */
  readonly line?: { readonly value: number; readonly label: string };
}

export interface TrendPoint {
  readonly week: string;
  readonly value: number;
  readonly low: number;
  readonly high: number;
}

export interface TrendChartOptions {
  readonly id: string;
  readonly title: string;
  readonly description: string;
  readonly axisTitle: string;
  /** At most four series, each told apart by shape, dash and a direct label, not colour alone. */
  readonly series: readonly { readonly label: string; readonly points: readonly TrendPoint[] }[];
  readonly format: "percent";
}

export interface ChartRenderer {
  /** Point-and-interval plot: a rule from low to high and a point at the value. */
  intervals(options: IntervalChartOptions): Promise<Chart>;
  /** Per-week point and interval per series, with lines between weeks. */
  trend(options: TrendChartOptions): Promise<Chart>;
}
