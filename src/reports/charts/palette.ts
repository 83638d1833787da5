/**
 * Colours, shapes and dashes of the charts.
 *
 * Colours come from the Okabe–Ito palette, chosen to stay distinguishable under the common forms of
 * colour-vision deficiency. Colour is never the only cue: every category also has its own shape (and,
 * for trend series, its own dash and a direct label).
 *
 * Contrast (WCAG 2.x, against the white background): a colour that carries meaning on a mark or
 * line reaches 3:1 (Success Criterion 1.4.11); text uses near-black (4.5:1 and more, SC 1.4.3).
 * Okabe–Ito orange, sky blue and yellow stay below 3:1 on white, so they never carry meaning alone:
 * orange appears only as the fill of a shape whose outline is black.
 *
 * Source: Okabe, M. & Ito, K. (2008), "Color Universal Design (CUD): how to make figures and
 * presentations that are friendly to colorblind people", J*Fly data depository.
 */
export const OKABE_ITO = {
  orange: "#E69F00",
  skyBlue: "#56B4E9",
  bluishGreen: "#009E73",
  yellow: "#F0E442",
  blue: "#0072B2",
  vermillion: "#D55E00",
  reddishPurple: "#CC79A7",
  black: "#000000",
} as const;

export const BACKGROUND = "#ffffff";
/** Axis labels, titles and direct labels (about 16:1 on white). */
export const TEXT_COLOUR = "#222222";
/** Interval rules and the reference line (about 7:1 on white). */
export const RULE_COLOUR = "#595959";
/** Grid lines: decorative only, so they may stay below 3:1. */
export const GRID_COLOUR = "#dddddd";
/**
 * A system sans-serif stack: no web font, nothing fetched. Text widths are estimated at build time,
 * so the stack stays close to the metrics of Helvetica/Arial.
 */
export const FONT = "Arial, Helvetica, sans-serif";

export type DrawnMarker = "concern" | "near" | "typical";

export interface MarkerStyle {
  /** Words for the legend and the data table. */
  readonly name: string;
  /** A vega symbol shape. */
  readonly shape: string;
  readonly fill: string;
  /** The colour that carries the contrast (the outline when the fill is light). */
  readonly stroke: string;
}

/** concern: filled triangle; near: diamond with an orange fill and a black outline; typical: filled circle. */
export const MARKER_STYLES: Readonly<Record<DrawnMarker, MarkerStyle>> = {
  concern: {
    name: "Concern",
    shape: "triangle-up",
    fill: OKABE_ITO.vermillion,
    stroke: OKABE_ITO.vermillion,
  },
  near: { name: "Near the line", shape: "diamond", fill: OKABE_ITO.orange, stroke: OKABE_ITO.black },
  typical: { name: "Typical", shape: "circle", fill: OKABE_ITO.blue, stroke: OKABE_ITO.blue },
};

export const DRAWN_MARKERS: readonly DrawnMarker[] = ["concern", "near", "typical"];

export const WITHHELD_NAME = "Withheld";

export interface SeriesStyle {
  readonly colour: string;
  readonly shape: string;
  /** A vega strokeDash array; [1, 0] draws a solid line. */
  readonly dash: readonly number[];
}

/** Trend series, in the order the caller gives them. Each differs by shape and dash, not only colour. */
export const SERIES_STYLES: readonly SeriesStyle[] = [
  { colour: OKABE_ITO.black, shape: "circle", dash: [1, 0] },
  { colour: OKABE_ITO.blue, shape: "square", dash: [6, 3] },
  { colour: OKABE_ITO.vermillion, shape: "triangle-up", dash: [2, 2] },
  { colour: OKABE_ITO.bluishGreen, shape: "diamond", dash: [8, 3, 2, 3] },
];

/** Every colour that carries meaning on a mark or line (each must reach 3:1 on the background). */
export function meaningfulMarkColours(): readonly string[] {
  return [
    RULE_COLOUR,
    ...DRAWN_MARKERS.map((marker) => MARKER_STYLES[marker].stroke),
    ...SERIES_STYLES.map((style) => style.colour),
  ];
}
