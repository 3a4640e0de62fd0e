import { createRequire } from 'node:module';
import { describe, expect, it } from 'vitest';
import { WaxwaneError } from '../../src/errors.js';
import type { PriorSpecs } from '../../src/model/prior-set.js';
import {
  compileDispersionPrior,
  compilePositivePrior,
  compilePriors,
  compileUnitPrior,
  type CompiledPrior,
} from '../../src/model/priors.js';
import { createRng } from '../../src/util/rng.js';

// Reference implementations: @stdlib/stats and @stdlib/math, a general-purpose numerical
// library written independently of waxwane.
const require = createRequire(import.meta.url);
type Fn = (...args: number[]) => number;
const ref = {
  lognormalLogpdf: require('@stdlib/stats/base/dists/lognormal/logpdf') as Fn,
  lognormalMean: require('@stdlib/stats/base/dists/lognormal/mean') as Fn,
  lognormalCdf: require('@stdlib/stats/base/dists/lognormal/cdf') as Fn,
  normalLogpdf: require('@stdlib/stats/base/dists/normal/logpdf') as Fn,
  normalPdf: require('@stdlib/stats/base/dists/normal/pdf') as Fn,
  normalCdf: require('@stdlib/stats/base/dists/normal/cdf') as Fn,
  halfnormalLogpdf: require('@stdlib/stats/base/dists/halfnormal/logpdf') as Fn,
  halfnormalMean: require('@stdlib/stats/base/dists/halfnormal/mean') as Fn,
  gammaLogpdf: require('@stdlib/stats/base/dists/gamma/logpdf') as Fn,
  gammaCdf: require('@stdlib/stats/base/dists/gamma/cdf') as Fn,
  gammaMean: require('@stdlib/stats/base/dists/gamma/mean') as Fn,
  betaLogpdf: require('@stdlib/stats/base/dists/beta/logpdf') as Fn,
  betaCdf: require('@stdlib/stats/base/dists/beta/cdf') as Fn,
  betaMean: require('@stdlib/stats/base/dists/beta/mean') as Fn,
  betaln: require('@stdlib/math/base/special/betaln') as Fn,
};

/** |a - b| <= tol * max(1, |b|) (relative for large values, absolute near 0). */
function expectClose(a: number, b: number, tol: number): void {
  expect(Number.isNaN(a)).toBe(false);
  if (a === b) return; // equal infinities
  expect(Math.abs(a - b)).toBeLessThanOrEqual(tol * Math.max(1, Math.abs(b)));
}

interface Case {
  label: string;
  prior: CompiledPrior;
  /** 'log' or 'logit': the sampler's transform */
  transform: 'log' | 'logit';
  /** the reference log density of the constrained value */
  reference: (x: number) => number;
  /** the reference cdf (for the quantile and Monte Carlo checks) */
  cdf: (x: number) => number;
  /** the reference mean, where it is finite */
  mean?: number;
  points: number[];
}

const HN_CDF = (s: number) => (x: number) => (x <= 0 ? 0 : 2 * ref.normalCdf(x, 0, s) - 1);

const cases: Case[] = [
  ...(
    [
      [1.5, 0.5],
      [3, 0.1],
      [10, 1],
    ] as const
  ).map(([median, sdlog]): Case => ({
    label: `lognormal(median ${median}, sdlog ${sdlog})`,
    prior: compilePositivePrior({ family: 'lognormal', median, sdlog }),
    transform: 'log',
    reference: (x) => ref.lognormalLogpdf(x, Math.log(median), sdlog),
    cdf: (x) => ref.lognormalCdf(x, Math.log(median), sdlog),
    mean: ref.lognormalMean(Math.log(median), sdlog),
    points: [0.01, 0.3, 1, 1.5, 2.9, 4, 10, 30],
  })),
  ...[0.05, 0.15, 0.4].map(
    (scale): Case => ({
      label: `half_normal(${scale})`,
      prior: compilePositivePrior({ family: 'half_normal', scale }),
      transform: 'log',
      // half-normal density = 2 * Normal(x; 0, scale) (definition of the folded normal)
      reference: (x) => Math.log(2 * ref.normalPdf(x, 0, scale)),
      cdf: HN_CDF(scale),
      mean: ref.halfnormalMean(scale),
      points: [0, 0.001, 0.05, 0.15, 0.4, 1],
    }),
  ),
  ...(
    [
      [2, 3],
      [0.5, 1],
      [1, 2],
      [40, 8],
    ] as const
  ).map(([shape, rate]): Case => ({
    label: `gamma(shape ${shape}, rate ${rate})`,
    prior: compilePositivePrior({ family: 'gamma', shape, rate }),
    transform: 'log',
    reference: (x) => ref.gammaLogpdf(x, shape, rate), // stdlib: (x, shape alpha, rate beta)
    cdf: (x) => ref.gammaCdf(x, shape, rate),
    mean: ref.gammaMean(shape, rate),
    points: [0.01, 0.2, 0.7, 1, 3, 5, 12],
  })),
  ...(
    [
      [2, 6],
      [0.5, 0.5],
      [1, 1],
      [3, 3],
      [200, 50],
    ] as const
  ).map(([a, b]): Case => ({
    label: `beta(${a}, ${b})`,
    prior: compileUnitPrior({ family: 'beta', a, b }),
    transform: 'logit',
    reference: (x) => ref.betaLogpdf(x, a, b),
    cdf: (x) => ref.betaCdf(x, a, b),
    mean: ref.betaMean(a, b),
    points: [1e-6, 0.01, 0.1, 0.25, 0.5, 0.8, 0.99, 1 - 1e-9],
  })),
];

