/**
 * Result shapes shared by several methods in this folder.
 */

/** A two-sided confidence interval around a point estimate. */
export interface Interval {
  /** The point estimate the interval belongs to. */
  readonly estimate: number;
  /** Lower limit. */
  readonly lower: number;
  /** Upper limit. */
  readonly upper: number;
  /** Two-sided confidence level, for example 0.95. */
  readonly level: number;
}
