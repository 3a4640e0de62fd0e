/**
 * Full trajectories of the latent epidemic and the expected reports, for derived quantities,
 * forecasts and the simulator. Unlike the log density this allocates its outputs: it runs
 * once per kept draw, not once per proposal.
 */
import type { ModelSettings } from './prior-set.js';
import { createSeirIntegrator } from './seir.js';
import { convolveDelay } from './observation.js';

/** Everything a trajectory needs besides the daily transmission rate. */
export interface EpidemicParameters {
  population: number;
  seedInfected: number;
  latentDays: number;
  infectiousDays: number;
  ascertainment: number;
  /** seven reporting multipliers, Monday..Sunday, or null for none */
  weekdayMultipliers: ArrayLike<number> | null;
}

export interface Trajectory {
  /** simulated days, from seed_days before the first observed day */
  readonly simDays: number;
  readonly seedDays: number;
  /** per simulated day: beta(t) */
  readonly transmissionRate: Float64Array;
  /** per simulated day: S at the start of the day */
  readonly susceptible: Float64Array;
  readonly infections: Float64Array;
  readonly onsets: Float64Array;
  /** per observed (and forecast) day t = 0..days-1: delayed onsets before ascertainment */
  readonly delayedOnsets: Float64Array;
  /** per observed (and forecast) day: mu_t = rho * weekday_t * delayedOnsets_t */
  readonly expectedReports: Float64Array;
  /** false when the state turned negative or non-finite: the other arrays are then incomplete */
  readonly ok: boolean;
}

/** The integrator of the last settings seen, reused: a fresh one per trajectory never gets fast. */
let lastIntegrator: { key: string; seir: ReturnType<typeof createSeirIntegrator> } | null = null;

function integratorFor(settings: ModelSettings): ReturnType<typeof createSeirIntegrator> {
  const key = `${settings.latent_stages}/${settings.infectious_stages}/${settings.substeps}`;
  if (lastIntegrator === null || lastIntegrator.key !== key) {
    lastIntegrator = { key, seir: createSeirIntegrator(settings.latent_stages, settings.infectious_stages, settings.substeps) };
  }
  return lastIntegrator.seir;
}

/**
 * Runs the SEIR model over `beta.length` simulated days (seed days included) and the
 * observation model over the days from the first observed day on.
 * `firstWeekday` is the weekday (0 = Monday) of the first observed day.
 */
export function runTrajectory(
  settings: ModelSettings,
  delay: Float64Array,
  params: EpidemicParameters,
  beta: Float64Array,
  firstWeekday: number,
): Trajectory {
  const seedDays = settings.seed_days;
  const simDays = beta.length;
  const days = simDays - seedDays;
  const N = params.population;
  const betaOverN = new Float64Array(simDays);
  for (let s = 0; s < simDays; s++) betaOverN[s] = beta[s] / N;
  const susceptible = new Float64Array(simDays);
  const infections = new Float64Array(simDays);
  const onsets = new Float64Array(simDays);
  const seir = integratorFor(settings);
  const ok =
    seir.seed(N, params.seedInfected, params.latentDays, params.infectiousDays) &&
    seir.run(betaOverN, 0, simDays, params.latentDays, params.infectiousDays, infections, onsets, susceptible);
  const delayedOnsets = new Float64Array(days);
  const expectedReports = new Float64Array(days);
  convolveDelay(delay, onsets, seedDays, 0, days, delayedOnsets);
  const wd = params.weekdayMultipliers;
  for (let t = 0; t < days; t++) {
    const w = wd === null ? 1 : wd[(firstWeekday + t) % 7];
    expectedReports[t] = params.ascertainment * w * delayedOnsets[t];
  }
  return {
    simDays,
    seedDays,
    transmissionRate: Float64Array.from(beta),
    susceptible,
    infections,
    onsets,
    delayedOnsets,
    expectedReports,
    ok,
  };
}

/**
 * One negative-binomial draw with mean mu and dispersion phi, as a gamma-Poisson mixture
 * (lambda ~ Gamma(phi, rate phi/mu), y ~ Poisson(lambda); a standard identity, e.g.
 * Cameron and Trivedi 1998, section 4.2, cited from memory).
 */
export function drawNegBin(rng: { gamma(shape: number, rate: number): number; poisson(mean: number): number }, mu: number, phi: number): number {
  if (!(mu > 0)) return 0;
  const lambda = rng.gamma(phi, phi / mu);
  return lambda > 0 ? rng.poisson(lambda) : 0;
}
