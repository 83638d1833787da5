import { trusted } from "../html.js";
import { checkChartId, labelSvg } from "./accessible-svg.js";
import { type Domain, linearDomain } from "./domain.js";
import { formatRange, formatValue } from "./format.js";
import { SERIES_STYLES } from "./palette.js";
import { renderSvg } from "./render-view.js";
import { runtimeFor } from "./runtime-cache.js";
import { TREND_DATA, TREND_HEIGHT, TREND_SIGNALS, trendSpec } from "./trend-spec.js";
import type { Chart, DataTable, TrendChartOptions } from "./types.js";

const EMPTY_LABEL = "No weeks to show";
/** Minimum vertical distance between two direct labels, in pixels (12 px text). */
const LABEL_GAP = 14;

function checkOptions(options: TrendChartOptions): void {
  checkChartId(options.id);
  if (options.series.length > SERIES_STYLES.length) {
    throw new RangeError(
      `a trend chart shows at most ${SERIES_STYLES.length} series, got ${options.series.length}`,
    );
  }
  options.series.forEach((series, s) => {
    series.points.forEach((point, p) => {
      for (const key of ["value", "low", "high"] as const) {
        if (!Number.isFinite(point[key]))
          throw new RangeError(`series[${s}].points[${p}].${key} must be a finite number`);
      }
      if (point.low > point.high) throw new RangeError(`series[${s}].points[${p}]: low is above high`);
    });
  });
}

/** Weeks in the order they first appear, series by series. */
function weekOrder(options: TrendChartOptions): string[] {
  const weeks: string[] = [];
  for (const series of options.series) {
    for (const point of series.points) if (!weeks.includes(point.week)) weeks.push(point.week);
  }
  return weeks;
}

function chartDomain(options: TrendChartOptions): Domain {
  const values = options.series.flatMap((series) => series.points.flatMap((p) => [p.value, p.low, p.high]));
  return linearDomain(values, { unit: values.every((value) => value >= 0 && value <= 1) });
}

/**
 * Direct labels at the right edge, level with each series' last point, pushed apart to at least
 * LABEL_GAP pixels (top to bottom) and kept inside the plot height where there is room.
 */
function labelRows(options: TrendChartOptions, domain: Domain): object[] {
  const toPixel = (value: number): number => (TREND_HEIGHT * (domain.hi - value)) / (domain.hi - domain.lo);
  const labels = options.series.flatMap((series, index) => {
    const last = series.points.at(-1);
    return last === undefined ? [] : [{ series: index, label: series.label, labelY: toPixel(last.value) }];
  });
  labels.sort((a, b) => a.labelY - b.labelY || a.series - b.series);
  for (let i = 1; i < labels.length; i++) {
    const previous = labels[i - 1]!;
    labels[i]!.labelY = Math.max(labels[i]!.labelY, previous.labelY + LABEL_GAP);
  }
  const overflow = (labels.at(-1)?.labelY ?? 0) - TREND_HEIGHT;
  const room = labels[0]?.labelY ?? 0;
  const shift = Math.min(Math.max(overflow, 0), Math.max(room, 0));
  return labels.map((label) => ({ ...label, labelY: label.labelY - shift }));
}

/** Series side by side within a week: at most 0.8 of a week wide in all. */
function seriesShift(index: number, count: number): number {
  return (index - (count - 1) / 2) * Math.min(0.18, 0.8 / count);
}

function pointRows(options: TrendChartOptions, weeks: readonly string[]): object[] {
  return options.series.flatMap((series, index) =>
    series.points.map((point) => ({
      series: index,
      x: weeks.indexOf(point.week) + seriesShift(index, options.series.length),
      value: point.value,
      low: point.low,
      high: point.high,
    })),
  );
}

/** One table row per point: series by series, points in the given order. */
export function trendTable(options: TrendChartOptions): DataTable {
  const rows = options.series.flatMap((series) =>
    series.points.map((point) => [
      series.label,
      point.week,
      formatValue(point.value, options.format),
      formatRange(point.low, point.high, options.format),
    ]),
  );
  return { caption: options.title, columns: ["Series", "Week", options.axisTitle, "Plausible range"], rows };
}

export async function renderTrendChart(options: TrendChartOptions): Promise<Chart> {
  checkOptions(options);
  const runtime = runtimeFor("trend", trendSpec);
  const weeks = weekOrder(options);
  const domain = chartDomain(options);
  const S = TREND_SIGNALS;
  const empty = weeks.length === 0;
  const svg = await renderSvg(runtime, {
    signals: {
      [S.weekIndexes]: empty ? [0] : weeks.map((_, index) => index),
      [S.weekLabels]: empty ? [EMPTY_LABEL] : weeks,
      [S.domainLo]: domain.lo,
      [S.domainHi]: domain.hi,
      [S.ticks]: [...domain.ticks],
      [S.axisTitle]: options.axisTitle,
      [S.valueFormat]: options.format,
    },
    data: { [TREND_DATA.points]: pointRows(options, weeks), [TREND_DATA.labels]: labelRows(options, domain) },
  });
  return {
    svg: trusted(labelSvg(svg, options)),
    description: options.description,
    table: trendTable(options),
  };
}
