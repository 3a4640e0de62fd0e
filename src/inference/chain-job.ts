/**
 * One chain of a fit as a self-contained job: the data and prior set to rebuild the model,
 * the start, the initial proposal and the chain's own seed. Run in a worker thread
 * (chain-worker.ts) or in this thread; the draws depend only on the job, never on where or
 * alongside what it ran, so a run is identical whatever the thread count.
 */
import { createModel, type ModelData } from '../model/posterior.js';
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

export function runChainJob(job: ChainJob, events: ChainJobEvents = {}, wantSnapshots = false): ChainResult {
  const model = modelFromInput(job.model);
  const runner = job.snapshot
    ? ChainRunner.restore(job.snapshot, model.logDensity)
    : new ChainRunner({
        logDensity: model.logDensity,
        start: Float64Array.from(job.start),
        initialCov: Float64Array.from(job.initialCov),
        warmup: job.warmup,
        draws: job.draws,
        thin: job.thin,
        rng: createRng(job.seed),
      });
  const total = runner.totalIterations;
  while (!runner.done) {
    runner.run(job.slice);
    events.progress?.(job.chain, runner.iteration, total, runner.warmingUp);
    if (wantSnapshots && !runner.done) events.snapshot?.(job.chain, runner.snapshot());
  }
  return runner.result();
}
