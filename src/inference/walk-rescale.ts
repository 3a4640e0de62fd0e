/**
 * A cheap extra move for the random walk on log beta: change the walk scale sigma while
 * rescaling every standardised step z_k so that the increments sigma * z_k, and so the whole
 * transmission path and the likelihood, stay exactly as they are.
 *
 * @remarks
 * With the non-centred walk (w_k = w_{k-1} + sigma z_k) the data pin the increments
 * sigma * z_k, so the posterior of (log sigma, z) lies along a curved ridge z_k = d_k / sigma
 * that a Gaussian random-walk proposal, however well adapted, follows only slowly. Moving
 * along the ridge is the ancillarity-sufficiency interweaving idea of Yu and Meng (2011,
 * "To center or not to center: that is not the question", Journal of Computational and
 * Graphical Statistics 20(3)): a step in the centred parametrisation inside a sampler that
 * works in the non-centred one.
 *
 * The move: u = log sigma -> u + delta, z -> z * exp(-delta), delta ~ Normal(0, s^2). It is
 * its own inverse under delta -> -delta, with Jacobian exp(-delta (K - 1)), so it is accepted
 * with probability min(1, pi(x') / pi(x) * exp(-delta (K - 1))). Only the prior terms of
 * pi change (the likelihood depends on sigma and z only through sigma * z_k), so the move
 * costs one prior evaluation, not a simulation.
 */
import type { Rng } from '../util/rng.js';
import type { ChainState } from './types.js';

export interface WalkRescaleSpec {
  /** log prior + log-Jacobian of the unconstrained vector (no likelihood) */
  logPrior: (x: Float64Array) => number;
  /** index of log sigma */
  walkScale: number;
  /** index of z_1 */
  firstStep: number;
  /** number of steps K - 1 */
  steps: number;
}

export interface WalkRescaleMove {
  /** One move; returns the new state (or the same object when rejected) and whether it moved. */
  step(rng: Rng, state: Readonly<ChainState>, proposalSd: number): { state: ChainState; accepted: boolean };
}

export function buildWalkRescaleMove(spec: WalkRescaleSpec): WalkRescaleMove {
  const { logPrior, walkScale, firstStep, steps } = spec;
  return {
    step(rng, state, proposalSd) {
      if (steps < 1) return { state: state as ChainState, accepted: false };
      const x = state.position;
      const delta = proposalSd * rng.normal();
      const y = Float64Array.from(x);
      y[walkScale] = x[walkScale] + delta;
      const shrink = Math.exp(-delta);
      for (let k = 0; k < steps; k++) y[firstStep + k] = x[firstStep + k] * shrink;
      const change = logPrior(y) - logPrior(x);
      const logAccept = change - delta * steps;
      if (Number.isFinite(change) && Math.log(rng.uniform()) < logAccept) {
        return { state: { position: y, logDensity: state.logDensity + change }, accepted: true };
      }
      return { state: state as ChainState, accepted: false };
    },
  };
}
