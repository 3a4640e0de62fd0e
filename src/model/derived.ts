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
import { sortFloat64 } from '../util/float-sort.js';

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
  return fillDaily(model, draws, firstWeekday, rng, false);
}

/**
 * The daily quantities of every draw into fresh matrices: draw-major (draw d, day t at
 * d * days + t) or, with `dayMajor`, day-major (t * draws + d). The same numbers either way,
 * drawn in the same order.
 */
function fillDaily(model: EpidemicModel, draws: Float64Array, firstWeekday: number, rng: Rng, dayMajor: boolean): DailyDraws {
  const dim = model.layout.dim;
  const n = draws.length / dim;
  const T = model.days;
  const S0 = model.seedDays;
  const out = Object.fromEntries(DAILY_QUANTITIES.map((q) => [q, new Float64Array(n * T)])) as DailyDraws;
  const m = model.priorSet.model.latent_stages;
  const nI = model.priorSet.model.infectious_stages;
  // index of (draw d, day t): d * drawStride + t * dayStride
  const drawStride = dayMajor ? 1 : T;
  const dayStride = dayMajor ? n : 1;
  for (let d = 0; d < n; d++) {
    const theta = draws.subarray(d * dim, (d + 1) * dim);
    const { params: p, traj } = trajectoryOf(model, theta, firstWeekday);
    for (let t = 0; t < T; t++) {
      const i = d * drawStride + t * dayStride;
      const beta = traj.transmissionRate[S0 + t];
      const r0 = beta * p.infectious_days;
      const reff = (r0 * traj.susceptible[S0 + t]) / model.population;
      const mu = traj.expectedReports[t];
      out.transmission_rate[i] = beta;
      out.basic_reproduction[i] = r0;
      out.effective_reproduction[i] = reff;
      out.growth_rate[i] = growthRate(reff, p.latent_days, p.infectious_days, m, nI);
      out.infections[i] = traj.infections[S0 + t];
      out.onsets[i] = traj.onsets[S0 + t];
      out.expected_reports[i] = mu;
      out.predicted_reports[i] = drawNegBin(rng, mu, p.dispersion);
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
 * {@link sortedColumns} of {@link chainDailyDraws}, the same numbers, computed straight into
 * day-major columns (no transpose) and sorted by util/float-sort.ts: what a chain's thread
 * hands back as the chain ends (inference/chain-job.ts).
 */
export function chainDailyColumns(model: EpidemicModel, draws: Float64Array, firstWeekday: number, chainSeed: number): SortedDailyColumns {
  const daily = fillDaily(model, draws, firstWeekday, createRng(deriveSeed(chainSeed, PREDICTIVE_STREAM)), true);
  const n = draws.length / model.layout.dim;
  for (const q of DAILY_QUANTITIES) {
    const m = daily[q];
    for (let t = 0; t < model.days; t++) sortFloat64(m.subarray(t * n, (t + 1) * n));
  }
  return daily as SortedDailyColumns;
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

/** Length of the part of a sorted column before its NaNs (which sort last). */
function numberCount(col: Float64Array): number {
  let n = col.length;
  while (n > 0 && col[n - 1] !== col[n - 1]) n--;
  return n;
}

/**
 * Merges the sorted columns `a` and `b` into `out` (length a + b), in the order of
 * Float64Array.prototype.sort: NaN last, -0 before +0; on other ties `a` first.
 */
function mergeTwo(a: Float64Array, b: Float64Array, out: Float64Array): void {
  const na = numberCount(a);
  const nb = numberCount(b);
  let i = 0;
  let j = 0;
  let k = 0;
  while (i < na && j < nb) {
    const x = a[i]!;
    const y = b[j]!;
    // y first when smaller, or -0 against +0 (equal to <, apart in the sort's order)
    if (y < x || (y === x && y === 0 && 1 / y < 1 / x)) {
      out[k++] = y;
      j++;
    } else {
      out[k++] = x;
      i++;
    }
  }
  while (i < na) out[k++] = a[i++]!;
  while (j < nb) out[k++] = b[j++]!;
  out.fill(NaN, k);
}

/**
 * The sorted columns of several sets of draws over the same `days` days merged into the sorted
 * columns of all of them: per day, the parts merged pairwise in a fixed tree (the first with the
 * second, the third with the fourth, then the two results, ...), no sort.
 */
export function mergeSortedColumns(parts: readonly SortedDailyColumns[], days: number): SortedDailyColumns {
  return Object.fromEntries(
    DAILY_QUANTITIES.map((q) => {
      const sizes = parts.map((p) => p[q].length / days);
      const total = sizes.reduce((a, b) => a + b, 0);
      const out = new Float64Array(total * days);
      // two scratch areas as long as a whole column, merged level by level between them
      const bufA = new Float64Array(total);
      const bufB = new Float64Array(total);
      for (let t = 0; t < days; t++) {
        let level: Float64Array[] = parts.map((p, i) => p[q].subarray(t * sizes[i]!, (t + 1) * sizes[i]!));
        let into = bufA;
        while (level.length > 1) {
          const next: Float64Array[] = [];
          let offset = 0;
          for (let i = 0; i < level.length; i += 2) {
            const a = level[i]!;
            const b = level[i + 1];
            const dest = into.subarray(offset, offset + a.length + (b?.length ?? 0));
            if (b === undefined) dest.set(a);
            else mergeTwo(a, b, dest);
            next.push(dest);
            offset += dest.length;
          }
          level = next;
          into = into === bufA ? bufB : bufA;
        }
        if (level.length === 1) out.set(level[0]!, t * total);
      }
      return [q, out];
    }),
  ) as SortedDailyColumns;
}
