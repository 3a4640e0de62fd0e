import { describe, expect, it } from 'vitest';
import {
  effectiveSampleSize,
  essBasic,
  essBulk,
  essTail,
  quantileEss,
} from '../../../src/inference/diagnostics/ess.js';
import { splitChains } from '../../../src/inference/diagnostics/helpers.js';
import { createRng, type Rng } from '../../../src/util/rng.js';

const f64 = (...a: number[]) => Float64Array.from(a);

/** Stationary AR(1): x_t = a x_{t-1} + sqrt(1 - a^2) e_t, x_0 ~ N(0, 1). */
function ar1(rng: Rng, a: number, n: number): Float64Array {
  const x = new Float64Array(n);
  const s = Math.sqrt(1 - a * a);
  let v = rng.normal();
  for (let i = 0; i < n; i++) {
    x[i] = v;
    v = a * v + s * rng.normal();
  }
  return x;
}

function ar1Chains(seed: number, a: number, chains = 4, n = 20_000): Float64Array[] {
  const rng = createRng(seed);
  return Array.from({ length: chains }, () => ar1(rng, a, n));
}

/**
 * A plain restatement of the estimator of Vehtari et al. (2021) (its reference
 * implementation's formulas, from memory), with
 * autocovariances summed directly at every lag (O(n^2)); it shares no code with the module.
 */
function referenceEss(chains: Float64Array[]): number {
  const m = chains.length;
  const n = chains[0]!.length;
  const means = chains.map((c) => c.reduce((s, v) => s + v, 0) / n);
  const acov = (j: number, t: number) => {
    let s = 0;
    for (let i = 0; i + t < n; i++) s += (chains[j]![i]! - means[j]!) * (chains[j]![i + t]! - means[j]!);
    return s / n;
  };
  const meanAcov = (t: number) => {
    let s = 0;
    for (let j = 0; j < m; j++) s += acov(j, t);
    return s / m;
  };
  const grand = means.reduce((s, v) => s + v, 0) / m;
  const varMeans = means.reduce((s, v) => s + (v - grand) ** 2, 0) / (m - 1);
  const meanVar = (meanAcov(0) * n) / (n - 1);
  const varPlus = (meanVar * (n - 1)) / n + varMeans;
  const rho = new Array<number>(n).fill(0);
  let t = 0;
  let even = 1;
  let odd = 1 - (meanVar - meanAcov(1)) / varPlus;
  rho[0] = even;
  rho[1] = odd;
  while (t < n - 5 && even + odd > 0) {
    t += 2;
    even = 1 - (meanVar - meanAcov(t)) / varPlus;
    odd = 1 - (meanVar - meanAcov(t + 1)) / varPlus;
    if (even + odd >= 0) {
      rho[t] = even;
      rho[t + 1] = odd;
    }
  }
  const maxT = t;
  if (even > 0) rho[maxT] = even;
  for (let u = 2; u <= maxT - 2; u += 2) {
    if (rho[u]! + rho[u + 1]! > rho[u - 2]! + rho[u - 1]!) {
      rho[u] = rho[u + 1] = (rho[u - 2]! + rho[u - 1]!) / 2;
    }
  }
  let tau = -1 + rho[maxT]!;
  for (let u = 0; u < maxT; u++) tau += 2 * rho[u]!;
  const s = m * n;
  return s / Math.max(tau, 1 / Math.log10(s));
}

describe('essBasic and essBulk on AR(1) chains', () => {
  // Standard time-series result: an AR(1) chain with coefficient a has integrated
  // autocorrelation time (1 + a) / (1 - a) (19 for a = 0.9), so ESS / draws -> (1 - a) / (1 + a).
  // 4 chains x 20,000 draws; relative tolerance 15%.
  for (const [a, seed] of [
    [0.5, 201],
    [0.9, 202],
  ] as const) {
    it(`matches (1 - a) / (1 + a) for a = ${a} within 15%`, () => {
      const chains = ar1Chains(seed, a);
      const draws = 80_000;
      const expected = ((1 - a) / (1 + a)) * draws;
      expect(Math.abs(essBasic(chains) / expected - 1)).toBeLessThan(0.15);
      expect(Math.abs(essBulk(chains) / expected - 1)).toBeLessThan(0.15);
    });
  }

  it('gives about S for independent draws (within 10%), bulk, basic and tail', () => {
    // a = 0: independent draws, ESS = S (same standard result).
    const chains = ar1Chains(203, 0);
    for (const ess of [essBasic(chains), essBulk(chains), essTail(chains)]) {
      expect(Math.abs(ess / 80_000 - 1)).toBeLessThan(0.1);
    }
  });

  it('exceeds S for antithetic chains (a = -0.3), near (1 - a) / (1 + a) S', () => {
    // Vehtari et al. (2021): antithetic chains may have ESS above S; the same
    // AR(1) result gives 1.3 / 0.7 S = 1.857 S. Tolerance 15%.
    const chains = ar1Chains(204, -0.3);
    const expected = (1.3 / 0.7) * 80_000;
    for (const ess of [essBasic(chains), essBulk(chains)]) {
      expect(ess).toBeGreaterThan(80_000);
      expect(Math.abs(ess / expected - 1)).toBeLessThan(0.15);
    }
  });

  it('caps the ESS at S log10(S) for strongly antithetic chains', () => {
    // Vehtari et al. (2021), reference implementation (from memory): tau is bounded below by
    // 1 / log10(S). An AR(1) chain with a = -0.99 has tau = 0.01 / 1.99, far below the bound.
    const chains = ar1Chains(205, -0.99, 4, 2000);
    const s = 8000;
    expect(essBasic(chains)).toBeCloseTo(s * Math.log10(s), 6);
  });
});