describe('logDensity', () => {
  it.each(cases)('$label matches @stdlib at several points', ({ prior, reference, points }) => {
    for (const x of points) expectClose(prior.logDensity(x), reference(x), 1e-12);
  });

  it('half_normal matches @stdlib halfnormal logpdf too', () => {
    // source: @stdlib/stats/base/dists/halfnormal/logpdf
    const p = compilePositivePrior({ family: 'half_normal', scale: 0.15 });
    for (const x of [0, 0.01, 0.1, 0.3, 2]) expectClose(p.logDensity(x), ref.halfnormalLogpdf(x, 0.15), 1e-12);
  });

  it('beta and gamma at the ends of the support agree with @stdlib', () => {
    for (const [a, b] of [
      [1, 3],
      [0.5, 0.5],
      [2, 6],
      [2, 1],
      [1, 1],
    ] as const) {
      const p = compileUnitPrior({ family: 'beta', a, b });
      expectClose(p.logDensity(0), ref.betaLogpdf(0, a, b), 1e-15);
      expectClose(p.logDensity(1), ref.betaLogpdf(1, a, b), 1e-15);
    }
    for (const [shape, rate] of [
      [1, 2],
      [0.5, 1],
      [2, 1],
    ] as const) {
      const p = compilePositivePrior({ family: 'gamma', shape, rate });
      expectClose(p.logDensity(0), ref.gammaLogpdf(0, shape, rate), 1e-15);
    }
  });

  it.each(cases)('$label is -Infinity outside the support, never NaN', ({ prior, transform }) => {
    const outside = transform === 'logit' ? [-1, -1e-12, 1 + 1e-12, 2] : [-1, -1e-12];
    for (const x of [...outside, NaN, -Infinity, Infinity]) {
      expect(prior.logDensity(x)).toBe(-Infinity);
    }
  });
});

