import { describe, it, expect } from 'vitest';
import { quantileSortedExtended, summarizeDraws, doublingOf, halvingOf } from '../../src/outputs/draw-summary.js';
import { quantileSorted, summarizeSample } from '../../src/outputs/stats.js';
import { growthRows } from '../../src/outputs/growth-table.js';

describe('quantileSortedExtended', () => {
  it('equals the type-7 quantile on finite values', () => {
    const sorted = [1, 2, 4, 8, 16];
    for (const p of [0, 0.05, 0.3, 0.5, 0.77, 1]) expect(quantileSortedExtended(sorted, p)).toBe(quantileSorted(sorted, p));
  });

  it('stays exact next to infinities instead of giving NaN', () => {
    const sorted = [1, 2, Infinity, Infinity];
    expect(quantileSortedExtended(sorted, 0)).toBe(1);
    expect(quantileSortedExtended(sorted, 1 / 3)).toBe(2); // an order statistic
    expect(quantileSortedExtended(sorted, 0.5)).toBe(Infinity); // between 2 and Inf
    expect(quantileSortedExtended(sorted, 0.9)).toBe(Infinity); // between Inf and Inf
    expect(quantileSorted(sorted, 0.9)).toBeNaN(); // what the plain formula gives
  });
});

describe('summarizeDraws', () => {
  it('leaves NaN draws out and agrees with summarizeSample otherwise', () => {
    const s = summarizeDraws(Float64Array.from([3, NaN, 1, 2]), [0.5]);
    expect(s).toEqual(summarizeSample(Float64Array.from([3, 1, 2]), [0.5]));
    expect(summarizeDraws(Float64Array.from([NaN]), [0.5]).quantiles[0]).toBeNaN();
  });

  it('gives an infinite mean and NaN sd when a draw is infinite', () => {
    const s = summarizeDraws(Float64Array.from([5, Infinity, 7]), [0.05, 0.5, 0.95]);
    expect(s.mean).toBe(Infinity);
    expect(s.sd).toBeNaN();
    expect(s.quantiles[0]).toBeCloseTo(5.2, 12);
    expect(s.quantiles[1]).toBe(7);
    expect(s.quantiles[2]).toBe(Infinity);
  });
});

describe('growthRows', () => {
  it('gives doubling times ln 2 / r of the growing draws and halving times of the declining ones', () => {
    // two dates, four draws each (draws x dates, row-major)
    const r = Float64Array.from([0.1, -0.05, 0.2, -0.1, 0.05, 0.01, 0.1, 0.02]);
    const rows = growthRows(r, ['2031-01-01', '2031-01-02'], [0, 0.5, 1]);
    expect(rows.map((x) => x.keys.join(' '))).toEqual([
      'growth_rate 2031-01-01',
      'growth_rate 2031-01-02',
      'doubling_time 2031-01-01',
      'doubling_time 2031-01-02',
      'halving_time 2031-01-01',
      'halving_time 2031-01-02',
    ]);
    // date 1: r = 0.1, 0.2, 0.05, 0.1 (all grow)
    const d1 = rows[2]!.summary.quantiles;
    expect(d1[0]).toBeCloseTo(Math.LN2 / 0.2, 12);
    expect(d1[2]).toBeCloseTo(Math.LN2 / 0.05, 12);
    expect(rows[4]!.summary.quantiles).toEqual([Infinity, Infinity, Infinity]);
    // date 2: r = -0.05, -0.1, 0.01, 0.02: half the draws decline
    expect(rows[3]!.summary.quantiles[0]).toBeCloseTo(Math.LN2 / 0.02, 12);
    expect(rows[3]!.summary.quantiles[2]).toBe(Infinity);
    expect(rows[5]!.summary.quantiles[0]).toBeCloseTo(Math.LN2 / 0.1, 12);
    expect(doublingOf(0)).toBe(Infinity);
    expect(halvingOf(0)).toBe(Infinity);
    expect(doublingOf(NaN)).toBeNaN();
  });
});
