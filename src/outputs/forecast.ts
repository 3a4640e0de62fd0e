/**
 * Forecasts for every posterior draw (MODEL.md section 5): the epidemic integrated over the
 * seeding days, the observed days and `horizon` days more, with beta past the last observed day
 * as a scenario says (model/forecast.ts), and the daily quantities of the forecast days.
 *
 * Randomness, all from the run seed, the same in every scenario (common random numbers, so two
 * scenarios differ only by what they state): the new walk steps of draw d come from stream
 * deriveSeed(seed, STREAM_WALK, d), the negative-binomial noise of its predicted reports from
 * deriveSeed(seed, STREAM_NOISE, d). Both are drawn day by day, so a shorter horizon gives the
 * first days of a longer one.
 */
import type { EpidemicModel } from '../model/posterior.js';
import { forecastBeta, newStepCount, type BetaScenario } from '../model/forecast.js';
import { drawNegBin } from '../model/trajectory.js';
import { growthRate } from '../model/growth.js';
import { createRng, deriveSeed } from '../util/rng.js';
import { trajectoryOf } from '../model/derived.js';
import { column, doublingOf, halvingOf, summarizeDraws, type LongRow } from './draw-summary.js';

export const STREAM_WALK = 0xf0ca;
export const STREAM_NOISE = 0xf0cb;

/** Daily quantities of a forecast, in the order forecast.csv lists them. */
export const FORECAST_QUANTITIES = [
  'predicted_reports',
  'expected_reports',
  'infections',
  'onsets',
  'effective_reproduction',
  'transmission_rate',
  'growth_rate',
  'doubling_time',
  'halving_time',
  'cumulative_infections',
  'cumulative_reports',
] as const;
export type ForecastQuantity = (typeof FORECAST_QUANTITIES)[number];

/** Per-draw totals of one scenario over the forecast days. */
export interface ScenarioTotals {
  /** forecast day (1 = the day after the last observed day) of the highest expected reports, weekday pattern removed */
  peakReportsDay: Float64Array;
  peakReports: Float64Array;
  /** forecast day of the most infections */
  peakInfectionsDay: Float64Array;
  peakInfections: Float64Array;
  cumulativeInfections: Float64Array;
  /** sum of the predicted (noisy) reports */
  cumulativeReports: Float64Array;
}

export interface ScenarioForecast {
  horizon: number;
  draws: number;
  /** per quantity, a draws x horizon matrix (row-major); NaN rows for failed draws */
  daily: Record<ForecastQuantity, Float64Array>;
  totals: ScenarioTotals;
  /** draws whose trajectory turned negative or non-finite (their values are NaN) */
  failed: number;
}

/**
 * Forecasts `horizon` days past the last observed day under `scenario` for every draw
 * (rows of `draws`, row-major draws x dim, unconstrained vectors of `model`).
 */
export function forecastScenario(
  model: EpidemicModel,
  draws: Float64Array,
  firstWeekday: number,
  horizon: number,
  scenario: BetaScenario,
  seed: number,
): ScenarioForecast {
  const dim = model.layout.dim;
  const n = draws.length / dim;
  const H = horizon;
  const T = model.days;
  const simDays = model.simDays;
  const settings = model.priorSet.model;
  const m = settings.latent_stages;
  const nI = settings.infectious_stages;
  const daily = Object.fromEntries(FORECAST_QUANTITIES.map((q) => [q, new Float64Array(n * H)])) as Record<ForecastQuantity, Float64Array>;
  const totals: ScenarioTotals = {
    peakReportsDay: new Float64Array(n),
    peakReports: new Float64Array(n),
    peakInfectionsDay: new Float64Array(n),
    peakInfections: new Float64Array(n),
    cumulativeInfections: new Float64Array(n),
    cumulativeReports: new Float64Array(n),
  };
  const stepCount = newStepCount(model, H);
  const steps = new Float64Array(stepCount);
  const beta = new Float64Array(simDays + H);
  let failed = 0;
  for (let d = 0; d < n; d++) {
    const theta = draws.subarray(d * dim, (d + 1) * dim);
    const walkRng = createRng(deriveSeed(seed, STREAM_WALK, d));
    for (let j = 0; j < stepCount; j++) steps[j] = walkRng.normal();
    forecastBeta(model, theta, H, scenario, steps, beta);
    const { params: p, traj } = trajectoryOf(model, theta, firstWeekday, beta);
    const row = d * H;
    if (!traj.ok) {
      failed++;
      for (const q of FORECAST_QUANTITIES) daily[q].fill(NaN, row, row + H);
      for (const k of Object.keys(totals) as Array<keyof ScenarioTotals>) totals[k][d] = NaN;
      continue;
    }
    const noise = createRng(deriveSeed(seed, STREAM_NOISE, d));
    let cumInf = 0;
    let cumRep = 0;
    let peakRep = -Infinity;
    let peakRepDay = 0;
    let peakInf = -Infinity;
    let peakInfDay = 0;
    for (let h = 0; h < H; h++) {
      const s = simDays + h;
      const t = T + h;
      const b = traj.transmissionRate[s];
      const reff = (b * p.infectious_days * traj.susceptible[s]) / model.population;
      const r = growthRate(reff, p.latent_days, p.infectious_days, m, nI);
      const mu = traj.expectedReports[t];
      const y = drawNegBin(noise, mu, p.dispersion);
      const inf = traj.infections[s];
      cumInf += inf;
      cumRep += y;
      daily.predicted_reports[row + h] = y;
      daily.expected_reports[row + h] = mu;
      daily.infections[row + h] = inf;
      daily.onsets[row + h] = traj.onsets[s];
      daily.effective_reproduction[row + h] = reff;
      daily.transmission_rate[row + h] = b;
      daily.growth_rate[row + h] = r;
      daily.doubling_time[row + h] = doublingOf(r);
      daily.halving_time[row + h] = halvingOf(r);
      daily.cumulative_infections[row + h] = cumInf;
      daily.cumulative_reports[row + h] = cumRep;
      // the peak of reports without the weekday pattern, which would otherwise decide its day
      const smooth = p.ascertainment * traj.delayedOnsets[t];
      if (smooth > peakRep) {
        peakRep = smooth;
        peakRepDay = h + 1;
      }
      if (inf > peakInf) {
        peakInf = inf;
        peakInfDay = h + 1;
      }
    }
    totals.peakReportsDay[d] = peakRepDay;
    totals.peakReports[d] = peakRep;
    totals.peakInfectionsDay[d] = peakInfDay;
    totals.peakInfections[d] = peakInf;
    totals.cumulativeInfections[d] = cumInf;
    totals.cumulativeReports[d] = cumRep;
  }
  return { horizon: H, draws: n, daily, totals, failed };
}

/** Rows of forecast.csv for one scenario: every quantity on every forecast date. */
export function forecastRows(name: string, f: ScenarioForecast, dates: readonly string[], levels: readonly number[]): LongRow[] {
  if (dates.length !== f.horizon) throw new RangeError(`forecastRows: ${dates.length} dates for a horizon of ${f.horizon}`);
  const rows: LongRow[] = [];
  const col = new Float64Array(f.draws);
  for (const q of FORECAST_QUANTITIES) {
    for (let h = 0; h < f.horizon; h++) {
      column(f.daily[q], f.horizon, h, col);
      rows.push({ keys: [name, q, dates[h]], summary: summarizeDraws(col, levels) });
    }
  }
  return rows;
}

export const FORECAST_KEYS = ['scenario', 'quantity', 'date'] as const;
