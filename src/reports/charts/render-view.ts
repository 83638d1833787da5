import { type Runtime, View } from "vega";
import { collectingLogger } from "./logger.js";

export interface ViewInput {
  readonly signals: Readonly<Record<string, unknown>>;
  /** Named datasets. Rows must be objects made for the view: vega tags the objects it ingests. */
  readonly data: Readonly<Record<string, readonly object[]>>;
}

/**
 * Renders one chart: a fresh view over a shared runtime, with its data and signals swapped in,
 * to an SVG string. No renderer is attached (nothing to draw on screen); `toSVG` builds the markup.
 * Throws if vega logged a warning or error, so that no questionable chart reaches a page.
 */
export async function renderSvg(runtime: Runtime, input: ViewInput): Promise<string> {
  const messages: string[] = [];
  const view = new View(runtime, { renderer: "none", logger: collectingLogger(messages) });
  try {
    for (const [name, value] of Object.entries(input.signals)) view.signal(name, value as never);
    for (const [name, rows] of Object.entries(input.data)) view.data(name, rows);
    const svg = await view.toSVG();
    if (messages.length > 0) throw new Error(`chart rendered with warnings: ${messages.join("; ")}`);
    return svg;
  } finally {
    view.finalize();
  }
}
