/**
 * Typed adapter over the @stdlib packages this project uses. @stdlib ships CommonJS with one
 * folder per function; `require` resolves those folders, ESM `import` does not, so every
 * @stdlib function enters the project here, with the signature we rely on.
 *
 * The build (scripts/bundle-vendor.mjs) bundles the modules of STDLIB_MODULES (vendor-bundles.ts)
 * into one file (dist/vendor/stdlib-bundle.cjs): the same code, loaded in about
 * a fifth of the time, since the packages are some 750 small files that every process and
 * every chain's worker thread would otherwise resolve and read one by one. Without the bundle
 * (running from src/ in the tests, or a build without the bundler) they load from the packages.
 */
import { existsSync } from 'node:fs';
import { createRequire } from 'node:module';
import { fileURLToPath } from 'node:url';
import { STDLIB_BUNDLE, type StdlibModule } from './vendor-bundles.js';

const require = createRequire(import.meta.url);

const bundlePath = fileURLToPath(new URL(`../vendor/${STDLIB_BUNDLE}`, import.meta.url));
const bundle: Partial<Record<StdlibModule, unknown>> | null = existsSync(bundlePath) ? (require(bundlePath) as Record<StdlibModule, unknown>) : null;

/** Whether the @stdlib functions come from the bundle (else from the packages). */
export const STDLIB_BUNDLED = bundle !== null;

/** An @stdlib module, from the bundle when there is one. */
export function stdlib<T>(id: StdlibModule): T {
  return (bundle?.[id] ?? require(id)) as T;
}

type F1 = (x: number) => number;
type F2 = (x: number, a: number) => number;
type F3 = (x: number, a: number, b: number) => number;

/** ln Gamma(x). */
export const gammaln = stdlib<F1>('@stdlib/math/base/special/gammaln');
/** Gamma CDF with shape k and rate (stdlib's parametrisation: shape, rate). */
export const gammaCdf = stdlib<F3>('@stdlib/stats/base/dists/gamma/cdf');
export const gammaQuantile = stdlib<F3>('@stdlib/stats/base/dists/gamma/quantile');
/** Lognormal CDF with location mu and scale sigma of the log. */
export const lognormalCdf = stdlib<F3>('@stdlib/stats/base/dists/lognormal/cdf');
export const lognormalQuantile = stdlib<F3>('@stdlib/stats/base/dists/lognormal/quantile');
export const normalQuantile = stdlib<F3>('@stdlib/stats/base/dists/normal/quantile');
export const normalCdf = stdlib<F3>('@stdlib/stats/base/dists/normal/cdf');
export const betaQuantile = stdlib<F3>('@stdlib/stats/base/dists/beta/quantile');
export const chisqCdf = stdlib<F2>('@stdlib/stats/base/dists/chisquare/cdf');

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

const mt19937 = stdlib<Mt19937Factory>('@stdlib/random/base/mt19937');

/** Mersenne Twister from @stdlib, seeded, returning uniforms on [0, 1). */
export function mersenneTwister(seed: number | Uint32Array, state?: Uint32Array) {
  return state === undefined
    ? mt19937.factory({ seed })
    : mt19937.factory({ state, copy: true });
}

/** ln B(a, b), the log of the beta function (accurate for large a and b too). */
export const betaln = stdlib<(a: number, b: number) => number>('@stdlib/math/base/special/betaln');
