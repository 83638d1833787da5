import fc from "fast-check";
import jStat from "jstat";
import { describe, expect, it } from "vitest";
import { clusterBootstrap } from "../../src/stats/cluster-bootstrap.js";
import { percentileBootstrap } from "../../src/stats/percentile-bootstrap.js";
import { quantile } from "../../src/stats/quantile.js";
import { createRandom } from "../../src/stats/random.js";
import { expectClose } from "./close.js";

const mean = (values: readonly number[]) => values.reduce((s, v) => s + v, 0) / values.length;

describe("quantile (Hyndman & Fan 1996, type 7)", () => {
  it("matches jstat 1.9.6 jStat.quantiles with alphap = betap = 1 (type 7) on random samples (1e-12)", () => {
    fc.assert(
      fc.property(
        fc.array(fc.double({ min: -1e3, max: 1e3, noNaN: true }), { minLength: 2, maxLength: 60 }),
        fc.double({ min: 0, max: 1, noNaN: true }),
        (values, p) => {
          const copy = [...values];
          expectClose(quantile(values, p), jStat.quantiles(values, [p], 1, 1)[0]!, { abs: 1e-9, rel: 1e-12 });
          expect(values).toEqual(copy);
        },
      ),
      { numRuns: 300, seed: 1996 },
    );
  });

  it("gives the textbook values for 1, 2, 3, 4 (R quantile type 7 documentation [mem])", () => {
    expect(quantile([4, 1, 3, 2], 0.5)).toBe(2.5);
    expect(quantile([1, 2, 3, 4], 0.25)).toBe(1.75);
    expect(quantile([7], 0.3)).toBe(7);
    expect(() => quantile([], 0.5)).toThrow(RangeError);
  });
});

describe("percentileBootstrap (Efron 1979)", () => {
  const data = Object.freeze(Array.from({ length: 200 }, (_, i) => Math.sin(i * 12.9898) * 10));
  const indices = Object.freeze(data.map((_, i) => i));
  const statistic = (ix: readonly number[]) => mean(ix.map((i) => data[i]!));

  it("reports the type 7 quantiles of its replicate distribution (checked with jstat 1.9.6; 1e-12)", () => {
    const result = percentileBootstrap({ indices, statistic, random: createRandom(11), replicates: 999 });
    expect(result.distribution.length).toBe(999);
    expect(result.failedReplicates).toBe(0);
    expectClose(result.lower, jStat.quantiles([...result.distribution], [0.025], 1, 1)[0]!, { abs: 1e-12 });
    expectClose(result.upper, jStat.quantiles([...result.distribution], [0.975], 1, 1)[0]!, { abs: 1e-12 });
    expectClose(result.estimate, mean(data), { abs: 1e-12 });
  });

  it("approximates the normal-theory interval for a mean (Efron & Tibshirani 1993, ch. 13; within 15% of the half-width)", () => {
    const result = percentileBootstrap({ indices, statistic, random: createRandom(5), replicates: 2000 });
    const m = mean(data);
    const sd = Math.sqrt(data.reduce((s, v) => s + (v - m) ** 2, 0) / data.length);
    const halfWidth = (1.959963984540054 * sd) / Math.sqrt(data.length);
    expectClose(result.lower, m - halfWidth, { abs: 0.15 * halfWidth });
    expectClose(result.upper, m + halfWidth, { abs: 0.15 * halfWidth });
  });

  it("draws uniformly with replacement: for n = 2 the resample mean is 0, ½, 1 with chances ¼, ½, ¼ (exact bootstrap distribution; ±5 binomial SD)", () => {
    const two = [0, 1];
    const result = percentileBootstrap({
      indices: [0, 1],
      statistic: (ix) => mean(ix.map((i) => two[i]!)),
      random: createRandom(3),
      replicates: 4000,
    });
    const share = (v: number) => result.distribution.filter((x) => x === v).length / 4000;
    const sd = (p: number) => Math.sqrt((p * (1 - p)) / 4000);
    expectClose(share(0), 0.25, { abs: 5 * sd(0.25) });
    expectClose(share(0.5), 0.5, { abs: 5 * sd(0.5) });
    expectClose(share(1), 0.25, { abs: 5 * sd(0.25) });
  });

  it("is reproducible with the same seed and differs with another", () => {
    const run = (seed: number) =>
      percentileBootstrap({ indices, statistic, random: createRandom(seed), replicates: 200 });
    expect(run(42)).toEqual(run(42));
    expect(run(42).distribution).not.toEqual(run(43).distribution);
  });

  it("leaves out and counts replicates where the statistic is not finite", () => {
    // The statistic is undefined (NaN) unless index 0 was drawn; for n = 3 that happens with
    // chance (2/3)³ = 8/27 per replicate.
    const result = percentileBootstrap({
      indices: [0, 1, 2],
      statistic: (ix) => (ix.includes(0) ? ix.length : Number.NaN),
      random: createRandom(8),
      replicates: 2700,
    });
    expectClose(result.failedReplicates / 2700, 8 / 27, {
      abs: 5 * Math.sqrt(((8 / 27) * (19 / 27)) / 2700),
    });
    expect(result.distribution.length + result.failedReplicates).toBe(2700);
  });

  it("rejects bad arguments", () => {
    const random = createRandom(1);
    expect(() => percentileBootstrap({ indices: [], statistic, random })).toThrow(RangeError);
    expect(() => percentileBootstrap({ indices, statistic, random, replicates: 0 })).toThrow(RangeError);
    expect(() => percentileBootstrap({ indices, statistic, random, level: 1.2 })).toThrow(RangeError);
    expect(() => percentileBootstrap({ indices, statistic: () => Number.NaN, random })).toThrow(RangeError);
  });
});

