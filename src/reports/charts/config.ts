import type { Config } from "vega-lite";
import { FONT, GRID_COLOUR, RULE_COLOUR, TEXT_COLOUR } from "./palette.js";

/**
 * Shared vega-lite config: a system font, near-black text, no ARIA markup on the inner marks (the
 * root carries role="img", a title and a description; the values are in the data table), and no
 * tooltips anywhere.
 */
export const CHART_CONFIG: Config = {
  font: FONT,
  aria: false,
  background: "#ffffff",
  view: { stroke: null },
  axis: {
    labelColor: TEXT_COLOUR,
    titleColor: TEXT_COLOUR,
    labelFontSize: 12,
    titleFontSize: 12,
    titleFontWeight: "normal",
    domainColor: RULE_COLOUR,
    tickColor: RULE_COLOUR,
    gridColor: GRID_COLOUR,
  },
  legend: { labelColor: TEXT_COLOUR, titleColor: TEXT_COLOUR, labelFontSize: 12 },
  text: { color: TEXT_COLOUR, fontSize: 12 },
  mark: { tooltip: false },
};
