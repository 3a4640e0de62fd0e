// Pooling warm-up moments across chains: the combined moments must equal the two-pass mean and
// covariance of all draws together (textbook sample covariance; Chan, Golub and LeVeque 1979
// for the pairwise update), and the round schedule must stay inside warm-up.
import { describe, expect, it } from 'vitest';
import { adaptationToJSON, adaptiveMetropolis } from '../../src/inference/adaptation.js';
import {
  combineMoments,
  covarianceOf,
  MIN_POOLED_WARMUP,
  momentsOf,
  poolRound,
  roundEnds,
} from '../../src/inference/pooled-adaptation.js';
import { createRng } from '../../src/util/rng.js';

const identity = (d: number) => {
  const m = new Float64Array(d * d);
  for (let i = 0; i < d; i++) m[i * d + i] = 1;
  return m;
};

/** Draws fed to an adaptation state (learnShape false: moments only) and the state as JSON. */
function chainState(points: Float64Array[], logScale: number) {
  const d = points[0]!.length;
  const m = adaptiveMetropolis({ learnShape: false });
  let a = m.init(d, identity(d), Math.exp(logScale));
  for (const p of points) a = m.update(a, { position: p, logDensity: 0 }, { accepted: true, acceptProb: 0.234, logDensity: 0 });
  return adaptationToJSON(a);
}

function randomPoints(n: number, d: number, seed: number, shift: number): Float64Array[] {
  const rng = createRng(seed);
  return Array.from({ length: n }, () => Float64Array.from({ length: d }, (_, i) => (i + 1) * rng.normal() + shift * i));
}

describe('combineMoments / covarianceOf', () => {
  it('equal the two-pass mean and sample covariance of all the chains draws together', () => {
    const d = 3;
    const sets = [randomPoints(40, d, 1, 0), randomPoints(77, d, 2, 1), randomPoints(3, d, 3, -4), randomPoints(1, d, 4, 9)];
    const pooled = combineMoments(sets.map((s) => momentsOf(chainState(s, 0))));
    const all = sets.flat();
    const n = all.length;
    expect(pooled.count).toBe(n);
    const mean = new Float64Array(d);
    for (const p of all) for (let i = 0; i < d; i++) mean[i] += p[i]! / n;
    for (let i = 0; i < d; i++) expect(pooled.mean[i]).toBeCloseTo(mean[i]!, 12);
    const cov = covarianceOf(pooled)!;
    for (let i = 0; i < d; i++) {
      for (let j = 0; j < d; j++) {
        let s = 0;
        for (const p of all) s += (p[i]! - mean[i]!) * (p[j]! - mean[j]!);
        expect(cov[i * d + j]).toBeCloseTo(s / (n - 1), 10);
      }
    }
  });

  it('gives no covariance from fewer than two draws', () => {
    expect(covarianceOf(momentsOf(chainState(randomPoints(1, 2, 5, 0), 0)))).toBeNull();
  });
});

describe('poolRound', () => {
  it('pools the covariance and averages the log scales', () => {
    const a = chainState(randomPoints(50, 2, 6, 0), -1);
    const b = chainState(randomPoints(50, 2, 7, 0), -0.5);
    const shape = poolRound([a, b], 3)!;
    expect(shape.round).toBe(3);
    expect(shape.logScale).toBeCloseTo(-0.75, 14);
    expect(shape.cov).toEqual(Array.from(covarianceOf(combineMoments([momentsOf(a), momentsOf(b)]))!));
  });
});

describe('roundEnds', () => {
  it('ends the rounds at increasing iterations inside warm-up, leaving the last stretch to the scale', () => {
    for (const w of [MIN_POOLED_WARMUP, 1000, 10_000, 123_457]) {
      const ends = roundEnds(w);
      expect(ends.length).toBeGreaterThan(1);
      expect(ends[0]).toBeGreaterThan(0);
      for (let i = 1; i < ends.length; i++) expect(ends[i]).toBeGreaterThan(ends[i - 1]!);
      expect(ends[ends.length - 1]).toBeLessThan(w);
    }
  });

  it('is empty when warm-up is too short to share', () => {
    expect(roundEnds(MIN_POOLED_WARMUP - 1)).toEqual([]);
    expect(roundEnds(0)).toEqual([]);
  });
});
