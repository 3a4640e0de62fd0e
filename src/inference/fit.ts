/**
 * A whole fit: posterior mode from several optimiser starts, Laplace covariance there,
 * over-dispersed chain starts, and the chains themselves on worker threads, in the sampler's
 * coordinates (model/sampling-space.ts: reported-scale infection flows, walk scale integrated
 * out). Warm-up runs in synchronous rounds whose ends pool the chains' draws into one proposal
 * shape (pooled-adaptation.ts). Every random choice comes from streams derived from the one run
 * seed, and nothing depends on the number of threads.
 */
import { performance } from 'node:perf_hooks';
import { WaxwaneError } from '../errors.js';
import { deriveSeed, createRng } from '../util/rng.js';
import { modelFromInput, type ChainJob, type ChainJobEvents, type ChainJobResult, type ModelInput } from './chain-job.js';
import { poolRound, roundEnds, type PooledShape } from './pooled-adaptation.js';
import type { ChainSnapshot } from './chain.js';
import { samplerMode } from './sampler-mode.js';
import { laplaceCovariance, dispersedStarts } from './laplace.js';
import { createChainPool, type ChainPool } from './worker-pool.js';
import type { EpidemicModel } from '../model/posterior.js';
import { createSamplingSpace } from '../model/sampling-space.js';
import { chainDailyColumns, mergeSortedColumns, type SortedDailyColumns } from '../model/derived.js';

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
  /** shortest time between two snapshots of a chain (checkpoints); default 2 s */
  snapshotIntervalMs?: number;
  /** compute the daily derived quantities in the chains' threads as each chain ends ({@link fitDailyDraws}) */
  derived?: boolean;
}

/**
 * Defaults, measured on the demo data (182 days) and a simulated district (150 days): with
 * 10,000 warm-up iterations the pooled shape is close to the posterior covariance, and 60,000
 * sampling iterations per chain give every parameter a bulk ESS above 1,000 over 4 chains,
 * which is what R-hat <= 1.01 needs for all 34 parameters at once (below about 800 the largest
 * of 34 split R-hats passes 1.01 in one run out of three). The slowest quantity is the walk
 * scale (the walk's overall roughness). Two optimiser starts: the mode only centres the
 * over-dispersed starts, and the second start is a safeguard against a poor local mode.
 */
export const DEFAULT_SAMPLER: SamplerOptions = {
  chains: 4,
  warmup: 10000,
  draws: 1000,
  thin: 60,
  seed: 1,
  threads: 2,
  optimizerStarts: 2,
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
  /** in the order of `jobs` */
  chains: ChainJobResult[];
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
  const starts = optimizerStarts(model, options.optimizerStarts, options.seed);
  const mode = samplerMode(
    space,
    starts,
    model.layout.walkScale,
    { maxIterations: 2000, functionTolerance: 1e-9 },
    { maxIterations: 2000, functionTolerance: 1e-6, differences: 'forward' },
  );
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
    ...(options.snapshotIntervalMs !== undefined ? { snapshotIntervalMs: options.snapshotIntervalMs } : {}),
    ...(options.derived === true ? { derived: true } : {}),
  }));
  return { model, mode: mode.position, modeLogDensity: mode.logDensity, laplaceAdjusted: laplace.adjusted, jobs, warnings };
}

/**
 * Runs the chains: warm-up in synchronous rounds whose ends pool the chains' draws into one
 * proposal shape (pooled-adaptation.ts), then the rest to the end.
 *
 * Resuming from snapshots (the latest one of each chain) gives the same draws as an
 * uninterrupted run: a round is pooled only once every chain has reached its end, so at any
 * moment the chains have been given either the same number of shapes or, for those that went
 * on, one more. A chain that went on carries that shape (the adaptation's `priorCov` and
 * `installedLogScale`) and hands it to the others; otherwise the round is pooled afresh from the
 * chains' moments, which then all belong to that round.
 */
async function runPooled(jobs: ChainJob[], pool: ChainPool, events: ChainJobEvents): Promise<ChainJobResult[]> {
  const wantSnapshots = events.snapshot !== undefined;
  const ends = roundEnds(jobs[0]?.warmup ?? 0);
  const pooling = ends.length > 0 && jobs.length > 1;
  const current: ChainJob[] = pooling ? jobs.map((j) => ({ ...j, adaptation: { learnShape: false } })) : jobs.slice();
  const installed = (j: ChainJob) => j.snapshot?.adaptation.installed ?? 0;
  for (let r = 0; pooling && r < ends.length; r++) {
    const behind = current.flatMap((j, i) => (installed(j) <= r ? [i] : []));
    if (behind.length === 0) continue;
    const results = await pool.run(behind.map((i) => ({ ...current[i]!, stopAt: ends[r] })), events, wantSnapshots);
    behind.forEach((i, k) => {
      current[i] = { ...current[i]!, snapshot: results[k]!.snapshot! };
      // a round's end is a natural checkpoint: nothing of the round is lost after it
      events.snapshot?.(current[i]!.chain, results[k]!.snapshot!);
    });
    const ahead = current.find((j) => installed(j) > r);
    const shape: PooledShape | null =
      ahead !== undefined
        ? { cov: ahead.snapshot!.adaptation.priorCov, logScale: ahead.snapshot!.adaptation.installedLogScale ?? 0, round: r + 1 }
        : poolRound(current.map((j) => j.snapshot!.adaptation), r + 1);
    if (shape === null) throw new Error(`warm-up round ${r + 1} gave too few draws to pool`);
    for (const i of behind) current[i] = { ...current[i]!, shape };
  }
  return await pool.run(current, events, wantSnapshots);
}

/**
 * A whole fit (see the file header). `resume` continues from a checkpoint's preparation and
 * chain snapshots; `pool` runs the chains on a pool the caller started (and closes) itself,
 * e.g. before its own call of {@link prepareFit}, else the fit starts and closes its own.
 */
export async function fitPosterior(
  input: ModelInput,
  options: SamplerOptions,
  events: ChainJobEvents = {},
  resume?: { prepared: PreparedFit; snapshots: Map<number, ChainSnapshot> },
  pool?: ChainPool,
): Promise<FitResult> {
  const t0 = performance.now();
  // the workers start loading while this thread looks for the mode
  const chainPool = pool ?? createChainPool(options.threads, options.chains);
  try {
    const prepared = resume?.prepared ?? prepareFit(input, options);
    const jobs = prepared.jobs.map((j) => {
      const snap = resume?.snapshots.get(j.chain);
      return snap === undefined ? j : { ...j, snapshot: snap };
    });
    const t1 = performance.now();
    const chains = await runPooled(jobs, chainPool, events);
    const t2 = performance.now();
    return { ...prepared, chains, timings: { prepareSeconds: (t1 - t0) / 1000, samplingSeconds: (t2 - t1) / 1000 } };
  } finally {
    if (pool === undefined) await chainPool.close();
  }
}

/**
 * The daily derived quantities of every kept draw as sorted columns (model/derived.ts): merged
 * from those the chains' threads computed (jobs run with `derived`), else computed here with the
 * same per-chain streams, so the numbers are the same either way (e.g. after resuming a
 * checkpoint written before `derived` was asked for).
 */
export function fitDailyColumns(fit: FitResult): SortedDailyColumns {
  const days = fit.model.days;
  return mergeSortedColumns(
    fit.chains.map(
      (c, i) => c.dailyColumns ?? chainDailyColumns(fit.model, c.draws, fit.jobs[i]!.model.firstWeekday, fit.jobs[i]!.seed),
    ),
    days,
  );
}
