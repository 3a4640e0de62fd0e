/**
 * The log posterior density of the default model (MODEL.md sections 1-4) over the
 * unconstrained parameter vector of {@link createLayout}: log prior + log-Jacobian + log
 * likelihood, every normalising constant included. Built once per data set; evaluation uses
 * preallocated work buffers and allocates nothing.
 */
import type { PriorSet } from './prior-set.js';
import { compilePriors, type CompiledPriors } from './priors.js';
import { createLayout, logistic, type ParameterLayout } from './layout.js';
import { knotCount, fillWalk, fillBetaOverN } from './transmission.js';
import { createSeirIntegrator, runOnsets22, type SeirIntegrator } from './seir.js';
import { discretiseDelay } from './delay.js';
import { convolveDelay, negBinLogLikelihood, observations, type Observations } from './observation.js';

const HALF_LOG_2PI = 0.5 * Math.log(2 * Math.PI);

export interface ModelData {
  /** daily reported counts from the first observed day; NaN = missing */
  counts: ArrayLike<number>;
  /** population N */
  population: number;
  /** day of week of the first observed day, 0 = Monday .. 6 = Sunday (used by weekday effects) */
  firstWeekday: number;
}

export interface DensityComponents {
  logLikelihood: number;
  logPrior: number;
  logJacobian: number;
  logDensity: number;
}

export interface EpidemicModel {
  readonly layout: ParameterLayout;
  readonly priorSet: PriorSet;
  readonly priors: CompiledPriors;
  readonly population: number;
  /** observed days T (missing included) */
  readonly days: number;
  /** simulated days: seed_days + T */
  readonly simDays: number;
  readonly seedDays: number;
  readonly delay: Float64Array;
  readonly observations: Observations;
  /** weekday index (0 = Monday) of every observed day */
  readonly weekdayOfDay: Uint8Array;
  /** log posterior density (up to nothing: all constants included); -Infinity, never NaN */
  logDensity(theta: Float64Array): number;
  /** the parts of the log density, for checks and reports */
  components(theta: Float64Array): DensityComponents;
  /** log prior + log-Jacobian only (no simulation) */
  logPriorUnconstrained(theta: Float64Array): number;
}

