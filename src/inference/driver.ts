/**
 * The driver: runs a kernel and hands out the stream of steps. Storage, thinning, adaptation,
 * checkpoints and progress all consume this stream; the kernel knows none of them.
 */
import type { Rng } from '../util/rng.js';
import type { ChainState, Kernel, StepInfo } from './types.js';

/** One step of the stream. */
export interface Step {
  state: ChainState;
  info: StepInfo;
}

/**
 * Yields `n` successive steps of `kernel` from `state`. The generator is lazy: stopping early
 * leaves `rng` exactly after the last yielded step.
 */
export function* sample(
  kernel: Kernel,
  state: Readonly<ChainState>,
  rng: Rng,
  n: number,
): Generator<Step, void, undefined> {
  let current = state;
  for (let i = 0; i < n; i++) {
    const step = kernel(rng, current);
    current = step.state;
    yield step;
  }
}