describe('compileDispersionPrior', () => {
  const scales = [1, 0.3, 2.5];

  it.each(scales)('scale %s: the density of phi integrates to 1 (trapezoid on a log grid)', (scale) => {
    const prior = compileDispersionPrior({ family: 'inverse_sqrt_half_normal', scale });
    // integral of p(phi) dphi = integral of p(e^u) e^u du; the Jacobian e^u is applied here, not
    // taken from logDensityUnconstrained. The upper tail decays like e^(-u/2): from u = 100 on it
    // holds about 2 e^-50 / scale, nothing at this tolerance. (Source: change of variables.)
    const lo = -20;
    const hi = 100;
    const h = 0.002;
    let sum = 0;
    for (let k = 0; lo + k * h <= hi + 1e-12; k++) {
      const u = lo + k * h;
      const f = Math.exp(prior.logDensity(Math.exp(u)) + u);
      sum += k === 0 || lo + (k + 1) * h > hi + 1e-12 ? f / 2 : f;
    }
    expect(Math.abs(sum * h - 1)).toBeLessThan(1e-7);
  });

  it.each(scales)('scale %s: equals the half-normal density of 1/sqrt(phi) times a finite-difference |d(1/sqrt(phi))/dphi|', (scale) => {
    const prior = compileDispersionPrior({ family: 'inverse_sqrt_half_normal', scale });
    const g = (phi: number) => 1 / Math.sqrt(phi);
    for (const phi of [0.05, 0.3, 1, 4, 20, 300]) {
      const eps = phi * 1e-5;
      const slope = Math.abs((g(phi + eps) - g(phi - eps)) / (2 * eps)); // central difference
      // source: @stdlib halfnormal logpdf; change of variables p(phi) = HN(g(phi)) |g'(phi)|
      const expected = ref.halfnormalLogpdf(g(phi), scale) + Math.log(slope);
      expectClose(prior.logDensity(phi), expected, 1e-8);
    }
  });

  it.each(scales)('scale %s: quantile(p) is the point below which the density integrates to p', (scale) => {
    const prior = compileDispersionPrior({ family: 'inverse_sqrt_half_normal', scale });
    for (const p of [0.05, 0.25, 0.5, 0.9]) {
      const q = prior.quantile(p);
      // P(phi <= q) = P(1/sqrt(phi) >= 1/sqrt(q)) = 1 - HNcdf(1/sqrt(q)) (@stdlib normal cdf)
      expectClose(1 - HN_CDF(scale)(1 / Math.sqrt(q)), p, 1e-10);
      // and by integration of the density itself on a log grid up to q
      const lo = -25;
      const hi = Math.log(q);
      const m = 20000;
      const h = (hi - lo) / m;
      let sum = 0;
      for (let k = 0; k <= m; k++) {
        const u = lo + k * h;
        const f = Math.exp(prior.logDensity(Math.exp(u)) + u);
        sum += k === 0 || k === m ? f / 2 : f;
      }
      expect(Math.abs(sum * h - p)).toBeLessThan(1e-7);
    }
    expect(prior.quantile(0)).toBe(0);
    expect(prior.quantile(1)).toBe(Infinity);
  });
});

const dispersionCases: Case[] = [1, 0.3].map((scale) => ({
  label: `inverse_sqrt_half_normal(${scale})`,
  prior: compileDispersionPrior({ family: 'inverse_sqrt_half_normal', scale }),
  transform: 'log',
  // change of variables from the @stdlib half-normal: ln HN(phi^-1/2) + ln(1/2) - 1.5 ln phi
  reference: (phi) => ref.halfnormalLogpdf(1 / Math.sqrt(phi), scale) + Math.log(0.5) - 1.5 * Math.log(phi),
  cdf: (phi) => (phi <= 0 ? 0 : 1 - HN_CDF(scale)(1 / Math.sqrt(phi))),
  points: [0.05, 1, 20],
}));

const allCases = [...cases, ...dispersionCases];

describe('logDensityUnconstrained', () => {
  it.each(allCases)('$label: equals logDensity(x(u)) + log|dx/du| on a grid of u', ({ prior, transform }) => {
    for (let u = -6; u <= 6; u += 0.5) {
      const x = prior.fromUnconstrained(u);
      // analytic Jacobians: d e^u/du = e^u; d logistic(u)/du = x (1 - x) (common practice)
      const logJac = transform === 'log' ? u : Math.log(x) + Math.log1p(-x);
      const lhs = prior.logDensityUnconstrained(u);
      expectClose(lhs, prior.logDensity(x) + logJac, 1e-10);
      // and against a finite-difference Jacobian of fromUnconstrained
      const e = 1e-5;
      const fd = (prior.fromUnconstrained(u + e) - prior.fromUnconstrained(u - e)) / (2 * e);
      expect(Math.abs(lhs - (prior.logDensity(x) + Math.log(fd)))).toBeLessThan(1e-7);
      expectClose(prior.toUnconstrained(x), u, 1e-12);
    }
  });

  it.each(allCases)('$label: finite at u = +-40 and equal to the reference there', ({ prior, transform, reference }) => {
    for (const u of [-40, 40]) {
      const lhs = prior.logDensityUnconstrained(u);
      expect(Number.isFinite(lhs)).toBe(true);
      if (transform === 'log') {
        // e^+-40 is representable: the reference density of x = e^u plus the log-Jacobian u
        expectClose(lhs, reference(Math.exp(u)) + u, 1e-12);
      }
    }
  });

  it('beta on the logit scale follows its asymptotes at u = +-40, where x rounds to 1', () => {
    // ln x + ln(1 - x) terms: at u = 40, a ln x ~ -a e^-40 and b ln(1 - x) ~ -b (40 + e^-40), so
    // the density of u is -40 b - ln B(a, b) to about 1e-17 (source: @stdlib betaln)
    for (const [a, b] of [
      [2, 6],
      [0.5, 0.5],
      [200, 50],
    ] as const) {
      const p = compileUnitPrior({ family: 'beta', a, b });
      expectClose(p.logDensityUnconstrained(40), -40 * b - ref.betaln(a, b), 1e-14);
      expectClose(p.logDensityUnconstrained(-40), -40 * a - ref.betaln(a, b), 1e-14);
      expectClose(p.logDensity(p.fromUnconstrained(40)), ref.betaLogpdf(1, a, b), 1e-15); // x rounds to 1
    }
  });

  it.each(allCases)('$label: -Infinity at u = +-Infinity, NaN and overflowing u, never NaN', ({ prior }) => {
    for (const u of [-Infinity, Infinity, NaN]) expect(prior.logDensityUnconstrained(u)).toBe(-Infinity);
    for (const u of [-800, -400, 400, 800]) {
      const v = prior.logDensityUnconstrained(u);
      expect(Number.isNaN(v)).toBe(false);
      expect(v).toBeLessThan(-100);
    }
  });
});

