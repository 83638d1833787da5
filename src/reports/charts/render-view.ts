import { type Runtime, View } from "vega";
import { collectingLogger } from "./logger.js";

export interface ViewInput {
  readonly signals: Readonly<Record<string, unknown>>;
  /** Named datasets. Rows must be objects made for the view: vega tags the objects it ingests. */
  readonly data: Readonly<Record<string, readonly object[]>>;
}

/** A view kept for reuse, with the array its logger writes to. */
interface Kept {
  readonly view: View;
  readonly messages: string[];
  /** Whether a chart was rendered on the view. */
  used: boolean;
}

/**
 * Idle views by runtime and by the names of the signals and datasets set, so that a view is only
 * ever given the same names again. Views are taken while they render (two charts rendering at once
 * get two views) and put back after.
 */
const idle = new Map<Runtime, Map<string, Kept[]>>();
/** Idle views kept per runtime and names, at most. */
const KEEP = 4;

/** Drops the idle views (for tests: the next chart of each kind gets a fresh view). */
export function forgetChartViews(): void {
  for (const byNames of idle.values())
    for (const list of byNames.values()) for (const kept of list) kept.view.finalize();
  idle.clear();
}

/**
 * Renders one chart: a view over a shared runtime, with its data and signals swapped in, to an SVG
 * string. No renderer is attached (nothing to draw on screen); `toSVG` builds the markup. A view is
 * reused for the next chart with the same runtime and names: building one from the runtime (its
 * operators and expressions) was over half of a chart's time (294 → 700 charts a second, warm).
 * Before the next chart the view is emptied (its datasets and list signals set empty, and run) and
 * every signal and dataset the names list is set anew; the specs re-fit their size on every run
 * (autosize resize). So nothing of the previous chart remains: the same bytes as a fresh view's
 * (tests/reports/charts.test.ts). Throws if vega logged a warning or error, so that no
 * questionable chart reaches a page; a view that did is not reused.
 */
export async function renderSvg(runtime: Runtime, input: ViewInput): Promise<string> {
  const names = `${Object.keys(input.signals).join(",")}|${Object.keys(input.data).join(",")}`;
  let byNames = idle.get(runtime);
  if (byNames === undefined) {
    byNames = new Map();
    idle.set(runtime, byNames);
  }
  let list = byNames.get(names);
  if (list === undefined) {
    list = [];
    byNames.set(names, list);
  }
  let kept = list.pop();
  if (kept === undefined) {
    const messages: string[] = [];
    const view = new View(runtime, { renderer: "none", logger: collectingLogger(messages) });
    kept = { view, messages, used: false };
  }
  const { view, messages } = kept;
  if (kept.used) {
    // Empty the previous chart's marks first: items that stayed would keep their place in the
    // markup, so the chart's bytes would depend on the chart before it.
    for (const name of Object.keys(input.data)) view.data(name, []);
    for (const [name, value] of Object.entries(input.signals))
      if (Array.isArray(value)) view.signal(name, []);
    await view.runAsync();
  }
  kept.used = true;
  messages.length = 0;
  let reusable = false;
  try {
    for (const [name, value] of Object.entries(input.signals)) view.signal(name, value as never);
    for (const [name, rows] of Object.entries(input.data)) view.data(name, rows);
    const svg = await view.toSVG();
    if (messages.length > 0) throw new Error(`chart rendered with warnings: ${messages.join("; ")}`);
    reusable = true;
    return svg;
  } finally {
    if (reusable && list.length < KEEP) list.push(kept);
    else view.finalize();
  }
}
