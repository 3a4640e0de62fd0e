// The sampler's coordinates (reported-scale infection flows, walk scale integrated out) against
// the model's own density: change of variables with a finite-difference Jacobian, the marginal
// against a brute-force integral over the walk scale, and the walk-scale draws against that
// integral's CDF. Change of variables: p_y(y) = p_theta(theta(y)) |det d theta / d y| (any
// calculus text; common practice).
import { describe, it, expect } from 'vitest';
import { fileURLToPath } from 'node:url';
import { createModel } from '../../src/model/posterior.js';
import { createSamplingSpace } from '../../src/model/sampling-space.js';
import { loadPriorSet } from '../../src/io/priors.js';
import { createRng } from '../../src/util/rng.js';

const priorSet = loadPriorSet(fileURLToPath(new URL('../../priors/default.json', import.meta.url)));
// 28 observed days: 14 seeding days + 28 = 42 simulated days, K = 6 knots, 12 parameters
const counts = Float64Array.from([3, 5, 4, 6, 8, 7, 10, 12, 11, 15, 18, 17, 22, 25, 24, 30, 28, 33, 31, 35, 30, 32, 29, 27, 30, 25, 24, NaN]);
const model = createModel({ counts, population: 50_000, firstWeekday: 2 }, priorSet);
const L = model.layout;
const K = L.knots;
const space = createSamplingSpace(model);

/** A theta inside the support: R_start 1.8, a wiggly walk, sigma 0.2, rho 0.3, ... */
function thetaPoint(): Float64Array {
  const th = new Float64Array(L.dim);
  th[L.startReproduction] = Math.log(1.8);
  for (let k = 1; k < K; k++) th[L.firstStep + k - 1] = 0.7 * Math.sin(1.3 * k) - 0.2;
  th[L.walkScale] = Math.log(0.2);
  th[L.ascertainment] = Math.log(0.3 / 0.7);
  th[L.dispersion] = Math.log(20);
  th[L.seedInfected] = Math.log(12);
  th[L.latentDays] = Math.log(3.1);
  th[L.infectiousDays] = Math.log(4.8);
  return th;
}

/** theta of (y, u): toTheta, then the walk steps rescaled to sigma = e^u. */
function thetaOf(y: Float64Array, u: number): Float64Array {
  const th = new Float64Array(L.dim);
  expect(space.toTheta(y, th, createRng(1))).toBe(true);
  const f = Math.exp(th[L.walkScale]! - u);
  for (let k = 1; k < K; k++) th[k] = th[k]! * f;
  th[L.walkScale] = u;
  return th;
}

/** log |det A| by Gaussian elimination with partial pivoting (Golub and Van Loan, Matrix Computations, alg. 3.4.1). */
function logAbsDet(a: Float64Array, n: number): number {
  const m = Float64Array.from(a);
  let s = 0;
  for (let c = 0; c < n; c++) {
    let p = c;
    for (let r = c + 1; r < n; r++) if (Math.abs(m[r * n + c]!) > Math.abs(m[p * n + c]!)) p = r;
    if (p !== c) for (let j = 0; j < n; j++) [m[c * n + j], m[p * n + j]] = [m[p * n + j]!, m[c * n + j]!];
    const piv = m[c * n + c]!;
    s += Math.log(Math.abs(piv));
    for (let r = c + 1; r < n; r++) {
      const f = m[r * n + c]! / piv;
      for (let j = c; j < n; j++) m[r * n + j] -= f * m[c * n + j]!;
    }
  }
  return s;
}

