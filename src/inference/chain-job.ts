/**
 * One chain of a fit as a self-contained job: the data and prior set to rebuild the model,
 * the start, the initial proposal and the chain's own seed. Run in a worker thread
 * (chain-worker.ts) or in this thread; the draws depend only on the job, never on where or
 * alongside what it ran, so a run is identical whatever the thread count. A job may stop at a
 * warm-up round's end and hand back its snapshot, to be continued with a pooled proposal shape
 * (fit.ts, pooled-adaptation.ts).
 */
import { createModel, type EpidemicModel, type ModelData } from '../model/posterior.js';
import { createSamplingSpace, type SamplingSpace } from '../model/sampling-space.js';
import type { PriorSet } from '../model/prior-set.js';
import { createRng, deriveSeed } from '../util/rng.js';
import { ChainRunner, type ChainResult, type ChainSnapshot } from './chain.js';
import type { AdaptationSettings } from './adaptation.js';
import type { PooledShape } from './pooled-adaptation.js';
import { createWalkScaleMove, type AuxiliaryStep } from './walk-scale-move.js';
import { chainDailyColumns, type SortedDailyColumns } from '../model/derived.js';

/**
 * Random-walk iterations between two walk-scale moves (walk-scale-move.ts). A move costs two
 * simulations of the epidemic against one per random-walk step (five before the move and the
 * density at the moved point were computed in one simulation). Measured: every 4 doubled
 * the lowest bulk ESS of 35-day fits (median 115 -> 250) and took the share of true walk scales
 * in the lowest calibration rank bin from 13.5% to 7.5% (10% expected), at +50% sampling time on
 * the 182-day demo (with the five-simulation move), whose ESS it did not change; every 8 keeps
 * the move's share of the sampling time near 15%, and where warm-up finds the move carrying the
 * walk scale too little to pay for itself (long series, chain.ts AUX_MIN_JUMP) the chain stops
 * making it for the sampling phase.
 */
export const WALK_SCALE_MOVE_EVERY = 8;

/** Sub-stream of a chain's seed for the walk-scale draws. */
const WALK_SCALE_STREAM = 0x5ca1e;

export interface ModelInput {
  counts: number[];
  population: number;
  firstWeekday: number;
  priorSet: PriorSet;
}

export interface ChainJob {
  chain: number;
  model: ModelInput;
  start: number[];
  initialCov: number[];
  seed: number;
  warmup: number;
  draws: number;
  thin: number;
  /** iterations between progress reports and snapshots */
  slice: number;
  /** shortest time between two snapshots sent for checkpoints (default SNAPSHOT_INTERVAL_MS) */
  snapshotIntervalMs?: number;
  /** continue from here instead of starting afresh */
  snapshot?: ChainSnapshot;
  /** adaptation tuning (adaptation.ts); the runner's defaults otherwise */
  adaptation?: Partial<AdaptationSettings>;
  /** install this proposal shape first, unless the chain already has (pooled-adaptation.ts) */
  shape?: PooledShape;
  /** stop at this iteration (a warm-up round's end) and return a snapshot instead of draws */
  stopAt?: number;
  /**
   * compute the daily derived quantities of the draws as the chain ends, as sorted columns
   * (model/derived.ts chainDailyColumns: the same numbers as computing them later), so that
   * work is spread over the threads too
   */
  derived?: boolean;
}

/** A job's outcome: the chain's draws, or its snapshot when the job stopped early. */
export interface ChainJobResult extends ChainResult {
  snapshot?: ChainSnapshot;
  /** the daily derived quantities of the draws as sorted columns, when the job asked for them */
  dailyColumns?: SortedDailyColumns;
}

export interface ChainJobEvents {
  progress?(chain: number, iteration: number, total: number, warmingUp: boolean): void;
  snapshot?(chain: number, snapshot: ChainSnapshot): void;
}

export function modelFromInput(input: ModelInput) {
  const data: ModelData = {
    counts: Float64Array.from(input.counts, (v) => (v === null ? NaN : v)),
    population: input.population,
    firstWeekday: input.firstWeekday,
  };
  return createModel(data, input.priorSet);
}

/** The model, sampling space and walk-scale move of the last job's input, kept for the next. */
let lastJobModel: { key: string; model: EpidemicModel; space: SamplingSpace; step: AuxiliaryStep | null } | null = null;

