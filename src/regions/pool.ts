/**
 * Fits regions on a pool of worker threads: each worker takes the next region as soon as it is
 * free, so long and short fits even out. Outcomes come back in task order, whatever the order
 * in which the fits finish. A worker that dies (an internal error that escaped, memory)
 * fails only the region it held; a fresh worker takes over the rest. With 0 workers the
 * regions are fitted one after another in this thread.
 */
import { Worker } from 'node:worker_threads';
import { failedOutcome, runRegionTask, type RegionOutcome, type RegionTask } from './region-task.js';

// The worker is always the compiled module: from src/regions (tests) and from dist/regions
// (the installed tool) alike, the package root is two folders up.
const WORKER_URL = new URL('../../dist/regions/region-worker.js', import.meta.url);

export interface RegionPoolEvents {
  /** a progress line of a region's fit */
  progress?(name: string, message: string): void;
  /** a region is about to start */
  start?(name: string): void;
  /** a region is done; `finished` of `total` are */
  done?(outcome: RegionOutcome, finished: number, total: number): void;
}

export async function runRegionTasks(tasks: readonly RegionTask[], workers: number, events: RegionPoolEvents = {}): Promise<RegionOutcome[]> {
  const outcomes: RegionOutcome[] = new Array(tasks.length);
  let finished = 0;
  const finish = (i: number, outcome: RegionOutcome) => {
    outcomes[i] = outcome;
    finished += 1;
    events.done?.(outcome, finished, tasks.length);
  };
  if (workers <= 0) {
    for (let i = 0; i < tasks.length; i++) {
      events.start?.(tasks[i]!.name);
      finish(i, await runRegionTask(tasks[i]!, (m) => events.progress?.(tasks[i]!.name, m)));
    }
    return outcomes;
  }
  if (tasks.length === 0) return outcomes;
  let next = 0;
  const live = new Set<Worker>();
  try {
    await new Promise<void>((resolve) => {
      const startWorker = () => {
        if (next >= tasks.length) return;
        const w = new Worker(WORKER_URL);
        live.add(w);
        let current = -1;
        const feed = () => {
          if (next < tasks.length) {
            current = next++;
            events.start?.(tasks[current]!.name);
            w.postMessage({ task: tasks[current] });
          } else {
            current = -1;
            live.delete(w);
            void w.terminate();
          }
        };
        const lost = (why: string) => {
          if (current < 0) return;
          const i = current;
          current = -1;
          live.delete(w);
          void w.terminate();
          finish(i, failedOutcome(tasks[i]!.name, `internal error: the worker thread fitting this region stopped (${why})`));
          if (finished === tasks.length) resolve();
          else startWorker();
        };
        w.on('message', (msg: { type: string; name?: string; message?: string; outcome?: RegionOutcome }) => {
          if (current < 0) return;
          if (msg.type === 'progress') events.progress?.(tasks[current]!.name, msg.message ?? '');
          else if (msg.type === 'outcome') {
            finish(current, msg.outcome!);
            if (finished === tasks.length) {
              current = -1;
              resolve();
            } else feed();
          }
        });
        w.on('error', (e) => lost(e instanceof Error ? e.message : String(e)));
        w.on('exit', (code) => lost(`exit code ${code}`));
        feed();
      };
      for (let k = 0; k < Math.min(workers, tasks.length); k++) startWorker();
    });
  } finally {
    await Promise.all([...live].map((w) => w.terminate()));
  }
  return outcomes;
}
