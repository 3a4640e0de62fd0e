/**
 * The coordinates the sampler moves in. The model's density is defined over the vector of
 * MODEL.md section 4 (theta: log R_start, standardised walk steps z, log sigma, ...); the
 * sampler may use an equivalent parametrisation in which the posterior is closer to Gaussian,
 * as long as it targets the same distribution (the log-Jacobian of the change is added) and
 * every draw is mapped back to theta.
 *
 * Why: the data pin the effective reproduction number week by week, very tightly (errors in
 * log beta compound through the epidemic), while beta itself trades off against susceptible
 * depletion, the walk scale and the ascertainment. In theta those pinned combinations are
 * curved ridges (w_k = sigma * sum z is bilinear in sigma and z; beta_k = R_eff,k N / (D S_k) with
 * S_k depending on ascertainment and the seed size), which a Gaussian random-walk proposal
 * follows only slowly. Here the sampler moves in
 *
 *     y = [ l_0 .. l_{K-1},  log sigma, logit rho, log phi, log(rho i0), log L, log D, (v_1..v_6) ]
 *
 * where l_k = log(beta_k D S(t_k) / N) is the log effective reproduction number at the start
 * of knot k (S at the knot's first day). Mapping y to theta runs the epidemic knot by knot:
 * log beta_k = l_k - log D - log(S(t_k)/N), then log R_start = log beta_0 + log D and
 * z_k = (log beta_k - log beta_{k-1}) / sigma.
 *
 * The seed enters as log(rho i0): before depletion shows, the reports pin the product of
 * ascertainment and seed size, not either one, and in (logit rho, log i0) that ridge is curved.
 *
 * Jacobian: the map from l to log beta is lower triangular with unit diagonal (S(t_k) depends
 * only on earlier knots and on the other parameters), so its determinant is 1; from log beta
 * to (log R_start, z) it is sigma^-(K-1); from (logit rho, log(rho i0)) to (logit rho, log i0)
 * it is triangular with unit diagonal. Hence log p_y(y) = log p_theta(theta(y)) - (K - 1) log sigma.
 *
 * Only for the piecewise-constant walk: with linear interpolation beta inside a knot depends on
 * the next knot's value, so the sampler then works in theta directly.
 */
import type { EpidemicModel } from './posterior.js';
import { createSeirIntegrator } from './seir.js';
import { convolveDelay, negBinLogLikelihood } from './observation.js';
import { logistic } from './layout.js';

export interface SamplingSpace {
  readonly kind: 'effective-reproduction' | 'model';
  readonly dim: number;
  /** log density of the sampler's coordinates (same distribution as the model's) */
  logDensity(y: Float64Array): number;
  /** theta of a sampler point; false when the epidemic cannot be simulated */
  toTheta(y: Float64Array, theta: Float64Array): boolean;
  /** the sampler point of a theta (for starts given in model coordinates) */
  fromTheta(theta: Float64Array): Float64Array | null;
}

/** log rho from logit rho, stable on both sides: -softplus(-u). */
function logRho(u: number): number {
  return u < 0 ? u - Math.log1p(Math.exp(u)) : -Math.log1p(Math.exp(-u));
}

