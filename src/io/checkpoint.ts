/**
 * Checkpoints of a fit in progress, so that a run killed by a crash, a power cut or `kill -9`
 * can continue with `fit --resume` and end with the same draws as an uninterrupted run.
 *
 * The file DIR/checkpoint.json holds what the fit prepared before sampling (mode, starting
 * points, initial proposal: everything the chains start from), the latest snapshot of every
 * chain (position, adaptation, frozen kernel, generator state, draws so far), and the input
 * hash and options the run was started with, so that a resume with other data or options is
 * refused. It is written atomically (temporary file, fsync, rename) every few seconds and
 * removed once the outputs are written.
 */
import { existsSync, readFileSync, unlinkSync } from 'node:fs';
import { join } from 'node:path';
import { WaxwaneError } from '../errors.js';
import { writeFileAtomic } from './atomic.js';
import type { ChainSnapshot } from '../inference/chain.js';
import type { ChainJob } from '../inference/chain-job.js';

export const CHECKPOINT_FILE = 'checkpoint.json';

/** What must be equal for a resume: the input's hash and every option that shapes the outputs. */
export type RunFingerprint = Record<string, unknown>;

export interface Checkpoint {
  format: 'waxwane-checkpoint';
  version: 1;
  fingerprint: RunFingerprint;
  prepared: {
    mode: number[];
    modeLogDensity: number;
    laplaceAdjusted: boolean;
    jobs: ChainJob[];
    warnings: string[];
  };
  /** latest snapshot of each chain, by chain number */
  snapshots: Record<string, ChainSnapshot>;
}

export function checkpointPath(dir: string): string {
  return join(dir, CHECKPOINT_FILE);
}

export function writeCheckpoint(dir: string, checkpoint: Checkpoint): void {
  writeFileAtomic(checkpointPath(dir), JSON.stringify(checkpoint));
}

export function removeCheckpoint(dir: string): void {
  const path = checkpointPath(dir);
  if (existsSync(path)) unlinkSync(path);
}

/**
 * Reads DIR/checkpoint.json for `--resume` and checks it belongs to this run.
 * @throws WaxwaneError when there is none, it is damaged, or data or options differ.
 */
export function readCheckpoint(dir: string, fingerprint: RunFingerprint): Checkpoint {
  const path = checkpointPath(dir);
  if (!existsSync(path)) {
    throw new WaxwaneError(`${dir}: nothing to resume (no ${CHECKPOINT_FILE} in this folder); run without --resume to start afresh`);
  }
  let cp: Checkpoint;
  try {
    cp = JSON.parse(readFileSync(path, 'utf8')) as Checkpoint;
  } catch (e) {
    throw new WaxwaneError(`${path}: the checkpoint cannot be read (${(e as Error).message}); start afresh without --resume (and --force)`);
  }
  if (cp === null || typeof cp !== 'object' || cp.format !== 'waxwane-checkpoint' || cp.version !== 1) {
    throw new WaxwaneError(`${path}: not a checkpoint of this version of waxwane; start afresh without --resume (and --force)`);
  }
  const differs = differences(cp.fingerprint ?? {}, fingerprint);
  if (differs.length > 0) {
    const [key, was, now] = differs[0];
    throw new WaxwaneError(
      `${dir}: cannot resume: ${key} differs from the interrupted run (it had ${show(was)}, now ${show(now)})` +
        `${differs.length > 1 ? ` and ${differs.length - 1} more setting${differs.length > 2 ? 's' : ''} differ` : ''}; ` +
        'resume with the same data and options, or start afresh with --force',
    );
  }
  return cp;
}

function show(v: unknown): string {
  const s = JSON.stringify(v) ?? 'nothing';
  return s.length > 60 ? `${s.slice(0, 57)}...` : s;
}

function differences(a: RunFingerprint, b: RunFingerprint): Array<[string, unknown, unknown]> {
  const keys = [...new Set([...Object.keys(a), ...Object.keys(b)])].sort();
  return keys.filter((k) => JSON.stringify(a[k]) !== JSON.stringify(b[k])).map((k) => [k, a[k], b[k]]);
}
