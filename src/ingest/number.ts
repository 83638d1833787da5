/**
 * Decimal numbers read straight from bytes, giving exactly the double that `Number(text)` gives:
 * plain decimals of up to 15 significant digits are m / 10^k with m < 2^53 and k ≤ 22, both exact
 * in binary, so the one IEEE division is correctly rounded, as `Number` is. Anything else
 * (exponents, more digits, signs) goes through `Number` itself.
 */

/** Returned for an empty field (only spaces or nothing): "not estimated". */
export const EMPTY = Number.NEGATIVE_INFINITY;
/** Returned for text that is not a number (test with Number.isNaN). */
export const NOT_A_NUMBER = Number.NaN;

const POW10 = Array.from({ length: 23 }, (_, i) => 10 ** i);

export function parseNumber(buf: Uint8Array, start: number, end: number): number {
  while (start < end && buf[start] === 32) start++;
  while (end > start && buf[end - 1] === 32) end--;
  if (start === end) return EMPTY;
  let m = 0;
  let digitsSeen = 0;
  let fractionDigits = 0;
  let dot = false;
  let i = start;
  for (; i < end; i++) {
    const c = buf[i]!;
    if (c >= 48 && c <= 57) {
      m = m * 10 + (c - 48);
      digitsSeen++;
      if (dot) fractionDigits++;
    } else if (c === 46 && !dot) {
      dot = true;
    } else {
      break;
    }
  }
  if (i === end && digitsSeen > 0 && digitsSeen <= 15) return m / POW10[fractionDigits]!;
  const text = Buffer.from(buf.buffer, buf.byteOffset + start, end - start).toString("latin1");
  // Number() accepts forms a CSV cell should not carry as a probability ("0x1", "Infinity", "").
  if (!/^[+-]?(\d+\.?\d*|\.\d+)([eE][+-]?\d+)?$/.test(text)) return NOT_A_NUMBER;
  return Number(text);
}
