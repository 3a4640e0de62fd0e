/**
 * Warm-up in synchronous rounds shared by parallel chains: at each round's end the chains'
 * running moments (of the draws made in that round) are pooled into one covariance, which every
 * chain then uses as its proposal shape in the next round, with the mean of the chains' log
 * scales. Four chains give four times the draws one chain has to learn the shape from; since
 * the rounds end at fixed iterations and the pooling is done in chain order, the result depends
 * on the seed only, never on the number of threads or on timing.
 *
 * @remarks Inter-chain adaptation: Craiu, Rosenthal and Yang (2009), "Learn from thy neighbor:
 *   parallel-chain and regional adaptive MCMC", JASA 104(488). Rounds whose length grows, each
 *   estimating the shape from its own draws only (so the transient of the first round does not
 *   linger): the windowed adaptation of Stan's warm-up (Stan Reference Manual, "Automatic
 *   parameter tuning", from memory). Adaptation stops with warm-up, so the kept draws come from
 *   one fixed kernel (Andrieu and Thoms 2008, "A tutorial on adaptive MCMC", Statistics and
 *   Computing 18, section 2.2).
 */
import type { AdaptationJSON } from './adaptation.js';

/** The running moments of a set of draws: count, mean, and sum of squared deviations (lower triangle, row-major). */
export interface Moments {
  dim: number;
  count: number;
  mean: Float64Array;
  m2: Float64Array;
}

/** A shape to install in every chain at a round's end. */
export interface PooledShape {
  /** row-major dim x dim covariance */
  cov: number[];
  logScale: number;
  /** how many shapes the chains will have been given once this one is installed */
  round: number;
}

/** Ends of the pooled rounds, as fractions of warm-up; the last stretch tunes only the scale. */
const ROUND_ENDS = [0.05, 0.15, 0.35, 0.85];
/** Below this many warm-up iterations every chain adapts on its own. */
export const MIN_POOLED_WARMUP = 400;

/**
 * Iterations at which the pooled rounds end, increasing and inside (0, warmup); empty when
 * warm-up is too short to share (then each chain adapts alone, adaptation.ts).
 */
export function roundEnds(warmup: number): number[] {
  if (!(warmup >= MIN_POOLED_WARMUP)) return [];
  return ROUND_ENDS.map((f) => Math.floor(f * warmup));
}

/** The moments held by a saved adaptation state. */
export function momentsOf(a: AdaptationJSON): Moments {
  return { dim: a.dim, count: a.count, mean: Float64Array.from(a.mean), m2: Float64Array.from(a.m2) };
}

/**
 * Moments of the union of several sets of draws.
 *
 * @remarks Chan, Golub and LeVeque (1979), "Updating formulae and a pairwise algorithm for
 *   computing sample variances", Stanford CS report STAN-CS-79-773: for sets A and B,
 *   n = n_A + n_B, mean = mean_A + (n_B / n) delta and M = M_A + M_B + (n_A n_B / n) delta delta^T
 *   with delta = mean_B - mean_A.
 */
export function combineMoments(parts: readonly Moments[]): Moments {
  const d = parts[0]!.dim;
  const out: Moments = { dim: d, count: 0, mean: new Float64Array(d), m2: new Float64Array(d * d) };
  const delta = new Float64Array(d);
  for (const p of parts) {
    if (p.count === 0) continue;
    const n = out.count + p.count;
    const wa = out.count;
    const wb = p.count;
    for (let i = 0; i < d; i++) delta[i] = p.mean[i]! - out.mean[i]!;
    const f = (wa * wb) / n;
    for (let i = 0; i < d; i++) {
      const row = i * d;
      for (let j = 0; j <= i; j++) out.m2[row + j] += p.m2[row + j]! + f * delta[i]! * delta[j]!;
    }
    for (let i = 0; i < d; i++) out.mean[i] += (wb / n) * delta[i]!;
    out.count = n;
  }
  return out;
}

/** The sample covariance M / (n - 1) as a full symmetric row-major matrix (null with fewer than 2 draws). */
export function covarianceOf(m: Moments): Float64Array | null {
  if (m.count < 2) return null;
  const d = m.dim;
  const cov = new Float64Array(d * d);
  for (let i = 0; i < d; i++) {
    for (let j = 0; j <= i; j++) {
      const v = m.m2[i * d + j]! / (m.count - 1);
      cov[i * d + j] = v;
      cov[j * d + i] = v;
    }
  }
  return cov;
}

/**
 * The shape for the next round from the chains' adaptation states at the end of this one: the
 * covariance of all their draws in the round, and the mean of their log scales. Null when the
 * round has too few draws for a covariance.
 */
export function poolRound(states: readonly AdaptationJSON[], round: number): PooledShape | null {
  const pooled = combineMoments(states.map(momentsOf));
  const cov = covarianceOf(pooled);
  if (cov === null) return null;
  let logScale = 0;
  for (const s of states) logScale += s.logScale / states.length;
  return { cov: Array.from(cov), logScale, round };
}
