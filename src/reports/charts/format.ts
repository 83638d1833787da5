/**
 * How chart values are written in data tables and axis labels.
 *
 * - ratio: two significant digits without trailing zeros ("2.1", "0.46", "0.9", "2", "12"); values
 *   of 100 and more are rounded to a whole number.
 * - percent: a share as a percentage, one decimal below 10% ("3.4%"), whole above ("23%").
 * - points: a difference of shares in percentage points, signed, one decimal ("+3.4", "−1.2"):
 *   minutes in every 100.
 *
 * Negative numbers use the minus sign U+2212, as the axis labels do (d3-format's default).
 */
export type ValueFormat = "ratio" | "percent" | "points";

const MINUS = "\u2212";

function signed(text: string): string {
  return text.startsWith("-") ? `${MINUS}${text.slice(1)}` : text;
}

const TWO_SIGNIFICANT = new Intl.NumberFormat("en-US", { maximumSignificantDigits: 2, useGrouping: false });
const WHOLE = new Intl.NumberFormat("en-US", { maximumFractionDigits: 0, useGrouping: false });

function isZeroText(text: string): boolean {
  return /^-?0(\.0*)?$/.test(text);
}

export function formatValue(value: number, format: ValueFormat): string {
  if (!Number.isFinite(value)) throw new RangeError(`chart value must be a finite number, got ${value}`);
  switch (format) {
    case "ratio":
      if (value === 0) return "0";
      return signed((Math.abs(value) >= 100 ? WHOLE : TWO_SIGNIFICANT).format(value));
    case "percent": {
      const percent = value * 100;
      const text = percent.toFixed(Math.abs(percent) < 9.95 ? 1 : 0);
      return `${isZeroText(text) ? text.replace("-", "") : signed(text)}%`;
    }
    case "points": {
      const text = (value * 100).toFixed(1);
      if (isZeroText(text)) return "0.0";
      return value > 0 ? `+${text}` : signed(text);
    }
  }
}

/** "1.6 to 2.7"; "1.8 or more" with no upper end (+∞); "not available" when either end is missing. */
export function formatRange(low: number | null, high: number | null, format: ValueFormat): string {
  if (low === null || high === null) return "not available";
  if (high === Number.POSITIVE_INFINITY) return `${formatValue(low, format)} or more`;
  return `${formatValue(low, format)} to ${formatValue(high, format)}`;
}

const AXIS_LABEL: Readonly<Record<ValueFormat, string>> = {
  ratio: "format(datum.value, '.3~g')",
  percent: "format(datum.value, '.1~%')",
  points: "abs(datum.value) < 1e-9 ? '0' : format(datum.value * 100, '+.1~f')",
};

/**
 * The vega expression that writes an axis tick (`datum.value`) in the style named by the signal
 * `formatSignal`; tick values are round numbers, so trailing zeros are dropped ("0.5", "25%", "+10").
 * The format is a signal so that one compiled chart serves all three formats.
 */
export function axisLabelExpression(formatSignal: string): string {
  return `${formatSignal} === 'percent' ? ${AXIS_LABEL.percent} : ${formatSignal} === 'points' ? (${AXIS_LABEL.points}) : ${AXIS_LABEL.ratio}`;
}
