import { describe, it, expect } from 'vitest';
import { knotCount, fillWalk, fillBetaOverN } from '../../src/model/transmission.js';

// Hand-computed values of the walk of MODEL.md section 2:
// w_0 = 0, w_k = w_{k-1} + sigma z_k; log beta(s) = log beta_0 + w_{k(s)}, k(s) = floor(s / knot_days)
// (step), or w interpolated linearly between knot days k * knot_days, flat after the last knot.

describe('knotCount', () => {
  it('is ceil(days / knotDays)', () => {
    expect(knotCount(30, 7)).toBe(5); // days 0..29: knots at 0, 7, 14, 21, 28
    expect(knotCount(28, 7)).toBe(4); // days 0..27: knots at 0, 7, 14, 21
    expect(knotCount(29, 7)).toBe(5);
    expect(knotCount(1, 7)).toBe(1);
    expect(knotCount(10, 1)).toBe(10);
  });
});

describe('fillWalk', () => {
  it('accumulates sigma * z from the given offset, w_0 = 0', () => {
    const steps = [99, 1, -2, 0.5, 0.7, 99]; // z_1..z_4 at offset 1; the 99s must not be read
    const walk = new Float64Array(5).fill(NaN);
    fillWalk(0.5, steps, 1, 5, walk);
    // 0, 0.5, 0.5 - 1, -0.5 + 0.25, -0.25 + 0.35
    const expected = [0, 0.5, -0.5, -0.25, 0.1];
    for (let k = 0; k < 5; k++) expect(walk[k]).toBeCloseTo(expected[k], 15);
  });

  it('gives a flat walk for one knot or sigma = 0', () => {
    const one = new Float64Array(1).fill(NaN);
    fillWalk(0.3, [], 0, 1, one);
    expect(one[0]).toBe(0);
    const flat = new Float64Array(4).fill(NaN);
    fillWalk(0, [1, 2, 3], 0, 4, flat);
    expect(Array.from(flat)).toEqual([0, 0, 0, 0]);
  });
});

describe('fillBetaOverN', () => {
  const walk = Float64Array.from([0, 0.5, -0.5, -0.25, 0.1]);
  const beta0 = 0.4;
  const invN = 1 / 1000;

  it('is piecewise constant between knots (step), the last value held past the last knot', () => {
    const days = 40; // 5 knots cover 0..34; days 35..39 are a forecast
    const out = new Float64Array(days).fill(NaN);
    fillBetaOverN(Math.log(beta0), walk, 5, 7, false, invN, days, out);
    for (let s = 0; s < days; s++) {
      const k = Math.min(Math.floor(s / 7), 4);
      expect(out[s]).toBeCloseTo((beta0 * Math.exp(walk[k])) / 1000, 17);
      expect(Math.abs(out[s] / ((beta0 * Math.exp(walk[k])) / 1000) - 1)).toBeLessThan(1e-15);
    }
    // hand values: day 0 is beta_0 / N; day 7 is beta_0 e^0.5 / N; day 34 and after e^0.1
    expect(out[0]).toBeCloseTo(4e-4, 18);
    expect(out[6]).toBeCloseTo(4e-4, 18);
    expect(out[7]).toBeCloseTo(4e-4 * 1.6487212707001282, 18);
    expect(out[39]).toBeCloseTo(4e-4 * 1.1051709180756477, 18);
  });

  it('interpolates log beta linearly between knot days (linear), exact at knots and midpoints', () => {
    const knotDays = 4;
    const days = 22; // knots at days 0, 4, 8, 12, 16; flat from 16 on
    const out = new Float64Array(days).fill(NaN);
    fillBetaOverN(Math.log(beta0), walk, 5, knotDays, true, invN, days, out);
    const at = (s: number) => Math.log(out[s] / (beta0 * invN)); // recovers w(s)
    // at knots: w_k
    for (let k = 0; k < 5; k++) expect(at(k * knotDays)).toBeCloseTo(walk[k], 14);
    // midpoints: (w_k + w_{k+1}) / 2
    expect(at(2)).toBeCloseTo(0.25, 14);
    expect(at(6)).toBeCloseTo(0, 14);
    expect(at(10)).toBeCloseTo(-0.375, 14);
    expect(at(14)).toBeCloseTo(-0.075, 14);
    // quarter points: w_k + (w_{k+1} - w_k) / 4 and 3/4
    expect(at(1)).toBeCloseTo(0.125, 14);
    expect(at(7)).toBeCloseTo(-0.25, 14);
    // flat past the last knot
    for (let s = 16; s < days; s++) expect(at(s)).toBeCloseTo(0.1, 14);
  });

  it('writes only days 0..days-1', () => {
    const out = new Float64Array(12).fill(-1);
    fillBetaOverN(0, walk, 5, 7, false, 1, 10, out);
    fillBetaOverN(0, walk, 5, 7, true, 1, 10, out);
    expect(out[10]).toBe(-1);
    expect(out[11]).toBe(-1);
  });
});
