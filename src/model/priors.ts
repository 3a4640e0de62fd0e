/**
 * Prior specs (model/prior-set.ts) compiled once into fast closures: the log density of the
 * constrained value, the log density on the sampler's unconstrained scale (log for positive
 * quantities, logit for a share) with its log-Jacobian, the transforms, quantiles and draws.
 * Parameters are checked once here; the returned functions neither check nor allocate, and
 * their log densities are total: `-Infinity` outside the support or for a NaN argument,
 * never NaN, never a throw.
 */
import { WaxwaneError } from '../errors.js';
import type { DispersionPrior, PositivePrior, PriorSpecs, UnitPrior } from './prior-set.js';
import type { Rng } from '../util/rng.js';
import {
  betaln,
  betaQuantile,
  gammaln,
  gammaQuantile,
  lognormalQuantile,
  normalQuantile,
} from '../util/stdlib.js';

export interface CompiledPrior {
  /** Log prior density of the constrained value x; -Infinity outside the support. */
  logDensity(x: number): number;
  /** log p(x(u)) + log |dx/du|, computed on the unconstrained scale without overflow. */
  logDensityUnconstrained(u: number): number;
  /** Constrained value to the sampler's scale (log or logit). */
  toUnconstrained(x: number): number;
  /** The sampler's scale back to the constrained value (exp or logistic). */
  fromUnconstrained(u: number): number;
  /** Quantile of the constrained value at probability p (NaN for p outside [0, 1]). */
  quantile(p: number): number;
  /** One draw of the constrained value. */
  sample(rng: Rng): number;
}

export interface CompiledPriors {
  start_reproduction: CompiledPrior;
  walk_scale: CompiledPrior;
  ascertainment: CompiledPrior;
  dispersion: CompiledPrior;
  seed_infected: CompiledPrior;
  latent_days: CompiledPrior;
  infectious_days: CompiledPrior;
  /** sd of each free weekday effect (checked finite and > 0) */
  weekday_sd: number;
}

/** ln sqrt(2 pi). */
const LN_SQRT_2PI = 0.91893853320467274178;

/** The family of a spec whose type TypeScript has ruled out (a caller outside the type system). */
function familyOf(spec: unknown): string {
  return String((spec as { family?: unknown }).family);
}

/** ln(1 + e^x) without overflow: max(x, 0) + ln(1 + e^-|x|). */
function softplus(x: number): number {
  return (x > 0 ? x : 0) + Math.log1p(Math.exp(-Math.abs(x)));
}

/** c ln x with 0 ln 0 = 0, so that a beta with a = 1 or b = 1 has a finite density at 0 or 1. */
function xlogy(c: number, x: number): number {
  return c === 0 ? 0 : c * Math.log(x);
}

function requirePositive(what: string, value: unknown): number {
  if (typeof value !== 'number' || !Number.isFinite(value) || !(value > 0)) {
    throw new WaxwaneError(`${what} must be a finite number > 0, got ${String(value)}`);
  }
  return value;
}

const log = Math.log;
const exp = Math.exp;

/**
 * Lognormal(median, sdlog): ln x ~ Normal(mu = ln median, sdlog).
 *
 * @remarks
 * ln p(x) = -ln x - ln sdlog - ln sqrt(2 pi) - (ln x - mu)^2 / (2 sdlog^2), x > 0.
 * On u = ln x the Jacobian x cancels the leading -ln x: the density of u is Normal(mu, sdlog).
 * (Johnson, Kotz and Balakrishnan, Continuous Univariate Distributions, vol. 1, ch. 14.)
 */
function lognormal(median: number, sdlog: number): CompiledPrior {
  const mu = log(median);
  const c = -log(sdlog) - LN_SQRT_2PI;
  const h = 0.5 / (sdlog * sdlog);
  const normalOfLog = (u: number): number => {
    const d = u - mu;
    const lp = c - h * d * d;
    return lp === lp ? lp : -Infinity;
  };
  return {
    logDensity: (x) => (x > 0 && x < Infinity ? normalOfLog(log(x)) - log(x) : -Infinity),
    logDensityUnconstrained: normalOfLog,
    toUnconstrained: log,
    fromUnconstrained: exp,
    quantile: (p) => lognormalQuantile(p, mu, sdlog),
    sample: (rng) => exp(mu + sdlog * rng.normal()),
  };
}

