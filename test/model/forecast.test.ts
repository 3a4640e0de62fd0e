import { describe, it, expect } from 'vitest';
import { forecastBeta, newStepCount, type BetaScenario } from '../../src/model/forecast.js';
import { dailyBeta } from '../../src/model/derived.js';
import { createRng } from '../../src/util/rng.js';
import { priorSetWith, syntheticDraws } from '../outputs/synthetic.js';

const WALK: BetaScenario = { transmission: 'walk', changes: [] };
const HOLD: BetaScenario = { transmission: 'hold', changes: [] };

function setup(interpolation: 'step' | 'linear', days = 60) {
  const { model, draws } = syntheticDraws({ days, population: 1e6, draws: 3, seed: 4, priorSet: priorSetWith({ interpolation }) });
  const theta = draws.subarray(0, model.layout.dim);
  return { model, theta };
}

describe('newStepCount', () => {
  it('counts the knots on the grid k * knot_days past the fitted ones (and one more for linear)', () => {
    // 14 seeding + 60 observed = 74 simulated days: knots at 0, 7, ..., 70 (K = 11)
    const { model } = setup('step');
    expect(model.layout.knots).toBe(11);
    expect(newStepCount(model, 0)).toBe(0);
    expect(newStepCount(model, 3)).toBe(0); // days 74..76 lie in the span of knot 10 (70..76)
    expect(newStepCount(model, 4)).toBe(1); // day 77 starts knot 11
    expect(newStepCount(model, 28)).toBe(4); // 102 days: knots 0..14
    expect(newStepCount(setup('linear').model, 28)).toBe(5);
  });
});

describe('forecastBeta', () => {
  for (const interpolation of ['step', 'linear'] as const) {
    it(`keeps every fitted day exactly as the fit has it (${interpolation})`, () => {
      const { model, theta } = setup(interpolation);
      const fitted = dailyBeta(model, theta);
      const steps = Float64Array.from({ length: newStepCount(model, 30) }, (_, j) => (j % 2 === 0 ? 2 : -1.5));
      for (const sc of [WALK, HOLD]) {
        const out = forecastBeta(model, theta, 30, sc, steps);
        expect(out.length).toBe(model.simDays + 30);
        for (let s = 0; s < model.simDays; s++) expect(out[s]).toBe(fitted[s]);
      }
    });
  }

  it('holds beta at its value on the last observed day', () => {
    const { model, theta } = setup('step');
    const out = forecastBeta(model, theta, 20, HOLD, []);
    for (let s = model.simDays; s < out.length; s++) expect(out[s]).toBe(out[model.simDays - 1]);
  });

  it('carries the walk on: log beta moves by sigma z at each new knot day and is flat between (step)', () => {
    const { model, theta } = setup('step');
    const sigma = Math.exp(theta[model.layout.walkScale]);
    const steps = [0.5, -1, 2, 0.25];
    const out = forecastBeta(model, theta, 28, WALK, steps);
    const kd = 7;
    const last = Math.log(out[model.simDays - 1]);
    // days 74..76 belong to the last fitted knot (70..76)
    for (let s = model.simDays; s < 77; s++) expect(out[s]).toBe(out[model.simDays - 1]);
    let w = last;
    for (let j = 0; j < 4; j++) {
      w += sigma * steps[j];
      for (let s = 77 + j * kd; s < Math.min(out.length, 77 + (j + 1) * kd); s++) expect(Math.log(out[s])).toBeCloseTo(w, 12);
    }
  });

  it('interpolates linearly from the last observed day to the new knots (linear)', () => {
    const { model, theta } = setup('linear');
    const sigma = Math.exp(theta[model.layout.walkScale]);
    const steps = [1, -1, 0.5, 0.5, -2];
    const out = forecastBeta(model, theta, 28, WALK, steps);
    const x0 = model.simDays - 1; // 73, value w_10
    const w10 = Math.log(out[x0]);
    const w11 = w10 + sigma * steps[0];
    const w12 = w11 + sigma * steps[1];
    // knot 11 on day 77, knot 12 on day 84
    expect(Math.log(out[77])).toBeCloseTo(w11, 12);
    expect(Math.log(out[84])).toBeCloseTo(w12, 12);
    expect(Math.log(out[75])).toBeCloseTo(w10 + ((75 - x0) / (77 - x0)) * (w11 - w10), 12);
    expect(Math.log(out[80])).toBeCloseTo(w11 + (3 / 7) * (w12 - w11), 12);
  });

  it('multiplies beta by each measure on its days only, both ends included; overlaps multiply', () => {
    const { model, theta } = setup('step');
    const base = forecastBeta(model, theta, 20, HOLD, []);
    const S = model.simDays;
    const changes = [
      { factor: 0.5, first: S + 2, last: S + 9 },
      { factor: 0.8, first: S + 5, last: S + 40 }, // runs past the horizon: clipped
      { factor: 3, first: S - 10, last: S - 1 }, // within the fitted days: never applied
    ];
    const out = forecastBeta(model, theta, 20, { transmission: 'hold', changes }, []);
    for (let s = 0; s < out.length; s++) {
      let f = 1;
      if (s >= S + 2 && s <= S + 9) f *= 0.5;
      if (s >= S + 5) f *= 0.8;
      expect(out[s]).toBe(base[s] * f);
    }
  });

  it('spreads log beta j sigma^2 after j new knots (a Gaussian random walk)', () => {
    // variance of a sum of j independent N(0, sigma^2) steps is j sigma^2 (common practice);
    // 20000 replicates: the sample variance is within about 1% (sd sqrt(2/n)) of it
    const { model, theta } = setup('step');
    const sigma = Math.exp(theta[model.layout.walkScale]);
    const H = 28;
    const need = newStepCount(model, H);
    const rng = createRng(77);
    const steps = new Float64Array(need);
    const out = new Float64Array(model.simDays + H);
    const reps = 20000;
    const sums = new Float64Array(need);
    const squares = new Float64Array(need);
    const last = Math.log(forecastBeta(model, theta, H, HOLD, [])[model.simDays - 1]);
    for (let r = 0; r < reps; r++) {
      for (let j = 0; j < need; j++) steps[j] = rng.normal();
      forecastBeta(model, theta, H, WALK, steps, out);
      for (let j = 0; j < need; j++) {
        const v = Math.log(out[77 + j * 7]) - last;
        sums[j] += v;
        squares[j] += v * v;
      }
    }
    for (let j = 0; j < need; j++) {
      const mean = sums[j] / reps;
      const variance = squares[j] / reps - mean * mean;
      expect(Math.abs(mean)).toBeLessThan(4 * sigma * Math.sqrt((j + 1) / reps));
      expect(variance / ((j + 1) * sigma * sigma)).toBeGreaterThan(0.95);
      expect(variance / ((j + 1) * sigma * sigma)).toBeLessThan(1.05);
    }
  });

  it('refuses too few new walk steps or too short an output', () => {
    const { model, theta } = setup('step');
    expect(() => forecastBeta(model, theta, 28, WALK, [1, 2])).toThrow(RangeError);
    expect(() => forecastBeta(model, theta, 28, HOLD, [], new Float64Array(10))).toThrow(RangeError);
  });
});
