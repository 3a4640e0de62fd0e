/**
 * Entry of a region worker thread (regions/pool.ts): runs the region tasks it is sent, one at
 * a time, and posts each fit's progress lines and its outcome.
 */
import { parentPort } from 'node:worker_threads';
import { runRegionTask, type RegionTask } from './region-task.js';

const port = parentPort;
if (port === null) throw new Error('region-worker.js runs as a worker thread');
port.on('message', (msg: { task: RegionTask }) => {
  const { task } = msg;
  void runRegionTask(task, (message) => port.postMessage({ type: 'progress', name: task.name, message })).then((outcome) =>
    port.postMessage({ type: 'outcome', outcome }),
  );
});