/**
 * Half-normal(scale) on x >= 0: the density 2 Normal(x; 0, scale).
 *
 * @remarks
 * ln p(x) = ln 2 - ln scale - ln sqrt(2 pi) - x^2 / (2 scale^2); quantile
 * scale * Phi^-1((1 + p) / 2) (Johnson, Kotz and Balakrishnan, vol. 1, ch. 13, folded normal).
 */
function halfNormal(scale: number): CompiledPrior {
  const c = Math.LN2 - log(scale) - LN_SQRT_2PI;
  const h = 0.5 / (scale * scale);
  return {
    logDensity: (x) => (x >= 0 && x < Infinity ? c - h * x * x : -Infinity),
    logDensityUnconstrained: (u) => {
      if (!(u > -Infinity && u < Infinity)) return -Infinity;
      const x = exp(u);
      return c - h * x * x + u;
    },
    toUnconstrained: log,
    fromUnconstrained: exp,
    quantile: (p) => (p >= 0 && p <= 1 ? scale * normalQuantile((1 + p) / 2, 0, 1) : NaN),
    sample: (rng) => Math.abs(scale * rng.normal()),
  };
}

/**
 * Gamma(shape, rate).
 *
 * @remarks
 * ln p(x) = shape ln rate - ln Gamma(shape) + (shape - 1) ln x - rate x, x > 0; on u = ln x
 * the density is shape ln rate - ln Gamma(shape) + shape u - rate e^u
 * (Johnson, Kotz and Balakrishnan, vol. 1, ch. 17).
 */
function gamma(shape: number, rate: number): CompiledPrior {
  const c = shape * log(rate) - gammaln(shape);
  return {
    logDensity: (x) => {
      if (!(x >= 0 && x < Infinity)) return -Infinity;
      // at 0 the density is finite only for shape 1 (unbounded below it, zero above it)
      if (x === 0) return shape === 1 ? c : shape < 1 ? Infinity : -Infinity;
      return c + (shape - 1) * log(x) - rate * x;
    },
    logDensityUnconstrained: (u) =>
      u > -Infinity && u < Infinity ? c + shape * u - rate * exp(u) : -Infinity,
    toUnconstrained: log,
    fromUnconstrained: exp,
    quantile: (p) => gammaQuantile(p, shape, rate),
    sample: (rng) => rng.gamma(shape, rate),
  };
}

/** Compiles a prior of a positive quantity (sampled on the log scale). */
export function compilePositivePrior(spec: PositivePrior): CompiledPrior {
  switch (spec.family) {
    case 'lognormal':
      return lognormal(
        requirePositive('lognormal median', spec.median),
        requirePositive('lognormal sdlog', spec.sdlog),
      );
    case 'half_normal':
      return halfNormal(requirePositive('half_normal scale', spec.scale));
    case 'gamma':
      return gamma(
        requirePositive('gamma shape', spec.shape),
        requirePositive('gamma rate', spec.rate),
      );
    default:
      throw new WaxwaneError(
        `unknown prior family "${familyOf(spec)}" for a positive quantity; ` +
          'use lognormal, half_normal or gamma',
      );
  }
}

/**
 * Compiles a Beta(a, b) prior of a share in (0, 1) (sampled on the logit scale).
 *
 * @remarks
 * ln p(x) = (a - 1) ln x + (b - 1) ln(1 - x) - ln B(a, b). With x = 1 / (1 + e^-u),
 * dx/du = x (1 - x), ln x = -softplus(-u) and ln(1 - x) = -softplus(u), so the density of u is
 * -a softplus(-u) - b softplus(u) - ln B(a, b), finite for every finite u
 * (Johnson, Kotz and Balakrishnan, vol. 2, ch. 25). Draws: G1 / (G1 + G2) with
 * G1 ~ Gamma(a, 1), G2 ~ Gamma(b, 1) (common practice).
 */
