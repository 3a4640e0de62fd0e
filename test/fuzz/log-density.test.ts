/**
 * Fuzzing the log posterior (src/model/posterior.ts) and the sampler's coordinates
 * (src/model/sampling-space.ts): over random data sets (zeros, missing days, 10 million cases,
 * one day), model settings (weekday effects, linear interpolation, other stage counts, no
 * seeding days) and random parameter vectors (plausible, wide, extreme, infinite, NaN entries),
 * the log density is finite or -Infinity: never NaN, never +Infinity, never a throw. It also
 * leaves its argument untouched and gives the same value twice (it reuses work buffers).
 * "Log densities are total functions" is the project's rule (DEVELOPERS.md), common practice.
 */
import { readFileSync } from 'node:fs';
import fc from 'fast-check';
import { describe, expect, it } from 'vitest';
import { createModel, type EpidemicModel } from '../../src/model/posterior.js';
import { createSamplingSpace } from '../../src/model/sampling-space.js';
import type { PriorSet } from '../../src/model/prior-set.js';

const PRIORS = new URL('../../priors/', import.meta.url);
const shipped = (name: string) => JSON.parse(readFileSync(new URL(`${name}.json`, PRIORS), 'utf8')) as PriorSet;
const DEFAULT = shipped('default');
const variant = (model: Partial<PriorSet['model']>): PriorSet => ({ ...DEFAULT, model: { ...DEFAULT.model, ...model } });

const PRIOR_SETS: Array<[string, PriorSet]> = [
  ['default', DEFAULT],
  ['long-latent', shipped('long-latent')],
  ['weekday effects', variant({ weekday_effect: true })],
  ['linear interpolation', variant({ interpolation: 'linear' })],
  ['1 latent and 3 infectious stages', variant({ latent_stages: 1, infectious_stages: 3 })],
  ['no seeding days, daily knots, one sub-step', variant({ seed_days: 0, knot_days: 1, substeps: 1 })],
  ['lognormal delay of 1 day', variant({ delay: { family: 'lognormal', mean: 3, sd: 2, max_days: 1 } })],
];

const count = fc.oneof(
  { weight: 6, arbitrary: fc.nat({ max: 60 }) },
  { weight: 1, arbitrary: fc.constantFrom(0, Number.NaN, 10_000_000, 123_456_789, Number.MAX_SAFE_INTEGER) },
);
const data = fc.record({
  counts: fc.oneof(
    fc.array(count, { minLength: 1, maxLength: 50 }),
    fc.constantFrom([0], [7], [Number.NaN, 3], new Array(10).fill(0), new Array(12).fill(10_000_000)),
  ),
  population: fc.constantFrom(1, 50, 1e4, 3.2e5, 1e9, 1e12, 1e15, 1e300),
  firstWeekday: fc.integer({ min: 0, max: 6 }),
});

/** One coordinate: near a plausible value, anywhere in a wide range, or something extreme. */
const coordinate = (plausible: number) =>
  fc.oneof(
    { weight: 5, arbitrary: fc.double({ min: -0.5, max: 0.5, noNaN: true }).map((d) => plausible + d) },
    { weight: 2, arbitrary: fc.double({ min: -50, max: 50, noNaN: true }) },
    { weight: 1, arbitrary: fc.double() },
    {
      weight: 1,
      arbitrary: fc.constantFrom(Number.NaN, Infinity, -Infinity, 0, -0, 709.8, -745.2, 1e308, -1e308, 5e-324, 36.8, -36.8),
    },
  );

/** A plausible point of the model's vector (MODEL.md section 4): R 1.5, sigma 0.1, rho 0.25, phi 10, i0 10, L 3, D 5. */
function plausibleTheta(model: EpidemicModel): number[] {
  const L = model.layout;
  const v = new Array<number>(L.dim).fill(0);
  v[0] = Math.log(1.5);
  v[L.walkScale] = Math.log(0.1);
  v[L.ascertainment] = Math.log(0.25 / 0.75);
  v[L.dispersion] = Math.log(10);
  v[L.seedInfected] = Math.log(10);
  v[L.latentDays] = Math.log(3);
  v[L.infectiousDays] = Math.log(5);
  return v;
}

/** Random vectors around `base`, each coordinate drawn by {@link coordinate}. */
const vectorsAround = (base: number[]) => fc.tuple(...base.map(coordinate)).map((v) => Float64Array.from(v));

/** The density at `x` is total, leaves `x` alone and repeats. */
function checkTotal(logDensity: (x: Float64Array) => number, x: Float64Array): void {
  const copy = Float64Array.from(x);
  const v = logDensity(x);
  expect(Number.isNaN(v), `NaN at [${Array.from(x)}]`).toBe(false);
  expect(v, `+Infinity at [${Array.from(x)}]`).not.toBe(Infinity);
  expect(Object.is(logDensity(x), v), `a second call differs at [${Array.from(x)}]`).toBe(true);
  expect(x).toEqual(copy);
}

describe('the log density under fuzzing', () => {
  it.each(PRIOR_SETS.map(([name, set], i) => ({ name, set, i })))(
    'createModel(...).logDensity ($name): finite or -Infinity',
    ({ set, i }) => {
      const cases = data.chain((d) => {
        const model = createModel(d, set);
        return fc.tuple(fc.constant(model), vectorsAround(plausibleTheta(model)));
      });
      let finite = 0;
      fc.assert(
        fc.property(cases, ([model, theta]) => {
          checkTotal(model.logDensity, theta);
          if (Number.isFinite(model.logDensity(theta))) finite++;
        }),
        { seed: 0x1d0000 + i, numRuns: 150 },
      );
      // the plausible points reach the likelihood, so the property is not only about -Infinity
      expect(finite).toBeGreaterThan(10);
    },
  );

  it.each(PRIOR_SETS.map(([name, set], i) => ({ name, set, i })))(
    'createSamplingSpace(model).logDensity ($name): finite or -Infinity',
    ({ set, i }) => {
      const cases = data.chain((d) => {
        const model = createModel(d, set);
        const space = createSamplingSpace(model);
        // a plausible sampler point: the map of a plausible theta when there is one
        const y = space.fromTheta(Float64Array.from(plausibleTheta(model))) ?? new Float64Array(space.dim);
        return fc.tuple(fc.constant(space), vectorsAround(Array.from(y, (v) => (Number.isFinite(v) ? v : 0))));
      });
      let finite = 0;
      fc.assert(
        fc.property(cases, ([space, y]) => {
          checkTotal(space.logDensity, y);
          if (Number.isFinite(space.logDensity(y))) finite++;
        }),
        { seed: 0x2d0000 + i, numRuns: 150 },
      );
      expect(finite).toBeGreaterThan(10);
    },
  );
});
