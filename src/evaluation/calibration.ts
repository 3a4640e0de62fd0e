/**
 * Simulation-based calibration of the whole engine (Talts, Betancourt, Simpson, Vehtari and
 * Gelman 2018, arXiv:1804.06788): in each replicate a parameter vector is drawn from the prior,
 * reported counts are simulated from it through the model's own code, the engine fits them
 * (fitPosterior, the fit every command runs), and the rank of each true value among thinned
 * posterior draws is recorded. If the engine's posterior is right, every rank is uniform on
 * 0..L; a histogram that is not flags a fault of the sampler, the density or the simulator.
 * How it looks says what is wrong (Talts et al. 2018, section 4.2): ranks piled at both ends
 * mean posteriors too narrow, a hump in the middle too wide, a slope a posterior shifted.
 */
import { performance } from 'node:perf_hooks';
import { WaxwaneError } from '../errors.js';
import { fitPosterior, type FitResult, type SamplerOptions } from '../inference/fit.js';
import type { EpidemicModel } from '../model/posterior.js';
import { createModel } from '../model/posterior.js';
import type { PriorSet } from '../model/prior-set.js';
import { toNatural } from '../model/layout.js';
import { dailyBeta, trajectoryOf } from '../model/derived.js';
import { createRng, deriveSeed, type Rng } from '../util/rng.js';
import { checkFit, pooledDraws, type FitCheck } from './fit-record.js';
import { drawFromPrior, simulateEpidemic } from './prior-draws.js';
import { rankHistogram, rankOf, thinEvenly, uniformityTest, type UniformityTest } from './ranks.js';

/** The quantities whose ranks are recorded: every scalar parameter and R_t on the last day. */
export const CALIBRATION_QUANTITIES = [
  'start_reproduction',
  'walk_scale',
  'ascertainment',
  'dispersion',
  'seed_infected',
  'latent_days',
  'infectious_days',
  'effective_reproduction_last_day',
] as const;
export type CalibrationQuantity = (typeof CALIBRATION_QUANTITIES)[number];

/** R_t = beta D S / N on the last observed day of the unconstrained vector `theta`. */
function lastDayReproduction(model: EpidemicModel, theta: ArrayLike<number>): number {
  const beta = dailyBeta(model, theta);
  const { params: p, traj } = trajectoryOf(model, theta, 0, beta);
  if (!traj.ok) return NaN;
  const s = model.simDays - 1;
  return (beta[s] * p.infectious_days * traj.susceptible[s]) / model.population;
}

/** The values of {@link CALIBRATION_QUANTITIES} for one unconstrained vector, in that order. */
export function calibrationValues(model: EpidemicModel, theta: ArrayLike<number>): number[] {
  const p = toNatural(model.layout, theta);
  return [p.start_reproduction, p.walk_scale, p.ascertainment, p.dispersion, p.seed_infected, p.latent_days, p.infectious_days, lastDayReproduction(model, theta)];
}

export interface CalibrationOptions {
  days: number;
  population: number;
  reps: number;
  /** posterior draws each rank is taken among (L); L + 1 must be a multiple of `bins` */
  thinTo: number;
  bins: number;
  /** family-wise level of the uniformity tests (Bonferroni over the quantities) */
  alpha: number;
  /** the fits' sampler; its seed is replaced per replicate */
  sampler: SamplerOptions;
  seed: number;
}

export interface Replicate {
  rep: number;
  /** true values, in the order of CALIBRATION_QUANTITIES */
  truth: number[];
  /** ranks 0..L, NaN when the fit failed */
  ranks: number[];
  /** simulations discarded before this one because the epidemic could not be run */
  discarded: number;
  /** total simulated reports */
  totalReports: number;
  check: FitCheck | null;
  /** why the fit failed, or null */
  failure: string | null;
  seconds: number;
}

export interface QuantityCalibration {
  quantity: CalibrationQuantity;
  histogram: number[];
  test: UniformityTest;
  /** mean rank / L: near 1/2 for a calibrated engine; below, the posterior sits above the truth */
  meanRankShare: number;
  /** share of ranks in the first and last bins: near 2 / bins for a calibrated engine; above, posteriors too narrow */
  outerShare: number;
  flagged: boolean;
}

export interface CalibrationResult {
  replicates: Replicate[];
  quantities: QuantityCalibration[];
  /** per-test level: alpha / number of quantities */
  testLevel: number;
  warnings: string[];
}

/** Seed streams: the truth and data of replicate r, its fit, and its tie-breaking. */
export const STREAM_TRUTH = 0x5bc0;
export const STREAM_FIT = 0x5bc1;
export const STREAM_TIES = 0x5bc2;
/** Simulations tried per replicate before giving up on a prior that cannot run an epidemic. */
const MAX_DISCARDED = 100;

export interface CalibrationEvents {
  replicateStarting?(rep: number, reps: number): void;
  progress?(chain: number, iteration: number, total: number): void;
}

/**
 * Runs one replicate: truth from `truthPriors`, data simulated from it, a fit with `fitPriors`
 * (the same set for a calibration check; another set shows what a wrong prior does), ranks.
 *
 * A prior draw whose epidemic cannot be run (a compartment turns negative or non-finite) is
 * drawn again: the model's density is -Infinity there, so the engine's actual prior is the
 * prior restricted to runnable epidemics, and that restricted prior is what the truth must come
 * from.
 */
