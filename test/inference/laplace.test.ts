import { describe, expect, it } from 'vitest';
import { dispersedStarts, laplaceCovariance, negLogDensityHessian } from '../../src/inference/laplace.js';
import { cholesky } from '../../src/inference/linalg.js';
import type { LogDensity } from '../../src/inference/types.js';
import { WaxwaneError } from '../../src/errors.js';
import { createRng } from '../../src/util/rng.js';
import { ar1Covariance, gaussianTarget } from './harness.js';

/** -x'Ax / 2 for a symmetric 2 x 2 A (no mean). */
const quadratic = (a: number[]): LogDensity => (x) =>
  -0.5 * (a[0]! * x[0]! * x[0]! + 2 * a[1]! * x[0]! * x[1]! + a[3]! * x[1]! * x[1]!);

describe('laplaceCovariance', () => {
  it('recovers the covariance of an 8-dimensional Gaussian to 1e-4 relative', () => {
    // For a Gaussian, the Hessian of -log density is Sigma^-1 everywhere (standard result), so
    // the Laplace covariance is Sigma itself; only finite-difference error remains.
    const d = 8;
    const sds = [0.3, 1, 2.5, 0.7, 4, 1.5, 0.2, 1];
    const sigma = ar1Covariance(sds, 0.7);
    const mean = Float64Array.from([1, -2, 5, 0.5, -8, 3, 0, 12]);
    const target = gaussianTarget(mean, sigma);
    const { covariance, adjusted } = laplaceCovariance((x) => target.logDensity(x) - 1234.5, mean);
    expect(adjusted).toBe(false);
    for (let i = 0; i < d; i++) {
      for (let j = 0; j < d; j++) {
        const err = Math.abs(covariance[i * d + j]! - sigma[i * d + j]!) / (sds[i]! * sds[j]!);
        expect(err, `(${i}, ${j})`).toBeLessThan(1e-4);
      }
    }
  });

  it('gives [[2,-1],[-1,2]] / 3 for -x[[2,1],[1,2]]x / 2', () => {
    const { covariance, adjusted } = laplaceCovariance(quadratic([2, 1, 1, 2]), new Float64Array(2));
    expect(adjusted).toBe(false);
    [2 / 3, -1 / 3, -1 / 3, 2 / 3].forEach((v, i) => expect(Math.abs(covariance[i]! - v)).toBeLessThan(1e-6));
  });

  it('adjusts a saddle: Hessian [[1,2],[2,1]] becomes [[2,1],[1,2]], covariance [[2,-1],[-1,2]] / 3', () => {
    // eigenvalues 3 and -1; with |lambda| the Hessian is [[2,1],[1,2]] (its inverse by the 2 x 2
    // formula [[d,-b],[-b,a]] / (ad - b^2))
    const { covariance, adjusted } = laplaceCovariance(quadratic([1, 2, 2, 1]), new Float64Array(2));
    expect(adjusted).toBe(true);
    expect(cholesky(covariance, 2)).not.toBeNull();
    [2 / 3, -1 / 3, -1 / 3, 2 / 3].forEach((v, i) => expect(Math.abs(covariance[i]! - v)).toBeLessThan(1e-6));
  });

  it('shrinks the step where the support ends just beyond the mode', () => {
    // N(0, diag(1, 4)) cut at x0 > 5e-5: the default step 1e-4 lands outside, 1e-5 does not
    const cut: LogDensity = (x) => (x[0]! > 5e-5 ? -Infinity : -0.5 * (x[0]! * x[0]! + (x[1]! * x[1]!) / 4));
    const { covariance } = laplaceCovariance(cut, new Float64Array(2));
    [1, 0, 0, 4].forEach((v, i) => expect(Math.abs(covariance[i]! - v)).toBeLessThan(1e-4));
  });

  it('fails clearly at -Infinity, on a flat density and at the very edge of the support', () => {
    expect(() => laplaceCovariance(() => -Infinity, new Float64Array(2))).toThrow(WaxwaneError);
    expect(() => laplaceCovariance(() => 3, new Float64Array(2))).toThrow(/flat/);
    const edge: LogDensity = (x) => (x[0]! > 0 ? -Infinity : -x[0]! * x[0]!);
    expect(() => laplaceCovariance(edge, new Float64Array(1))).toThrow(WaxwaneError);
  });
});

describe('negLogDensityHessian', () => {
  it('matches the analytic Hessian of a non-quadratic density to 1e-6', () => {
    // f = -log density = x0^4 / 4 + x0 x1^2 + exp(x1): H = [[3 x0^2, 2 x1], [2 x1, 2 x0 + exp(x1)]]
    const ld: LogDensity = (x) => -(x[0]! ** 4 / 4 + x[0]! * x[1]! ** 2 + Math.exp(x[1]!));
    const x = Float64Array.from([1.3, -0.4]);
    const h = negLogDensityHessian(ld, x);
    const exact = [3 * 1.3 ** 2, 2 * -0.4, 2 * -0.4, 2 * 1.3 + Math.exp(-0.4)];
    exact.forEach((v, i) => expect(Math.abs(h[i]! - v)).toBeLessThan(1e-6));
    expect(Array.from(x)).toEqual([1.3, -0.4]);
  });
});

describe('dispersedStarts', () => {
  const mode = Float64Array.from([1, -1, 3]);
  const cov = ar1Covariance([1, 0.5, 2], 0.5);

  it('draws from N(mode, inflate^2 covariance)', () => {
    const n = 4000;
    const starts = dispersedStarts(() => 0, createRng(1), mode, cov, n, 2);
    expect(starts).toHaveLength(n);
    // sample covariance vs 4 Sigma: relative sd of each entry about sqrt(2 / n) = 2 %, so 8 %
    for (let i = 0; i < 3; i++) {
      for (let j = 0; j < 3; j++) {
        let s = 0;
        for (const x of starts) s += (x[i]! - mode[i]!) * (x[j]! - mode[j]!);
        const sdij = Math.sqrt(cov[i * 3 + i]! * cov[j * 3 + j]!);
        expect(Math.abs(s / n - 4 * cov[i * 3 + j]!) / (4 * sdij)).toBeLessThan(0.08);
      }
    }
  });

  it('redraws points outside the support, and is reproducible', () => {
    const half: LogDensity = (x) => (x[0]! >= 1 ? 0 : -Infinity);
    const a = dispersedStarts(half, createRng(7), mode, cov, 50);
    for (const x of a) expect(x[0]).toBeGreaterThanOrEqual(1);
    const b = dispersedStarts(half, createRng(7), mode, cov, 50);
    expect(b.map((x) => Array.from(x))).toEqual(a.map((x) => Array.from(x)));
  });

  it('fails clearly when no start can be found or the covariance is not positive definite', () => {
    expect(() => dispersedStarts(() => -Infinity, createRng(1), mode, cov, 2, 2, 20)).toThrow(WaxwaneError);
    expect(() => dispersedStarts(() => 0, createRng(1), Float64Array.from([0, 0]), Float64Array.from([1, 2, 2, 1]), 2)).toThrow(WaxwaneError);
    expect(() => dispersedStarts(() => 0, createRng(1), mode, cov, -1)).toThrow(WaxwaneError);
  });
});
