/**
 * Prior predictive check: what a prior set says about epidemics before it sees any data.
 * Many parameter vectors are drawn from the prior alone, each epidemic is run and its reports
 * drawn, and the implied reproduction numbers, peaks, totals and attack rates are summarised;
 * outcomes no real epidemic shows (more reports than people, everyone infected, reproduction
 * numbers beyond any illness in view) are counted and flagged when they carry too much mass.
 *
 * @remarks Prior predictive checks: Box (1980), "Sampling and Bayes' inference in scientific
 * modelling and robustness", JRSS A 143(4); Gabry, Simpson, Vehtari, Betancourt and Gelman
 * (2019), "Visualization in Bayesian workflow", JRSS A 182(2), section 3.
 */
import { createModel, type EpidemicModel } from '../model/posterior.js';
import type { PriorSet } from '../model/prior-set.js';
import { createRng, deriveSeed } from '../util/rng.js';
import { drawFromPrior, simulateEpidemic } from './prior-draws.js';

/** Per-draw summaries of a simulated epidemic, in the order of the outputs. */
export const PRIOR_CHECK_QUANTITIES = [
  'max_basic_reproduction',
  'max_effective_reproduction',
  'min_effective_reproduction',
  'last_effective_reproduction',
  'peak_reports',
  'peak_reports_day',
  'total_reports',
  'reports_per_person',
  'attack_rate',
] as const;
export type PriorCheckQuantity = (typeof PRIOR_CHECK_QUANTITIES)[number];

/** Daily series kept for each draw (draws x days, row-major). */
export const PRIOR_DAILY_QUANTITIES = ['effective_reproduction', 'infections', 'expected_reports', 'predicted_reports'] as const;
export type PriorDailyQuantity = (typeof PRIOR_DAILY_QUANTITIES)[number];

export interface PriorCheckOptions {
  days: number;
  population: number;
  draws: number;
  seed: number;
  /** R_t above this on any day counts as implausible */
  maxReproduction: number;
  /** day of week of the first day (0 = Monday); matters only with weekday effects */
  firstWeekday: number;
}

export interface PriorCheckFinding {
  /** short name, e.g. more_reports_than_people */
  name: string;
  /** what is counted, in words */
  description: string;
  /** share of all draws where it happens */
  share: number;
  /** a share above this is flagged; null: reported only */
  flagAbove: number | null;
  flagged: boolean;
}

export interface PriorCheckResult {
  model: EpidemicModel;
  draws: number;
  /** draws whose epidemic turned impossible (negative or non-finite state) */
  failed: number;
  /** per quantity, one value per draw (NaN for failed draws) */
  perDraw: Record<PriorCheckQuantity, Float64Array>;
  daily: Record<PriorDailyQuantity, Float64Array>;
  findings: PriorCheckFinding[];
}

/** Seed stream of the prior draws: draw d uses deriveSeed(seed, STREAM_PRIOR_CHECK, d). */
export const STREAM_PRIOR_CHECK = 0x9c4e;

/**
 * Shares that are flagged. More reports than people and impossible epidemics are errors of the
 * prior (or of the population), so 1% is already too much; a whole population infected, or
 * reproduction numbers beyond the chosen bound, are outcomes no epidemic in view shows, and a
 * prior may spend at most 5% of its mass on them (project judgement, no published source).
 */
export const FLAG_SHARES = { impossible: 0.01, reportsAbovePopulation: 0.01, everyoneInfected: 0.05, reproductionAboveBound: 0.05 } as const;
/** An attack rate above this counts as the whole population infected. */
export const EVERYONE_INFECTED = 0.99;

/** Simulates `draws` epidemics from the prior of `priorSet` alone and summarises them. */
export function priorCheck(priorSet: PriorSet, o: PriorCheckOptions): PriorCheckResult {
  const model = createModel({ counts: new Float64Array(o.days).fill(NaN), population: o.population, firstWeekday: o.firstWeekday }, priorSet);
  const T = o.days;
  const n = o.draws;
  const perDraw = Object.fromEntries(PRIOR_CHECK_QUANTITIES.map((q) => [q, new Float64Array(n).fill(NaN)])) as PriorCheckResult['perDraw'];
  const daily = Object.fromEntries(PRIOR_DAILY_QUANTITIES.map((q) => [q, new Float64Array(n * T).fill(NaN)])) as PriorCheckResult['daily'];
  let failed = 0;
  for (let d = 0; d < n; d++) {
    const rng = createRng(deriveSeed(o.seed, STREAM_PRIOR_CHECK, d));
    const theta = drawFromPrior(model, rng);
    const sim = simulateEpidemic(model, theta, o.firstWeekday, rng);
    if (!sim.ok) {
      failed++;
      continue;
    }
    let r0Max = -Infinity;
    let rMax = -Infinity;
    let rMin = Infinity;
    let peak = -Infinity;
    let peakDay = 0;
    let total = 0;
    for (let t = 0; t < T; t++) {
      const r = sim.effectiveReproduction[t];
      if (sim.basicReproduction[t] > r0Max) r0Max = sim.basicReproduction[t];
      if (r > rMax) rMax = r;
      if (r < rMin) rMin = r;
      const y = sim.counts[t];
      if (y > peak) {
        peak = y;
        peakDay = t + 1;
      }
      total += y;
      daily.effective_reproduction[d * T + t] = r;
      daily.infections[d * T + t] = sim.infections[t];
      daily.expected_reports[d * T + t] = sim.expectedReports[t];
      daily.predicted_reports[d * T + t] = y;
    }
    perDraw.max_basic_reproduction[d] = r0Max;
    perDraw.max_effective_reproduction[d] = rMax;
    perDraw.min_effective_reproduction[d] = rMin;
    perDraw.last_effective_reproduction[d] = sim.effectiveReproduction[T - 1];
    perDraw.peak_reports[d] = peak;
    perDraw.peak_reports_day[d] = peakDay;
    perDraw.total_reports[d] = total;
    perDraw.reports_per_person[d] = total / o.population;
    perDraw.attack_rate[d] = sim.attackRate;
  }
  const share = (values: Float64Array, test: (v: number) => boolean) => values.reduce((a, v) => a + (!Number.isNaN(v) && test(v) ? 1 : 0), 0) / n;
  const finding = (name: string, description: string, s: number, flagAbove: number | null): PriorCheckFinding => ({
    name,
    description,
    share: s,
    flagAbove,
    flagged: flagAbove !== null && s > flagAbove,
  });
  const findings = [
    finding('impossible_epidemic', 'the epidemic cannot be run (a compartment turned negative or non-finite: an extreme transmission rate)', failed / n, FLAG_SHARES.impossible),
    finding('more_reports_than_people', `more reports over the ${T} days than the population of ${o.population}`, share(perDraw.reports_per_person, (v) => v > 1), FLAG_SHARES.reportsAbovePopulation),
    finding('everyone_infected', `more than ${EVERYONE_INFECTED * 100}% of the population infected within the ${T} days`, share(perDraw.attack_rate, (v) => v > EVERYONE_INFECTED), FLAG_SHARES.everyoneInfected),
    finding(
      'reproduction_above_bound',
      `R_0(t) = beta D above ${o.maxReproduction} on some day (the transmissibility itself, before immunity brings R_t down)`,
      share(perDraw.max_basic_reproduction, (v) => v > o.maxReproduction),
      FLAG_SHARES.reproductionAboveBound,
    ),
    finding('no_reports', `not a single report in the ${T} days`, share(perDraw.total_reports, (v) => v === 0), null),
  ];
  return { model, draws: n, failed, perDraw, daily, findings };
}
