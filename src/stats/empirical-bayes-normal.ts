import { assertFiniteArray, assertPositive } from "./validate.js";

/** Options of `empiricalBayesNormal`. */
export interface EmpiricalBayesNormalOptions {
  /** Raw estimates yᵢ (k ≥ 2). */
  readonly estimates: readonly number[];
  /** Their known sampling variances vᵢ (> 0), same order. */
  readonly variances: readonly number[];
  /** How τ² is estimated: "reml" (default) or "moments" (DerSimonian–Laird). */
  readonly method?: "reml" | "moments";
  /** Largest number of REML iterations; default 500. */
  readonly maxIterations?: number;
  /** REML stops when τ² changes by less than this (absolute); default 1e-10. */
  readonly tolerance?: number;
}

/** Fitted normal–normal model and the shrunken estimates. */
export interface EmpiricalBayesNormal {
  /** Precision-weighted mean μ̂ = Σwᵢyᵢ/Σwᵢ, wᵢ = 1/(vᵢ + τ̂²). */
  readonly mean: number;
  /** Standard error of μ̂, (Σwᵢ)^(−½). */
  readonly meanStandardError: number;
  /** Between-unit variance τ̂² (≥ 0). */
  readonly tau2: number;
  /** Shrunken estimates θ̂ᵢ = μ̂ + (1 − Bᵢ)(yᵢ − μ̂), input order. */
  readonly shrunk: readonly number[];
  /** Shrinkage weights Bᵢ = vᵢ/(vᵢ + τ̂²) toward the mean (1 = fully pooled). */
  readonly shrinkage: readonly number[];
  /** Posterior variances vᵢ(1 − Bᵢ) + Bᵢ²·SE(μ̂)². */
  readonly posteriorVariances: readonly number[];
  readonly method: "reml" | "moments";
  /** REML iterations used (0 for moments). */
  readonly iterations: number;
  /** False when REML hit the iteration limit. */
  readonly converged: boolean;
}

/**
 * Empirical-Bayes shrinkage of estimates with unequal known variances (the normal–normal model).
 *
 * Definition: each raw estimate yᵢ ~ N(θᵢ, vᵢ) with known vᵢ, and the true values θᵢ ~ N(μ, τ²).
 * With μ and τ² estimated from all units, the best guess of θᵢ is
 *   θ̂ᵢ = μ̂ + (1 − Bᵢ)(yᵢ − μ̂),  Bᵢ = vᵢ/(vᵢ + τ̂²):
 * noisy estimates (large vᵢ) are pulled strongly toward the overall mean, precise ones hardly.
 *
 * Variant: τ² by restricted maximum likelihood (default; the fixed-point iteration
 *   τ² ← max(0, Σwᵢ²((yᵢ − μ̂)² − vᵢ)/Σwᵢ² + 1/Σwᵢ), wᵢ = 1/(vᵢ + τ²),
 * started from the moment estimate) or by the DerSimonian–Laird method of moments
 *   τ² = max(0, (Q − (k − 1))/(Σwᵢ − Σwᵢ²/Σwᵢ)), wᵢ = 1/vᵢ, Q = Σwᵢ(yᵢ − ȳ_w)².
 * Posterior variances include Morris's (1983) term Bᵢ²·Var(μ̂) for the estimated mean; they do not
 * include the uncertainty of τ̂², so they are slightly too small when k is small.
 *
 * Fails when: fewer than 2 estimates, lengths differ, a value is not finite, or a variance is not
 * positive (RangeError/TypeError). With few units (k < 5) τ̂² is often 0, which pools everything;
 * report it as such.
 *
 * Example: the 13 BCG vaccine trials (log relative risks, Colditz et al. 1994) give τ̂² = 0.3088 and
 * μ̂ = −0.7141 by moments, τ̂² = 0.3132 and μ̂ = −0.7145 by REML:
 * `empiricalBayesNormal({ estimates: logRr, variances: v, method: "moments" })`.
 *
 * Source: C. N. Morris (1983), "Parametric empirical Bayes inference: theory and applications",
 * JASA 78:47–55; R. DerSimonian & N. Laird (1986), "Meta-analysis in clinical trials", Controlled
 * Clinical Trials 7:177–188; W. Viechtbauer (2005), "Bias and efficiency of meta-analytic variance
 * estimators in the random-effects model", Journal of Educational and Behavioral Statistics
 * 30:261–293 (REML iteration).
 */
