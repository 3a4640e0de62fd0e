/**
 * What the build's bundler (scripts/bundle-vendor.mjs) puts in dist/vendor/, listed apart from
 * the modules that load the bundles so that the bundler can read it without loading them: the
 * @stdlib modules the project uses (util/stdlib.ts), arquero's CSV reader (util/arquero.ts) and
 * the chart library (outputs/report/render.ts).
 */
export const STDLIB_MODULES = [
  '@stdlib/math/base/special/gammaln',
  '@stdlib/math/base/special/betaln',
  '@stdlib/stats/base/dists/gamma/cdf',
  '@stdlib/stats/base/dists/gamma/quantile',
  '@stdlib/stats/base/dists/lognormal/cdf',
  '@stdlib/stats/base/dists/lognormal/quantile',
  '@stdlib/stats/base/dists/normal/quantile',
  '@stdlib/stats/base/dists/normal/cdf',
  '@stdlib/stats/base/dists/beta/quantile',
  '@stdlib/stats/base/dists/chisquare/cdf',
  '@stdlib/random/base/mt19937',
  '@stdlib/random/base/poisson',
] as const;
export type StdlibModule = (typeof STDLIB_MODULES)[number];

/** File name of the bundle in the compiled tool's vendor folder (dist/vendor/). */
export const STDLIB_BUNDLE = 'stdlib-bundle.cjs';

/** File name of the bundle of vega and vega-lite in dist/vendor/ (outputs/report/render.ts). */
export const VEGA_BUNDLE = 'vega-bundle.mjs';

/** File name of the bundle of arquero's fromCSV in dist/vendor/ (util/arquero.ts). */
export const ARQUERO_BUNDLE = 'arquero-bundle.mjs';
