/**
 * Derived quantities for every kept posterior draw (MODEL.md section 5): the transmission
 * rate, basic and effective reproduction numbers, growth rate, infections, onsets, expected
 * reports and posterior predictive reports, per observed day.
 */
import type { EpidemicModel } from './posterior.js';
import { toNatural, type NaturalParameters } from './layout.js';
import { fillWalk, fillBetaOverN } from './transmission.js';
import { runTrajectory, drawNegBin, type Trajectory } from './trajectory.js';
import { growthRate } from './growth.js';
import { createRng, deriveSeed, type Rng } from '../util/rng.js';

export const DAILY_QUANTITIES = [
  'transmission_rate',
  'basic_reproduction',
  'effective_reproduction',
  'growth_rate',
  'infections',
  'onsets',
  'expected_reports',
  'predicted_reports',
] as const;
export type DailyQuantity = (typeof DAILY_QUANTITIES)[number];

/** Per quantity, a draws x days matrix (row-major: draw d, day t at d * days + t). */
export type DailyDraws = Record<DailyQuantity, Float64Array>;

/** Weekday multipliers exp(v_1..v_6, -sum v) or null. */
export function weekdayMultipliers(weekday: number[]): number[] | null {
  if (weekday.length === 0) return null;
  const sum = weekday.reduce((a, b) => a + b, 0);
  return [...weekday.map((v) => Math.exp(v)), Math.exp(-sum)];
}

/** Daily beta over the simulated window for one unconstrained vector. */
export function dailyBeta(model: EpidemicModel, theta: ArrayLike<number>): Float64Array {
  const L = model.layout;
  const s = model.priorSet.model;
  const walk = new Float64Array(L.knots);
  fillWalk(Math.exp(theta[L.walkScale]), theta, L.firstStep, L.knots, walk);
  const beta = new Float64Array(model.simDays);
  fillBetaOverN(theta[0] - theta[L.infectiousDays], walk, L.knots, s.knot_days, s.interpolation === 'linear', 1, model.simDays, beta);
  return beta;
}

/**
 * The epidemic of one unconstrained vector: its natural parameters and its trajectory under
 * the daily transmission rate `beta` (by default the fitted walk over the simulated window;
 * forecasts pass a longer one). `firstWeekday` is the weekday (0 = Monday) of the first
 * observed day, for the weekday reporting multipliers.
 */
export function trajectoryOf(
  model: EpidemicModel,
  theta: ArrayLike<number>,
  firstWeekday: number,
  beta: Float64Array = dailyBeta(model, theta),
): { params: NaturalParameters; traj: Trajectory } {
  const params = toNatural(model.layout, theta);
  const traj = runTrajectory(
    model.priorSet.model,
    model.delay,
    {
      population: model.population,
      seedInfected: params.seed_infected,
      latentDays: params.latent_days,
      infectiousDays: params.infectious_days,
      ascertainment: params.ascertainment,
      weekdayMultipliers: weekdayMultipliers(params.weekday),
    },
    beta,
    firstWeekday,
  );
  return { params, traj };
}

/**
 * Computes every daily quantity for each draw (rows of `draws`, row-major draws x dim).
 * `rng` gives the negative-binomial noise of the predicted reports.
 */
export function dailyDraws(model: EpidemicModel, draws: Float64Array, firstWeekday: number, rng: Rng): DailyDraws {
  const dim = model.layout.dim;
  const n = draws.length / dim;
  const T = model.days;
  const S0 = model.seedDays;
  const out = Object.fromEntries(DAILY_QUANTITIES.map((q) => [q, new Float64Array(n * T)])) as DailyDraws;
  const m = model.priorSet.model.latent_stages;
  const nI = model.priorSet.model.infectious_stages;
  for (let d = 0; d < n; d++) {
    const theta = draws.subarray(d * dim, (d + 1) * dim);
    const { params: p, traj } = trajectoryOf(model, theta, firstWeekday);
    const row = d * T;
    for (let t = 0; t < T; t++) {
      const beta = traj.transmissionRate[S0 + t];
      const r0 = beta * p.infectious_days;
      const reff = (r0 * traj.susceptible[S0 + t]) / model.population;
      const mu = traj.expectedReports[t];
      out.transmission_rate[row + t] = beta;
      out.basic_reproduction[row + t] = r0;
      out.effective_reproduction[row + t] = reff;
      out.growth_rate[row + t] = growthRate(reff, p.latent_days, p.infectious_days, m, nI);
      out.infections[row + t] = traj.infections[S0 + t];
      out.onsets[row + t] = traj.onsets[S0 + t];
      out.expected_reports[row + t] = mu;
      out.predicted_reports[row + t] = drawNegBin(rng, mu, p.dispersion);
    }
  }
  return out;
}