describe('quantile', () => {
  it('lognormal quantile(0.5) is the median', () => {
    // the median of a lognormal is e^mu (common practice)
    for (const median of [0.2, 1.5, 10, 3000]) {
      const p = compilePositivePrior({ family: 'lognormal', median, sdlog: 0.7 });
      expectClose(p.quantile(0.5), median, 1e-14);
    }
  });

  it('half_normal quantile(0.5) is 0.6744897501960817 times the scale', () => {
    // the median of |Z| is the normal 75% point, 0.6744897501960817 (normal tables, e.g.
    // Abramowitz and Stegun 1964, table 26.5: 0.674490)
    const p = compilePositivePrior({ family: 'half_normal', scale: 0.15 });
    expectClose(p.quantile(0.5), 0.15 * 0.6744897501960817, 1e-14);
  });

  it.each(allCases)('$label: the reference cdf at quantile(p) is p', ({ prior, cdf }) => {
    for (const p of [0.01, 0.1, 0.5, 0.9, 0.99]) expectClose(cdf(prior.quantile(p)), p, 1e-9);
    expect(Number.isNaN(prior.quantile(-0.1))).toBe(true);
    expect(Number.isNaN(prior.quantile(1.1))).toBe(true);
  });
});

describe('sample', () => {
  // Monte Carlo, fixed seed, n = 20000 draws. The share of draws below quantile(p) is binomial
  // with sd sqrt(p (1 - p) / n) (at most 0.0035): allowed 4.5 sd. The sample mean, where the mean
  // is finite, is allowed 5 standard errors (with the sample sd). Both bounds are far from the
  // values a wrong sampler gives (a wrong scale moves quantile shares by more than 0.05).
  const n = 20000;
  it.each(allCases)('$label: draws match quantile() and the reference mean', ({ prior, mean }) => {
    const rng = createRng(20240611);
    const draws = new Float64Array(n);
    for (let k = 0; k < n; k++) draws[k] = prior.sample(rng);
    for (const p of [0.05, 0.25, 0.5, 0.75, 0.95]) {
      const q = prior.quantile(p);
      let below = 0;
      for (const d of draws) if (d <= q) below++;
      expect(Math.abs(below / n - p)).toBeLessThanOrEqual(4.5 * Math.sqrt((p * (1 - p)) / n));
    }
    if (mean !== undefined) {
      let s = 0;
      let s2 = 0;
      for (const d of draws) {
        s += d;
        s2 += d * d;
      }
      const m = s / n;
      const sd = Math.sqrt(s2 / n - m * m);
      expect(Math.abs(m - mean)).toBeLessThanOrEqual((5 * sd) / Math.sqrt(n));
    }
  });

  it('the same seed gives the same draws', () => {
    const prior = compileUnitPrior({ family: 'beta', a: 2, b: 6 });
    const a = createRng(7);
    const b = createRng(7);
    for (let k = 0; k < 50; k++) expect(prior.sample(a)).toBe(prior.sample(b));
  });
});

