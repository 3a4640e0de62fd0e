/**
 * The simulator: epidemics with known truth from a simulation scenario (io/sim-scenario.ts),
 * through the model's own SEIR and observation code, with negative-binomial reporting noise.
 */
import type { SimPlace, SimScenario } from '../io/sim-scenario.js';
import { addDays, dayOfWeek, parseIsoDate } from '../io/dates.js';
import { discretiseDelay } from './delay.js';
import { runTrajectory, drawNegBin } from './trajectory.js';
import type { Rng } from '../util/rng.js';

export interface SimulatedPlace {
  name: string;
  dates: string[];
  cases: number[];
  truth: {
    transmission_rate: Float64Array;
    basic_reproduction: Float64Array;
    effective_reproduction: Float64Array;
    infections: Float64Array;
    onsets: Float64Array;
    expected_reports: Float64Array;
  };
}

/** R0 on day `day` (days since 1970-01-01) from the place's [date, R0] path. */
export function reproductionOnDay(place: SimPlace, day: number): number {
  const pts = place.reproduction.map(([d, r]) => [parseIsoDate(d) as number, r] as const);
  if (day <= pts[0][0]) return pts[0][1];
  for (let j = 1; j < pts.length; j++) {
    const [d1, r1] = pts[j];
    if (day < d1) {
      const [d0, r0] = pts[j - 1];
      return place.interpolation === 'step' ? r0 : r0 + ((r1 - r0) * (day - d0)) / (d1 - d0);
    }
  }
  return pts[pts.length - 1][1];
}

export function simulatePlace(scenario: SimScenario, place: SimPlace, rng: Rng): SimulatedPlace {
  const settings = scenario.model;
  const seedDays = settings.seed_days;
  const simDays = seedDays + scenario.days;
  const firstSimDay = (parseIsoDate(scenario.start_date) as number) - seedDays;
  const beta = new Float64Array(simDays);
  for (let s = 0; s < simDays; s++) beta[s] = reproductionOnDay(place, firstSimDay + s) / place.infectious_days;
  const delay = discretiseDelay(settings.delay);
  const traj = runTrajectory(
    settings,
    delay,
    {
      population: place.population,
      seedInfected: place.seed_infected,
      latentDays: place.latent_days,
      infectiousDays: place.infectious_days,
      ascertainment: place.ascertainment,
      weekdayMultipliers: place.weekday_multipliers,
    },
    beta,
    dayOfWeek(scenario.start_date),
  );
  if (!traj.ok) throw new RangeError(`simulation of ${place.name} produced an invalid state`);
  const T = scenario.days;
  const dates: string[] = [];
  const cases: number[] = [];
  const pick = (a: Float64Array) => a.slice(seedDays, seedDays + T);
  const susceptible = pick(traj.susceptible);
  const basic = new Float64Array(T);
  const effective = new Float64Array(T);
  for (let t = 0; t < T; t++) {
    dates.push(addDays(scenario.start_date, t));
    cases.push(drawNegBin(rng, traj.expectedReports[t], place.dispersion));
    basic[t] = beta[seedDays + t] * place.infectious_days;
    effective[t] = (basic[t] * susceptible[t]) / place.population;
  }
  return {
    name: place.name,
    dates,
    cases,
    truth: {
      transmission_rate: pick(traj.transmissionRate),
      basic_reproduction: basic,
      effective_reproduction: effective,
      infections: pick(traj.infections),
      onsets: pick(traj.onsets),
      expected_reports: traj.expectedReports,
    },
  };
}
