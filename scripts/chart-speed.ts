/**
 * Warm rendering speed of the interval chart: renders one chart to compile the spec, then 1000
 * charts of 12 rows each (new data every time), and prints charts per second. The target is 300
 * or more per second. Usage: tsx scripts/chart-speed.ts [charts]
 */
import { performance } from "node:perf_hooks";
import { chartCompileCount, createChartRenderer, type IntervalRow } from "../src/reports/charts.js";

const count = Number(process.argv[2] ?? 1000);
const renderer = createChartRenderer();
const markers = ["concern", "near", "typical", "withheld"] as const;

function rows(chart: number): IntervalRow[] {
  return Array.from({ length: 12 }, (_, i) => {
    const value = 0.6 + ((chart * 7 + i * 13) % 20) / 10;
    return {
      label: `Student ${chart}-${i}`,
      value: i === 5 ? null : value,
      low: i === 5 ? null : value / 1.4,
      high: i === 5 ? null : value * 1.4,
      marker: markers[i % markers.length] ?? "typical",
    };
  });
}

function options(chart: number) {
  return {
    id: `chart-${chart}`,
    title: `Boredom compared with classmates, chart ${chart}`,
    description:
      "Twelve invented students; each row shows a ratio to peers on the same units with its plausible range.",
    axisTitle: "Ratio to peers on the same units (log scale)",
    rows: rows(chart),
    format: "ratio" as const,
    scale: "log" as const,
    reference: { value: 1, label: "same as peers" },
    line: { value: 1.3, label: "check-in line" },
  };
}

await renderer.intervals(options(0));
const compiledBefore = chartCompileCount();
const start = performance.now();
let bytes = 0;
for (let chart = 1; chart <= count; chart++)
  bytes += (await renderer.intervals(options(chart))).svg.html.length;
const seconds = (performance.now() - start) / 1000;
process.stdout.write(
  `${count} interval charts (12 rows) warm in ${seconds.toFixed(2)} s: ${(count / seconds).toFixed(0)} charts per second; ` +
    `${(bytes / count / 1024).toFixed(1)} KiB per chart; specs compiled during the run: ${chartCompileCount() - compiledBefore}\n`,
);