/** Sub-stream of a chain's seed for the negative-binomial noise of its predicted reports. */
const PREDICTIVE_STREAM = 0x9e37;

/**
 * {@link dailyDraws} of one chain's draws, the predictive noise from a stream of the chain's own
 * seed: the same numbers whether a worker thread computes them as the chain ends
 * (inference/chain-job.ts) or the main thread does afterwards.
 */
export function chainDailyDraws(model: EpidemicModel, draws: Float64Array, firstWeekday: number, chainSeed: number): DailyDraws {
  return dailyDraws(model, draws, firstWeekday, createRng(deriveSeed(chainSeed, PREDICTIVE_STREAM)));
}

/**
 * Per quantity, a days x draws matrix, day-major (day t's draws at t * n .. t * n + n - 1), each
 * day's draws in ascending order, NaN last: what the summaries need (model/derived.ts
 * {@link sortedColumns}, outputs/summary.ts), and small enough to pass between threads once.
 */
export type SortedDailyColumns = Record<DailyQuantity, Float64Array> & { readonly [sortedBrand]: true };
/** A mark for the type checker only, so draw-ordered {@link DailyDraws} cannot pass for sorted columns. */
declare const sortedBrand: unique symbol;

/** Day-major sorted columns of daily draws over `days` days (a copy; the draws are left as they are). */
export function sortedColumns(daily: DailyDraws, days: number): SortedDailyColumns {
  return Object.fromEntries(
    DAILY_QUANTITIES.map((q) => {
      const m = daily[q];
      const n = m.length / days;
      const out = new Float64Array(m.length);
      for (let d = 0; d < n; d++) {
        const row = d * days;
        for (let t = 0; t < days; t++) out[t * n + d] = m[row + t];
      }
      for (let t = 0; t < days; t++) out.subarray(t * n, (t + 1) * n).sort();
      return [q, out];
    }),
  ) as SortedDailyColumns;
}

/** a before b in ascending order with NaN last (the order of Float64Array.prototype.sort, -0 and 0 aside) */
function before(a: number, b: number): boolean {
  return a < b || (b !== b && a === a);
}

/**
 * The sorted columns of several sets of draws over the same `days` days merged into the sorted
 * columns of all of them (a merge per day, no sort).
 */
export function mergeSortedColumns(parts: readonly SortedDailyColumns[], days: number): SortedDailyColumns {
  return Object.fromEntries(
    DAILY_QUANTITIES.map((q) => {
      const sizes = parts.map((p) => p[q].length / days);
      const total = sizes.reduce((a, b) => a + b, 0);
      const out = new Float64Array(total * days);
      let run = new Float64Array(total);
      let spare = new Float64Array(total);
      for (let t = 0; t < days; t++) {
        // fold the parts in one by one: run holds the merge of the first i parts
        let len = 0;
        for (let i = 0; i < parts.length; i++) {
          const col = parts[i]![q].subarray(t * sizes[i]!, (t + 1) * sizes[i]!);
          let a = 0;
          let b = 0;
          let k = 0;
          while (a < len && b < col.length) spare[k++] = before(col[b]!, run[a]!) ? col[b++]! : run[a++]!;
          while (a < len) spare[k++] = run[a++]!;
          while (b < col.length) spare[k++] = col[b++]!;
          len = k;
          const swap = run;
          run = spare;
          spare = swap;
        }
        out.set(run.subarray(0, total), t * total);
      }
      return [q, out];
    }),
  ) as SortedDailyColumns;
}
