import { relativeLuminance } from "./relative-luminance.js";

/**
 * WCAG 2.x contrast ratio between two colours.
 *
 * Definition: (L₁ + 0.05)/(L₂ + 0.05), where L₁ is the relative luminance of the lighter colour and
 * L₂ of the darker; from 1 (no contrast) to 21 (black on white). WCAG level AA asks for at least
 * 4.5 for normal text, 3 for large text and for graphical objects; level AAA asks for 7.
 *
 * Variant: WCAG 2.0–2.2 (not the APCA contrast of the WCAG 3 drafts); order of the arguments does
 * not matter. Unrounded: compare with thresholds without rounding up (4.48 fails 4.5).
 *
 * Fails when: a colour is not "#rgb" or "#rrggbb" hex (RangeError/TypeError).
 *
 * Example: `contrastRatio("#767676", "#ffffff")` ≈ 4.542225 (the lightest grey that passes AA on
 * white); `contrastRatio("#000", "#fff")` = 21.
 *
 * Source: W3C (2008, 2023), Web Content Accessibility Guidelines 2.0 / 2.2, definition of
 * "contrast ratio" and Success Criteria 1.4.3, 1.4.6 and 1.4.11.
 */
export function contrastRatio(foreground: string, background: string): number {
  const a = relativeLuminance(foreground);
  const b = relativeLuminance(background);
  return (Math.max(a, b) + 0.05) / (Math.min(a, b) + 0.05);
}
