import { describe, it, expect } from 'vitest';
import { createRequire } from 'node:module';
import {
  chainLadderCdf,
  delayEvidence,
  drawDelayCdf,
  uninformedDelays,
  JEFFREYS,
  type TriangleCounts,
} from '../../src/model/observed-delay.js';
import { createRng } from '../../src/util/rng.js';

const require = createRequire(import.meta.url);
// reference library: @stdlib beta quantile and gamma CDF
const betaQuantile: (p: number, a: number, b: number) => number = require('@stdlib/stats/base/dists/beta/quantile');
const gammaCdf: (x: number, k: number, rate: number) => number = require('@stdlib/stats/base/dists/gamma/cdf');

const D = 10;

/** Delay pmf p_d = G(d + 1) - G(d), renormalised on 0..D, for a gamma with mean 4, sd 2.5 (stdlib). */
function truthPmf(): number[] {
  const shape = (4 / 2.5) ** 2;
  const rate = 4 / 2.5 ** 2;
  const total = gammaCdf(D + 1, shape, rate);
  return Array.from({ length: D + 1 }, (_, d) => (gammaCdf(d + 1, shape, rate) - gammaCdf(d, shape, rate)) / total);
}

/** A triangle of Poisson counts with mean `perDay` p_d, onsets 0..rows-1, last report day rows-1 (truncated). */
function simulateTriangle(rows: number, perDay: number, seed: number, pmf = truthPmf()): TriangleCounts {
  const rng = createRng(seed);
  const counts = new Float64Array(rows * (D + 1));
  for (let s = 0; s < rows; s++) {
    for (let d = 0; d <= D && s + d <= rows - 1; d++) counts[s * (D + 1) + d] = rng.poisson(perDay * pmf[d]!);
  }
  return { maxDelay: D, firstOnset: 0, lastDay: rows - 1, counts };
}

describe('chainLadderCdf', () => {
  it('is the empirical delay distribution when every onset day is fully reported', () => {
    // with no truncation, q_k = n_k / n_{<=k}, and the product telescopes to F(k) = n_{<=k} / n
    // (follows from the definitions; common practice)
    const rows = 40;
    const tri = simulateTriangle(rows, 50, 1);
    // onset days whose reports are still coming carry nothing: a fully developed triangle
    for (let s = rows - D; s < rows; s++) tri.counts.fill(0, s * (D + 1), (s + 1) * (D + 1));
    const byDelay = new Float64Array(D + 1);
    for (let s = 0; s < rows; s++) for (let d = 0; d <= D; d++) byDelay[d] += tri.counts[s * (D + 1) + d]!;
    const total = byDelay.reduce((a, b) => a + b, 0);
    const F = chainLadderCdf(delayEvidence(tri));
    let cum = 0;
    for (let d = 0; d <= D; d++) {
      cum += byDelay[d]!;
      expect(F[d]).toBeCloseTo(cum / total, 12);
    }
  });

  it('recovers a known delay from a right-truncated triangle, where the plain share is biased', () => {
    const pmf = truthPmf();
    const tri = simulateTriangle(60, 400, 2, pmf);
    const F = chainLadderCdf(delayEvidence(tri));
    // naive: every report seen so far pooled, which over-weights short delays in the last rows
    const seen = new Float64Array(D + 1);
    for (let s = 0; s < 60; s++) for (let d = 0; d <= D; d++) seen[d] += tri.counts[s * (D + 1) + d]!;
    const seenTotal = seen.reduce((a, b) => a + b, 0);
    let truth = 0;
    let naive = 0;
    let worstChain = 0;
    let worstNaive = 0;
    for (let d = 0; d < D; d++) {
      truth += pmf[d]!;
      naive += seen[d]! / seenTotal;
      worstChain = Math.max(worstChain, Math.abs(F[d]! - truth));
      worstNaive = Math.max(worstNaive, Math.abs(naive - truth));
    }
    expect(worstChain).toBeLessThan(0.02);
    expect(worstNaive).toBeGreaterThan(3 * worstChain);
  });
});

describe('drawDelayCdf', () => {
  it('draws each q_k from Beta(B_k + 1/2, A_k + 1/2), quantiles as @stdlib gives them', () => {
    const tri = simulateTriangle(30, 20, 3);
    const ev = delayEvidence(tri);
    const rng = createRng(4);
    const reps = 20000;
    const F = new Float64Array(D + 1);
    const q: number[][] = Array.from({ length: D + 1 }, () => []);
    let ordered = true;
    for (let r = 0; r < reps; r++) {
      drawDelayCdf(rng, ev, F);
      ordered &&= F[D] === 1;
      for (let k = 1; k <= D; k++) {
        ordered &&= F[k - 1]! <= F[k]!;
        q[k]!.push(1 - F[k - 1]! / F[k]!);
      }
    }
    expect(ordered).toBe(true);
    for (let k = 1; k <= D; k++) {
      const sorted = q[k]!.sort((a, b) => a - b);
      const a = ev.atDelay[k]! + JEFFREYS;
      const b = ev.belowDelay[k]! + JEFFREYS;
      for (const p of [0.05, 0.5, 0.95]) {
        const ref = betaQuantile(p, a, b);
        // sampling error of a quantile with 20000 draws: a few thousandths of the spread
        const spread = betaQuantile(0.95, a, b) - betaQuantile(0.05, a, b);
        expect(Math.abs(sorted[Math.floor(p * reps)]! - ref), `k ${k}, p ${p}`).toBeLessThan(0.03 * spread + 1e-9);
      }
    }
  });
});

describe('uninformedDelays', () => {
  it('names the delays no onset day can show', () => {
    // 3 onset rows up to the last day: delays above 2 are never seen
    const tri: TriangleCounts = { maxDelay: 4, firstOnset: 0, lastDay: 2, counts: new Float64Array(3 * 5).fill(1) };
    expect(uninformedDelays(delayEvidence(tri))).toEqual([3, 4]);
    const full = simulateTriangle(30, 20, 5);
    expect(uninformedDelays(delayEvidence(full))).toEqual([]);
  });
});
