/**
 * Probabilities are summed as whole multiples of 1/SCALE (see session-accumulator.ts), so that sums
 * are exact integers and do not depend on the order of the rows.
 */
export const SCALE = 1e12;