export async function runReplicate(truthPriors: PriorSet, fitPriors: PriorSet, o: CalibrationOptions, rep: number, events: CalibrationEvents = {}): Promise<Replicate> {
  const started = performance.now();
  const firstWeekday = 0;
  const blank = { counts: new Float64Array(o.days).fill(NaN), population: o.population, firstWeekday };
  const truthModel = createModel(blank, truthPriors);
  const rng = createRng(deriveSeed(o.seed, STREAM_TRUTH, rep));
  let discarded = 0;
  let theta = drawFromPrior(truthModel, rng);
  let sim = simulateEpidemic(truthModel, theta, firstWeekday, rng);
  while (!sim.ok) {
    if (++discarded >= MAX_DISCARDED) {
      throw new WaxwaneError(`${MAX_DISCARDED} draws in a row from the prior set "${truthPriors.name}" gave epidemics that cannot be run; check the prior set and the population (waxwane prior-check shows what it implies)`);
    }
    theta = drawFromPrior(truthModel, rng);
    sim = simulateEpidemic(truthModel, theta, firstWeekday, rng);
  }
  const truth = calibrationValues(truthModel, theta);
  const totalReports = sim.counts.reduce((a, v) => a + v, 0);
  const counts = Array.from(sim.counts);
  const none = CALIBRATION_QUANTITIES.map(() => NaN);
  let fit: FitResult;
  try {
    fit = await fitPosterior({ counts, population: o.population, firstWeekday, priorSet: fitPriors }, { ...o.sampler, seed: deriveSeed(o.seed, STREAM_FIT, rep) }, { progress: (c, i, t) => events.progress?.(c, i, t) });
  } catch (e) {
    if (!(e instanceof WaxwaneError)) throw e;
    return { rep, truth, ranks: none, discarded, totalReports, check: null, failure: e.message, seconds: (performance.now() - started) / 1000 };
  }
  const all = pooledDraws(fit);
  const dim = fit.model.layout.dim;
  const picked = thinEvenly(all.length / dim, o.thinTo);
  const values = CALIBRATION_QUANTITIES.map(() => new Float64Array(picked.length));
  picked.forEach((row, l) => {
    calibrationValues(fit.model, all.subarray(row * dim, (row + 1) * dim)).forEach((v, q) => {
      values[q]![l] = v;
    });
  });
  const ties: Rng = createRng(deriveSeed(o.seed, STREAM_TIES, rep));
  const ranks = truth.map((t, q) => rankOf(t, values[q]!, ties));
  return { rep, truth, ranks, discarded, totalReports, check: checkFit(fit), failure: null, seconds: (performance.now() - started) / 1000 };
}

/** The histograms and uniformity tests of the replicates' ranks. */
export function summarizeCalibration(replicates: readonly Replicate[], o: Pick<CalibrationOptions, 'thinTo' | 'bins' | 'alpha'>): CalibrationResult {
  const testLevel = o.alpha / CALIBRATION_QUANTITIES.length;
  const quantities = CALIBRATION_QUANTITIES.map((quantity, q): QuantityCalibration => {
    const ranks = replicates.map((r) => r.ranks[q]!).filter((r) => !Number.isNaN(r));
    const histogram = rankHistogram(ranks, o.thinTo, o.bins);
    const test = uniformityTest(histogram);
    const n = ranks.length;
    return {
      quantity,
      histogram,
      test,
      meanRankShare: n === 0 ? NaN : ranks.reduce((a, r) => a + r, 0) / n / o.thinTo,
      outerShare: n === 0 ? NaN : (histogram[0]! + histogram[o.bins - 1]!) / n,
      flagged: test.pValue < testLevel,
    };
  });
  const warnings: string[] = [];
  const failed = replicates.filter((r) => r.failure !== null);
  if (failed.length > 0) {
    warnings.push(`${failed.length} of ${replicates.length} fits failed and have no ranks (${failed[0]!.failure}); leaving them out can itself bend the histograms`);
  }
  const ess = replicates.filter((r) => r.check !== null).map((r) => r.check!.minEssBulk).sort((a, b) => a - b);
  const medianEss = ess.length === 0 ? NaN : ess[Math.floor(ess.length / 2)]!;
  if (medianEss < o.thinTo) {
    warnings.push(
      `the fits' lowest bulk ESS has median ${Math.round(medianEss)}, below the ${o.thinTo} draws each rank is taken among: the ranked draws are autocorrelated, which piles ranks at both ends even for a correct engine; run the fits longer (--draws, --thin) or lower --thin-to`,
    );
  }
  return { replicates: [...replicates], quantities, testLevel, warnings };
}

/** Runs every replicate in turn and summarises them. */
export async function runCalibration(truthPriors: PriorSet, fitPriors: PriorSet, o: CalibrationOptions, events: CalibrationEvents = {}): Promise<CalibrationResult> {
  if (o.sampler.chains * o.sampler.draws < o.thinTo) {
    throw new WaxwaneError(`the fits keep ${o.sampler.chains * o.sampler.draws} draws (--chains x --draws), fewer than the ${o.thinTo} each rank is taken among (--thin-to); keep more draws or lower --thin-to`);
  }
  const replicates: Replicate[] = [];
  for (let rep = 0; rep < o.reps; rep++) {
    events.replicateStarting?.(rep, o.reps);
    replicates.push(await runReplicate(truthPriors, fitPriors, o, rep, events));
  }
  return summarizeCalibration(replicates, o);
}