export function empiricalBayesNormal(options: EmpiricalBayesNormalOptions): EmpiricalBayesNormal {
  const { estimates, variances } = options;
  const method = options.method ?? "reml";
  const maxIterations = options.maxIterations ?? 500;
  const tolerance = options.tolerance ?? 1e-10;
  assertFiniteArray("estimates", estimates);
  assertFiniteArray("variances", variances);
  for (const [i, v] of variances.entries()) assertPositive(`variances[${i}]`, v);
  if (estimates.length !== variances.length) {
    throw new RangeError(
      `estimates and variances must have the same length, got ${estimates.length} and ${variances.length}`,
    );
  }
  if (estimates.length < 2) throw new RangeError(`need at least 2 estimates, got ${estimates.length}`);
  if (method !== "reml" && method !== "moments") {
    throw new RangeError(`method must be "reml" or "moments", got ${JSON.stringify(method)}`);
  }
  assertPositive("maxIterations", maxIterations);
  assertPositive("tolerance", tolerance);

  let tau2 = momentEstimate(estimates, variances);
  let iterations = 0;
  let converged = true;
  if (method === "reml") {
    converged = false;
    while (iterations < maxIterations) {
      iterations++;
      const next = remlStep(estimates, variances, tau2);
      const change = Math.abs(next - tau2);
      tau2 = next;
      if (change < tolerance) {
        converged = true;
        break;
      }
    }
  }
  const { mean, sumWeights } = weightedMean(estimates, variances, tau2);
  const meanVariance = 1 / sumWeights;
  const shrinkage = variances.map((v) => v / (v + tau2));
  return {
    mean,
    meanStandardError: Math.sqrt(meanVariance),
    tau2,
    shrunk: estimates.map((y, i) => mean + (1 - shrinkage[i]!) * (y - mean)),
    shrinkage,
    posteriorVariances: variances.map((v, i) => {
      const b = shrinkage[i]!;
      return v * (1 - b) + b * b * meanVariance;
    }),
    method,
    iterations,
    converged,
  };
}

function weightedMean(
  estimates: readonly number[],
  variances: readonly number[],
  tau2: number,
): { mean: number; sumWeights: number } {
  let sumWeights = 0;
  let sum = 0;
  for (let i = 0; i < estimates.length; i++) {
    const w = 1 / (variances[i]! + tau2);
    sumWeights += w;
    sum += w * estimates[i]!;
  }
  return { mean: sum / sumWeights, sumWeights };
}

/** DerSimonian–Laird moment estimate of τ². */
function momentEstimate(estimates: readonly number[], variances: readonly number[]): number {
  const { mean, sumWeights } = weightedMean(estimates, variances, 0);
  let q = 0;
  let sumSquaredWeights = 0;
  for (let i = 0; i < estimates.length; i++) {
    const w = 1 / variances[i]!;
    q += w * (estimates[i]! - mean) ** 2;
    sumSquaredWeights += w * w;
  }
  const denominator = sumWeights - sumSquaredWeights / sumWeights;
  return Math.max(0, (q - (estimates.length - 1)) / denominator);
}

/** One step of the REML fixed-point iteration. */
function remlStep(estimates: readonly number[], variances: readonly number[], tau2: number): number {
  const { mean, sumWeights } = weightedMean(estimates, variances, tau2);
  let numerator = 0;
  let sumSquaredWeights = 0;
  for (let i = 0; i < estimates.length; i++) {
    const w = 1 / (variances[i]! + tau2);
    numerator += w * w * ((estimates[i]! - mean) ** 2 - variances[i]!);
    sumSquaredWeights += w * w;
  }
  return Math.max(0, numerator / sumSquaredWeights + 1 / sumWeights);
}
