import type { TopLevelSpec } from "vega-lite";
import { CHART_CONFIG } from "./config.js";
import { axisLabelExpression } from "./format.js";
import { DRAWN_MARKERS, MARKER_STYLES, RULE_COLOUR, TEXT_COLOUR } from "./palette.js";

/** Datasets and signals the interval chart reads; interval-chart.ts fills them for each chart. */
export const INTERVAL_DATA = {
  guides: "guides",
  intervals: "intervals",
  points: "points",
  notes: "notes",
} as const;
export const INTERVAL_SIGNALS = {
  rowIndexes: "rowIndexes",
  rowLabels: "rowLabels",
  domainLo: "domainLo",
  domainHi: "domainHi",
  ticks: "ticks",
  axisTitle: "axisTitle",
  valueFormat: "valueFormat",
} as const;

export const INTERVAL_WIDTH = 360;
const ROW_STEP = 24;
/** The key sits this many pixels above the plot, over the labels of the vertical guides. */
const KEY_Y = -30;

const markerNames = DRAWN_MARKERS.map((marker) => MARKER_STYLES[marker].name);

/** Shape, fill and outline by marker name; the same scales serve the rows and the key. */
const markerEncoding = {
  shape: {
    field: "marker",
    type: "nominal",
    scale: { domain: markerNames, range: DRAWN_MARKERS.map((m) => MARKER_STYLES[m].shape) },
    legend: null,
  },
  fill: {
    field: "marker",
    type: "nominal",
    scale: { domain: markerNames, range: DRAWN_MARKERS.map((m) => MARKER_STYLES[m].fill) },
    legend: null,
  },
  stroke: {
    field: "marker",
    type: "nominal",
    scale: { domain: markerNames, range: DRAWN_MARKERS.map((m) => MARKER_STYLES[m].stroke) },
    legend: null,
  },
} as const;

/** Key entries left to right, spaced by an estimate of each name's width (12 px text). */
function keyRows(): { marker: string; x: number }[] {
  let x = 6;
  return markerNames.map((marker) => {
    const row = { marker, x };
    x += 10 + marker.length * 6.5 + 20;
    return row;
  });
}

/**
 * The point-and-interval chart: one row per item, top to bottom in the caller's order (rows are
 * indexed, and the axis writes each index as its label), a rule from the low to the high end of the
 * plausible range, and a point at the estimate whose shape and colour say concern / near / typical.
 * Rows without an estimate show a direct text note instead of a mark. Vertical guides: a solid
 * reference (e.g. "same as peers") and a dashed line (e.g. "check-in line"), each labelled directly.
 */
export function intervalSpec(scaleType: "log" | "linear"): TopLevelSpec {
  const S = INTERVAL_SIGNALS;
  const x = {
    type: "quantitative",
    scale: {
      type: scaleType,
      domain: { expr: `[${S.domainLo}, ${S.domainHi}]` },
      nice: false,
      ...(scaleType === "linear" ? { zero: false } : {}),
      clamp: true,
    },
  } as const;
  const y = {
    field: "row",
    type: "ordinal",
    scale: { domain: { expr: S.rowIndexes } },
    axis: {
      title: null,
      labelExpr: `${S.rowLabels}[datum.value]`,
      // No truncation: without a canvas, vega estimates text at 0.8 em per character and would cut
      // ordinary names short. The full label is also in the data table.
      labelLimit: 0,
      labelPadding: 10,
      ticks: false,
      domain: false,
    },
  } as const;
  return {
    description:
      "Point-and-interval chart: one row per item, a horizontal line over the plausible range and a mark at the estimate; " +
      "the mark's shape and colour give its reading; vertical lines show the reference and the check line.",
    width: INTERVAL_WIDTH,
    // The layout is fitted to each chart's content again on every run: a view is reused from
    // chart to chart (render-view.ts), and without resize the first chart's size would stay.
    autosize: { type: "pad", resize: true },
    height: { step: ROW_STEP },
    config: CHART_CONFIG,
    params: [
      { name: S.rowIndexes, value: [] },
      { name: S.rowLabels, value: [] },
      { name: S.domainLo, value: 0.5 },
      { name: S.domainHi, value: 2 },
      { name: S.ticks, value: [] },
      { name: S.axisTitle, value: "" },
      { name: S.valueFormat, value: "ratio" },
    ],
    layer: [
      {
        name: "guides",
        data: { name: INTERVAL_DATA.guides },
        mark: { type: "rule", strokeWidth: 1.5, color: RULE_COLOUR },
        encoding: {
          x: {
            ...x,
            field: "value",
            axis: {
              title: { signal: S.axisTitle },
              values: { expr: S.ticks },
              labelExpr: axisLabelExpression(S.valueFormat),
              grid: true,
            },
          },
          strokeDash: {
            field: "kind",
            type: "nominal",
            scale: {
              domain: ["reference", "line"],
              range: [
                [1, 0],
                [6, 4],
              ],
            },
            legend: null,
          },
        },
      },
      {
        name: "guide_labels",
        data: { name: INTERVAL_DATA.guides },
        mark: {
          type: "text",
          baseline: "bottom",
          align: { expr: "datum.align" },
          dx: { expr: "datum.dx" },
          y: -4,
        },
        encoding: { x: { ...x, field: "value" }, text: { field: "label" } },
      },
      {
        name: "intervals",
        data: { name: INTERVAL_DATA.intervals },
        mark: { type: "rule", strokeWidth: 2, color: RULE_COLOUR },
        encoding: { y, x: { ...x, field: "low" }, x2: { field: "high" } },
      },
      {
        name: "points",
        data: { name: INTERVAL_DATA.points },
        mark: { type: "point", size: 90, strokeWidth: 1.5, opacity: 1, filled: false },
        encoding: {
          y,
          x: { ...x, field: "value" },
          ...markerEncoding,
        },
      },
      // The key: drawn as marks above the plot (a vega legend costs about 1 ms more per chart).
      {
        name: "key_symbols",
        data: { values: keyRows() },
        mark: { type: "point", size: 90, strokeWidth: 1.5, opacity: 1, filled: false },
        encoding: {
          x: { field: "x", type: "quantitative", scale: null },
          y: { value: KEY_Y },
          ...markerEncoding,
        },
      },
      {
        name: "key_labels",
        data: { values: keyRows() },
        mark: { type: "text", align: "left", baseline: "middle", dx: 10 },
        encoding: {
          x: { field: "x", type: "quantitative", scale: null },
          y: { value: KEY_Y },
          text: { field: "marker" },
        },
      },
      {
        name: "notes",
        data: { name: INTERVAL_DATA.notes },
        mark: { type: "text", align: "left", baseline: "middle", fontStyle: "italic", color: TEXT_COLOUR },
        encoding: { y, x: { value: 4 }, text: { field: "text" } },
      },
    ],
  };
}
