import { type BootstrapInterval, type IndexStatistic, runBootstrap } from "./percentile-bootstrap.js";
import type { Random } from "./random.js";

/** Options of `clusterBootstrap`. */
export interface ClusterBootstrapOptions {
  /** The observation indices of each cluster (for example the windows of each student); at least one cluster. */
  readonly clusters: readonly (readonly number[])[];
  /** The statistic, computed from the concatenated indices of the resampled clusters. */
  readonly statistic: IndexStatistic;
  /** Seeded generator (from `createRandom`); its stream is consumed. */
  readonly random: Random;
  /** Number of bootstrap replicates B; default 2000. */
  readonly replicates?: number;
  /** Two-sided confidence level; default 0.95. */
  readonly level?: number;
}

/**
 * Cluster (block) bootstrap percentile interval: resample whole clusters, not observations.
 *
 * Definition: when observations come in correlated groups (windows within a session, sessions
 * within a student, students within a class), resampling single observations understates the
 * variance. Here each replicate draws as many clusters as there are, with replacement, keeps every
 * observation of each drawn cluster, and computes the statistic on the union; the interval is
 * the percentile interval of the replicates.
 *
 * Variant: one-stage cluster resampling (Davison & Hinkley 1997, §3.8: resample
 * clusters, keep their contents intact), percentile interval with type 7 quantiles. A cluster drawn
 * twice contributes its indices twice. Replicates with a non-finite statistic are left out and
 * counted.
 *
 * Fails when: there are no clusters, replicates is not a whole number ≥ 1, level is not in (0, 1),
 * the statistic is not finite on the original data or on every resample (RangeError/TypeError).
 * With few clusters (under about 20) the interval is too narrow.
 *
 * Example: `clusterBootstrap({ clusters: [[0, 1, 2], [3, 4], [5]], statistic, random: createRandom(7) })`.
 *
 * Source: A. C. Davison & D. V. Hinkley (1997), Bootstrap Methods and their Application,
 * Cambridge University Press, §3.8; C. A. Field & A. H. Welsh (2007), "Bootstrapping clustered
 * data", JRSS B 69:369–390.
 */
export function clusterBootstrap(options: ClusterBootstrapOptions): BootstrapInterval {
  const { clusters, statistic, random } = options;
  if (!Array.isArray(clusters) || clusters.length === 0) {
    throw new RangeError("clusters must be a non-empty array of index lists");
  }
  clusters.forEach((cluster, i) => {
    if (!Array.isArray(cluster)) throw new TypeError(`clusters[${i}] must be an array of indices`);
  });
  return runBootstrap({
    statistic,
    random,
    replicates: options.replicates ?? 2000,
    level: options.level ?? 0.95,
    original: clusters.flat(),
    resample: () => {
      const drawn: number[] = [];
      for (let c = 0; c < clusters.length; c++) {
        for (const index of clusters[random.int(clusters.length)]!) drawn.push(index);
      }
      return drawn;
    },
  });
}
