/**
 * A pool of worker threads that stays up across several batches of chain jobs: the warm-up
 * rounds of pooled-adaptation.ts run as one batch each, and starting fresh workers (module
 * loading, and the compiler's warm-up of the density code) for every round would cost more than
 * a short round itself. Jobs are handed out in order as workers come free; results come back in
 * job order. With threads = 0 the jobs run in this thread.
 */
import { Worker } from 'node:worker_threads';
import { WaxwaneError } from '../errors.js';
import { runChainJob, type ChainJob, type ChainJobEvents, type ChainJobResult } from './chain-job.js';

// The worker is always the compiled module: from src/inference (tests) and from dist/inference
// (the installed tool) alike, the package root is two folders up.
const WORKER_URL = new URL('../../dist/inference/chain-worker.js', import.meta.url);

export interface ChainPool {
  /** Runs one batch of jobs to completion. */
  run(jobs: ChainJob[], events: ChainJobEvents, snapshots: boolean): Promise<ChainJobResult[]>;
  /** Stops the workers; the pool cannot be used afterwards. */
  close(): Promise<void>;
}

/**
 * A pool of `threads` workers (none: the jobs run in this thread). `prestart` workers (at most
 * `threads`) are started at once, so their module loading overlaps whatever this thread does
 * before the first batch (the mode search of a fit); the others start with the first batch
 * that needs them.
 */
export function createChainPool(threads: number, prestart = 0): ChainPool {
  if (threads <= 0) {
    return {
      run: async (jobs, events, snapshots) => jobs.map((job) => runChainJob(job, events, snapshots)),
      close: async () => {},
    };
  }
  const workers: Worker[] = [];
  let closed = false;
  let broken: Error | null = null;
  const start = () => {
    const w = new Worker(WORKER_URL);
    // an error before a batch listens (a worker that cannot start) breaks the pool: the next
    // batch reports it
    w.on('error', (e) => {
      broken ??= e;
    });
    workers.push(w);
  };
  while (workers.length < Math.min(threads, prestart)) start();

  async function run(jobs: ChainJob[], events: ChainJobEvents, snapshots: boolean): Promise<ChainJobResult[]> {
    if (closed || broken !== null) throw broken ?? new Error('the chain pool is closed');
    const results: ChainJobResult[] = new Array(jobs.length);
    if (jobs.length === 0) return results;
    while (workers.length < Math.min(threads, jobs.length)) start();
    const active = workers.slice(0, Math.min(threads, jobs.length));
    let next = 0;
    await new Promise<void>((resolve, reject) => {
      let finished = 0;
      let failed = false;
      const listeners: Array<() => void> = [];
      const fail = (e: Error) => {
        if (failed) return;
        failed = true;
        broken = e;
        for (const off of listeners) off();
        reject(e);
      };
      for (const w of active) {
        const feed = () => {
          if (next < jobs.length) w.postMessage({ job: jobs[next++], snapshots });
        };
        const onMessage = (msg: { type: string; [k: string]: unknown }) => {
          if (failed) return;
          if (msg.type === 'progress') {
            events.progress?.(msg.chain as number, msg.iteration as number, msg.total as number, msg.warmingUp as boolean);
          } else if (msg.type === 'snapshot') {
            events.snapshot?.(msg.chain as number, msg.snapshot as never);
          } else if (msg.type === 'result') {
            const idx = jobs.findIndex((j) => j.chain === msg.chain);
            results[idx] = msg.result as ChainJobResult;
            finished++;
            if (finished === jobs.length) {
              for (const off of listeners) off();
              resolve();
            } else feed();
          } else if (msg.type === 'error') {
            fail(msg.name === 'WaxwaneError' ? new WaxwaneError(msg.message as string) : new Error(`chain ${String(msg.chain)}: ${String(msg.message)}\n${String(msg.stack ?? '')}`));
          }
        };
        const onError = (e: Error) => fail(e);
        w.on('message', onMessage);
        w.on('error', onError);
        listeners.push(() => {
          w.off('message', onMessage);
          w.off('error', onError);
        });
        feed();
      }
    });
    return results;
  }

  return {
    run,
    async close() {
      closed = true;
      await Promise.all(workers.map((w) => w.terminate()));
      workers.length = 0;
    },
  };
}