export function createModel(data: ModelData, priorSet: PriorSet): EpidemicModel {
  const settings = priorSet.model;
  const T = data.counts.length;
  const N = data.population;
  if (!(T >= 1)) throw new RangeError('at least one day of data is needed');
  if (!(N > 0) || !Number.isFinite(N)) throw new RangeError(`population must be positive and finite, got ${N}`);
  const seedDays = settings.seed_days;
  const simDays = seedDays + T;
  const K = knotCount(simDays, settings.knot_days);
  const layout = createLayout(K, settings.weekday_effect);
  const priors = compilePriors(priorSet.priors);
  const delay = discretiseDelay(settings.delay);
  const obs = observations(data.counts);
  const weekdayOfDay = new Uint8Array(T);
  for (let t = 0; t < T; t++) weekdayOfDay[t] = (data.firstWeekday + t) % 7;
  const linear = settings.interpolation === 'linear';
  const seir: SeirIntegrator = createSeirIntegrator(
    settings.latent_stages,
    settings.infectious_stages,
    settings.substeps,
  );

  const erlang22 = settings.latent_stages === 2 && settings.infectious_stages === 2;
  const substeps = settings.substeps;
  const rates = new Float64Array(2);

  // work buffers
  const walk = new Float64Array(K);
  const betaOverN = new Float64Array(simDays);
  const onsets = new Float64Array(simDays);
  const delayed = new Float64Array(T);
  const weekdayMult = new Float64Array(7);
  const invN = 1 / N;
  const weekdaySd = priors.weekday_sd;

  const L = layout;
  const pR = priors.start_reproduction;
  const pSigma = priors.walk_scale;
  const pRho = priors.ascertainment;
  const pPhi = priors.dispersion;
  const pI0 = priors.seed_infected;
  const pL = priors.latent_days;
  const pD = priors.infectious_days;

  function priorPart(th: Float64Array): number {
    let zz = 0;
    for (let k = 1; k < K; k++) zz += th[k] * th[k];
    let lp = -0.5 * zz - HALF_LOG_2PI * (K - 1);
    lp += pR.logDensityUnconstrained(th[0]);
    lp += pSigma.logDensityUnconstrained(th[L.walkScale]);
    lp += pRho.logDensityUnconstrained(th[L.ascertainment]);
    lp += pPhi.logDensityUnconstrained(th[L.dispersion]);
    lp += pI0.logDensityUnconstrained(th[L.seedInfected]);
    lp += pL.logDensityUnconstrained(th[L.latentDays]);
    lp += pD.logDensityUnconstrained(th[L.infectiousDays]);
    if (L.weekday) {
      const c = -Math.log(weekdaySd) - HALF_LOG_2PI;
      for (let j = 0; j < 6; j++) {
        const v = th[L.firstWeekday + j] / weekdaySd;
        lp += c - 0.5 * v * v;
      }
    }
    return lp;
  }

  // The log likelihood leaves observe() through this array, not as a return value: a double
  // returned from (or passed to) a function too large to inline is boxed on the heap. For the
  // same reason the work is split in two functions that each stay within the optimising
  // compiler's inlining budget and take and give only arrays and booleans.
  const likelihoodOut = new Float64Array(1);

  function likelihoodPart(th: Float64Array): number {
    return simulate(th) && observe(th) ? likelihoodOut[0] : -Infinity;
  }

  /** Transmission rate, SEIR and delay: fills `delayed`; false for an impossible vector. */
  function simulate(th: Float64Array): boolean {
    const sigma = Math.exp(th[L.walkScale]);
    const i0 = Math.exp(th[L.seedInfected]);
    const latent = Math.exp(th[L.latentDays]);
    const infectious = Math.exp(th[L.infectiousDays]);
    const logBeta0 = th[0] - th[L.infectiousDays];
    if (!(latent > 0) || !(infectious > 0)) return false;
    fillWalk(sigma, th, L.firstStep, K, walk);
    fillBetaOverN(logBeta0, walk, K, settings.knot_days, linear, invN, simDays, betaOverN);
    if (!seir.seed(N, i0, latent, infectious)) return false;
    if (erlang22) {
      // the default stage counts: state in local variables (seir.ts), rates passed in an array
      rates[0] = 2 / latent;
      rates[1] = 2 / infectious;
      if (!runOnsets22(seir.state, rates, substeps, betaOverN, 0, simDays, onsets, 0)) return false;
    } else if (!seir.run(betaOverN, 0, simDays, latent, infectious, null, onsets, null)) {
      return false;
    }
    convolveDelay(delay, onsets, seedDays, 0, T, delayed);
    return true;
  }

  /** Observation model on `delayed`: writes the log likelihood into likelihoodOut[0]. */
  function observe(th: Float64Array): boolean {
    const rho = logistic(th[L.ascertainment]);
    const phi = Math.exp(th[L.dispersion]);
    if (!(rho > 0) || !(phi > 0) || !(phi < Infinity)) return false;
    let wd: Float64Array | null = null;
    if (L.weekday) {
      let sum = 0;
      for (let j = 0; j < 6; j++) {
        const v = th[L.firstWeekday + j];
        weekdayMult[j] = Math.exp(v);
        sum += v;
      }
      weekdayMult[6] = Math.exp(-sum);
      wd = weekdayMult;
    }
    likelihoodOut[0] = negBinLogLikelihood(obs, delayed, rho, wd, weekdayOfDay, phi);
    return true;
  }

  function logDensity(th: Float64Array): number {
    const lp = priorPart(th);
    if (!(lp > -Infinity)) return -Infinity;
    const v = lp + likelihoodPart(th);
    return v === v && v < Infinity ? v : -Infinity;
  }

  function components(th: Float64Array): DensityComponents {
    const logLikelihood = likelihoodPart(th);
    const x = (p: typeof pR, u: number) => p.logDensity(p.fromUnconstrained(u));
    let logPrior =
      x(pR, th[0]) +
      x(pSigma, th[L.walkScale]) +
      x(pRho, th[L.ascertainment]) +
      x(pPhi, th[L.dispersion]) +
      x(pI0, th[L.seedInfected]) +
      x(pL, th[L.latentDays]) +
      x(pD, th[L.infectiousDays]);
    const total = priorPart(th);
    let zz = 0;
    for (let k = 1; k < K; k++) zz += th[k] * th[k];
    logPrior += -0.5 * zz - HALF_LOG_2PI * (K - 1);
    if (L.weekday) {
      for (let j = 0; j < 6; j++) {
        const v = th[L.firstWeekday + j] / weekdaySd;
        logPrior += -Math.log(weekdaySd) - HALF_LOG_2PI - 0.5 * v * v;
      }
    }
    const logJacobian = total - logPrior;
    return { logLikelihood, logPrior, logJacobian, logDensity: logDensity(th) };
  }

  return {
    layout,
    priorSet,
    priors,
    population: N,
    days: T,
    simDays,
    seedDays,
    delay,
    observations: obs,
    weekdayOfDay,
    logDensity,
    components,
    logPriorUnconstrained: priorPart,
  };
}
