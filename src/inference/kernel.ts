/**
 * Metropolis-Hastings kernels in three layers: `initState` (a position and its cached log
 * density), `buildMetropolisKernel(logDensity, propose, dim)` for any proposal, and the
 * random-walk factory `buildRwmKernel` on top.
 */
import { evaluate, type ChainState, type Kernel, type LogDensity, type StepInfo } from './types.js';
import { gaussianRandomWalk, type Propose, type RandomWalkParams } from './proposal.js';

/** The chain state at `position` (copied), with its log density evaluated once. */
export function initState(logDensity: LogDensity, position: Float64Array): ChainState {
  const copy = new Float64Array(position);
  return { position: copy, logDensity: evaluate(logDensity, copy) };
}

/**
 * A Metropolis-Hastings kernel for a proposal. Each step draws a proposal into a buffer the
 * kernel owns, then one uniform u, and accepts when log u < lp1 - lp0 + log Hastings ratio.
 * An accepted step copies the buffer into a fresh position array (the only allocation); a
 * rejected step returns the input state object itself. The input state is never mutated.
 * Not re-entrant (one scratch buffer per kernel).
 *
 * @remarks Metropolis et al. (1953) with the Hastings (1970) correction, "Monte Carlo sampling
 *   methods using Markov chains and their applications", Biometrika 57(1). A proposal whose
 *   density is -Infinity (or NaN) is always rejected, with acceptProb 0.
 */
export function buildMetropolisKernel(logDensity: LogDensity, propose: Propose, dim: number): Kernel {
  const candidate = new Float64Array(dim);
  return (rng, state) => {
    const logRatio = propose(rng, state.position, candidate);
    const lp1 = evaluate(logDensity, candidate);
    const logAlpha = lp1 - state.logDensity + logRatio;
    const u = rng.uniform();
    const acceptProb = logAlpha >= 0 ? 1 : logAlpha > -Infinity ? Math.exp(logAlpha) : 0;
    if (lp1 > -Infinity && Math.log(u) < logAlpha) {
      const info: StepInfo = { accepted: true, acceptProb, logDensity: lp1 };
      return { state: { position: new Float64Array(candidate), logDensity: lp1 }, info };
    }
    return { state: state as ChainState, info: { accepted: false, acceptProb, logDensity: lp1 } };
  };
}

/**
 * Random-walk Metropolis kernel with proposal N(x, scale^2 L L^T).
 *
 * @example buildRwmKernel(ld, { cholesky: new Float64Array([1, 0, 0, 1]), scale: 1.68, dim: 2 })
 *   (1.68 = 2.38 / sqrt(2), the optimal scale for a 2-dimensional Gaussian target).
 * @remarks For a d-dimensional Gaussian target with proposal shape equal to its covariance, the
 *   scale 2.38 / sqrt(d) is optimal and gives acceptance near 0.234 as d grows (Roberts, Gelman
 *   and Gilks 1997, "Weak convergence and optimal scaling of random walk Metropolis algorithms",
 *   Annals of Applied Probability 7(1)).
 */
export function buildRwmKernel(logDensity: LogDensity, params: RandomWalkParams): Kernel {
  return buildMetropolisKernel(logDensity, gaussianRandomWalk(params), params.dim);
}
