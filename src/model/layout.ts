/**
 * The unconstrained parameter vector the sampler works on (MODEL.md section 4), by name.
 *
 *     [0]          log R_start
 *     [1..K-1]     z_1..z_{K-1}          standardised walk steps
 *     [K]          log sigma             walk scale
 *     [K+1]        logit rho             ascertainment
 *     [K+2]        log phi               dispersion
 *     [K+3]        log i0                seed infected
 *     [K+4]        log L                 latent days
 *     [K+5]        log D                 infectious days
 *     [K+6..K+11]  v_1..v_6              weekday effects Monday..Saturday (if on)
 */

export const WEEKDAY_NAMES = ['mon', 'tue', 'wed', 'thu', 'fri', 'sat', 'sun'] as const;

export interface ParameterLayout {
  readonly dim: number;
  readonly knots: number;
  readonly weekday: boolean;
  /** names of the entries of the constrained parameters, in vector order */
  readonly names: readonly string[];
  readonly startReproduction: number;
  readonly firstStep: number;
  readonly walkScale: number;
  readonly ascertainment: number;
  readonly dispersion: number;
  readonly seedInfected: number;
  readonly latentDays: number;
  readonly infectiousDays: number;
  /** index of v_1, or -1 without weekday effects */
  readonly firstWeekday: number;
}

export function createLayout(knots: number, weekday: boolean): ParameterLayout {
  if (!Number.isInteger(knots) || knots < 1) throw new RangeError(`knots must be a positive integer, got ${knots}`);
  const K = knots;
  const names: string[] = ['start_reproduction'];
  for (let k = 1; k < K; k++) names.push(`walk_step[${k}]`);
  names.push('walk_scale', 'ascertainment', 'dispersion', 'seed_infected', 'latent_days', 'infectious_days');
  if (weekday) for (let j = 0; j < 6; j++) names.push(`weekday_${WEEKDAY_NAMES[j]}`);
  return {
    dim: names.length,
    knots: K,
    weekday,
    names,
    startReproduction: 0,
    firstStep: 1,
    walkScale: K,
    ascertainment: K + 1,
    dispersion: K + 2,
    seedInfected: K + 3,
    latentDays: K + 4,
    infectiousDays: K + 5,
    firstWeekday: weekday ? K + 6 : -1,
  };
}

/** Parameters in their natural units. */
export interface NaturalParameters {
  start_reproduction: number;
  walk_steps: number[];
  walk_scale: number;
  ascertainment: number;
  dispersion: number;
  seed_infected: number;
  latent_days: number;
  infectious_days: number;
  /** v_1..v_6 (Monday..Saturday); Sunday's is minus their sum. Empty without weekday effects. */
  weekday: number[];
}

const logit = (p: number) => Math.log(p) - Math.log1p(-p);
/** Logistic function, stable on both sides. */
export function logistic(u: number): number {
  return u >= 0 ? 1 / (1 + Math.exp(-u)) : Math.exp(u) / (1 + Math.exp(u));
}

export function toUnconstrained(layout: ParameterLayout, p: NaturalParameters): Float64Array {
  if (p.walk_steps.length !== layout.knots - 1) {
    throw new RangeError(`expected ${layout.knots - 1} walk steps, got ${p.walk_steps.length}`);
  }
  const th = new Float64Array(layout.dim);
  th[layout.startReproduction] = Math.log(p.start_reproduction);
  for (let k = 0; k < layout.knots - 1; k++) th[layout.firstStep + k] = p.walk_steps[k];
  th[layout.walkScale] = Math.log(p.walk_scale);
  th[layout.ascertainment] = logit(p.ascertainment);
  th[layout.dispersion] = Math.log(p.dispersion);
  th[layout.seedInfected] = Math.log(p.seed_infected);
  th[layout.latentDays] = Math.log(p.latent_days);
  th[layout.infectiousDays] = Math.log(p.infectious_days);
  if (layout.weekday) for (let j = 0; j < 6; j++) th[layout.firstWeekday + j] = p.weekday[j] ?? 0;
  return th;
}

export function toNatural(layout: ParameterLayout, th: ArrayLike<number>): NaturalParameters {
  const steps: number[] = [];
  for (let k = 0; k < layout.knots - 1; k++) steps.push(th[layout.firstStep + k]);
  const weekday: number[] = [];
  if (layout.weekday) for (let j = 0; j < 6; j++) weekday.push(th[layout.firstWeekday + j]);
  return {
    start_reproduction: Math.exp(th[layout.startReproduction]),
    walk_steps: steps,
    walk_scale: Math.exp(th[layout.walkScale]),
    ascertainment: logistic(th[layout.ascertainment]),
    dispersion: Math.exp(th[layout.dispersion]),
    seed_infected: Math.exp(th[layout.seedInfected]),
    latent_days: Math.exp(th[layout.latentDays]),
    infectious_days: Math.exp(th[layout.infectiousDays]),
    weekday,
  };
}

/**
 * Value of entry `i` of the unconstrained vector in natural units (the scale reported in
 * summaries and diagnostics).
 */
export function naturalValue(layout: ParameterLayout, i: number, u: number): number {
  if (i === layout.ascertainment) return logistic(u);
  if (i >= layout.firstStep && i < layout.walkScale) return u;
  if (layout.weekday && i >= layout.firstWeekday) return u;
  return Math.exp(u);
}
