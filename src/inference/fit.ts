/**
 * A whole fit: posterior mode from several optimiser starts, Laplace covariance there,
 * over-dispersed chain starts, and the chains themselves on worker threads. Every random
 * choice comes from streams derived from the one run seed.
 */
import { performance } from 'node:perf_hooks';
import { WaxwaneError } from '../errors.js';
import { deriveSeed, createRng } from '../util/rng.js';
import { modelFromInput, type ChainJob, type ChainJobEvents, type ModelInput } from './chain-job.js';
import type { ChainResult, ChainSnapshot } from './chain.js';
import { findMode } from './optimize.js';
import { laplaceCovariance, dispersedStarts } from './laplace.js';
import { runChainJobs } from './pool.js';
import type { EpidemicModel } from '../model/posterior.js';
import { createSamplingSpace } from '../model/sampling-space.js';

export interface SamplerOptions {
  chains: number;
  warmup: number;
  draws: number;
  thin: number;
  seed: number;
  /** worker threads; 0 runs the chains in this thread */
  threads: number;
  /** optimiser starts for the mode */
  optimizerStarts: number;
  /** iterations between progress events and snapshots */
  slice: number;
}

export const DEFAULT_SAMPLER: SamplerOptions = {
  chains: 4,
  warmup: 4000,
  draws: 1000,
  thin: 10,
  seed: 1,
  threads: 2,
  optimizerStarts: 4,
  slice: 1000,
};

export interface PreparedFit {
  model: EpidemicModel;
  /** the posterior mode in the sampler's coordinates (model/sampling-space.ts) */
  mode: Float64Array;
  modeLogDensity: number;
  laplaceAdjusted: boolean;
  jobs: ChainJob[];
  warnings: string[];
}

export interface FitResult extends PreparedFit {
  chains: ChainResult[];
  timings: { prepareSeconds: number; samplingSeconds: number };
}

/** Deterministic optimiser starts: the prior medians, then draws from the prior (walk flat). */
function optimizerStarts(model: EpidemicModel, count: number, seed: number): Float64Array[] {
  const { layout: L, priors: p } = model;
  const rng = createRng(deriveSeed(seed, 0x0071));
  const starts: Float64Array[] = [];
  for (let s = 0; s < count; s++) {
    const th = new Float64Array(L.dim);
    const pick = (prior: typeof p.start_reproduction) =>
      prior.toUnconstrained(s === 0 ? prior.quantile(0.5) : prior.quantile(0.2 + 0.6 * rng.uniform()));
    th[L.startReproduction] = pick(p.start_reproduction);
    th[L.walkScale] = pick(p.walk_scale);
    th[L.ascertainment] = pick(p.ascertainment);
    th[L.dispersion] = pick(p.dispersion);
    th[L.seedInfected] = pick(p.seed_infected);
    th[L.latentDays] = pick(p.latent_days);
    th[L.infectiousDays] = pick(p.infectious_days);
    starts.push(th);
  }
  return starts;
}

export function prepareFit(input: ModelInput, options: SamplerOptions): PreparedFit {
  const model = modelFromInput(input);
  const space = createSamplingSpace(model);
  const warnings: string[] = [];
  const starts = optimizerStarts(model, options.optimizerStarts, options.seed)
    .map((theta) => space.fromTheta(theta))
    .filter((y): y is Float64Array => y !== null);
  if (starts.length === 0) {
    throw new WaxwaneError('the epidemic cannot be simulated from any starting point; check the data and the population');
  }
  const mode = findMode(space.logDensity, starts, { maxIterations: 2000, functionTolerance: 1e-10 });
  if (!Number.isFinite(mode.logDensity)) {
    throw new WaxwaneError('no parameter vector with a finite posterior density was found; check the data and the population');
  }
  if (!mode.converged) warnings.push(`the optimiser stopped before converging (${mode.reason}); the chains start from its best point`);
  const laplace = laplaceCovariance(space.logDensity, mode.position);
  if (laplace.adjusted) warnings.push('the Hessian at the mode was not positive definite and was adjusted for the initial proposal');
  const chainStarts = dispersedStarts(
    space.logDensity,
    createRng(deriveSeed(options.seed, 0x5747)),
    mode.position,
    laplace.covariance,
    options.chains,
  );
  const jobs: ChainJob[] = chainStarts.map((start, chain) => ({
    chain,
    model: input,
    start: Array.from(start),
    initialCov: Array.from(laplace.covariance),
    seed: deriveSeed(options.seed, chain),
    warmup: options.warmup,
    draws: options.draws,
    thin: options.thin,
    slice: options.slice,
  }));
  return { model, mode: mode.position, modeLogDensity: mode.logDensity, laplaceAdjusted: laplace.adjusted, jobs, warnings };
}

export async function fitPosterior(
  input: ModelInput,
  options: SamplerOptions,
  events: ChainJobEvents = {},
  resume?: { prepared: PreparedFit; snapshots: Map<number, ChainSnapshot> },
): Promise<FitResult> {
  const t0 = performance.now();
  const prepared = resume?.prepared ?? prepareFit(input, options);
  const jobs = prepared.jobs.map((j) => {
    const snap = resume?.snapshots.get(j.chain);
    return snap === undefined ? j : { ...j, snapshot: snap };
  });
  const t1 = performance.now();
  const chains = await runChainJobs(jobs, options.threads, events, events.snapshot !== undefined);
  const t2 = performance.now();
  return { ...prepared, chains, timings: { prepareSeconds: (t1 - t0) / 1000, samplingSeconds: (t2 - t1) / 1000 } };
}
