/**
 * Hand-made posterior draws for the forecast tests: the forecast machinery does not depend on
 * where the draws come from, so these tests need no fit. Every draw is a plain parameter vector
 * of a model built on `days` observed days (the counts do not enter a forecast).
 */
import { fileURLToPath } from 'node:url';
import { loadPriorSet } from '../../src/io/priors.js';
import { createModel, type EpidemicModel } from '../../src/model/posterior.js';
import { toUnconstrained } from '../../src/model/layout.js';
import type { ModelSettings, PriorSet } from '../../src/model/prior-set.js';
import { createRng } from '../../src/util/rng.js';

export const DEFAULT_PRIORS: PriorSet = loadPriorSet(fileURLToPath(new URL('../../priors/default.json', import.meta.url)));

export function priorSetWith(model: Partial<ModelSettings>): PriorSet {
  return { ...DEFAULT_PRIORS, model: { ...DEFAULT_PRIORS.model, ...model, delay: { ...DEFAULT_PRIORS.model.delay, ...(model.delay ?? {}) } } };
}

export interface SyntheticOptions {
  days: number;
  population: number;
  draws: number;
  seed: number;
  /** range of the starting reproduction number */
  reproduction?: [number, number];
  /** walk scale of every draw */
  walkScale?: number;
  /** sd of the standardised steps of the fitted walk (1 = the prior) */
  stepSd?: number;
  seedInfected?: number;
  priorSet?: PriorSet;
  /** day of week of the first observed day (0 = Monday) */
  firstWeekday?: number;
}

/** A model and `draws` parameter vectors around a generic illness (latent ~3, infectious ~5 days). */
export function syntheticDraws(o: SyntheticOptions): { model: EpidemicModel; draws: Float64Array } {
  const priorSet = o.priorSet ?? DEFAULT_PRIORS;
  const model = createModel({ counts: new Float64Array(o.days).fill(NaN), population: o.population, firstWeekday: o.firstWeekday ?? 0 }, priorSet);
  const L = model.layout;
  const rng = createRng(o.seed);
  const [rLo, rHi] = o.reproduction ?? [0.9, 1.8];
  const draws = new Float64Array(o.draws * L.dim);
  for (let d = 0; d < o.draws; d++) {
    const steps: number[] = [];
    for (let k = 1; k < L.knots; k++) steps.push((o.stepSd ?? 1) * rng.normal());
    const weekday: number[] = [];
    if (L.weekday) for (let j = 0; j < 6; j++) weekday.push(0.15 * rng.normal());
    const theta = toUnconstrained(L, {
      start_reproduction: rLo + (rHi - rLo) * rng.uniform(),
      walk_steps: steps,
      walk_scale: o.walkScale ?? 0.1,
      ascertainment: 0.2 + 0.2 * rng.uniform(),
      dispersion: 10 + 40 * rng.uniform(),
      seed_infected: o.seedInfected ?? 5 + 20 * rng.uniform(),
      latent_days: 2.5 + rng.uniform(),
      infectious_days: 4.5 + rng.uniform(),
      weekday,
    });
    draws.set(theta, d * L.dim);
  }
  return { model, draws };
}
