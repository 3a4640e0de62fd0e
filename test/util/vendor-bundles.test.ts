// The one-file bundles the build writes to dist/vendor/ (scripts/bundle-vendor.mjs) must hold
// the packages' own code: every bundled @stdlib function gives the same values as the package
// loaded directly (the packages are the reference), and the bundled chart library draws the
// same SVG as vega and vega-lite loaded from their packages. `npm test` builds first (pretest).
import { existsSync } from 'node:fs';
import { createRequire } from 'node:module';
import { fileURLToPath, pathToFileURL } from 'node:url';
import { describe, expect, it } from 'vitest';
import { ARQUERO_BUNDLE, STDLIB_BUNDLE, STDLIB_MODULES, VEGA_BUNDLE } from '../../src/util/vendor-bundles.js';

const require = createRequire(import.meta.url);
const vendor = (name: string) => fileURLToPath(new URL(`../../dist/vendor/${name}`, import.meta.url));
type Fn = (...args: number[]) => number;

describe('dist/vendor bundles', () => {
  it('exist after the build', () => {
    expect(existsSync(vendor(STDLIB_BUNDLE)), 'run "npm run build" (npm test does it first)').toBe(true);
    expect(existsSync(vendor(VEGA_BUNDLE)), 'run "npm run build" (npm test does it first)').toBe(true);
    expect(existsSync(vendor(ARQUERO_BUNDLE)), 'run "npm run build" (npm test does it first)').toBe(true);
  });

  it('are what the compiled tool loads', async () => {
    const dist = (path: string) => import(new URL(`../../dist/${path}`, import.meta.url).href);
    expect((await dist('util/stdlib.js')).STDLIB_BUNDLED).toBe(true);
    expect((await dist('outputs/report/render.js')).VEGA_BUNDLED).toBe(true);
    expect((await dist('util/arquero.js')).ARQUERO_BUNDLED).toBe(true);
  });

  it('hold every listed @stdlib module, giving the same values as the packages', () => {
    const bundle = require(vendor(STDLIB_BUNDLE)) as Record<string, unknown>;
    expect(Object.keys(bundle).sort()).toEqual([...STDLIB_MODULES].sort());
    // arguments inside each function's domain (x, then the distribution's parameters)
    const points: Record<string, number[][]> = {
      '@stdlib/math/base/special/gammaln': [[0.5], [3.7], [120.25]],
      '@stdlib/math/base/special/betaln': [[0.5, 2], [30, 41.5]],
      '@stdlib/stats/base/dists/gamma/cdf': [[2.5, 3, 1.2], [0.1, 0.5, 4]],
      '@stdlib/stats/base/dists/gamma/quantile': [[0.05, 3, 1.2], [0.975, 0.5, 4]],
      '@stdlib/stats/base/dists/lognormal/cdf': [[2.5, 0.3, 0.8]],
      '@stdlib/stats/base/dists/lognormal/quantile': [[0.9, 0.3, 0.8]],
      '@stdlib/stats/base/dists/normal/quantile': [[0.025, 1, 2]],
      '@stdlib/stats/base/dists/normal/cdf': [[-0.4, 1, 2]],
      '@stdlib/stats/base/dists/beta/quantile': [[0.3, 2.5, 7]],
      '@stdlib/stats/base/dists/chisquare/cdf': [[11.2, 9]],
    };
    for (const [id, args] of Object.entries(points)) {
      const fromBundle = bundle[id] as Fn;
      const fromPackage = require(id) as Fn;
      for (const a of args) expect(Object.is(fromBundle(...a), fromPackage(...a)), `${id}(${a.join(', ')})`).toBe(true);
    }
    type Mt = { factory(o: { seed: number }): { normalized: () => number } };
    const a = (bundle['@stdlib/random/base/mt19937'] as Mt).factory({ seed: 2026 }).normalized;
    const b = (require('@stdlib/random/base/mt19937') as Mt).factory({ seed: 2026 }).normalized;
    for (let i = 0; i < 1000; i++) expect(a()).toBe(b());
    type Pf = { factory(o: { prng: () => number }): (mean: number) => number };
    const ua = (require('@stdlib/random/base/mt19937') as Mt).factory({ seed: 7 }).normalized;
    const ub = (require('@stdlib/random/base/mt19937') as Mt).factory({ seed: 7 }).normalized;
    const pa = (bundle['@stdlib/random/base/poisson'] as Pf).factory({ prng: ua });
    const pb = (require('@stdlib/random/base/poisson') as Pf).factory({ prng: ub });
    for (const mean of [0.3, 4, 25, 700]) for (let i = 0; i < 200; i++) expect(pa(mean)).toBe(pb(mean));
  });

  it('hold a chart library that draws the same SVG as the packages', async () => {
    type Lib = { parse: typeof import('vega').parse; View: typeof import('vega').View; compile: typeof import('vega-lite').compile };
    const bundled = (await import(pathToFileURL(vendor(VEGA_BUNDLE)).href)) as Lib;
    const vega = await import('vega');
    const vegaLite = await import('vega-lite');
    const packaged: Lib = { parse: vega.parse, View: vega.View, compile: vegaLite.compile };
    const spec = {
      $schema: 'https://vega.github.io/schema/vega-lite/v5.json',
      data: { values: [{ day: 1, r: 1.2 }, { day: 2, r: 1.1 }, { day: 3, r: 0.95 }] },
      mark: 'line',
      encoding: { x: { field: 'day', type: 'quantitative' }, y: { field: 'r', type: 'quantitative' } },
    } as const;
    const draw = async (lib: Lib) => {
      const view = new lib.View(lib.parse(lib.compile(spec as never).spec), { renderer: 'none' });
      try {
        return await view.toSVG();
      } finally {
        view.finalize();
      }
    };
    const [a, b] = [await draw(bundled), await draw(packaged)];
    expect(a).toContain('<svg');
    expect(a).toBe(b);
  });

  it("hold arquero's CSV reader, reading as the package does", async () => {
    type FromCsv = typeof import('arquero').fromCSV;
    const bundled = ((await import(pathToFileURL(vendor(ARQUERO_BUNDLE)).href)) as { fromCSV: FromCsv }).fromCSV;
    const { fromCSV } = await import('arquero');
    const text = 'date,cases,region\n2026-01-01,12,"North, upper"\n2026-01-02,,"say ""hi"""\n2026-01-03,7,\n';
    const a = bundled(text, { autoType: false }).objects();
    expect(a).toHaveLength(3);
    expect(a).toEqual(fromCSV(text, { autoType: false }).objects());
  });
});
