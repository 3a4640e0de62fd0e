/**
 * The shape of a prior set (a file in priors/): the model settings for an illness and the
 * prior of every parameter. Loading and validating a file is io/priors.ts; turning the
 * priors into log densities on the unconstrained scale is model/priors.ts.
 */

export type PositivePrior =
  | { family: 'lognormal'; median: number; sdlog: number }
  | { family: 'half_normal'; scale: number }
  | { family: 'gamma'; shape: number; rate: number };

/** Prior of the negative-binomial dispersion phi, stated on 1/sqrt(phi). */
export type DispersionPrior = { family: 'inverse_sqrt_half_normal'; scale: number };

export type UnitPrior = { family: 'beta'; a: number; b: number };

export interface DelaySpec {
  family: 'gamma' | 'lognormal';
  /** mean onset-to-report delay, days */
  mean: number;
  /** standard deviation of the delay, days */
  sd: number;
  /** longest delay kept (Dmax), days */
  max_days: number;
}

export interface ModelSettings {
  /** Erlang stages of the latent period (m) */
  latent_stages: number;
  /** Erlang stages of the infectious period (n) */
  infectious_stages: number;
  /** RK4 sub-steps per day */
  substeps: number;
  /** days simulated before the first observed day */
  seed_days: number;
  /** spacing of the random-walk knots, days */
  knot_days: number;
  /** beta between knots: constant from one knot to the next, or linear */
  interpolation: 'step' | 'linear';
  delay: DelaySpec;
  /** day-of-week reporting multipliers */
  weekday_effect: boolean;
}

export interface PriorSpecs {
  start_reproduction: PositivePrior;
  walk_scale: PositivePrior;
  ascertainment: UnitPrior;
  dispersion: DispersionPrior;
  seed_infected: PositivePrior;
  latent_days: PositivePrior;
  infectious_days: PositivePrior;
  /** sd of each of the six free weekday effects (mean 0) */
  weekday_sd: number;
}

export interface PriorSet {
  name: string;
  description: string;
  /** where the values come from: citations, "common practice", or "from memory" */
  sources: string[];
  model: ModelSettings;
  priors: PriorSpecs;
}
