/**
 * One chain of a fit as a self-contained job: the data and prior set to rebuild the model,
 * the start, the initial proposal and the chain's own seed. Run in a worker thread
 * (chain-worker.ts) or in this thread; the draws depend only on the job, never on where or
 * alongside what it ran, so a run is identical whatever the thread count.
 */
import { createModel, type ModelData, type EpidemicModel } from '../model/posterior.js';
import { createSamplingSpace } from '../model/sampling-space.js';
import type { PriorSet } from '../model/prior-set.js';
import { createRng } from '../util/rng.js';
import { ChainRunner, type ChainResult, type ChainSnapshot } from './chain.js';

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
  /** continue from here instead of starting afresh */
  snapshot?: ChainSnapshot;
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

/**
 * Coordinates of the sampler space that get extra one-dimensional updates: the ascertainment,
 * which trades off against susceptible depletion along a curved direction that the joint
 * proposal crosses slowly.
 */
export function coordinateMovesFor(model: EpidemicModel): number[] {
  return [model.layout.ascertainment];
}

/**
 * Runs one chain in the sampler's coordinates (model/sampling-space.ts) and returns its draws
 * mapped back to the model's parameter vector, each with the model's log density.
 */
export function runChainJob(job: ChainJob, events: ChainJobEvents = {}, wantSnapshots = false): ChainResult {
  const model = modelFromInput(job.model);
  const space = createSamplingSpace(model);
  const runner = job.snapshot
    ? ChainRunner.restore(job.snapshot, space.logDensity)
    : new ChainRunner({
        logDensity: space.logDensity,
        start: Float64Array.from(job.start),
        initialCov: Float64Array.from(job.initialCov),
        warmup: job.warmup,
        draws: job.draws,
        thin: job.thin,
        rng: createRng(job.seed),
        coordinateMoves: coordinateMovesFor(model),
      });
  const total = runner.totalIterations;
  while (!runner.done) {
    runner.run(job.slice);
    events.progress?.(job.chain, runner.iteration, total, runner.warmingUp);
    if (wantSnapshots && !runner.done) events.snapshot?.(job.chain, runner.snapshot());
  }
  const result = runner.result();
  const dim = space.dim;
  const theta = new Float64Array(dim);
  for (let k = 0; k < result.logDensity.length; k++) {
    const y = result.draws.subarray(k * dim, (k + 1) * dim);
    if (!space.toTheta(y, theta)) throw new Error(`kept draw ${k} of chain ${job.chain} cannot be mapped to the model's parameters`);
    y.set(theta);
    result.logDensity[k] = model.logDensity(theta);
  }
  return result;
}
