/**
 * The vocabulary of the sampler core: a log density, the state a chain carries from step to
 * step, the record a step reports, and the kernel that makes a step.
 */
import type { Rng } from '../util/rng.js';

/**
 * Log of an unnormalised target density over unconstrained parameters. Returns `-Infinity`
 * outside the support; a `NaN` is treated as `-Infinity` by everything in this folder.
 */
export type LogDensity = (x: Float64Array) => number;

/** What a chain carries forward: the position and its cached log density. */
export interface ChainState {
  position: Float64Array;
  logDensity: number;
}

/** What a step reports; it is never carried forward. */
export interface StepInfo {
  /** whether the proposal was accepted */
  accepted: boolean;
  /** Metropolis-Hastings acceptance probability min(1, exp(log ratio)); 0 for a `-Infinity` proposal */
  acceptProb: number;
  /** log density of the proposal (accepted or not) */
  logDensity: number;
}

/**
 * One Markov step. Pure: the input state is never mutated; a rejected step may return the very
 * same state object, an accepted step returns a new one with its own position array.
 */
export type Kernel = (rng: Rng, state: Readonly<ChainState>) => { state: ChainState; info: StepInfo };

/** `logDensity(x)` with `NaN` mapped to `-Infinity`, so comparisons downstream stay total. */
export function evaluate(logDensity: LogDensity, x: Float64Array): number {
  const value = logDensity(x);
  return Number.isNaN(value) ? -Infinity : value;
}
