/**
 * Epidemics drawn from the prior alone: a parameter vector from the compiled priors, and the
 * epidemic and reported counts it implies, through the model's own trajectory and observation
 * code (the code the fits and forecasts use).
 */
import type { EpidemicModel } from '../model/posterior.js';
import { toUnconstrained } from '../model/layout.js';
import { drawNegBin } from '../model/trajectory.js';
import { trajectoryOf } from '../model/derived.js';
import type { Rng } from '../util/rng.js';

/**
 * One draw of the model's parameter vector (unconstrained, as the sampler sees it) from the
 * prior of MODEL.md section 4: each scalar from its compiled prior's sample(), the standardised
 * walk steps z_1..z_{K-1} ~ Normal(0, 1), and the weekday effects ~ Normal(0, weekday_sd) when
 * the prior set has them. The draws are taken in that order from `rng`.
 */
export function drawFromPrior(model: EpidemicModel, rng: Rng): Float64Array {
  const L = model.layout;
  const p = model.priors;
  const startReproduction = p.start_reproduction.sample(rng);
  const walkSteps: number[] = [];
  for (let k = 1; k < L.knots; k++) walkSteps.push(rng.normal());
  const walkScale = p.walk_scale.sample(rng);
  const ascertainment = p.ascertainment.sample(rng);
  const dispersion = p.dispersion.sample(rng);
  const seedInfected = p.seed_infected.sample(rng);
  const latentDays = p.latent_days.sample(rng);
  const infectiousDays = p.infectious_days.sample(rng);
  const weekday: number[] = [];
  if (L.weekday) for (let j = 0; j < 6; j++) weekday.push(p.weekday_sd * rng.normal());
  return toUnconstrained(L, {
    start_reproduction: startReproduction,
    walk_steps: walkSteps,
    walk_scale: walkScale,
    ascertainment,
    dispersion,
    seed_infected: seedInfected,
    latent_days: latentDays,
    infectious_days: infectiousDays,
    weekday,
  });
}

/** An epidemic of one parameter vector over the model's observed days. */
export interface SimulatedEpidemic {
  /** false when the state turned negative or non-finite (the other fields are then incomplete) */
  ok: boolean;
  /** reported counts: one negative-binomial draw per day around the expected reports */
  counts: Float64Array;
  /** expected reports mu_t */
  expectedReports: Float64Array;
  /** R_0(t) = beta(t) D on each observed day */
  basicReproduction: Float64Array;
  /** R_t = beta(t) D S(t) / N on each observed day */
  effectiveReproduction: Float64Array;
  /** infections (S to E) on each observed day */
  infections: Float64Array;
  /** share of the population infected by the end of the last day, the initially infected included */
  attackRate: number;
}

/**
 * Runs the epidemic of the unconstrained vector `theta` of `model` (days and population are
 * the model's) and draws its reported counts with `rng`.
 */
export function simulateEpidemic(model: EpidemicModel, theta: ArrayLike<number>, firstWeekday: number, rng: Rng): SimulatedEpidemic {
  const { params: p, traj } = trajectoryOf(model, theta, firstWeekday);
  const T = model.days;
  const S0 = model.seedDays;
  const counts = new Float64Array(T);
  const basicReproduction = new Float64Array(T);
  const effectiveReproduction = new Float64Array(T);
  let infected = p.seed_infected;
  for (let s = 0; s < traj.simDays; s++) infected += traj.infections[s];
  for (let t = 0; t < T; t++) {
    basicReproduction[t] = traj.transmissionRate[S0 + t] * p.infectious_days;
    effectiveReproduction[t] = (basicReproduction[t] * traj.susceptible[S0 + t]) / model.population;
    counts[t] = traj.ok ? drawNegBin(rng, traj.expectedReports[t], p.dispersion) : NaN;
  }
  const ok = traj.ok && Number.isFinite(infected) && traj.expectedReports.every(Number.isFinite);
  return {
    ok,
    counts,
    expectedReports: traj.expectedReports,
    basicReproduction,
    effectiveReproduction,
    infections: traj.infections.slice(S0, S0 + T),
    attackRate: infected / model.population,
  };
}