describe('compile* factories', () => {
  it.each([
    ['lognormal sdlog 0', () => compilePositivePrior({ family: 'lognormal', median: 1, sdlog: 0 }), /lognormal sdlog must be a finite number > 0, got 0/],
    ['lognormal median -1', () => compilePositivePrior({ family: 'lognormal', median: -1, sdlog: 1 }), /median.*got -1/],
    ['half_normal scale NaN', () => compilePositivePrior({ family: 'half_normal', scale: NaN }), /scale.*got NaN/],
    ['gamma rate Infinity', () => compilePositivePrior({ family: 'gamma', shape: 1, rate: Infinity }), /rate.*got Infinity/],
    ['beta b 0', () => compileUnitPrior({ family: 'beta', a: 1, b: 0 }), /beta b must be/],
    ['dispersion scale -2', () => compileDispersionPrior({ family: 'inverse_sqrt_half_normal', scale: -2 }), /scale.*got -2/],
    ['unknown family', () => compilePositivePrior({ family: 'weibull', scale: 1 } as never), /unknown prior family "weibull"/],
    ['unit prior not beta', () => compileUnitPrior({ family: 'gamma', a: 1, b: 1 } as never), /use beta/],
  ])('%s throws a WaxwaneError', (_label, compile, message) => {
    expect(compile).toThrow(WaxwaneError);
    expect(compile).toThrow(message);
  });
});

// The project's default priors (MODEL.md section 4).
const defaults: PriorSpecs = {
  start_reproduction: { family: 'lognormal', median: 1.5, sdlog: 0.5 },
  walk_scale: { family: 'half_normal', scale: 0.15 },
  ascertainment: { family: 'beta', a: 2, b: 6 },
  dispersion: { family: 'inverse_sqrt_half_normal', scale: 1 },
  seed_infected: { family: 'lognormal', median: 10, sdlog: 1 },
  latent_days: { family: 'lognormal', median: 3, sdlog: 0.1 },
  infectious_days: { family: 'lognormal', median: 5, sdlog: 0.1 },
  weekday_sd: 0.2,
};

describe('compilePriors', () => {
  it('reproduces the log prior and log-Jacobian of an independent C implementation of the same model', () => {
    // Values from an independent C implementation of the same model (point-T90: one parameter
    // point of the default model, printed to 17 digits). Its log prior also holds the standard
    // normal walk steps, added here with @stdlib's normal logpdf.
    const point = {
      R_start: 1.95,
      walk_steps: [-0.13, -0.14, -0.14, -0.15, -0.14, -0.15, -0.16, -0.15, -0.16, -2, -0.77, 0.9, 0.55, 0.24],
      walk_scale: 0.14999999999999999,
      ascertainment: 0.28000000000000008,
      dispersion: 19.999999999999996,
      seed_infected: 11.000000000000002,
      latent_days: 3.0500000000000003,
      infectious_days: 4.9500000000000002,
      log_prior: -23.606478130808647,
      log_jacobian: 5.277396358457132,
    };
    const c = compilePriors(defaults);
    const pairs: [CompiledPrior, number][] = [
      [c.start_reproduction, point.R_start],
      [c.walk_scale, point.walk_scale],
      [c.ascertainment, point.ascertainment],
      [c.dispersion, point.dispersion],
      [c.seed_infected, point.seed_infected],
      [c.latent_days, point.latent_days],
      [c.infectious_days, point.infectious_days],
    ];
    let logPrior = 0;
    let logJac = 0;
    for (const [prior, x] of pairs) {
      logPrior += prior.logDensity(x);
      logJac += prior.logDensityUnconstrained(prior.toUnconstrained(x)) - prior.logDensity(x);
    }
    for (const z of point.walk_steps) logPrior += ref.normalLogpdf(z, 0, 1);
    expect(Math.abs(logPrior - point.log_prior)).toBeLessThanOrEqual(1e-9 * Math.abs(point.log_prior));
    expect(Math.abs(logJac - point.log_jacobian)).toBeLessThanOrEqual(1e-9 * Math.abs(point.log_jacobian));
  });

  it('keeps weekday_sd and names the field of a bad spec', () => {
    expect(compilePriors(defaults).weekday_sd).toBe(0.2);
    expect(() => compilePriors({ ...defaults, walk_scale: { family: 'half_normal', scale: 0 } })).toThrow(
      /^priors\.walk_scale: half_normal scale must be a finite number > 0, got 0$/,
    );
    expect(() => compilePriors({ ...defaults, weekday_sd: -1 })).toThrow(/^priors\.weekday_sd: .*got -1$/);
  });
});
