import { describe, expect, it } from "vitest";
import { linearDomain, logDomain } from "../../src/reports/charts/domain.js";
import { formatValue } from "../../src/reports/charts/format.js";
import { intervalSpec } from "../../src/reports/charts/interval-spec.js";
import {
  BACKGROUND,
  FONT,
  meaningfulMarkColours,
  OKABE_ITO,
  SERIES_STYLES,
  TEXT_COLOUR,
} from "../../src/reports/charts/palette.js";
import { forgetChartViews } from "../../src/reports/charts/render-view.js";
import { trendSpec } from "../../src/reports/charts/trend-spec.js";
import {
  type Chart,
  chartCompileCount,
  createChartRenderer,
  type IntervalChartOptions,
  type IntervalRow,
  type Marker,
  type TrendChartOptions,
} from "../../src/reports/charts.js";
import { contrastRatio } from "../../src/stats/contrast-ratio.js";

const renderer = createChartRenderer();
const SVG_NAMESPACE = "http://www.w3.org/2000/svg";
const MARKERS: readonly Marker[] = ["concern", "near", "typical", "withheld"];

/** Invented rows: every 7th has no estimate, every 4th is withheld (with numbers that must not show). */
function makeRows(count: number): IntervalRow[] {
  return Array.from({ length: count }, (_, i) => {
    const value = 0.55 + ((i * 37) % 23) / 10;
    const missing = i % 7 === 3;
    return {
      label: `Student ${String(i).padStart(2, "0")}`,
      value: missing ? null : value,
      low: missing ? null : value / 1.5,
      high: missing ? null : value * 1.5,
      marker: MARKERS[i % 4] ?? "typical",
    };
  });
}

function intervalOptions(overrides: Partial<IntervalChartOptions> = {}): IntervalChartOptions {
  return {
    id: "boredom-ratio",
    title: "Boredom compared with classmates",
    description: "Each row is one invented student: the ratio of boredom to classmates on the same units.",
    axisTitle: "Ratio to classmates (log scale)",
    rows: makeRows(6),
    format: "ratio",
    scale: "log",
    reference: { value: 1, label: "same as peers" },
    line: { value: 1.3, label: "check-in line" },
    ...overrides,
  };
}

const WEEKS = ["2025-09-01", "2025-09-08", "2025-09-15", "2025-09-22", "2025-09-29", "2025-10-06"];

function trendOptions(seriesCount: number, weekCount = WEEKS.length): TrendChartOptions {
  const names = ["Larkmoor Unified", "Fenwick Middle", "Grade 7", "Grade 8", "Grade 9"];
  return {
    id: "boredom-trend",
    title: "Boredom by week",
    description: "Weekly share of time bored for the district and invented groups.",
    axisTitle: "Share of time",
    format: "percent",
    series: Array.from({ length: seriesCount }, (_, s) => ({
      label: names[s] ?? `Series ${s}`,
      points: WEEKS.slice(0, weekCount).map((week, w) => {
        const value = 0.1 + 0.02 * s + 0.005 * w;
        return { week, value, low: value - 0.03, high: value + 0.04 };
      }),
    })),
  };
}

function deepFreeze<T>(value: T): T {
  if (typeof value === "object" && value !== null) {
    for (const child of Object.values(value)) deepFreeze(child);
    Object.freeze(value);
  }
  return value;
}

/**
 * A naive well-formedness check written for this test: tags nest and close, attribute values are
 * quoted, and text holds no raw "<" or bare "&". Not a full XML parser.
 */
