/**
 * The transmission rate past the last observed day (MODEL.md section 5): the random walk on
 * log beta carried on, beta held at its last value, and measures that multiply beta by a
 * factor over a span of forecast days.
 *
 * @remarks
 * Days are counted in simulated days s (s = 0 is the first seeding day; the observed days are
 * s = seed_days .. seed_days + T - 1). The fitted walk has K knots on days k * knot_days,
 * k = 0..K-1, covering the simulated window. Carrying it on adds knots k = K, K+1, ... on the
 * same grid, with w_k = w_{k-1} + sigma z_k and fresh z_k ~ Normal(0, 1): the prior of the walk
 * (MODEL.md section 2) continued, so the spread of log beta grows with the number of new knots
 * (variance j sigma^2 after j new knots, a Gaussian random walk). Every day of the fitted
 * window keeps exactly the beta it had in the fit, also with linear interpolation: there the
 * fit holds w_{K-1} flat after the last knot day, so the forecast interpolates from the last
 * observed day (value w_{K-1}) to the first new knot.
 */
import type { EpidemicModel } from './posterior.js';
import { fillBetaOverN, fillWalk, knotCount } from './transmission.js';

/** How beta moves past the last observed day before any measure applies. */
export type TransmissionPath = 'walk' | 'hold';

/** A multiplicative change of beta on forecast days first..last (simulated-day indices, inclusive). */
export interface BetaChange {
  factor: number;
  /** first simulated day it applies to */
  first: number;
  /** last simulated day it applies to (inclusive) */
  last: number;
}

export interface BetaScenario {
  transmission: TransmissionPath;
  changes: readonly BetaChange[];
}

/**
 * Number of new standardised walk steps a forecast of `horizon` days needs: one per new knot;
 * with linear interpolation one more, so that every forecast day lies between two knots.
 */
export function newStepCount(model: EpidemicModel, horizon: number): number {
  const kd = model.priorSet.model.knot_days;
  const total = model.simDays + horizon;
  const extra = knotCount(total, kd) - model.layout.knots;
  return Math.max(0, extra) + (model.priorSet.model.interpolation === 'linear' ? 1 : 0);
}

/**
 * Daily beta over the fitted window and `horizon` forecast days, for the unconstrained vector
 * `theta` of `model`, under `scenario`. `steps` holds the new standardised walk steps
 * z_K, z_{K+1}, ... (at least {@link newStepCount} of them; read only for the walk path).
 * Writes `out[0 .. simDays + horizon - 1]` and returns it.
 */
export function forecastBeta(
  model: EpidemicModel,
  theta: ArrayLike<number>,
  horizon: number,
  scenario: BetaScenario,
  steps: ArrayLike<number>,
  out: Float64Array = new Float64Array(model.simDays + horizon),
): Float64Array {
  const L = model.layout;
  const s = model.priorSet.model;
  const K = L.knots;
  const kd = s.knot_days;
  const simDays = model.simDays;
  const total = simDays + horizon;
  if (out.length < total) throw new RangeError(`forecastBeta: out holds ${out.length} days, ${total} needed`);
  const sigma = Math.exp(theta[L.walkScale]);
  const logBeta0 = theta[L.startReproduction] - theta[L.infectiousDays];
  const walk = new Float64Array(K);
  fillWalk(sigma, theta, L.firstStep, K, walk);
  const linear = s.interpolation === 'linear';
  // the fitted window exactly as the log density sees it
  fillBetaOverN(logBeta0, walk, K, kd, linear, 1, simDays, out);
  if (horizon === 0) return out;
  if (scenario.transmission === 'hold') {
    out.fill(out[simDays - 1], simDays, total);
  } else {
    const needed = newStepCount(model, horizon);
    if (steps.length < needed) throw new RangeError(`forecastBeta: ${needed} new walk steps needed, ${steps.length} given`);
    // w at the new knots K, K+1, ...: wNew[j] = w_{K+j}
    const wNew = new Float64Array(needed);
    let w = walk[K - 1];
    for (let j = 0; j < needed; j++) {
      w += sigma * steps[j];
      wNew[j] = w;
    }
    const knotValue = (k: number) => (k < K ? walk[k] : wNew[k - K]);
    for (let day = simDays; day < total; day++) {
      const k = Math.floor(day / kd);
      let logW: number;
      if (!linear) {
        logW = knotValue(k);
      } else if (k < K) {
        // between the last observed day (flat at w_{K-1} in the fit) and the first new knot
        const x0 = simDays - 1;
        const x1 = K * kd;
        logW = walk[K - 1] + ((day - x0) / (x1 - x0)) * (wNew[0] - walk[K - 1]);
      } else {
        const frac = (day - k * kd) / kd;
        logW = knotValue(k) + frac * (knotValue(k + 1) - knotValue(k));
      }
      out[day] = Math.exp(logBeta0 + logW);
    }
  }
  for (const c of scenario.changes) {
    const from = Math.max(c.first, simDays);
    const to = Math.min(c.last, total - 1);
    for (let day = from; day <= to; day++) out[day] *= c.factor;
  }
  return out;
}
