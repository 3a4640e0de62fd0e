// Prior-only runs of the adaptive Metropolis sampler on the default prior set: with the
// likelihood left out, the kept draws must reproduce the prior quantiles of every scalar
// parameter. Reference values: @stdlib's quantile functions (lognormal, beta, normal), and
// the half-normal quantile scale * Phi^-1((1 + p) / 2) (standard identity; common practice).
import { describe, it, expect } from 'vitest';
import { createRequire } from 'node:module';
import { fileURLToPath } from 'node:url';
import { createModel } from '../../src/model/posterior.js';
import { loadPriorSet } from '../../src/io/priors.js';
import { ChainRunner } from '../../src/inference/chain.js';
import { createRng, deriveSeed } from '../../src/util/rng.js';
import { naturalValue } from '../../src/model/layout.js';
import { quantileSorted } from '../../src/outputs/stats.js';

const require = createRequire(import.meta.url);
const lognormalQuantile: (p: number, mu: number, s: number) => number = require('@stdlib/stats/base/dists/lognormal/quantile');
const betaQuantile: (p: number, a: number, b: number) => number = require('@stdlib/stats/base/dists/beta/quantile');
const normalQuantile: (p: number, mu: number, s: number) => number = require('@stdlib/stats/base/dists/normal/quantile');

const priorSet = loadPriorSet(fileURLToPath(new URL('../../priors/default.json', import.meta.url)));

describe('ChainRunner on the prior alone (default prior set)', () => {
  // 28 observed days: K = 6 knots, 12 parameters. The data are never used: the target is
  // log prior + log-Jacobian only.
  const model = createModel({ counts: new Float64Array(28).fill(5), population: 1e5, firstWeekday: 0 }, priorSet);
  const L = model.layout;
  const dim = L.dim;
  const chains = 4;
  const draws = 5000;
  const pooled: Float64Array[] = Array.from({ length: dim }, () => new Float64Array(chains * draws));
  for (let c = 0; c < chains; c++) {
    const start = new Float64Array(dim);
    start[L.startReproduction] = Math.log(1.5);
    start[L.walkScale] = Math.log(0.1);
    start[L.ascertainment] = -1;
    start[L.dispersion] = Math.log(3);
    start[L.seedInfected] = Math.log(10);
    start[L.latentDays] = Math.log(3);
    start[L.infectiousDays] = Math.log(5);
    const cov = new Float64Array(dim * dim);
    for (let i = 0; i < dim; i++) cov[i * dim + i] = 0.25;
    const runner = new ChainRunner({
      logDensity: model.logPriorUnconstrained,
      start,
      initialCov: cov,
      warmup: 4000,
      draws,
      thin: 5,
      rng: createRng(deriveSeed(2024, c)),
    });
    while (!runner.done) runner.run(10_000);
    const res = runner.result();
    for (let k = 0; k < draws; k++) {
      for (let i = 0; i < dim; i++) pooled[i][c * draws + k] = naturalValue(L, i, res.draws[k * dim + i]);
    }
  }
  const q = (i: number, p: number) => quantileSorted(Float64Array.from(pooled[i]).sort(), p);
  const halfNormalQ = (p: number, scale: number) => scale * normalQuantile((1 + p) / 2, 0, 1);
  // phi: 1/sqrt(phi) ~ half-normal(1), so phi's p-quantile is x^-2 at x's (1 - p)-quantile
  const dispersionQ = (p: number) => halfNormalQ(1 - p, 1) ** -2;

  const cases: Array<[string, number, (p: number) => number]> = [
    ['start_reproduction', L.startReproduction, (p) => lognormalQuantile(p, Math.log(1.5), 0.5)],
    ['walk_scale', L.walkScale, (p) => halfNormalQ(p, 0.15)],
    ['ascertainment', L.ascertainment, (p) => betaQuantile(p, 2, 6)],
    ['dispersion', L.dispersion, dispersionQ],
    ['seed_infected', L.seedInfected, (p) => lognormalQuantile(p, Math.log(10), 1)],
    ['latent_days', L.latentDays, (p) => lognormalQuantile(p, Math.log(3), 0.1)],
    ['infectious_days', L.infectiousDays, (p) => lognormalQuantile(p, Math.log(5), 0.1)],
    ['walk_step[1]', L.firstStep, (p) => normalQuantile(p, 0, 1)],
  ];
  it.each(cases)('reproduces the prior quantiles of %s', (_name, i, ref) => {
    // Tolerance on the probability scale: the empirical CDF at the reference quantile must be
    // within 0.03 of p (20,000 autocorrelated draws, effective size a few thousand: the Monte
    // Carlo sd of an empirical CDF near 0.5 is then below 0.01).
    for (const p of [0.05, 0.25, 0.5, 0.75, 0.95]) {
      const x = ref(p);
      let below = 0;
      for (const v of pooled[i]) if (v <= x) below++;
      expect(Math.abs(below / pooled[i].length - p)).toBeLessThan(0.03);
    }
    expect(Number.isFinite(q(i, 0.5))).toBe(true);
  });
});