describe('effectiveSampleSize', () => {
  it('equals a direct restatement of the published estimator, whichever lag path it takes', () => {
    // Three regimes: a short Geyer sequence (direct lag sums), a long one (FFT up to n/4) and
    // one running past n/4 (full-length FFT).
    for (const [a, n, seed] of [
      [0, 600, 206],
      [0.9, 600, 207],
      [0.998, 400, 208],
    ] as const) {
      const split = splitChains(ar1Chains(seed, a, 4, n));
      const ess = effectiveSampleSize(split);
      expect(Math.abs(ess / referenceEss(split) - 1)).toBeLessThan(1e-9);
    }
  });

  it('works a two-chain example by hand', () => {
    // Split chains (N = 4): 2 4 3 3 | 5 7 6 6 | 1 5 3 3 | 4 4 2 6, centred:
    //   -1 1 0 0 | -1 1 0 0 | -2 2 0 0 | 0 0 -2 2.
    // Biased autocovariances (divisor N = 4), mean over the 4 chains:
    //   lag 0: (2 + 2 + 8 + 8) / 4 / 4 = 1.25;  lag 1: (-1 - 1 - 4 - 4) / 4 / 4 = -0.625.
    // W = 1.25 * 4/3 = 5/3; var of the means 3, 6, 3, 4 is 2; var+ = 1.25 + 2 = 13/4.
    // rho_1 = 1 - (W - (-0.625)) / var+ = 1 - (55/24) / (13/4) = 23/78.
    // With N = 4 < 6 only the first pair is examined: tau = -1 + 2 (1 + 23/78) = 62/39;
    // ESS = 16 / (62/39) = 312/31 (Geyer 1992 initial positive sequence; Vehtari et al. 2021).
    const chains = [f64(2, 4, 3, 3, 5, 7, 6, 6), f64(1, 5, 3, 3, 4, 4, 2, 6)];
    expect(Math.abs(essBasic(chains) - 312 / 31)).toBeLessThan(1e-12);
  });
});

describe('essBulk', () => {
  it('is unchanged by a monotone transform of the draws', () => {
    // Rank invariance of bulk-ESS: Vehtari et al. (2021).
    const chains = ar1Chains(209, 0.6, 4, 1000);
    const expd = chains.map((c) => c.map(Math.exp));
    expect(essBulk(expd)).toBe(essBulk(chains));
    expect(essBasic(expd)).not.toBe(essBasic(chains));
  });
});

describe('essTail and quantileEss', () => {
  it('takes the smaller of the 5% and 95% quantile ESS of the split chains', () => {
    const chains = ar1Chains(210, 0.7, 4, 2000);
    const split = splitChains(chains);
    expect(essTail(chains)).toBe(Math.min(quantileEss(split, 0.05), quantileEss(split, 0.95)));
  });

  it('is NaN when an indicator is constant although the bulk ESS is defined', () => {
    // 97% of the draws equal the largest value, so q05 = q95 = max and I(x <= q) is always 1.
    const rng = createRng(211);
    const chains = [0, 1].map(() => Float64Array.from({ length: 100 }, () => (rng.uniform() < 0.03 ? 0 : 1)));
    chains[0]![10] = 0;
    expect(essTail(chains)).toBeNaN();
    expect(Number.isFinite(essBulk(chains))).toBe(true);
  });
});

describe('NaN results', () => {
  it('for too few draws, a non-finite draw or constant draws', () => {
    const rng = createRng(212);
    const make = (n: number) => [0, 1].map(() => Float64Array.from({ length: n }, () => rng.normal()));
    for (const ess of [essBasic, essBulk, essTail]) {
      expect(ess(make(7))).toBeNaN();
      expect(Number.isFinite(ess(make(8)))).toBe(true);
      expect(ess([])).toBeNaN();
      for (const bad of [NaN, Infinity]) {
        const chains = make(50);
        chains[0]![3] = bad;
        expect(ess(chains)).toBeNaN();
      }
      expect(ess([new Float64Array(50).fill(1), new Float64Array(50).fill(1)])).toBeNaN();
    }
    expect(effectiveSampleSize([f64(1, 2, 3)])).toBeNaN();
  });
});