describe("clusterBootstrap (Davison & Hinkley 1997, §3.8)", () => {
  it("draws whole clusters: with sizes 3 and 1, resample sizes 6, 4, 2 occur with chances ¼, ½, ¼ (±5 binomial SD)", () => {
    const result = clusterBootstrap({
      clusters: [[0, 1, 2], [3]],
      statistic: (ix) => ix.length,
      random: createRandom(21),
      replicates: 4000,
    });
    const share = (v: number) => result.distribution.filter((x) => x === v).length / 4000;
    const sd = (p: number) => Math.sqrt((p * (1 - p)) / 4000);
    expectClose(share(6), 0.25, { abs: 5 * sd(0.25) });
    expectClose(share(4), 0.5, { abs: 5 * sd(0.5) });
    expectClose(share(2), 0.25, { abs: 5 * sd(0.25) });
    expect(result.estimate).toBe(4);
  });

  it("keeps each cluster's indices together", () => {
    const clusters = [
      [0, 1],
      [2, 3],
      [4, 5],
    ];
    const seen: number[][] = [];
    clusterBootstrap({
      clusters,
      statistic: (ix) => {
        seen.push([...ix]);
        return 0;
      },
      random: createRandom(4),
      replicates: 50,
    });
    for (const drawn of seen) {
      expect(drawn.length).toBe(6);
      for (let k = 0; k < drawn.length; k += 2) expect(drawn[k + 1]).toBe(drawn[k]! + 1);
    }
  });

  it("is wider than the observation bootstrap when observations within a cluster are alike", () => {
    // 10 clusters of 20 identical values: the observation bootstrap sees 200 independent values.
    const values = Array.from({ length: 200 }, (_, i) => Math.floor(i / 20));
    const clusters = Array.from({ length: 10 }, (_, c) => Array.from({ length: 20 }, (_, j) => c * 20 + j));
    const statistic = (ix: readonly number[]) => mean(ix.map((i) => values[i]!));
    const byCluster = clusterBootstrap({ clusters, statistic, random: createRandom(9), replicates: 1000 });
    const byObservation = percentileBootstrap({
      indices: values.map((_, i) => i),
      statistic,
      random: createRandom(9),
      replicates: 1000,
    });
    expect(byCluster.upper - byCluster.lower).toBeGreaterThan(
      3 * (byObservation.upper - byObservation.lower),
    );
  });

  it("rejects an empty cluster list", () => {
    expect(() => clusterBootstrap({ clusters: [], statistic: () => 1, random: createRandom(1) })).toThrow(
      RangeError,
    );
  });
});
