import type { TopLevelSpec } from "vega-lite";
import { CHART_CONFIG } from "./config.js";
import { axisLabelExpression } from "./format.js";
import { SERIES_STYLES, TEXT_COLOUR } from "./palette.js";

/** Datasets and signals the trend chart reads; trend-chart.ts fills them for each chart. */
export const TREND_DATA = { points: "points", labels: "labels" } as const;
export const TREND_SIGNALS = {
  weekIndexes: "weekIndexes",
  weekLabels: "weekLabels",
  domainLo: "domainLo",
  domainHi: "domainHi",
  ticks: "ticks",
  axisTitle: "axisTitle",
  valueFormat: "valueFormat",
} as const;

export const TREND_WIDTH = 480;
export const TREND_HEIGHT = 220;

const seriesIndexes = SERIES_STYLES.map((_, index) => index);

/**
 * The weekly trend: per series and week a point at the estimate and a rule over the plausible
 * range, with a line joining the weeks. Series sit side by side within each week, and differ by
 * colour, point shape and dash; each is labelled in words (beside its shape) at the right edge,
 * level with its last point (the label's vertical position arrives precomputed in pixels so that labels never
 * overlap).
 */
export function trendSpec(): TopLevelSpec {
  const S = TREND_SIGNALS;
  // Weeks sit at whole numbers on a linear scale (so that lines join them); each series is shifted
  // a little within its week (field "x", computed in trend-chart.ts) so that intervals do not overlap.
  const x = {
    field: "x",
    type: "quantitative",
    scale: { domain: { expr: `[-0.5, length(${S.weekIndexes}) - 0.5]` }, nice: false, zero: false },
  } as const;
  const y = {
    type: "quantitative",
    scale: { domain: { expr: `[${S.domainLo}, ${S.domainHi}]` }, nice: false, zero: false },
  } as const;
  const colour = {
    field: "series",
    type: "nominal",
    scale: { domain: seriesIndexes, range: SERIES_STYLES.map((style) => style.colour) },
    legend: null,
  } as const;
  const shape = {
    field: "series",
    type: "nominal",
    scale: { domain: seriesIndexes, range: SERIES_STYLES.map((style) => style.shape) },
    legend: null,
  } as const;
  return {
    description:
      "Weekly trend chart: for each series and week a mark at the estimate and a vertical line over the plausible range, " +
      "weeks joined by a line; series differ by mark shape and line dash and are labelled beside their last week.",
    width: TREND_WIDTH,
    // The layout is fitted to each chart's content again on every run: a view is reused from
    // chart to chart (render-view.ts), and without resize the first chart's size would stay.
    autosize: { type: "pad", resize: true },
    height: TREND_HEIGHT,
    config: CHART_CONFIG,
    params: [
      { name: S.weekIndexes, value: [] },
      { name: S.weekLabels, value: [] },
      { name: S.domainLo, value: 0 },
      { name: S.domainHi, value: 1 },
      { name: S.ticks, value: [] },
      { name: S.axisTitle, value: "" },
      { name: S.valueFormat, value: "percent" },
    ],
    layer: [
      {
        name: "lines",
        data: { name: TREND_DATA.points },
        mark: { type: "line", strokeWidth: 1.5 },
        encoding: {
          x: {
            ...x,
            axis: {
              title: "Week",
              values: { expr: S.weekIndexes },
              labelExpr: `${S.weekLabels}[datum.value]`,
              labelOverlap: true,
              grid: false,
            },
          },
          y: {
            ...y,
            field: "value",
            axis: {
              title: { signal: S.axisTitle },
              values: { expr: S.ticks },
              labelExpr: axisLabelExpression(S.valueFormat),
              grid: true,
            },
          },
          color: colour,
          detail: { field: "series", type: "nominal" },
          strokeDash: {
            field: "series",
            type: "nominal",
            scale: { domain: seriesIndexes, range: SERIES_STYLES.map((style) => [...style.dash]) },
            legend: null,
          },
        },
      },
      {
        name: "intervals",
        data: { name: TREND_DATA.points },
        mark: { type: "rule", strokeWidth: 1.5 },
        encoding: { x, y: { ...y, field: "low" }, y2: { field: "high" }, color: colour },
      },
      {
        name: "points",
        data: { name: TREND_DATA.points },
        mark: { type: "point", filled: true, size: 50, opacity: 1 },
        encoding: {
          x,
          y: { ...y, field: "value" },
          color: colour,
          shape,
        },
      },
      {
        name: "label_symbols",
        data: { name: TREND_DATA.labels },
        mark: { type: "point", filled: true, size: 50, opacity: 1 },
        encoding: {
          x: { value: TREND_WIDTH + 12 },
          y: { field: "labelY", type: "quantitative", scale: null },
          color: colour,
          shape,
        },
      },
      {
        name: "labels",
        data: { name: TREND_DATA.labels },
        mark: { type: "text", align: "left", baseline: "middle", color: TEXT_COLOUR },
        encoding: {
          x: { value: TREND_WIDTH + 22 },
          y: { field: "labelY", type: "quantitative", scale: null },
          text: { field: "label" },
        },
      },
    ],
  };
}
