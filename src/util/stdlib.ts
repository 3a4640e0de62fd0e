/**
 * Typed adapter over the @stdlib packages this project uses. @stdlib ships CommonJS with one
 * folder per function; `require` resolves those folders, ESM `import` does not, so every
 * @stdlib function enters the project here, with the signature we rely on.
 */
import { createRequire } from 'node:module';

const require = createRequire(import.meta.url);

type F1 = (x: number) => number;
type F2 = (x: number, a: number) => number;
type F3 = (x: number, a: number, b: number) => number;

/** ln Gamma(x). */
export const gammaln: F1 = require('@stdlib/math/base/special/gammaln');
/** Gamma CDF with shape k and rate (stdlib's parametrisation: shape, rate). */
export const gammaCdf: F3 = require('@stdlib/stats/base/dists/gamma/cdf');
export const gammaQuantile: F3 = require('@stdlib/stats/base/dists/gamma/quantile');
/** Lognormal CDF with location mu and scale sigma of the log. */
export const lognormalCdf: F3 = require('@stdlib/stats/base/dists/lognormal/cdf');
export const lognormalQuantile: F3 = require('@stdlib/stats/base/dists/lognormal/quantile');
export const normalQuantile: F3 = require('@stdlib/stats/base/dists/normal/quantile');
export const normalCdf: F3 = require('@stdlib/stats/base/dists/normal/cdf');
export const betaQuantile: F3 = require('@stdlib/stats/base/dists/beta/quantile');
export const chisqCdf: F2 = require('@stdlib/stats/base/dists/chisquare/cdf');

/** A seedable uniform generator on (0, 1) with a capturable state. */
export interface UniformGenerator {
  (): number;
  seed: Uint32Array;
  state: Uint32Array;
}

interface Mt19937Factory {
  factory(options: { seed?: number | Uint32Array; state?: Uint32Array; copy?: boolean }): {
    normalized: UniformGenerator;
    state: Uint32Array;
  };
}

const mt19937: Mt19937Factory = require('@stdlib/random/base/mt19937');

/** Mersenne Twister from @stdlib, seeded, returning uniforms on [0, 1). */
export function mersenneTwister(seed: number | Uint32Array, state?: Uint32Array) {
  return state === undefined
    ? mt19937.factory({ seed })
    : mt19937.factory({ state, copy: true });
}

/** ln B(a, b), the log of the beta function (accurate for large a and b too). */
export const betaln: (a: number, b: number) => number = require('@stdlib/math/base/special/betaln');
