/** Worker-thread entry: runs chain jobs sent by the pool (pool.ts) and posts events back. */
import { parentPort } from 'node:worker_threads';
import { runChainJob, type ChainJob } from './chain-job.js';

interface Request {
  job: ChainJob;
  snapshots: boolean;
}

const port = parentPort;
if (port !== null) {
  port.on('message', (req: Request) => {
    try {
      const result = runChainJob(
        req.job,
        {
          progress: (chain, iteration, total, warmingUp) => port.postMessage({ type: 'progress', chain, iteration, total, warmingUp }),
          snapshot: (chain, snapshot) => port.postMessage({ type: 'snapshot', chain, snapshot }),
        },
        req.snapshots,
      );
      const buffers = [result.draws, result.logDensity, ...Object.values(result.dailyColumns ?? {})].map((a) => a.buffer as ArrayBuffer);
      port.postMessage({ type: 'result', chain: req.job.chain, result }, buffers);
    } catch (e) {
      const err = e as Error;
      port.postMessage({ type: 'error', chain: req.job.chain, name: err.name, message: err.message, stack: err.stack });
    }
  });
}
