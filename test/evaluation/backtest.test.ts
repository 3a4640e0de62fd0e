// The rolling-origin backtest on the first 63 days of the Larkmere demo data, with fits far too
// short to converge (2 chains, 400 warm-up, 100 draws: a fraction of a second each): only the
// mechanics are checked here (origins, one forecast per origin and horizon, scores that belong
// to the forecast `waxwane forecast` makes from the same fit), not the quality of the fits.
import { describe, it, expect, beforeAll } from 'vitest';
import { readFileSync } from 'node:fs';
import { fileURLToPath } from 'node:url';
import { backtestOrigins, backtestPriorSet, STREAM_BACKTEST, type BacktestResult } from '../../src/evaluation/backtest.js';
import { FORECAST_LEVELS } from '../../src/evaluation/forecast-scores.js';
import { computeForecast, planForecast } from '../../src/cli/forecast.js';
import { fitPosterior, DEFAULT_SAMPLER, type SamplerOptions } from '../../src/inference/fit.js';
import { pooledDraws } from '../../src/evaluation/fit-record.js';
import { loadPriorSet } from '../../src/io/priors.js';
import { dayOfWeek } from '../../src/io/dates.js';
import { deriveSeed } from '../../src/util/rng.js';
import { WaxwaneError } from '../../src/errors.js';

describe('backtestOrigins', () => {
  it('puts the first origin just before the test window and the others every k days while H days remain', () => {
    expect(backtestOrigins(182, { window: 56, every: 7, horizon: 14 })).toEqual([125, 132, 139, 146, 153, 160, 167]);
    expect(backtestOrigins(100, { window: 20, every: 5, horizon: 7 })).toEqual([79, 84, 89]);
    expect(backtestOrigins(100, { window: 14, every: 7, horizon: 14 })).toEqual([85]);
  });

  it('refuses a window shorter than the horizon or one that leaves too little to fit', () => {
    expect(() => backtestOrigins(182, { window: 10, every: 7, horizon: 14 })).toThrow(WaxwaneError);
    expect(() => backtestOrigins(60, { window: 40, every: 7, horizon: 14 })).toThrow(/leaves 20 days to fit/);
  });
});

describe('backtestPriorSet', () => {
  const lines = readFileSync(fileURLToPath(new URL('../../data-demo/larkmere/cases.csv', import.meta.url)), 'utf8').trim().split('\n').slice(1, 64);
  const dates = lines.map((l) => l.split(',')[0]!);
  const counts = Float64Array.from(lines.map((l) => Number(l.split(',')[1])));
  counts[58] = NaN; // a missing day in the test window is left unscored
  const priorSet = loadPriorSet(fileURLToPath(new URL('../../priors/default.json', import.meta.url)));
  const data = { counts, dates, population: 320000, firstWeekday: dayOfWeek(dates[0]!) };
  const sampler: SamplerOptions = { ...DEFAULT_SAMPLER, chains: 2, warmup: 400, draws: 100, thin: 2, threads: 0, optimizerStarts: 1 };
  const origins = backtestOrigins(63, { window: 14, every: 7, horizon: 7 });
  let result: BacktestResult;

  beforeAll(async () => {
    result = await backtestPriorSet(data, priorSet, origins, 7, sampler, 42);
  }, 60_000);

  it('scores every known day after each origin, once', () => {
    expect(origins).toEqual([48, 55]);
    expect(result.fits.map((f) => f.origin)).toEqual([48, 55]);
    // 2 origins x 7 days, less day 58 (missing: horizon 3 of the second origin)
    const keys = result.forecasts.map((f) => `${f.origin}+${f.horizon}`);
    expect(new Set(keys).size).toBe(keys.length);
    expect(result.forecasts).toHaveLength(13);
    expect(result.forecasts.some((f) => f.target === 58)).toBe(false);
    for (const f of result.forecasts) {
      expect(f.target).toBe(f.origin + f.horizon);
      expect(f.observed).toBe(counts[f.target]);
      for (const v of [f.score.wis, f.score.crps, f.score.logScore]) expect(Number.isFinite(v) && v >= 0).toBe(true);
    }
  });

  it('scores the forecast that waxwane forecast makes from the same fit (same seed, same draws)', async () => {
    const seed = deriveSeed(42, STREAM_BACKTEST, 0);
    const input = { counts: Array.from(counts.subarray(0, 49)), population: 320000, firstWeekday: data.firstWeekday, priorSet };
    const fit = await fitPosterior(input, { ...sampler, seed });
    const plan = planForecast({ horizon: 7, hold: false }, dates[0]!, dates[48]!, priorSet.model);
    const csv = computeForecast(plan, {
      model: fit.model,
      draws: pooledDraws(fit),
      dates: dates.slice(0, 49),
      firstWeekday: data.firstWeekday,
      seed,
      levels: [...FORECAST_LEVELS],
      command: 'fit',
      runFolder: null,
      converged: null,
    }).files.find(([name]) => name === 'forecast.csv')![1];
    const rows = csv.trim().split('\n').slice(1).map((l) => l.split(',')).filter((r) => r[0] === 'carry_on' && r[1] === 'predicted_reports');
    expect(rows).toHaveLength(7);
    const first = result.forecasts.filter((f) => f.origin === 48);
    first.forEach((f) => {
      const row = rows[f.horizon - 1]!;
      expect(row[2]).toBe(dates[f.target]);
      expect(f.score.mean).toBeCloseTo(Number(row[3]), 4);
      // q05, q25, q50, q75, q95 of forecast.csv
      f.score.quantiles.forEach((q, i) => expect(q).toBeCloseTo(Number(row[5 + i]), 4));
      // coverage agrees with the written intervals
      expect(f.score.in50).toBe(f.observed >= Number(row[6]) && f.observed <= Number(row[8]) ? 1 : 0);
      expect(f.score.in90).toBe(f.observed >= Number(row[5]) && f.observed <= Number(row[9]) ? 1 : 0);
    });
  }, 60_000);
});
