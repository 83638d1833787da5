/**
 * log1p(t) − t for t > −1, without the cancellation of subtracting two nearly equal numbers when
 * t is small: for |t| < 0.1 the Maclaurin series −t²/2 + t³/3 − t⁴/4 + … (to 1e-17), otherwise
 * directly. Used to form the prefactors of the incomplete beta and gamma functions for large shapes.
 *
 * Source: Abramowitz & Stegun (1964), Handbook of Mathematical Functions, 4.1.24.
 */
export function log1pMinusX(t: number): number {
  if (Math.abs(t) >= 0.1) return Math.log1p(t) - t;
  let power = t * t;
  let sum = 0;
  for (let k = 2; k <= 20; k++) {
    const term = power / k;
    sum += k % 2 === 0 ? -term : term;
    if (Math.abs(term) < 1e-17 * Math.abs(sum)) break;
    power *= t;
  }
  return sum;
}