function checkXmlish(markup: string): string[] {
  const problems: string[] = [];
  const stack: string[] = [];
  const tag = /<(\/?)([A-Za-z][\w:-]*)((?:\s+[\w:-]+="[^"<]*")*)\s*(\/?)>/y;
  let position = 0;
  while (position < markup.length) {
    const next = markup.indexOf("<", position);
    const text = markup.slice(position, next < 0 ? markup.length : next);
    if (/&(?![a-z]+;|#\d+;|#x[0-9a-f]+;)/i.test(text)) problems.push(`bare & in "${text}"`);
    if (next < 0) break;
    tag.lastIndex = next;
    const match = tag.exec(markup);
    if (match === null) {
      problems.push(`malformed tag at ${next}: ${markup.slice(next, next + 40)}`);
      break;
    }
    const [, closing, name, , selfClosing] = match;
    if (closing) {
      const open = stack.pop();
      if (open !== name) problems.push(`</${name}> closes <${open}>`);
    } else if (!selfClosing) {
      stack.push(name as string);
    }
    position = tag.lastIndex;
  }
  if (stack.length > 0) problems.push(`unclosed: ${stack.join(", ")}`);
  return problems;
}

/** The contents of every <text> element, in document order. */
function texts(svg: string): string[] {
  return [...svg.matchAll(/<text\b[^>]*>([^<]*)<\/text>/g)].map((m) => m[1] as string);
}

/** The children of the mark group whose class names `markName` (e.g. "points_marks"). */
function markGroup(svg: string, markName: string): string {
  const start = svg.indexOf(`role-mark ${markName}"`);
  if (start < 0) return "";
  const openEnd = svg.indexOf(">", start);
  if (svg[openEnd - 1] === "/") return ""; // an empty group: <g .../>
  return svg.slice(openEnd + 1, svg.indexOf("</g>", openEnd));
}

/** XML escaping written for this test (the five predefined entities of XML 1.0, section 4.6). */
function xmlEscape(text: string): string {
  return text
    .replaceAll("&", "&amp;")
    .replaceAll("<", "&lt;")
    .replaceAll(">", "&gt;")
    .replaceAll('"', "&quot;")
    .replaceAll("'", "&apos;");
}

function count(haystack: string, needle: RegExp): number {
  return [...haystack.matchAll(needle)].length;
}

function expectAccessibleSvg(chart: Chart, id: string, title: string, description: string): void {
  const svg = chart.svg.html;
  expect(svg.startsWith("<svg ")).toBe(true);
  const rootEnd = svg.indexOf(">");
  const root = svg.slice(0, rootEnd);
  expect(root).toContain('role="img"');
  expect(root).toContain(`aria-labelledby="${id}-title ${id}-desc"`);
  // <title> and <desc> are the first children of the root.
  const afterRoot = svg.slice(rootEnd + 1);
  const titleElement = `<title id="${id}-title">${xmlEscape(title)}</title>`;
  expect(afterRoot.startsWith(titleElement)).toBe(true);
  const descElement = `<desc id="${id}-desc">${xmlEscape(description)}</desc>`;
  expect(afterRoot.slice(titleElement.length).startsWith(descElement)).toBe(true);
  expect(checkXmlish(svg)).toEqual([]);
  expect(svg.endsWith("</svg>")).toBe(true);
  // Self-contained and static: no script, no URL but the SVG namespace, no external reference.
  expect(svg.toLowerCase()).not.toContain("<script");
  expect([...svg.matchAll(/https?:\/\/[^\s"')]+/g)].map((m) => m[0])).toEqual([SVG_NAMESPACE]);
  expect(svg).not.toMatch(/href|url\(|@import|<image|<foreignObject|\son[a-z]+=/i);
  // One <title>: no tooltips.
  expect(count(svg, /<title/g)).toBe(1);
  // Only the system font stack.
  const fonts = [...svg.matchAll(/font-family="([^"]*)"/g)].map((m) => m[1]);
  expect(fonts.length).toBeGreaterThan(0);
  expect(new Set(fonts)).toEqual(new Set([FONT]));
  expect(chart.description).toBe(description);
}

describe("interval chart: accessible, self-contained SVG", () => {
  it("has role=img, <title> and <desc> first, and no script, URL or web font", async () => {
    const options = intervalOptions();
    const chart = await renderer.intervals(options);
    expectAccessibleSvg(chart, options.id, options.title, options.description);
  });

  it("escapes text from the input in <title>, <desc> and the row labels", async () => {
    const options = intervalOptions({
      id: "escaping",
      title: 'Units <b>"A" & B</b>',
      description: "Rows named <script>alert(1)</script> & co.",
      rows: [{ label: "<script>x</script> & <i>y</i>", value: 1.2, low: 1, high: 1.5, marker: "typical" }],
    });
    const chart = await renderer.intervals(options);
    const svg = chart.svg.html;
    expectAccessibleSvg(chart, "escaping", options.title, options.description);
    expect(svg).toContain("Units &lt;b&gt;&quot;A&quot; &amp; B&lt;/b&gt;");
    expect(svg).not.toContain("<b>");
    expect(svg).not.toContain("<i>");
    expect(texts(svg)).toContain("&lt;script&gt;x&lt;/script&gt; &amp; &lt;i&gt;y&lt;/i&gt;");
  });

  it("writes long row labels in full (no ellipsis)", async () => {
    const label = "Alexandria Montgomery-Featherstonehaugh, Grade 7, Fenwick Middle";
    const chart = await renderer.intervals(
      intervalOptions({ rows: [{ label, value: 1.2, low: 1, high: 1.5, marker: "typical" }] }),
    );
    expect(texts(chart.svg.html)).toContain(label);
    expect(chart.svg.html).not.toContain("\u2026");
  });

  it("makes ids unique per page from the caller's prefix and rejects unusable ids", async () => {
    expect.assertions(4);
    const a = await renderer.intervals(intervalOptions({ id: "unit-chart-1" }));
    const b = await renderer.intervals(intervalOptions({ id: "unit-chart-2" }));
    const ids = [...`${a.svg.html}${b.svg.html}`.matchAll(/\sid="([^"]*)"/g)].map((m) => m[1]);
    expect(new Set(ids).size).toBe(ids.length);
    expect(ids).toEqual([
      "unit-chart-1-title",
      "unit-chart-1-desc",
      "unit-chart-2-title",
      "unit-chart-2-desc",
    ]);
    await expect(renderer.intervals(intervalOptions({ id: "has space" }))).rejects.toThrow(RangeError);
    await expect(renderer.intervals(intervalOptions({ id: '1"x' }))).rejects.toThrow(RangeError);
  });

  it("gives every spec a description", () => {
    expect(intervalSpec("log").description).toMatch(/\w+/);
    expect(intervalSpec("linear").description).toMatch(/\w+/);
    expect(trendSpec().description).toMatch(/\w+/);
  });

  it("is deterministic and keeps no state from one chart to the next", async () => {
    const options = intervalOptions({ id: "repeat" });
    const first = (await renderer.intervals(options)).svg.html;
    await renderer.intervals(intervalOptions({ rows: makeRows(40), scale: "log", line: undefined }));
    await renderer.intervals(intervalOptions({ rows: makeRows(3), format: "points", scale: "linear" }));
    expect((await renderer.intervals(options)).svg.html).toBe(first);
  });

  it("does not change its input", async () => {
    const options = deepFreeze(intervalOptions({ rows: makeRows(12) }));
    const copy = structuredClone(options);
    await renderer.intervals(options);
    expect(options).toEqual(copy);
  });
});

describe("interval chart: rows, marks and data table", () => {
  it.each([0, 1, 40])("renders %i rows (nulls and withheld included) with one table row each", async (n) => {
    const options = intervalOptions({ id: `rows-${n}`, rows: makeRows(n) });
    const chart = await renderer.intervals(options);
    expectAccessibleSvg(chart, options.id, options.title, options.description);
    expect(chart.table.rows).toHaveLength(n);
    expect(chart.table.rows.map((row) => row[0])).toEqual(options.rows.map((row) => row.label));
    const drawn = options.rows.filter((row) => row.marker !== "withheld" && row.value !== null);
    expect(count(markGroup(chart.svg.html, "points_marks"), /<path/g)).toBe(drawn.length);
    expect(count(markGroup(chart.svg.html, "intervals_marks"), /<line/g)).toBe(drawn.length);
    const notes = texts(markGroup(chart.svg.html, "notes_marks"));
    if (n === 0) expect(notes).toEqual(["No rows to show"]);
    else expect(notes).toHaveLength(n - drawn.length);
  });

  it("draws rows top to bottom in the given order, never re-sorted, duplicates kept", async () => {
    const rows: IntervalRow[] = [
      { label: "Zoe", value: 0.7, low: 0.5, high: 0.9, marker: "typical" },
      { label: "Adam", value: 2.4, low: 1.8, high: 3.1, marker: "concern" },
      { label: "Mia", value: 1.4, low: 1.0, high: 1.9, marker: "near" },
      { label: "Adam", value: 1.1, low: 0.9, high: 1.3, marker: "typical" },
    ];
    const chart = await renderer.intervals(intervalOptions({ rows }));
    const labelled = [
      ...chart.svg.html.matchAll(/<text[^>]*translate\([^,]+,([\d.]+)\)[^>]*>(Zoe|Adam|Mia)</g),
    ];
    expect(labelled.map((m) => m[2])).toEqual(["Zoe", "Adam", "Mia", "Adam"]);
    const ys = labelled.map((m) => Number(m[1]));
    expect([...ys].sort((a, b) => a - b)).toEqual(ys);
    expect(new Set(ys).size).toBe(4);
    expect(chart.table.rows.map((row) => row[0])).toEqual(["Zoe", "Adam", "Mia", "Adam"]);
  });

  it("writes the table with formatted values, the plausible range, the reading and notes", async () => {
    // Expected strings follow the formats the reports issue defines (ratio 1.3; percent 0.23 → 23%;
    // points 0.034 → +3.4), written out by hand.
    const rows: IntervalRow[] = [
      { label: "Avery", value: 2.1, low: 1.6, high: 2.7, marker: "concern" },
      { label: "Blake", value: 1.25, low: 0.9, high: 1.72, marker: "near" },
      { label: "Casey", value: null, low: null, high: null, marker: "typical", note: "too little data" },
      { label: "Devon", value: 3.3, low: 2.2, high: 4.4, marker: "withheld" },
    ];
    const chart = await renderer.intervals(intervalOptions({ rows }));
    expect(chart.table).toEqual({
      caption: "Boredom compared with classmates",
      columns: ["Name", "Ratio to classmates (log scale)", "Plausible range", "Reading", "Note"],
      rows: [
        ["Avery", "2.1", "1.6 to 2.7", "Concern", ""],
        ["Blake", "1.3", "0.9 to 1.7", "Near the line", ""],
        ["Casey", "no estimate", "not available", "Typical", "too little data"],
        ["Devon", "withheld", "withheld", "Withheld", ""],
      ],
    });
    // The withheld row is written, not drawn; its numbers appear nowhere.
    const notes = texts(markGroup(chart.svg.html, "notes_marks"));
    expect(notes).toEqual(["too little data", "withheld"]);
    expect(JSON.stringify(chart)).not.toMatch(/3\.3|2\.2|4\.4/);
  });

  it("draws a range with no upper end (+∞) to the right edge and writes it as 'or more'", async () => {
    const rows: IntervalRow[] = [
      { label: "Avery", value: 2.4, low: 1.5, high: Number.POSITIVE_INFINITY, marker: "concern" },
      { label: "Blake", value: 1.1, low: 0.8, high: 1.5, marker: "typical" },
    ];
    const chart = await renderer.intervals(intervalOptions({ id: "open-end", rows }));
    expect(chart.table.rows.map((row) => row[2])).toEqual(["1.5 or more", "0.8 to 1.5"]);
    const ends = [
      ...markGroup(chart.svg.html, "intervals_marks").matchAll(
        /translate\(([\d.]+),[\d.]+\)" x2="([\d.]+)"/g,
      ),
    ].map((m) => ({ start: Number(m[1]), end: Number(m[1]) + Number(m[2]) }));
    expect(ends).toHaveLength(2);
    // Avery's range starts at 1.5, where Blake's ends, and runs on to the axis' end, past Blake's.
    expect(ends[0]!.start).toBeCloseTo(ends[1]!.end, 6);
    expect(ends[0]!.end).toBeGreaterThan(ends[1]!.end + 50);
    // The open range ends where the axis ends: no finite end was invented for it, and it reaches
    // further right than the bounded one.
    expect(chart.svg.html).not.toMatch(/Infinity|NaN/);
    await expect(
      renderer.intervals(intervalOptions({ rows: [{ ...rows[0]!, low: Number.NEGATIVE_INFINITY }] })),
    ).rejects.toThrow(RangeError);
  });

  it("formats percent and points tables and axis labels", async () => {
    const percent = await renderer.intervals(
      intervalOptions({
        format: "percent",
        scale: "linear",
        reference: undefined,
        line: undefined,
        rows: [{ label: "Unit 1", value: 0.23, low: 0.034, high: 0.3, marker: "typical" }],
      }),
    );
    expect(percent.table.rows).toEqual([["Unit 1", "23%", "3.4% to 30%", "Typical"]]);
    expect(texts(percent.svg.html)).toContain("20%");
    const points = await renderer.intervals(
      intervalOptions({
        format: "points",
        scale: "linear",
        reference: { value: 0, label: "no difference" },
        line: undefined,
        rows: [{ label: "Fractions", value: 0.034, low: -0.012, high: 0.08, marker: "concern" }],
      }),
    );
    expect(points.table.rows).toEqual([["Fractions", "+3.4", "\u22121.2 to +8.0", "Concern"]]);
    expect(texts(points.svg.html)).toEqual(expect.arrayContaining(["0", "+4", "no difference"]));
  });

  it("writes number formats by hand-checked examples", () => {
    expect(formatValue(1.3, "ratio")).toBe("1.3");
    expect(formatValue(0.456, "ratio")).toBe("0.46");
    expect(formatValue(2, "ratio")).toBe("2");
    expect(formatValue(123.4, "ratio")).toBe("123");
    expect(formatValue(0, "ratio")).toBe("0");
    expect(formatValue(0.23, "percent")).toBe("23%");
    expect(formatValue(0.034, "percent")).toBe("3.4%");
    expect(formatValue(-0.0001, "percent")).toBe("0.0%");
    expect(formatValue(0.034, "points")).toBe("+3.4");
    expect(formatValue(-0.012, "points")).toBe("\u22121.2");
    expect(formatValue(-0.0001, "points")).toBe("0.0");
    expect(() => formatValue(Number.NaN, "ratio")).toThrow(RangeError);
  });

  it("chooses domains that hold every value, with ticks inside", () => {
    const cases: [number[], "log" | "linear" | "unit"][] = [
      [[0.4, 1, 1.3, 2.9], "log"],
      [[0.97, 1.02], "log"],
      [[0.01, 50], "log"],
      [[], "log"],
      [[-0.012, 0, 0.08], "linear"],
      [[0.2, 0.2], "linear"],
      [[0.034, 0.23, 0.3], "unit"],
      [[0, 1], "unit"],
    ];
    for (const [values, kind] of cases) {
      const domain = kind === "log" ? logDomain(values) : linearDomain(values, { unit: kind === "unit" });
      for (const value of values) {
        expect(domain.lo).toBeLessThanOrEqual(value);
        expect(domain.hi).toBeGreaterThanOrEqual(value);
      }
      if (kind === "unit") expect([domain.lo >= 0, domain.hi <= 1]).toEqual([true, true]);
      expect(domain.ticks.length).toBeGreaterThanOrEqual(kind === "log" ? 2 : 3);
      for (const tick of domain.ticks) expect(tick >= domain.lo && tick <= domain.hi).toBe(true);
    }
    // Ratios read best at doublings or 1-2-5 steps around 1.
    expect(logDomain([0.4, 1, 1.3, 2.9]).ticks).toEqual([0.5, 1, 2]);
  });

  it("labels the reference and check-in line directly, the line dashed", async () => {
    const chart = await renderer.intervals(intervalOptions());
    expect(texts(markGroup(chart.svg.html, "guide_labels_marks"))).toEqual([
      "same as peers",
      "check-in line",
    ]);
    const guides = markGroup(chart.svg.html, "guides_marks");
    expect(count(guides, /<line/g)).toBe(2);
    expect(guides).toContain('stroke-dasharray="6,4"');
    // The key names each shape in words.
    expect(texts(markGroup(chart.svg.html, "key_labels_marks"))).toEqual([
      "Concern",
      "Near the line",
      "Typical",
    ]);
  });

  it("gives each marker its own shape, so nothing depends on colour", async () => {
    const rows: IntervalRow[] = (["concern", "near", "typical"] as const).map((marker) => ({
      label: marker,
      value: 1,
      low: 0.8,
      high: 1.2,
      marker,
    }));
    const chart = await renderer.intervals(intervalOptions({ rows }));
    const shapes = [...markGroup(chart.svg.html, "points_marks").matchAll(/\sd="([^"]*)"/g)].map((m) => m[1]);
    expect(new Set(shapes).size).toBe(3);
  });

  it("rejects values that cannot be drawn", async () => {
    expect.assertions(3);
    const bad = (row: Partial<IntervalRow>) => intervalOptions({ rows: [{ ...makeRows(1)[0]!, ...row }] });
    await expect(renderer.intervals(bad({ value: Number.NaN }))).rejects.toThrow(RangeError);
    await expect(renderer.intervals(bad({ low: 2, high: 1 }))).rejects.toThrow(RangeError);
    await expect(
      renderer.intervals(intervalOptions({ reference: { value: 0, label: "no difference" } })),
    ).rejects.toThrow(RangeError);
  });
});

describe("trend chart", () => {
  it.each([
    [0, 0],
    [1, 1],
    [4, 6],
  ])(
    "renders %i series of %i weeks with one table row per point, in order",
    async (seriesCount, weekCount) => {
      const options = trendOptions(seriesCount, weekCount);
      const chart = await renderer.trend(options);
      expectAccessibleSvg(chart, options.id, options.title, options.description);
      const expected = options.series.flatMap((series) =>
        series.points.map((point) => [series.label, point.week, formatValue(point.value, "percent")]),
      );
      expect(chart.table.rows.map((row) => row.slice(0, 3))).toEqual(expected);
      expect(chart.table.columns).toEqual(["Series", "Week", "Share of time", "Plausible range"]);
      expect(count(markGroup(chart.svg.html, "points_marks"), /<path/g)).toBe(seriesCount * weekCount);
      // Each series is labelled in words, beside its own shape.
      expect(texts(markGroup(chart.svg.html, "labels_marks"))).toHaveLength(seriesCount);
    },
  );

  it("tells series apart by shape and dash as well as colour, with a direct label", async () => {
    const chart = await renderer.trend(trendOptions(4));
    const svg = chart.svg.html;
    const dashes = new Set(
      [...svg.matchAll(/mark-line[\s\S]*?stroke-dasharray="([^"]*)"/g)].map((m) => m[1]),
    );
    expect(dashes.size).toBe(4);
    const labelShapes = [...markGroup(svg, "label_symbols_marks").matchAll(/\sd="([^"]*)"/g)].map(
      (m) => m[1],
    );
    expect(new Set(labelShapes).size).toBe(4);
    expect(texts(markGroup(svg, "labels_marks")).sort()).toEqual(
      ["Fenwick Middle", "Grade 7", "Grade 8", "Larkmoor Unified"].sort(),
    );
    expect(new Set(SERIES_STYLES.map((style) => style.shape)).size).toBe(SERIES_STYLES.length);
    expect(new Set(SERIES_STYLES.map((style) => style.dash.join(","))).size).toBe(SERIES_STYLES.length);
  });

  it("keeps direct labels apart even when series end at the same value", async () => {
    const options = trendOptions(3);
    const same = {
      ...options,
      series: options.series.map((series) => ({
        ...series,
        points: series.points.map((point) => ({ ...point, value: 0.2, low: 0.15, high: 0.25 })),
      })),
    };
    const chart = await renderer.trend(same);
    const ys = [...markGroup(chart.svg.html, "labels_marks").matchAll(/translate\([^,]+,([\d.-]+)\)/g)].map(
      (m) => Number(m[1]),
    );
    expect(ys).toHaveLength(3);
    const sorted = [...ys].sort((a, b) => a - b);
    for (let i = 1; i < sorted.length; i++) expect(sorted[i]! - sorted[i - 1]!).toBeGreaterThanOrEqual(14);
  });

  it("rejects more series than it has styles for", async () => {
    expect.assertions(1);
    await expect(renderer.trend(trendOptions(SERIES_STYLES.length + 1))).rejects.toThrow(RangeError);
  });
});

describe("colour and contrast (WCAG 2.x contrast ratio via src/stats/contrast-ratio.ts)", () => {
  it("knows which Okabe–Ito colours reach 3:1 on white (graphical objects, SC 1.4.11)", () => {
    // Okabe & Ito (2008) palette; the split below is what the WCAG 2.x definition gives.
    const passing = Object.entries(OKABE_ITO)
      .filter(([, colour]) => contrastRatio(colour, BACKGROUND) >= 3)
      .map(([name]) => name)
      .sort();
    expect(passing).toEqual(["black", "blue", "bluishGreen", "reddishPurple", "vermillion"]);
  });

  it("uses only colours of 3:1 or more for marks and lines that carry meaning", () => {
    for (const colour of meaningfulMarkColours())
      expect(contrastRatio(colour, BACKGROUND)).toBeGreaterThanOrEqual(3);
    expect(meaningfulMarkColours().map((c) => c.toUpperCase())).not.toEqual(
      expect.arrayContaining([OKABE_ITO.skyBlue]),
    );
    expect(contrastRatio(TEXT_COLOUR, BACKGROUND)).toBeGreaterThanOrEqual(4.5);
  });

  it("renders marks at 3:1 (fill or outline) and text at 4.5:1, never sky blue or yellow", async () => {
    const charts = [
      await renderer.intervals(intervalOptions({ rows: makeRows(8) })),
      await renderer.trend(trendOptions(4)),
    ];
    for (const { svg } of charts) {
      const markup = svg.html;
      expect(markup.toUpperCase()).not.toContain(OKABE_ITO.skyBlue);
      expect(markup.toUpperCase()).not.toContain(OKABE_ITO.yellow);
      const textColours = [...markup.matchAll(/<text[^>]*fill="([^"]*)"/g)].map((m) => m[1] as string);
      expect(textColours.length).toBeGreaterThan(10);
      for (const colour of textColours) expect(contrastRatio(colour, BACKGROUND)).toBeGreaterThanOrEqual(4.5);
      const markNames = [
        "points_marks",
        "intervals_marks",
        "lines_marks",
        "label_symbols_marks",
        "key_symbols_marks",
      ];
      const marks = markNames.flatMap((name) => [
        ...markGroup(markup, name).matchAll(/<(?:path|line)\b[^>]*>/g),
      ]);
      expect(marks.length).toBeGreaterThan(10);
      for (const [mark] of marks) {
        // A mark passes when its fill or its outline reaches 3:1 (the "near" diamond: orange fill, black outline).
        const colours = [...mark.matchAll(/(?:fill|stroke)="(#[0-9a-fA-F]{6})"/g)].map((c) => c[1] as string);
        expect(colours.length).toBeGreaterThan(0);
        expect(Math.max(...colours.map((c) => contrastRatio(c, BACKGROUND)))).toBeGreaterThanOrEqual(3);
      }
    }
  });
});

describe("compiled once per chart kind", () => {
  it("reuses the compiled runtime: more charts, any format or guides, compile nothing new", async () => {
    // Warm every kind first (other tests in this file may already have done so).
    await renderer.intervals(intervalOptions({ scale: "log" }));
    await renderer.intervals(intervalOptions({ scale: "linear", format: "points", reference: undefined }));
    await renderer.trend(trendOptions(2));
    const warm = chartCompileCount();
    expect(warm).toBeGreaterThanOrEqual(3);
    for (let i = 0; i < 5; i++) {
      await renderer.intervals(
        intervalOptions({ id: `again-${i}`, rows: makeRows(i * 3), axisTitle: `Axis ${i}` }),
      );
      await renderer.intervals(
        intervalOptions({ scale: "linear", format: i % 2 ? "percent" : "points", line: undefined, rows: [] }),
      );
      await createChartRenderer().trend(trendOptions(i % 5));
    }
    expect(chartCompileCount()).toBe(warm);
  });
});

describe("views reused from one chart to the next", () => {
  it("give every chart, byte for byte, what a fresh view gives it alone", async () => {
    // A mixed sequence: both scales and every format, guides on and off, 0 to 40 rows, missing and
    // withheld rows, trends of 1 to 4 series and of fewer weeks. The reference for each chart is
    // the same chart rendered first, on a view made for it (no chart before it on that view).
    const charts: (() => Promise<Chart>)[] = [];
    for (let i = 0; i < 24; i++) {
      const rows = makeRows([12, 1, 0, 40, 5, 7][i % 6]!);
      const format = (["ratio", "percent", "points"] as const)[i % 3]!;
      const scale = format === "ratio" && i % 2 === 0 ? "log" : "linear";
      charts.push(() =>
        renderer.intervals(
          intervalOptions({
            id: `mixed-${i}`,
            rows,
            format,
            scale,
            axisTitle: `Axis ${i}`,
            ...(i % 4 === 1 ? { line: undefined } : {}),
            ...(i % 5 === 2 ? { reference: undefined } : {}),
          }),
        ),
      );
      if (i % 3 === 0) charts.push(() => renderer.trend(trendOptions(1 + (i % 4), 2 + (i % 5))));
    }
    forgetChartViews();
    const inSequence: string[] = [];
    for (const chart of charts) inSequence.push((await chart()).svg.html);
    for (const [i, chart] of charts.entries()) {
      forgetChartViews();
      expect((await chart()).svg.html, `chart ${i}`).toBe(inSequence[i]);
    }
    // Two charts at once get two views, and still their own output.
    forgetChartViews();
    const together = await Promise.all(charts.map((chart) => chart()));
    expect(together.map((c) => c.svg.html)).toEqual(inSequence);
  });
});
