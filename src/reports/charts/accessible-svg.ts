/**
 * Turns vega's SVG into an accessible, self-contained image:
 * - `<title>` and `<desc>` become the first children of the root `<svg>`;
 * - the root gets `role="img"` and `aria-labelledby` naming both, with ids made unique on the page
 *   by the caller's prefix;
 * - the unused xlink namespace declaration is dropped, so the markup names no URL other than the
 *   SVG namespace.
 */
const ID_PATTERN = /^[A-Za-z][A-Za-z0-9_-]*$/;

const XML_ENTITIES: Readonly<Record<string, string>> = {
  "&": "&amp;",
  "<": "&lt;",
  ">": "&gt;",
  '"': "&quot;",
  "'": "&apos;",
};

export function escapeXml(text: string): string {
  return text.replace(/[&<>"']/g, (c) => XML_ENTITIES[c] as string);
}

export function checkChartId(id: string): void {
  if (!ID_PATTERN.test(id)) {
    throw new RangeError(
      `chart id must start with a letter and hold only letters, digits, "-" and "_"; got "${id}"`,
    );
  }
}

export interface SvgLabels {
  readonly id: string;
  readonly title: string;
  readonly description: string;
}

/** Attributes vega may set on the root that would compete with role="img". */
const ROOT_ARIA = /\s(?:role|aria-[a-z]+)="[^"]*"/g;
const XLINK_DECLARATION = ' xmlns:xlink="http://www.w3.org/1999/xlink"';

export function labelSvg(svg: string, labels: SvgLabels): string {
  checkChartId(labels.id);
  const end = svg.indexOf(">");
  if (!svg.startsWith("<svg ") || end < 0) throw new Error("vega did not return an <svg> element");
  // Inside role="img" every child is presentational: roles vega still puts on some mark groups
  // (graphics-symbol without a name) would be reported as images without text (axe svg-img-alt).
  const body = svg.slice(end + 1).replace(ROOT_ARIA, "");
  let root = svg.slice(0, end).replace(ROOT_ARIA, "");
  if (!body.includes("xlink:")) root = root.replace(XLINK_DECLARATION, "");
  const titleId = `${labels.id}-title`;
  const descId = `${labels.id}-desc`;
  return (
    `${root} role="img" aria-labelledby="${titleId} ${descId}">` +
    `<title id="${titleId}">${escapeXml(labels.title)}</title>` +
    `<desc id="${descId}">${escapeXml(labels.description)}</desc>` +
    body
  );
}
