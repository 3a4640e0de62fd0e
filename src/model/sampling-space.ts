/**
 * The coordinates the sampler moves in. The model's density is defined over the vector of
 * MODEL.md section 4 (theta: log R_start, standardised walk steps z, log sigma, ...); the
 * sampler uses an equivalent parametrisation in which the posterior is close to Gaussian, with
 * the log-Jacobian of the change added, and every draw is mapped back to theta.
 *
 * Why: the data pin the number of reports week by week, so in theta the pinned combinations
 * are curved ridges: a change in an early walk step moves every later week's incidence, the
 * walk scale multiplies every step (w_k = sigma * sum z, bilinear), and the ascertainment trades
 * off against the depletion of susceptibles. Here the sampler moves in
 *
 *     y = [ f_0 .. f_{K-1},  logit rho, log phi, log(rho i0), log L, log D, (v_1..v_6) ]
 *
 * with f_k = log(rho beta_k S_k I_k / N): the log of the infection flow at the first day of
 * knot k on the scale of reports (S_k, I_k = I_1 + .. + I_n the compartments on that day).
 * Mapping y to theta runs the epidemic knot by knot: log beta_k = f_k - log rho - log(S_k / N)
 * - log I_k from the state reached so far. Each f_k then says how many reports the week will
 * bring, whatever the earlier weeks did, so the f_k are nearly independent in the posterior;
 * with f and rho i0 fixed, a change of rho rescales every infection count and leaves the reports
 * as they are (up to depletion). The seed enters as log(rho i0) for the same reason.
 *
 * The walk scale is integrated out of the sampler's density. Given y, theta's walk part is
 * fixed up to sigma: the increments d_k = log beta_k - log beta_{k-1} do not depend on sigma,
 * and sigma enters the density only through its prior, the walk steps' normal density and the
 * Jacobian, as the factor exp(g(u)) of u = log sigma,
 *
 *     g(u) = log p_sigma(u) - (K - 1) u - S2 e^(-2u) / 2,   S2 = sum_k d_k^2
 *
 * (log p_sigma(u) the prior of u with its log-Jacobian). The sampler's density is the marginal
 * p(y) = p(y, u) exp(-g(u)) * integral exp(g(u')) du', the integral by the trapezoid rule to the
 * rounding of double precision (inference/log-concave.ts); each kept draw gets u drawn exactly
 * from its conditional exp(g(u)) / integral, so (y, u) is a draw from the posterior. This is
 * the collapsed sampler of Liu (1994), "The collapsed Gibbs sampler in Bayesian computations
 * with applications to a gene regulation problem", JASA 89(427): integrating a parameter out
 * analytically cannot slow the chain down, and here it removes the funnel between the walk
 * scale and the increments that a random walk crosses only slowly (Neal 2003, "Slice
 * sampling", Annals of Statistics 31(3), section 8; Papaspiliopoulos, Roberts and Skold 2007,
 * "A general framework for the parametrization of hierarchical models", Statistical Science
 * 22(1)). g is concave for every walk-scale prior the prior sets allow (on u: lognormal gives a
 * quadratic, half-normal u - e^(2u) / (2 s^2), gamma a u - b e^u, each concave; -(K-1) u is
 * linear and -S2 e^(-2u) / 2 concave), so the integral and the draw are those of a log-concave
 * density.
 *
 * Jacobian: the map from f to log beta is lower triangular with unit diagonal (S_k and I_k
 * depend only on earlier knots and on the other coordinates), and (logit rho, log(rho i0)) to
 * (logit rho, log i0) is triangular with unit diagonal, so the joint density of (y, u) is
 * p_theta(theta) * sigma^-(K-1) (the map from log beta to (log R_start, z) has determinant
 * sigma^-(K-1)), which is where the -(K - 1) u in g comes from.
 *
 * Only for the piecewise-constant walk: with linear interpolation beta inside a knot depends on
 * the next knot's value, so the sampler then works in theta directly.
 */
import type { EpidemicModel } from './posterior.js';
import { createSeirIntegrator } from './seir.js';
import { convolveDelay, negBinLogLikelihood } from './observation.js';
import { logistic } from './layout.js';
import type { Rng } from '../util/rng.js';
import { createLogConcaveIntegrator } from '../inference/log-concave.js';