/**
 * The model, sampling space and walk-scale move of a job's input, reused from the previous job
 * when the input is the same (the chains of one fit, and its warm-up rounds): the functions
 * the compiler has already optimised are kept, where fresh ones would warm up again in every
 * round. They hold only scratch buffers that each evaluation overwrites, and jobs in one thread
 * run one at a time, so reusing them changes no result.
 */
function jobModel(input: ModelInput): { model: EpidemicModel; space: SamplingSpace; step: AuxiliaryStep | null } {
  const key = JSON.stringify(input);
  if (lastJobModel === null || lastJobModel.key !== key) {
    const model = modelFromInput(input);
    const space = createSamplingSpace(model);
    lastJobModel = { key, model, space, step: createWalkScaleMove(space) };
  }
  return lastJobModel;
}

/** Shortest time between two snapshots of a chain sent for checkpoints. */
export const SNAPSHOT_INTERVAL_MS = 2000;

/**
 * Runs one chain in the sampler's coordinates (model/sampling-space.ts) and returns its draws
 * mapped back to the model's parameter vector, each with the model's log density.
 */
export function runChainJob(job: ChainJob, events: ChainJobEvents = {}, wantSnapshots = false): ChainJobResult {
  const { model, space, step } = jobModel(job.model);
  const auxiliary = step !== null ? { step, every: WALK_SCALE_MOVE_EVERY } : undefined;
  const runner = job.snapshot
    ? ChainRunner.restore(job.snapshot, space.logDensity, auxiliary)
    : new ChainRunner({
        logDensity: space.logDensity,
        start: Float64Array.from(job.start),
        initialCov: Float64Array.from(job.initialCov),
        warmup: job.warmup,
        draws: job.draws,
        thin: job.thin,
        rng: createRng(job.seed),
        ...(auxiliary !== undefined ? { auxiliary } : {}),
        ...(job.adaptation !== undefined ? { adaptation: job.adaptation } : {}),
      });
  if (job.shape !== undefined && runner.installedShapes < job.shape.round) {
    runner.installShape(Float64Array.from(job.shape.cov), job.shape.logScale);
  }
  const total = runner.totalIterations;
  const stopAt = Math.min(job.stopAt ?? total, total);
  let lastSnapshot = Date.now();
  while (runner.iteration < stopAt) {
    runner.run(Math.min(job.slice, stopAt - runner.iteration));
    events.progress?.(job.chain, runner.iteration, total, runner.warmingUp);
    // snapshots (for checkpoints) at most every SNAPSHOT_INTERVAL_MS: when they are taken never
    // changes the chain, only how much a crash can lose
    if (wantSnapshots && !runner.done && Date.now() - lastSnapshot >= (job.snapshotIntervalMs ?? SNAPSHOT_INTERVAL_MS)) {
      events.snapshot?.(job.chain, runner.snapshot());
      lastSnapshot = Date.now();
    }
  }
  if (!runner.done) {
    return {
      draws: new Float64Array(0),
      logDensity: new Float64Array(0),
      acceptRateWarmup: NaN,
      acceptRateSampling: NaN,
      finalScale: NaN,
      snapshot: runner.snapshot(),
    };
  }
  const result = runner.result();
  const dim = space.dim;
  const dimModel = model.layout.dim;
  const draws = new Float64Array(result.logDensity.length * dimModel);
  // the walk scale, integrated out of the sampler's density, is drawn from its conditional
  // with a stream of its own, so the chain's draws do not depend on it
  const rng = createRng(deriveSeed(job.seed, WALK_SCALE_STREAM));
  for (let k = 0; k < result.logDensity.length; k++) {
    const theta = draws.subarray(k * dimModel, (k + 1) * dimModel);
    if (!space.toTheta(result.draws.subarray(k * dim, (k + 1) * dim), theta, rng)) {
      throw new Error(`kept draw ${k} of chain ${job.chain} cannot be mapped to the model's parameters`);
    }
    result.logDensity[k] = model.logDensity(theta);
  }
  if (job.derived !== true) return { ...result, draws };
  return { ...result, draws, dailyColumns: chainDailyColumns(model, draws, job.model.firstWeekday, job.seed) };
}
