/**
 * Runs chain jobs on a pool of worker threads (or in this thread when threads = 0).
 * Jobs are handed out in order as workers come free; results are returned in job order.
 */
import { Worker } from 'node:worker_threads';
import { WaxwaneError } from '../errors.js';
import type { ChainResult } from './chain.js';
import { runChainJob, type ChainJob, type ChainJobEvents } from './chain-job.js';

// The worker is always the compiled module: from src/inference (tests) and from dist/inference
// (the installed tool) alike, the package root is two folders up.
const WORKER_URL = new URL('../../dist/inference/chain-worker.js', import.meta.url);

export async function runChainJobs(
  jobs: ChainJob[],
  threads: number,
  events: ChainJobEvents = {},
  snapshots = false,
): Promise<ChainResult[]> {
  const results: ChainResult[] = new Array(jobs.length);
  if (threads <= 0) {
    jobs.forEach((job, i) => {
      results[i] = runChainJob(job, events, snapshots);
    });
    return results;
  }
  const n = Math.min(threads, jobs.length);
  let next = 0;
  const workers: Worker[] = [];
  try {
    await new Promise<void>((resolve, reject) => {
      let finished = 0;
      let failed = false;
      const startWorker = () => {
        const w = new Worker(WORKER_URL);
        workers.push(w);
        const feed = () => {
          if (next < jobs.length) {
            w.postMessage({ job: jobs[next++], snapshots });
          } else {
            void w.terminate();
          }
        };
        w.on('message', (msg) => {
          if (failed) return;
          if (msg.type === 'progress') events.progress?.(msg.chain, msg.iteration, msg.total, msg.warmingUp);
          else if (msg.type === 'snapshot') events.snapshot?.(msg.chain, msg.snapshot);
          else if (msg.type === 'result') {
            const idx = jobs.findIndex((j) => j.chain === msg.chain);
            results[idx] = msg.result as ChainResult;
            finished++;
            if (finished === jobs.length) resolve();
            else feed();
          } else if (msg.type === 'error') {
            failed = true;
            reject(msg.name === 'WaxwaneError' ? new WaxwaneError(msg.message) : new Error(`chain ${msg.chain}: ${msg.message}\n${msg.stack ?? ''}`));
          }
        });
        w.on('error', (e) => {
          failed = true;
          reject(e);
        });
        feed();
      };
      for (let i = 0; i < n; i++) startWorker();
    });
  } finally {
    await Promise.all(workers.map((w) => w.terminate()));
  }
  return results;
}