export interface SamplingSpace {
  readonly kind: 'reported-flow' | 'model';
  /** length of the sampler's vector */
  readonly dim: number;
  /** log density of the sampler's coordinates (the posterior's marginal); -Infinity, never NaN */
  logDensity(y: Float64Array): number;
  /**
   * theta of a sampler point; a parameter integrated out of the sampler's density (the walk
   * scale) is drawn from its exact conditional with `rng`. False when the epidemic cannot be
   * simulated.
   */
  toTheta(y: Float64Array, theta: Float64Array, rng: Rng): boolean;
  /** the sampler point of a theta (for starts given in model coordinates); null if impossible */
  fromTheta(theta: Float64Array): Float64Array | null;
  /**
   * The log density of a sampler point together with the log walk scale u integrated out of
   * {@link SamplingSpace.logDensity} (-Infinity, never NaN); null when nothing is integrated
   * out. For the mode search (inference/sampler-mode.ts), which must avoid the spike that the
   * marginal has where every walk increment is zero.
   */
  readonly jointLogDensity: ((y: Float64Array, u: number) => number) | null;
  /** K - 1, the number of walk steps: log p_theta(theta(y, u)) = jointLogDensity(y, u) + (K - 1) u */
  readonly walkSteps: number;
  /**
   * The two halves of the walk-scale move (inference/walk-scale-move.ts) at the cost of two
   * simulations of the epidemic; null when nothing is integrated out.
   */
  readonly walkRescaling: WalkRescaling | null;
}

/** Where {@link WalkRescaling} writes what it finds (owned by the caller, reused, no allocation). */
export interface WalkScaleDraw {
  /** the log walk scale drawn */
  u: number;
  /** log p(u | y), the log of its conditional density */
  logConditional: number;
}

export interface RescaledDensities {
  /** the sampler's log density at the new point, as `logDensity` gives it (to the last bit) */
  marginal: number;
  /** the joint log density of the new point and the moved log walk scale (`jointLogDensity`) */
  joint: number;
}

export interface WalkRescaling {
  /**
   * Runs the epidemic of `y`, draws u ~ p(u | y) exactly with `rng` and keeps y's walk
   * increments for {@link WalkRescaling.rescale}. False when y cannot be simulated.
   */
  draw(y: Float64Array, rng: Rng, out: WalkScaleDraw): boolean;
  /**
   * The sampler point of theta(y, u) with u moved to `u1` and every standardised walk step
   * held, i.e. every walk increment of y times e^(u1 - u), written to `yOut`, with its
   * densities (the joint one at u1) in `out`; one simulation. `y` must be the point of the
   * last `draw` (its increments are kept there). False when it cannot be simulated.
   */
  rescale(y: Float64Array, u: number, u1: number, yOut: Float64Array, out: RescaledDensities): boolean;
}

/** log rho from logit rho, stable on both sides: -softplus(-u). */
function logRho(u: number): number {
  return u < 0 ? u - Math.log1p(Math.exp(u)) : -Math.log1p(Math.exp(-u));
}

