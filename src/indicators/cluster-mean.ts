import type { Cell } from "./collect.js";

/**
 * The mean detector signal over clusters of windows (a student's sessions, or a group's students),
 * with the pieces its variance is built from:
 * - the cluster-robust variance of the ratio mean m = Σs/Σn over k clusters,
 *   V_cl = k/(k − 1)·Σ(s_j − m·n_j)²/N² (the linearisation variance of a ratio estimator;
 *   Cochran 1977, Sampling Techniques, §6.3, with the k/(k − 1) small-sample factor), used for groups;
 * - the windows-as-independent variance V_srs = (Σs²/N − m²)/N and the cluster size weighted by
 *   windows M = Σn_j²/N, for Kish's design effect 1 + (M − 1)ρ (observedMean, pooledCorrelation).
 */
export interface ClusterMean {
  readonly n: number;
  readonly mean: number;
  /** Variance of the mean. */
  readonly variance: number;
  readonly degreesOfFreedom: number;
  readonly clusters: number;
}

export interface ClusterParts {
  readonly n: number;
  readonly mean: number;
  /** Windows-as-independent variance of the mean. */
  readonly srs: number;
  /** Cluster-robust variance of the mean (0 with one cluster). */
  readonly robust: number;
  /** Σn_j²/N. */
  readonly meanClusterSize: number;
  readonly clusters: number;
}

/** Floor for a window-level variance, so that a constant signal (all 0) still gets an interval. */
const MIN_WINDOW_VARIANCE = 1e-6;

export function clusterParts(cells: Iterable<Cell>): ClusterParts {
  let n = 0;
  let s = 0;
  let s2 = 0;
  let nn = 0;
  let k = 0;
  const list: Cell[] = [];
  for (const c of cells) {
    if (c.n <= 0) continue;
    list.push(c);
    n += c.n;
    s += c.s;
    s2 += c.s2;
    nn += c.n * c.n;
    k++;
  }
  const mean = n > 0 ? s / n : 0;
  const windowVariance = Math.max(MIN_WINDOW_VARIANCE, s2 / Math.max(n, 1) - mean * mean);
  let robust = 0;
  if (k > 1) {
    let sum = 0;
    for (const c of list) {
      const r = c.s - mean * c.n;
      sum += r * r;
    }
    robust = ((k / (k - 1)) * sum) / (n * n);
  }
  return {
    n,
    mean,
    srs: windowVariance / Math.max(n, 1),
    robust,
    meanClusterSize: n > 0 ? nn / n : 0,
    clusters: k,
  };
}

/**
 * The mean signal of the windows a subject was observed in, with the variance of how the detector
 * read them: the estimand is the share of the observed time, so what is uncertain is the detector's
 * reading of those windows, not what the subject might do in other sessions.
 *   Var(m) = σ²(π̂)/N · (1 + (M − 1)ρ)
 * with σ²(π̂) the detector's noise per window at the estimated share (correction.ts) and Kish's
 * design effect for sessions as clusters, ρ being the within-session correlation of the signal
 * pooled over all students (it also holds persistence of the state itself, so it is an upper
 * bound for the correlation of the detector's errors: the interval errs on the wide side).
 * In relative mode (no noise figures) the window variance is the data's own spread around m.
 */
export function observedMean(
  parts: ClusterParts,
  correlation: number,
  noiseVariance: number | null,
): ClusterMean {
  const window = noiseVariance ?? parts.srs * Math.max(parts.n, 1);
  const variance =
    (window / Math.max(parts.n, 1)) * (1 + Math.max(0, parts.meanClusterSize - 1) * correlation);
  return {
    n: parts.n,
    mean: parts.mean,
    variance,
    degreesOfFreedom: Number.POSITIVE_INFINITY,
    clusters: parts.clusters,
  };
}

/**
 * ρ pooled over units with at least two clusters: each unit's design effect V_cl/V_srs gives
 * ρ_i = (V_cl/V_srs − 1)/(M − 1); they are averaged with weights k − 1 (their degrees of freedom)
 * and the result is kept within [0, 1]. Returns 0 when no unit has two clusters of more than one
 * window (then the model is windows as independent, and the own variance still enters).
 */
export function pooledCorrelation(all: Iterable<ClusterParts>): number {
  let num = 0;
  let den = 0;
  for (const p of all) {
    if (p.clusters < 2 || p.meanClusterSize <= 1 || p.srs <= 0) continue;
    const rho = (p.robust / p.srs - 1) / (p.meanClusterSize - 1);
    num += (p.clusters - 1) * rho;
    den += p.clusters - 1;
  }
  return den > 0 ? Math.min(1, Math.max(0, num / den)) : 0;
}