export function createSamplingSpace(model: EpidemicModel): SamplingSpace {
  const settings = model.priorSet.model;
  if (settings.interpolation !== 'step') {
    return {
      kind: 'model',
      dim: model.layout.dim,
      logDensity: model.logDensity,
      toTheta: (y, theta) => {
        theta.set(y);
        return true;
      },
      fromTheta: (theta) => Float64Array.from(theta),
    };
  }
  const L = model.layout;
  const K = L.knots;
  const dim = L.dim;
  const N = model.population;
  const T = model.days;
  const simDays = model.simDays;
  const knotDays = settings.knot_days;
  const seir = createSeirIntegrator(settings.latent_stages, settings.infectious_stages, settings.substeps);
  const betaOverN = new Float64Array(simDays);
  const onsets = new Float64Array(simDays);
  const delayed = new Float64Array(T);
  const theta = new Float64Array(dim);
  const weekdayMult = new Float64Array(7);
  const logN = Math.log(N);

  /** Runs the epidemic from y, filling `onsets` and theta; false if it cannot be simulated. */
  function simulate(y: Float64Array, th: Float64Array): boolean {
    const uD = y[L.infectiousDays];
    const latent = Math.exp(y[L.latentDays]);
    const infectious = Math.exp(uD);
    const sigma = Math.exp(y[L.walkScale]);
    if (!(sigma > 0) || !(sigma < Infinity)) return false;
    const logI0 = y[L.seedInfected] - logRho(y[L.ascertainment]);
    if (!seir.seed(N, Math.exp(logI0), latent, infectious)) return false;
    let prev = 0;
    for (let k = 0; k < K; k++) {
      const S = seir.state[0];
      if (!(S > 0)) return false;
      const lb = y[k] - uD - (Math.log(S) - logN);
      if (k === 0) th[0] = lb + uD;
      else th[k] = (lb - prev) / sigma;
      prev = lb;
      const b = Math.exp(lb) / N;
      const s0 = k * knotDays;
      const s1 = Math.min(simDays, s0 + knotDays);
      for (let s = s0; s < s1; s++) betaOverN[s] = b;
      if (!seir.run(betaOverN, s0, s1 - s0, latent, infectious, null, onsets, null)) return false;
    }
    for (let i = K; i < dim; i++) th[i] = y[i];
    th[L.seedInfected] = logI0;
    return true;
  }

  function logDensity(y: Float64Array): number {
    if (!simulate(y, theta)) return -Infinity;
    const lp = model.logPriorUnconstrained(theta) - (K - 1) * y[L.walkScale];
    if (!(lp > -Infinity)) return -Infinity;
    convolveDelay(model.delay, onsets, model.seedDays, 0, T, delayed);
    let wd: Float64Array | null = null;
    if (L.weekday) {
      let sum = 0;
      for (let j = 0; j < 6; j++) {
        const v = y[L.firstWeekday + j];
        weekdayMult[j] = Math.exp(v);
        sum += v;
      }
      weekdayMult[6] = Math.exp(-sum);
      wd = weekdayMult;
    }
    const rho = logistic(y[L.ascertainment]);
    const phi = Math.exp(y[L.dispersion]);
    if (!(rho > 0) || !(phi > 0) || !(phi < Infinity)) return -Infinity;
    const v = lp + negBinLogLikelihood(model.observations, delayed, rho, wd, model.weekdayOfDay, phi);
    return v === v && v < Infinity ? v : -Infinity;
  }

  function fromTheta(th: Float64Array): Float64Array | null {
    const y = Float64Array.from(th);
    const uD = th[L.infectiousDays];
    const latent = Math.exp(th[L.latentDays]);
    const infectious = Math.exp(uD);
    const sigma = Math.exp(th[L.walkScale]);
    if (!seir.seed(N, Math.exp(th[L.seedInfected]), latent, infectious)) return null;
    y[L.seedInfected] = th[L.seedInfected] + logRho(th[L.ascertainment]);
    let lb = th[0] - uD;
    for (let k = 0; k < K; k++) {
      if (k > 0) lb += sigma * th[k];
      const S = seir.state[0];
      if (!(S > 0)) return null;
      y[k] = lb + uD + (Math.log(S) - logN);
      const b = Math.exp(lb) / N;
      const s0 = k * knotDays;
      const s1 = Math.min(simDays, s0 + knotDays);
      for (let s = s0; s < s1; s++) betaOverN[s] = b;
      if (!seir.run(betaOverN, s0, s1 - s0, latent, infectious, null, onsets, null)) return null;
    }
    return y;
  }

  return {
    kind: 'effective-reproduction',
    dim,
    logDensity,
    toTheta: simulate,
    fromTheta,
  };
}