export function createSamplingSpace(model: EpidemicModel): SamplingSpace {
  const settings = model.priorSet.model;
  const L = model.layout;
  if (settings.interpolation !== 'step') {
    return {
      kind: 'model',
      dim: L.dim,
      logDensity: model.logDensity,
      toTheta: (y, theta) => {
        theta.set(y);
        return true;
      },
      fromTheta: (theta) => Float64Array.from(theta),
      jointLogDensity: null,
      walkSteps: L.knots - 1,
      walkRescaling: null,
    };
  }
  const K = L.knots;
  const steps = K - 1;
  const dimModel = L.dim;
  const dim = dimModel - 1;
  const iu = L.walkScale;
  const N = model.population;
  const T = model.days;
  const simDays = model.simDays;
  const knotDays = settings.knot_days;
  const firstI = 1 + settings.latent_stages;
  const lastI = settings.latent_stages + settings.infectious_stages;
  const seir = createSeirIntegrator(settings.latent_stages, settings.infectious_stages, settings.substeps);
  const betaOverN = new Float64Array(simDays);
  const onsets = new Float64Array(simDays);
  const delayed = new Float64Array(T);
  const full = new Float64Array(dimModel);
  const theta = new Float64Array(dimModel);
  const weekdayMult = new Float64Array(7);
  // walk increments d_k of the last simulation, and those of the last walk-scale draw
  const increments = new Float64Array(K);
  const drawnIncrements = new Float64Array(K);
  const densities: RescaledDensities = { marginal: -Infinity, joint: -Infinity };
  const logN = Math.log(N);
  const walkPrior = model.priors.walk_scale;
  const walkPriorAtZero = walkPrior.logDensityUnconstrained(0);
  const integrator = createLogConcaveIntegrator();
  // g(u) of the header, over the S2 of the last simulation; one closure, made once
  let sumSq = 0;
  const g = (u: number): number => walkPrior.logDensityUnconstrained(u) - steps * u - 0.5 * sumSq * Math.exp(-2 * u);

  /**
   * log of the integral of exp(g) over the S2 of the last simulation. The guess is g's mode
   * without the prior, u = log(S2 / (K - 1)) / 2, width 1 / sqrt(2 (K - 1)) there. g is analytic
   * for |Im u| < pi / 4 (the factor exp(-S2 e^(-2u) / 2)), hence the step bound (log-concave.ts).
   */
  function walkIntegral(): number {
    return integrator.logIntegral(g, 0.5 * Math.log(sumSq / steps), 1 / Math.sqrt(2 * steps), 0.05);
  }

  /** The model-length vector of a sampler point, with u = 0 (sigma = 1). */
  function expand(y: Float64Array): Float64Array {
    for (let i = 0; i < iu; i++) full[i] = y[i]!;
    full[iu] = 0;
    for (let i = iu; i < dim; i++) full[i + 1] = y[i]!;
    return full;
  }

  /**
   * Runs the epidemic from a model-length vector in sampler coordinates (walk scale e^x[iu]),
   * filling `onsets`, theta, sumSq and the walk increments `increments`; false if it cannot be
   * simulated. With a finite `rescale` the flows x[1..K-1] are not read but written: those of
   * the log transmission rates log beta_0 + rescale * (the increments of the last `draw`), each
   * computed from the state reached so far and then used exactly as a flow read from x would be,
   * so the run is the very one that x as written would give.
   */
  function simulate(x: Float64Array, th: Float64Array, rescale = NaN): boolean {
    const uD = x[L.infectiousDays]!;
    const latent = Math.exp(x[L.latentDays]!);
    const infectious = Math.exp(uD);
    const sigma = Math.exp(x[iu]!);
    if (!(sigma > 0) || !(sigma < Infinity)) return false;
    const lr = logRho(x[L.ascertainment]!);
    const logI0 = x[L.seedInfected]! - lr;
    if (!seir.seed(N, Math.exp(logI0), latent, infectious)) return false;
    const state = seir.state;
    let prev = 0;
    let ss = 0;
    let target = 0;
    for (let k = 0; k < K; k++) {
      const S = state[0]!;
      let I = 0;
      for (let j = firstI; j <= lastI; j++) I += state[j]!;
      if (!(S > 0) || !(I > 0)) return false;
      if (k > 0 && rescale === rescale) {
        target += rescale * drawnIncrements[k]!;
        x[k] = target + lr + (Math.log(S) - logN) + Math.log(I);
      }
      const lb = x[k]! - lr - (Math.log(S) - logN) - Math.log(I);
      if (k === 0) {
        th[0] = lb + uD;
        target = lb;
      } else {
        const d = lb - prev;
        ss += d * d;
        th[k] = d / sigma;
        increments[k] = d;
      }
      prev = lb;
      const b = Math.exp(lb) / N;
      if (!(b < Infinity)) return false;
      const s0 = k * knotDays;
      const s1 = Math.min(simDays, s0 + knotDays);
      for (let s = s0; s < s1; s++) betaOverN[s] = b;
      if (!seir.run(betaOverN, s0, s1 - s0, latent, infectious, null, onsets, null)) return false;
    }
    for (let i = K; i < dimModel; i++) th[i] = x[i]!;
    th[L.seedInfected] = logI0;
    sumSq = ss;
    return true;
  }

  /**
   * After `simulate(x, theta)`: the marginal log density (walk scale integrated out) into
   * out.marginal unless `jointOnly`, and for a finite u the joint one at u into out.joint;
   * -Infinity for what is not computed or cannot be.
   */
  function finish(x: Float64Array, u: number, jointOnly: boolean, out: RescaledDensities): void {
    out.marginal = -Infinity;
    out.joint = -Infinity;
    // theta has sigma = 1, so the model's prior there holds g(0) = p_sigma(0) - S2 / 2; swap it
    // for the log of the integral of exp(g) (marginal), or for g(u) (joint)
    const base = model.logPriorUnconstrained(theta) - walkPriorAtZero + 0.5 * sumSq;
    const integral = jointOnly ? NaN : walkIntegral();
    const lpMarginal = integral > -Infinity && integral < Infinity ? base + integral : -Infinity;
    const gu = u === u ? g(u) : -Infinity;
    const lpJoint = gu > -Infinity && gu < Infinity ? base + gu : -Infinity;
    if (!(lpMarginal > -Infinity) && !(lpJoint > -Infinity)) return;
    convolveDelay(model.delay, onsets, model.seedDays, 0, T, delayed);
    let wd: Float64Array | null = null;
    if (L.weekday) {
      let sum = 0;
      for (let j = 0; j < 6; j++) {
        const v = x[L.firstWeekday + j]!;
        weekdayMult[j] = Math.exp(v);
        sum += v;
      }
      weekdayMult[6] = Math.exp(-sum);
      wd = weekdayMult;
    }
    const rho = logistic(x[L.ascertainment]!);
    const phi = Math.exp(x[L.dispersion]!);
    if (!(rho > 0) || !(phi > 0) || !(phi < Infinity)) return;
    const loglik = negBinLogLikelihood(model.observations, delayed, rho, wd, model.weekdayOfDay, phi);
    const m = lpMarginal + loglik;
    const j = lpJoint + loglik;
    out.marginal = m === m && m < Infinity ? m : -Infinity;
    out.joint = j === j && j < Infinity ? j : -Infinity;
  }

  /** marginal density when u is NaN, else the joint density at u */
  function density(y: Float64Array, u: number): number {
    const x = expand(y);
    if (!simulate(x, theta)) return -Infinity;
    finish(x, u, u === u, densities);
    return u === u ? densities.joint : densities.marginal;
  }

  function toTheta(y: Float64Array, th: Float64Array, rng: Rng): boolean {
    const x = expand(y);
    if (!simulate(x, th)) return false;
    const logIntegral = walkIntegral();
    if (!(logIntegral > -Infinity && logIntegral < Infinity)) return false;
    const u = integrator.sample(rng);
    const shrink = Math.exp(-u);
    for (let k = 1; k < K; k++) th[k] = th[k]! * shrink;
    th[iu] = u;
    return true;
  }

  function fromTheta(th: Float64Array): Float64Array | null {
    const y = new Float64Array(dim);
    const uD = th[L.infectiousDays]!;
    const latent = Math.exp(th[L.latentDays]!);
    const infectious = Math.exp(uD);
    const sigma = Math.exp(th[iu]!);
    const lr = logRho(th[L.ascertainment]!);
    if (!seir.seed(N, Math.exp(th[L.seedInfected]!), latent, infectious)) return null;
    const state = seir.state;
    let lb = th[0]! - uD;
    for (let k = 0; k < K; k++) {
      if (k > 0) lb += sigma * th[k]!;
      const S = state[0]!;
      let I = 0;
      for (let j = firstI; j <= lastI; j++) I += state[j]!;
      if (!(S > 0) || !(I > 0)) return null;
      y[k] = lb + lr + (Math.log(S) - logN) + Math.log(I);
      const b = Math.exp(lb) / N;
      const s0 = k * knotDays;
      const s1 = Math.min(simDays, s0 + knotDays);
      for (let s = s0; s < s1; s++) betaOverN[s] = b;
      if (!seir.run(betaOverN, s0, s1 - s0, latent, infectious, null, onsets, null)) return null;
    }
    for (let i = K; i < iu; i++) y[i] = th[i]!;
    for (let i = iu + 1; i < dimModel; i++) y[i - 1] = th[i]!;
    y[L.seedInfected - 1] = th[L.seedInfected]! + lr;
    return y.every(Number.isFinite) ? y : null;
  }

  const walkRescaling: WalkRescaling = {
    draw(y, rng, out) {
      if (!simulate(expand(y), theta)) return false;
      const logIntegral = walkIntegral();
      if (!(logIntegral > -Infinity && logIntegral < Infinity)) return false;
      const u = integrator.sample(rng);
      drawnIncrements.set(increments);
      out.u = u;
      out.logConditional = g(u) - logIntegral;
      return out.logConditional > -Infinity && out.logConditional < Infinity;
    },
    rescale(y, u, u1, yOut, out) {
      out.marginal = -Infinity;
      out.joint = -Infinity;
      const x = expand(y);
      if (!simulate(x, theta, Math.exp(u1 - u))) return false;
      for (let k = 0; k < K; k++) yOut[k] = x[k]!;
      for (let i = K; i < dim; i++) yOut[i] = y[i]!;
      finish(x, u1, false, out);
      return out.marginal > -Infinity && out.joint > -Infinity;
    },
  };

  return {
    kind: 'reported-flow',
    dim,
    logDensity: (y) => density(y, NaN),
    toTheta,
    fromTheta,
    jointLogDensity: (y, u) => (u > -Infinity && u < Infinity ? density(y, u) : -Infinity),
    walkSteps: steps,
    walkRescaling,
  };
}
