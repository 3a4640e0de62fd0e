/**
 * An extra move of the chains in the sampler's coordinates (model/sampling-space.ts) when the
 * walk scale is integrated out: it rescales every walk increment at once, in and out of the
 * spike of the collapsed density where all increments are near zero, which the random walk
 * over the sampler's coordinates reaches too rarely (small walk scales were then under-covered
 * in simulation-based calibration).
 */
import type { RescaledDensities, SamplingSpace, WalkScaleDraw } from '../model/sampling-space.js';
import type { Rng } from '../util/rng.js';
import type { ChainState } from './types.js';

/**
 * One step of a move applied between the random-walk steps (inference/chain.ts): from `state`,
 * with proposal log sd `logScale`, returns the next state (the very same object when it stays),
 * the move's acceptance probability (tuned toward a target during warm-up only) and the value
 * of the moved coordinate before the move (NaN when there was none), from which warm-up judges
 * how far the move carries it (chain.ts AUX_MIN_JUMP).
 */
export type AuxiliaryStep = (
  rng: Rng,
  state: Readonly<ChainState>,
  logScale: number,
) => { state: ChainState; acceptProb: number; before: number };

/**
 * The interweaving move on the log walk scale, or null when nothing is integrated out
 * (`space.walkRescaling` null: the sampler then works in theta, where u is a coordinate).
 *
 * @remarks
 * From a sampler point y with log density p(y) = integral of p(y, u) du:
 *   1. draw u ~ p(u | y) exactly (`walkRescaling.draw`, a log-concave draw): theta = theta(y, u),
 *      whose walk part is z_k = d_k / sigma (d_k the increments of log beta);
 *   2. propose u' = u + e^logScale * N(0, 1) with every other coordinate of theta held fixed, z
 *      included (so the increments become d_k e^(u' - u)), and accept with probability
 *      min(1, p_theta(theta') / p_theta(theta)), p_theta the model's density in theta;
 *   3. map theta back to the sampler's coordinates and drop u.
 * Steps 2 and 3 are one simulation (`walkRescaling.rescale` gives the new sampler point y', its
 * density p(y') and the joint p(y', u')), and log p_theta = log p(y, u) + (K - 1) u, with
 * log p(y, u) = log p(y) + log p(u | y) on the current side: two simulations per move in all.
 * Invariance: if y ~ p(y), step 1 makes (y, u) ~ p(y, u), i.e. theta ~ p_theta (the map from
 * theta to (y, u) is a bijection, model/sampling-space.ts); step 2 is a Metropolis step with a
 * symmetric proposal in theta, so it leaves p_theta invariant; mapping back gives
 * (y', u') ~ p(y, u), and dropping u' leaves y' ~ p(y). So the move leaves the collapsed target
 * p(y) invariant, and composed with the random-walk kernel so does every iteration (a
 * composition of invariant kernels is invariant). This is the ancillarity-sufficiency
 * interweaving of Yu and Meng (2011), "To center or not to center: that is not the question",
 * Journal of Computational and Graphical Statistics 20(3), with the centred step done by the
 * collapsed sampler (Liu 1994); the same argument is the partially collapsed Gibbs sampler of
 * van Dyk and Park (2008), "Partially collapsed Gibbs samplers", JASA 103(482), whose rule is
 * met because u is drawn afresh from p(u | y) before the move that uses it and is discarded
 * after. The proposal scale changes only during warm-up; the kept draws come from one fixed
 * kernel. A proposal that cannot be simulated has density zero and is rejected.
 */
export function createWalkScaleMove(space: SamplingSpace): AuxiliaryStep | null {
  const rescaling = space.walkRescaling;
  if (rescaling === null) return null;
  const steps = space.walkSteps;
  const drawn: WalkScaleDraw = { u: NaN, logConditional: NaN };
  const moved: RescaledDensities = { marginal: -Infinity, joint: -Infinity };
  const candidate = new Float64Array(space.dim);
  return (rng, state, logScale) => {
    if (!rescaling.draw(state.position, rng, drawn)) return { state: state as ChainState, acceptProb: 0, before: NaN };
    // log p_theta(theta) = log p(y) + log p(u | y) + (K - 1) u (model/sampling-space.ts)
    const lp0 = state.logDensity + drawn.logConditional + steps * drawn.u;
    const u1 = drawn.u + Math.exp(logScale) * rng.normal();
    // a proposal that cannot be simulated has density zero: rejected (its uniform still drawn,
    // so the stream does not depend on it)
    const ok = rescaling.rescale(state.position, drawn.u, u1, candidate, moved);
    const logAlpha = ok ? moved.joint + steps * u1 - lp0 : -Infinity;
    const acceptProb = logAlpha >= 0 ? 1 : logAlpha > -Infinity ? Math.exp(logAlpha) : 0;
    if (!(Math.log(rng.uniform()) < logAlpha)) return { state: state as ChainState, acceptProb, before: drawn.u };
    return { state: { position: new Float64Array(candidate), logDensity: moved.marginal }, acceptProb, before: drawn.u };
  };
}
