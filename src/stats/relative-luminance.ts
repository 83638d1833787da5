/**
 * WCAG 2.x relative luminance of an sRGB colour given as hex.
 *
 * Definition: the brightness of a colour relative to white (0 for black, 1 for white), from its
 * linearised red, green and blue channels: L = 0.2126·R + 0.7152·G + 0.0722·B, where each channel
 * c = value/255 is linearised as c/12.92 if c ≤ 0.03928, else ((c + 0.055)/1.055)^2.4.
 *
 * Variant: the WCAG 2.0/2.1/2.2 definition with the threshold 0.03928 as printed there (the sRGB
 * standard's 0.04045 gives identical results for 8-bit colours, since no 8-bit value falls between
 * the two). Accepts "#rgb" or "#rrggbb" (the "#" optional, any case); no alpha, no colour names.
 *
 * Fails when: the string is not 3 or 6 hexadecimal digits (RangeError) or not a string
 * (TypeError).
 *
 * Example: `relativeLuminance("#ffffff")` = 1; `relativeLuminance("#767676")` ≈ 0.18116.
 *
 * Source: W3C (2008, 2023), Web Content Accessibility Guidelines 2.0 / 2.2, definition of
 * "relative luminance"; IEC 61966-2-1:1999 (sRGB).
 */
export function relativeLuminance(color: string): number {
  const [r, g, b] = parseHexColor(color);
  return 0.2126 * linearise(r) + 0.7152 * linearise(g) + 0.0722 * linearise(b);
}

/** Parses "#rgb" or "#rrggbb" into 0–255 channel values. */
export function parseHexColor(color: string): [number, number, number] {
  if (typeof color !== "string") throw new TypeError(`color must be a hex string, got ${typeof color}`);
  const hex = color.trim().replace(/^#/, "");
  if (!/^(?:[0-9a-f]{3}|[0-9a-f]{6})$/i.test(hex)) {
    throw new RangeError(`color must be "#rgb" or "#rrggbb" hexadecimal, got ${JSON.stringify(color)}`);
  }
  const full = hex.length === 3 ? [...hex].map((d) => d + d).join("") : hex;
  return [0, 2, 4].map((i) => Number.parseInt(full.slice(i, i + 2), 16)) as [number, number, number];
}

function linearise(channel: number): number {
  const c = channel / 255;
  return c <= 0.03928 ? c / 12.92 : ((c + 0.055) / 1.055) ** 2.4;
}
