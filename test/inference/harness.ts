/**
 * Shared statistical harness for the sampler tests: known Gaussian targets, a few chains run
 * through ChainRunner, and `expectRecoversNormal`, which checks acceptance, means, covariances
 * and the distribution of the Mahalanobis distance against their exact values.
 */
import { createRequire } from 'node:module';
import { expect } from 'vitest';
import { ChainRunner, type ChainOptions, type ChainResult } from '../../src/inference/chain.js';
import { cholesky, solveLower } from '../../src/inference/linalg.js';
import type { LogDensity } from '../../src/inference/types.js';
import { createRng, deriveSeed } from '../../src/util/rng.js';

const require = createRequire(import.meta.url);
const chisqQuantile: (p: number, k: number) => number = require('@stdlib/stats/base/dists/chisquare/quantile');

export interface GaussianTarget {
  dim: number;
  mean: Float64Array;
  covariance: Float64Array;
  /** unnormalised: -(x - mean)' covariance^-1 (x - mean) / 2 */
  logDensity: LogDensity;
  /** (x - mean)' covariance^-1 (x - mean) */
  mahalanobis(x: Float64Array): number;
}

/** N(mean, covariance) as a target. */
export function gaussianTarget(mean: Float64Array, covariance: Float64Array): GaussianTarget {
  const dim = mean.length;
  const l = cholesky(covariance, dim);
  if (l === null) throw new Error('gaussianTarget: covariance not positive definite');
  const r = new Float64Array(dim);
  const mahalanobis = (x: Float64Array): number => {
    for (let i = 0; i < dim; i++) r[i] = x[i]! - mean[i]!;
    solveLower(l, r, dim, r);
    let q = 0;
    for (let i = 0; i < dim; i++) q += r[i]! * r[i]!;
    return q;
  };
  return { dim, mean, covariance, logDensity: (x) => -0.5 * mahalanobis(x), mahalanobis };
}

/** Covariance sd_i sd_j rho^|i-j| (AR(1)-type correlation). */
export function ar1Covariance(sds: number[], rho: number): Float64Array {
  const d = sds.length;
  const c = new Float64Array(d * d);
  for (let i = 0; i < d; i++) for (let j = 0; j < d; j++) c[i * d + j] = sds[i]! * sds[j]! * rho ** Math.abs(i - j);
  return c;
}

export function identity(d: number, diag = 1): Float64Array {
  const m = new Float64Array(d * d);
  for (let i = 0; i < d; i++) m[i * d + i] = diag;
  return m;
}

export interface ChainsSpec {
  chains: number;
  warmup: number;
  draws: number;
  thin?: number;
  seed: number;
  initialCov: Float64Array;
  /** start of chain c */
  start: (c: number) => Float64Array;
}

/** Runs `chains` independent chains (seeds derived from `seed`) to completion. */
export function runChains(logDensity: LogDensity, spec: ChainsSpec): ChainResult[] {
  return Array.from({ length: spec.chains }, (_, c) => {
    const options: ChainOptions = {
      logDensity,
      start: spec.start(c),
      initialCov: spec.initialCov,
      warmup: spec.warmup,
      draws: spec.draws,
      thin: spec.thin ?? 1,
      rng: createRng(deriveSeed(spec.seed, c)),
    };
    const runner = new ChainRunner(options);
    runner.run(runner.totalIterations);
    return runner.result();
  });
}

/** One coordinate (or any per-draw statistic) of each chain: series[c][t]. */
export function column(results: ChainResult[], dim: number, f: (row: Float64Array) => number): Float64Array[] {
  return results.map((r) => {
    const n = r.draws.length / dim;
    const out = new Float64Array(n);
    for (let t = 0; t < n; t++) out[t] = f(r.draws.subarray(t * dim, (t + 1) * dim));
    return out;
  });
}

/**
 * Pooled mean and its Monte Carlo standard error by non-overlapping batch means (each chain cut
 * into `batches` batches; MCSE = sd of the batch means / sqrt(number of batches)).
 * Batch means: Flegal and Jones (2010), "Batch means and spectral variance estimators in
 * Markov chain Monte Carlo", Annals of Statistics 38(2).
 */