export function compileUnitPrior(spec: UnitPrior): CompiledPrior {
  if (spec.family !== 'beta') {
    throw new WaxwaneError(
      `unknown prior family "${familyOf(spec)}" for a share; use beta`,
    );
  }
  const a = requirePositive('beta a', spec.a);
  const b = requirePositive('beta b', spec.b);
  const c = -betaln(a, b);
  return {
    logDensity: (x) => {
      if (!(x >= 0 && x <= 1)) return -Infinity;
      const lp = c + xlogy(a - 1, x) + xlogy(b - 1, 1 - x);
      // (a - 1) ln 0 with a < 1 is +Infinity; the two ends cannot both be hit, so no NaN here,
      // but guard anyway for the contract
      return lp === lp ? lp : -Infinity;
    },
    logDensityUnconstrained: (u) => {
      if (u !== u) return -Infinity;
      const lp = c - a * softplus(-u) - b * softplus(u);
      return lp === lp ? lp : -Infinity;
    },
    toUnconstrained: (x) => log(x) - Math.log1p(-x),
    fromUnconstrained: (u) => 1 / (1 + exp(-u)),
    quantile: (p) => betaQuantile(p, a, b),
    sample: (rng) => {
      const g1 = rng.gamma(a, 1);
      const g2 = rng.gamma(b, 1);
      return g1 / (g1 + g2);
    },
  };
}

/**
 * Compiles the dispersion prior: 1/sqrt(phi) ~ half-normal(scale), as a density of phi
 * (sampled on the log scale).
 *
 * @remarks
 * With g(phi) = phi^(-1/2), |g'(phi)| = phi^(-3/2) / 2, so
 * ln p(phi) = ln HN(phi^(-1/2); scale) + ln(1/2) - 1.5 ln phi
 *           = -ln scale - ln sqrt(2 pi) - 1 / (2 scale^2 phi) - 1.5 ln phi,
 * and on u = ln phi: -ln scale - ln sqrt(2 pi) - e^-u / (2 scale^2) - u / 2 (change of
 * variables; any probability text). phi falls as 1/sqrt(phi) rises, so the quantile at p is
 * (scale * Phi^-1(1 - p/2))^-2, the half-normal's quantile at 1 - p mapped through g^-1.
 */
export function compileDispersionPrior(spec: DispersionPrior): CompiledPrior {
  if (spec.family !== 'inverse_sqrt_half_normal') {
    throw new WaxwaneError(
      `unknown prior family "${familyOf(spec)}" for the dispersion; use inverse_sqrt_half_normal`,
    );
  }
  const scale = requirePositive('inverse_sqrt_half_normal scale', spec.scale);
  const c = -log(scale) - LN_SQRT_2PI;
  const h = 0.5 / (scale * scale);
  return {
    logDensity: (phi) => (phi > 0 && phi < Infinity ? c - h / phi - 1.5 * log(phi) : -Infinity),
    logDensityUnconstrained: (u) =>
      u > -Infinity && u < Infinity ? c - h * exp(-u) - 0.5 * u : -Infinity,
    toUnconstrained: log,
    fromUnconstrained: exp,
    quantile: (p) => {
      if (!(p >= 0 && p <= 1)) return NaN;
      const z = scale * normalQuantile(1 - p / 2, 0, 1);
      return 1 / (z * z);
    },
    sample: (rng) => {
      const z = scale * rng.normal();
      return 1 / (z * z);
    },
  };
}

function labelled<T>(field: string, compile: () => T): T {
  try {
    return compile();
  } catch (err) {
    if (err instanceof WaxwaneError) throw new WaxwaneError(`priors.${field}: ${err.message}`);
    throw err;
  }
}

/** Compiles every prior of a prior set once; the result is what the log density calls. */
export function compilePriors(specs: PriorSpecs): CompiledPriors {
  return {
    start_reproduction: labelled('start_reproduction', () =>
      compilePositivePrior(specs.start_reproduction),
    ),
    walk_scale: labelled('walk_scale', () => compilePositivePrior(specs.walk_scale)),
    ascertainment: labelled('ascertainment', () => compileUnitPrior(specs.ascertainment)),
    dispersion: labelled('dispersion', () => compileDispersionPrior(specs.dispersion)),
    seed_infected: labelled('seed_infected', () => compilePositivePrior(specs.seed_infected)),
    latent_days: labelled('latent_days', () => compilePositivePrior(specs.latent_days)),
    infectious_days: labelled('infectious_days', () =>
      compilePositivePrior(specs.infectious_days),
    ),
    weekday_sd: labelled('weekday_sd', () => requirePositive('the value', specs.weekday_sd)),
  };
}
