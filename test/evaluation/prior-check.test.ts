import { describe, it, expect } from 'vitest';
import { createRequire } from 'node:module';
import { fileURLToPath } from 'node:url';
import { loadPriorSet } from '../../src/io/priors.js';
import { createModel } from '../../src/model/posterior.js';
import { naturalValue, toUnconstrained } from '../../src/model/layout.js';
import type { PriorSet } from '../../src/model/prior-set.js';
import { drawFromPrior, simulateEpidemic } from '../../src/evaluation/prior-draws.js';
import { priorCheck, PRIOR_CHECK_QUANTITIES } from '../../src/evaluation/prior-check.js';
import { createRng } from '../../src/util/rng.js';

const require = createRequire(import.meta.url);
const lognormalQuantile = require('@stdlib/stats/base/dists/lognormal/quantile') as (p: number, mu: number, s: number) => number;
const betaQuantile = require('@stdlib/stats/base/dists/beta/quantile') as (p: number, a: number, b: number) => number;
const normalQuantile = require('@stdlib/stats/base/dists/normal/quantile') as (p: number, mu: number, s: number) => number;

const DEFAULT: PriorSet = loadPriorSet(fileURLToPath(new URL('../../priors/default.json', import.meta.url)));

describe('drawFromPrior', () => {
  const model = createModel({ counts: new Float64Array(35).fill(NaN), population: 1e5, firstWeekday: 0 }, DEFAULT);
  const L = model.layout;
  const n = 4000;
  const rng = createRng(31);
  const values = Array.from({ length: L.dim }, () => new Float64Array(n));
  for (let d = 0; d < n; d++) {
    const theta = drawFromPrior(model, rng);
    for (let i = 0; i < L.dim; i++) values[i]![d] = naturalValue(L, i, theta[i]!);
  }
  const halfNormalQ = (p: number, scale: number) => scale * normalQuantile((1 + p) / 2, 0, 1);
  const cases: Array<[string, number, (p: number) => number]> = [
    // quantiles from @stdlib; half-normal and 1/sqrt(phi) through the standard identities (common practice)
    ['start_reproduction', L.startReproduction, (p) => lognormalQuantile(p, Math.log(1.5), 0.5)],
    ['walk_step[1]', L.firstStep, (p) => normalQuantile(p, 0, 1)],
    ['walk_scale', L.walkScale, (p) => halfNormalQ(p, 0.15)],
    ['ascertainment', L.ascertainment, (p) => betaQuantile(p, 2, 6)],
    ['dispersion', L.dispersion, (p) => halfNormalQ(1 - p, 1) ** -2],
    ['seed_infected', L.seedInfected, (p) => lognormalQuantile(p, Math.log(10), 1)],
    ['infectious_days', L.infectiousDays, (p) => lognormalQuantile(p, Math.log(5), 0.1)],
  ];
  it.each(cases)('draws %s from its prior', (_name, i, quantile) => {
    // empirical CDF at the prior's quantiles within 0.03 of p: 4000 independent draws give a
    // Monte Carlo sd of at most 0.008
    for (const p of [0.05, 0.25, 0.5, 0.75, 0.95]) {
      const x = quantile(p);
      const below = values[i]!.reduce((a, v) => a + (v <= x ? 1 : 0), 0);
      expect(Math.abs(below / n - p)).toBeLessThan(0.03);
    }
  });
});

describe('simulateEpidemic', () => {
  it('with constant beta infects the final size z = 1 - exp(-R0 z) (Kermack and McKendrick 1927)', () => {
    const model = createModel({ counts: new Float64Array(500).fill(NaN), population: 1e6, firstWeekday: 0 }, DEFAULT);
    const L = model.layout;
    const theta = toUnconstrained(L, {
      start_reproduction: 2,
      walk_steps: new Array(L.knots - 1).fill(0),
      walk_scale: 0.1,
      ascertainment: 0.3,
      dispersion: 20,
      seed_infected: 1,
      latent_days: 3,
      infectious_days: 5,
      weekday: [],
    });
    const sim = simulateEpidemic(model, theta, 0, createRng(4));
    expect(sim.ok).toBe(true);
    // z for R0 = 2 by fixed-point iteration of the final-size equation
    let z = 0.5;
    for (let i = 0; i < 200; i++) z = 1 - Math.exp(-2 * z);
    expect(z).toBeCloseTo(0.7968, 4);
    expect(sim.attackRate).toBeCloseTo(z, 3);
    expect(sim.basicReproduction[0]).toBeCloseTo(2, 12);
    expect(sim.effectiveReproduction[499]).toBeCloseTo(2 * (1 - z), 3);
  });
});

describe('priorCheck', () => {
  it('summarises the default prior: every draw runs, shares are shares', () => {
    const r = priorCheck(DEFAULT, { days: 60, population: 320000, draws: 300, seed: 5, maxReproduction: 10, firstWeekday: 0 });
    expect(r.failed).toBe(0);
    for (const q of PRIOR_CHECK_QUANTITIES) for (const v of r.perDraw[q]) expect(Number.isFinite(v), q).toBe(true);
    for (let d = 0; d < 300; d++) {
      expect(r.perDraw.max_effective_reproduction[d]!).toBeLessThanOrEqual(r.perDraw.max_basic_reproduction[d]! + 1e-12);
      expect(r.perDraw.attack_rate[d]!).toBeGreaterThan(0);
      expect(r.perDraw.attack_rate[d]!).toBeLessThanOrEqual(1);
    }
    for (const f of r.findings) {
      expect(f.share).toBeGreaterThanOrEqual(0);
      expect(f.share).toBeLessThanOrEqual(1);
    }
    expect(r.findings.find((f) => f.name === 'more_reports_than_people')!.flagged).toBe(false);
  });

  it('flags a prior that makes every epidemic burn through a small town', () => {
    const wild: PriorSet = {
      ...DEFAULT,
      name: 'wild',
      priors: {
        ...DEFAULT.priors,
        start_reproduction: { family: 'lognormal', median: 15, sdlog: 0.3 },
        ascertainment: { family: 'beta', a: 50, b: 2 },
        dispersion: { family: 'inverse_sqrt_half_normal', scale: 3 },
      },
    };
    const r = priorCheck(wild, { days: 120, population: 2000, draws: 300, seed: 5, maxReproduction: 10, firstWeekday: 0 });
    const flagged = r.findings.filter((f) => f.flagged).map((f) => f.name);
    expect(flagged).toContain('reproduction_above_bound');
    expect(flagged).toContain('everyone_infected');
    // nearly every onset reported, with very overdispersed counts: reports can outnumber people
    expect(flagged).toContain('more_reports_than_people');
    expect(r.findings.find((f) => f.name === 'everyone_infected')!.share).toBeGreaterThan(0.9);
  });
});
