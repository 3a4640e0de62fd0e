import { describe, it, expect } from 'vitest';
import { pairedWisDifference, rankPriorSets, summarizeByHorizon, summarizeScores, type ScoreSummary } from '../../src/evaluation/comparison.js';
import type { ScoredForecast } from '../../src/evaluation/backtest.js';

function forecast(origin: number, horizon: number, wis: number, extra: Partial<ScoredForecast['score']> = {}): ScoredForecast {
  return {
    origin,
    horizon,
    target: origin + horizon,
    observed: 10,
    score: { wis, crps: wis / 2, logScore: 1, in50: 1, in90: 1, mean: 10, quantiles: [], ...extra },
  };
}

const summary = (wis: number, crps: number, logScore: number): ScoreSummary => ({ forecasts: 4, wis, crps, logScore, coverage50: 0.5, coverage90: 0.9 });

describe('summarizeScores and summarizeByHorizon', () => {
  it('average each score and count coverage', () => {
    const fs = [forecast(0, 1, 2, { in50: 0 }), forecast(0, 2, 4), forecast(7, 1, 6, { in90: 0 }), forecast(7, 2, 8)];
    const all = summarizeScores(fs);
    expect(all).toEqual({ forecasts: 4, wis: 5, crps: 2.5, logScore: 1, coverage50: 0.75, coverage90: 0.75 });
    const byH = summarizeByHorizon(fs, 2);
    expect(byH.map((s) => s.wis)).toEqual([4, 6]);
    expect(byH[0]!.coverage50).toBe(0.5);
    expect(summarizeScores([]).wis).toBeNaN();
  });
});

describe('rankPriorSets', () => {
  it('ranks by mean WIS, breaks ties by CRPS, and keeps the ranks by CRPS and log score', () => {
    const ranked = rankPriorSets([
      { label: 'a', overall: summary(3, 2, 1.0) },
      { label: 'b', overall: summary(2, 1.5, 2.0) },
      { label: 'c', overall: summary(3, 1, 0.5) },
    ]);
    expect(ranked.map((r) => r.label)).toEqual(['b', 'c', 'a']);
    expect(ranked.map((r) => r.rank)).toEqual([1, 2, 3]);
    expect(ranked.map((r) => r.relativeWis)).toEqual([1, 1.5, 1.5]);
    expect(ranked.find((r) => r.label === 'c')!.rankCrps).toBe(1);
    expect(ranked.find((r) => r.label === 'c')!.rankLogScore).toBe(1);
    expect(ranked.find((r) => r.label === 'b')!.rankLogScore).toBe(3);
  });

  it('puts a set without scores last', () => {
    const ranked = rankPriorSets([
      { label: 'none', overall: summary(NaN, NaN, NaN) },
      { label: 'some', overall: summary(5, 2, 1) },
    ]);
    expect(ranked.map((r) => r.label)).toEqual(['some', 'none']);
  });
});

describe('pairedWisDifference', () => {
  it('averages differences within each origin first, then over origins (hand-worked)', () => {
    const ref = [forecast(0, 1, 1), forecast(0, 2, 1), forecast(7, 1, 2), forecast(7, 2, 2), forecast(14, 1, 0), forecast(14, 2, 0)];
    // differences: origin 0: 1 and 3 (mean 2); origin 7: 0 and 0 (mean 0); origin 14: 4 and 2 (mean 3)
    const other = [forecast(0, 1, 2), forecast(0, 2, 4), forecast(7, 1, 2), forecast(7, 2, 2), forecast(14, 1, 4), forecast(14, 2, 2)];
    const d = pairedWisDifference(other, ref);
    // mean (2 + 0 + 3) / 3 = 5/3; sample variance ((1/3)^2 + (5/3)^2 + (4/3)^2) / 2 = 7/3; se sqrt(7/9)
    expect(d.origins).toBe(3);
    expect(d.mean).toBeCloseTo(5 / 3, 12);
    expect(d.se).toBeCloseTo(Math.sqrt(7 / 9), 12);
    expect(pairedWisDifference(ref, ref)).toEqual({ mean: 0, se: 0, origins: 3 });
  });
});
