/**
 * Charts for the report pages: vega-lite specs rendered to inline SVG at build time (no browser,
 * no script in the page).
 *
 *   spec (once per chart kind) → vega-lite compile → vega parse → cached runtime
 *   options → data rows + signals → new vega View over the runtime → toSVG → title/desc/role added
 *
 * Each chart comes with its text alternative and a data table holding every value shown (there
 * are no tooltips). Colours are Okabe–Ito, always doubled by shape, dash or a direct label.
 */
import { renderIntervalChart } from "./charts/interval-chart.js";
import { renderTrendChart } from "./charts/trend-chart.js";
import type { ChartRenderer } from "./charts/types.js";

export { chartCompileCount } from "./charts/runtime-cache.js";
export type {
  Chart,
  ChartRenderer,
  DataTable,
  IntervalChartOptions,
  IntervalRow,
  Marker,
  TrendChartOptions,
  TrendPoint,
} from "./charts/types.js";

export function createChartRenderer(): ChartRenderer {
  return {
    intervals: renderIntervalChart,
    trend: renderTrendChart,
  };
}