export function batchMeans(series: Float64Array[], batches = 25): { mean: number; mcse: number } {
  const means: number[] = [];
  for (const s of series) {
    const size = Math.floor(s.length / batches);
    for (let b = 0; b < batches; b++) {
      let sum = 0;
      for (let t = b * size; t < (b + 1) * size; t++) sum += s[t]!;
      means.push(sum / size);
    }
  }
  const k = means.length;
  const mean = means.reduce((a, b) => a + b, 0) / k;
  const v = means.reduce((a, b) => a + (b - mean) ** 2, 0) / (k - 1);
  return { mean, mcse: Math.sqrt(v / k) };
}

export interface RecoverOptions {
  chains: number;
  warmup: number;
  draws: number;
  seed: number;
  /** deliberately wrong or rough first proposal covariance */
  initialCov: Float64Array;
  start: (c: number) => Float64Array;
  /** means must be within this many batch-means standard errors (default 4) */
  meanZ?: number;
  /** |cov_ij - true_ij| <= covTol * sd_i sd_j (default 0.1) */
  covTol?: number;
  /** sampling acceptance band (default [0.15, 0.35]) */
  acceptBand?: [number, number];
}

export interface RecoverSummary {
  acceptRates: number[];
  worstMeanZ: number;
  worstCovError: number;
  mahalanobisMeanZ: number;
  belowMedian: number;
}

/**
 * Runs chains on a Gaussian target and checks:
 * - sampling acceptance of every chain in the band around 0.234 (Roberts, Gelman and Gilks 1997,
 *   Annals of Applied Probability 7(1): 0.234 is optimal as d grows, and efficiency is flat
 *   within about 0.15-0.35);
 * - each mean within `meanZ` batch-means standard errors of the true mean;
 * - each covariance entry within `covTol` sd_i sd_j of the true covariance;
 * - the Mahalanobis distance Q = (x - mu)' Sigma^-1 (x - mu), chi-square with d degrees of freedom
 *   under the target (standard result), has mean d within `meanZ` standard errors, and the
 *   fraction of draws below the chi-square median (@stdlib quantile) is 0.5 +- 0.05.
 */
export function expectRecoversNormal(target: GaussianTarget, o: RecoverOptions): RecoverSummary {
  const { dim } = target;
  const meanZ = o.meanZ ?? 4;
  const covTol = o.covTol ?? 0.1;
  const [lo, hi] = o.acceptBand ?? [0.15, 0.35];
  const results = runChains(target.logDensity, { ...o });
  const acceptRates = results.map((r) => r.acceptRateSampling);
  for (const a of acceptRates) {
    expect(a).toBeGreaterThanOrEqual(lo);
    expect(a).toBeLessThanOrEqual(hi);
  }
  const sd = (i: number) => Math.sqrt(target.covariance[i * dim + i]!);
  let worstMeanZ = 0;
  const means = new Float64Array(dim);
  for (let i = 0; i < dim; i++) {
    const { mean, mcse } = batchMeans(column(results, dim, (x) => x[i]!));
    means[i] = mean;
    const z = Math.abs(mean - target.mean[i]!) / mcse;
    worstMeanZ = Math.max(worstMeanZ, z);
    expect(z, `mean of coordinate ${i}`).toBeLessThan(meanZ);
  }
  let worstCovError = 0;
  for (let i = 0; i < dim; i++) {
    for (let j = 0; j <= i; j++) {
      let s = 0;
      let n = 0;
      for (const r of results) {
        for (let t = 0; t < r.draws.length; t += dim) {
          s += (r.draws[t + i]! - means[i]!) * (r.draws[t + j]! - means[j]!);
          n += 1;
        }
      }
      const err = Math.abs(s / (n - 1) - target.covariance[i * dim + j]!) / (sd(i) * sd(j));
      worstCovError = Math.max(worstCovError, err);
      expect(err, `covariance (${i}, ${j})`).toBeLessThan(covTol);
    }
  }
  const q = column(results, dim, (x) => target.mahalanobis(x));
  const qm = batchMeans(q);
  const mahalanobisMeanZ = Math.abs(qm.mean - dim) / qm.mcse;
  expect(mahalanobisMeanZ, 'mean Mahalanobis distance vs d').toBeLessThan(meanZ);
  const median = chisqQuantile(0.5, dim);
  let below = 0;
  let total = 0;
  for (const s of q) for (const v of s) (total += 1), (below += v < median ? 1 : 0);
  const belowMedian = below / total;
  expect(Math.abs(belowMedian - 0.5), 'fraction below the chi-square median').toBeLessThan(0.05);
  return { acceptRates, worstMeanZ, worstCovError, mahalanobisMeanZ, belowMedian };
}