describe('createSamplingSpace (step walk: reported-scale flows, walk scale integrated out)', () => {
  const y = space.fromTheta(thetaPoint())!;
  const u0 = Math.log(0.2);

  it('has one coordinate fewer than the model (the walk scale) and maps back and forth', () => {
    expect(space.kind).toBe('reported-flow');
    expect(space.dim).toBe(L.dim - 1);
    expect(y).not.toBeNull();
    const th = thetaOf(y, u0);
    const ref = thetaPoint();
    for (let i = 0; i < L.dim; i++) expect(th[i]).toBeCloseTo(ref[i]!, 9);
    const back = space.fromTheta(th)!;
    for (let i = 0; i < space.dim; i++) expect(back[i]).toBeCloseTo(y[i]!, 9);
  });

  it('jointLogDensity is the model density at theta(y, u) plus log |det d theta / d(y, u)|, checked by finite differences', () => {
    const u = u0;
    const th = thetaOf(y, u);
    // analytic log-Jacobian of the header: -(K - 1) u
    expect(space.jointLogDensity!(y, u) - model.logDensity(th)).toBeCloseTo(-(K - 1) * u, 8);
    // the same log-Jacobian from the finite-difference Jacobian of (y, u) -> theta
    const n = L.dim;
    const x = new Float64Array(n); // (y with u inserted at the walk-scale index)
    for (let i = 0, j = 0; i < n; i++) x[i] = i === L.walkScale ? u : y[j++]!;
    const mapX = (v: Float64Array) => {
      const yy = new Float64Array(n - 1);
      for (let i = 0, j = 0; i < n; i++) if (i !== L.walkScale) yy[j++] = v[i]!;
      return thetaOf(yy, v[L.walkScale]!);
    };
    const jac = new Float64Array(n * n);
    const h = 1e-6;
    for (let c = 0; c < n; c++) {
      const xp = Float64Array.from(x);
      const xm = Float64Array.from(x);
      xp[c] += h;
      xm[c] -= h;
      const tp = mapX(xp);
      const tm = mapX(xm);
      for (let r = 0; r < n; r++) jac[r * n + c] = (tp[r]! - tm[r]!) / (2 * h);
    }
    expect(logAbsDet(jac, n)).toBeCloseTo(-(K - 1) * u, 5);
  });

  it('logDensity is the log of the integral of exp(jointLogDensity) over u (brute-force Riemann sum)', () => {
    const lo = -8;
    const hi = 3;
    const step = 1e-4;
    const ref = space.jointLogDensity!(y, u0);
    let sum = 0;
    for (let u = lo; u < hi; u += step) sum += Math.exp(space.jointLogDensity!(y, u) - ref);
    expect(space.logDensity(y)).toBeCloseTo(ref + Math.log(sum * step), 8);
  });

  it('toTheta draws the walk scale from its conditional given y (Kolmogorov-Smirnov against the brute-force CDF)', () => {
    const lo = -8;
    const step = 1e-3;
    const ref = space.jointLogDensity!(y, u0);
    const cdfU: number[] = [];
    const cdfP: number[] = [];
    let acc = 0;
    for (let u = lo; u < 3; u += step) {
      acc += Math.exp(space.jointLogDensity!(y, u + step / 2) - ref) * step;
      cdfU.push(u + step);
      cdfP.push(acc);
    }
    const total = acc;
    const cdf = (u: number) => {
      const i = Math.min(cdfP.length - 1, Math.max(0, Math.floor((u - lo) / step)));
      return cdfP[i]! / total;
    };
    const rng = createRng(42);
    const n = 4000;
    const draws = new Float64Array(n);
    const th = new Float64Array(L.dim);
    for (let i = 0; i < n; i++) {
      space.toTheta(y, th, rng);
      draws[i] = th[L.walkScale]!;
    }
    draws.sort();
    let d = 0;
    for (let i = 0; i < n; i++) {
      const f = cdf(draws[i]!);
      d = Math.max(d, Math.abs(f - i / n), Math.abs(f - (i + 1) / n));
    }
    // 1% critical value 1.63 / sqrt(n) (Massey 1951, JASA 46(253)), plus the grid's resolution
    expect(d).toBeLessThan(1.63 / Math.sqrt(n) + 0.002);
  });

  it('walkRescaling: the conditional of u, and the rescaled point with both its densities', () => {
    const r = space.walkRescaling!;
    const drawn = { u: NaN, logConditional: NaN };
    expect(r.draw(y, createRng(3), drawn)).toBe(true);
    // p(u | y) = p(y, u) / p(y) (definition of a conditional density)
    expect(drawn.logConditional).toBeCloseTo(space.jointLogDensity!(y, drawn.u) - space.logDensity(y), 9);
    for (const u1 of [drawn.u - 0.7, drawn.u + 0.3, drawn.u + 1.1]) {
      const yOut = new Float64Array(space.dim);
      const out = { marginal: NaN, joint: NaN };
      expect(r.draw(y, createRng(3), drawn)).toBe(true);
      expect(r.rescale(y, drawn.u, u1, yOut, out)).toBe(true);
      // the same point as mapping theta(y, u) with u moved to u1 (z held) back
      const th = thetaOf(y, drawn.u);
      th[L.walkScale] = u1;
      const ref = space.fromTheta(th)!;
      for (let i = 0; i < space.dim; i++) expect(yOut[i]).toBeCloseTo(ref[i]!, 9);
      // and its densities are the ones the sampler gets there, to the last bit: a chain's cached
      // density must equal a re-evaluation (checkpoints are checked that way)
      expect(out.marginal).toBe(space.logDensity(yOut));
      expect(out.joint).toBe(space.jointLogDensity!(yOut, u1));
    }
  });

  it('walkRescaling refuses a point that cannot be simulated', () => {
    const bad = Float64Array.from(y);
    bad[0] = 80;
    expect(space.walkRescaling!.draw(bad, createRng(1), { u: NaN, logConditional: NaN })).toBe(false);
  });

  it('is -Infinity, never NaN, where the epidemic cannot be simulated', () => {
    const bad = Float64Array.from(y);
    bad[0] = 80; // an absurd infection flow: beta overflows
    expect(space.logDensity(bad)).toBe(-Infinity);
    expect(space.jointLogDensity!(bad, u0)).toBe(-Infinity);
    expect(space.jointLogDensity!(y, NaN)).toBe(-Infinity);
  });
});

describe('createSamplingSpace (linear interpolation)', () => {
  it('works in the model coordinates themselves', () => {
    const linear = createModel(
      { counts, population: 50_000, firstWeekday: 2 },
      { ...priorSet, model: { ...priorSet.model, interpolation: 'linear' } },
    );
    const s = createSamplingSpace(linear);
    expect(s.kind).toBe('model');
    expect(s.dim).toBe(linear.layout.dim);
    expect(s.jointLogDensity).toBeNull();
    expect(s.walkRescaling).toBeNull();
    const th = thetaPoint();
    expect(s.logDensity(th)).toBe(linear.logDensity(th));
  });
});
