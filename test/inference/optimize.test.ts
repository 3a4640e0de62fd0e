import { describe, expect, it } from 'vitest';
import { finiteDifferenceGradient, findMode, forwardDifferenceGradient, maximizeLogDensity } from '../../src/inference/optimize.js';
import type { LogDensity } from '../../src/inference/types.js';
import { WaxwaneError } from '../../src/errors.js';
import { ar1Covariance, gaussianTarget } from './harness.js';

/**
 * Extended Rosenbrock function, minimum 0 at (1, ..., 1), standard start (-1.2, 1, -1.2, 1, ...):
 * More, Garbow and Hillstrom (1981), "Testing unconstrained optimization software", ACM TOMS 7(1),
 * problem 21; Rosenbrock (1960), The Computer Journal 3(3).
 */
const rosenbrock: LogDensity = (x) => {
  let f = 0;
  for (let i = 0; i < x.length; i += 2) {
    const a = x[i + 1]! - x[i]! * x[i]!;
    const b = 1 - x[i]!;
    f += 100 * a * a + b * b;
  }
  return -f;
};
const rosenbrockStart = (n: number) => Float64Array.from({ length: n }, (_, i) => (i % 2 === 0 ? -1.2 : 1));

describe('maximizeLogDensity', () => {
  it('finds the Rosenbrock minimum (1, 1) from (-1.2, 1)', () => {
    const r = maximizeLogDensity(rosenbrock, rosenbrockStart(2));
    expect(r.converged).toBe(true);
    for (const v of r.position) expect(Math.abs(v - 1)).toBeLessThan(1e-4);
    expect(r.logDensity).toBeGreaterThan(-1e-8);
  });

  it('finds the 10-dimensional extended Rosenbrock minimum at all ones', () => {
    const r = maximizeLogDensity(rosenbrock, rosenbrockStart(10));
    expect(r.converged).toBe(true);
    for (const v of r.position) expect(Math.abs(v - 1)).toBeLessThan(1e-4);
  });

  it('finds the mean of a 40-dimensional correlated Gaussian to 1e-5', () => {
    const d = 40;
    const sds = Array.from({ length: d }, (_, i) => 0.2 + (i % 7) * 0.5); // 0.2 to 3.2
    const mean = Float64Array.from({ length: d }, (_, i) => Math.sin(i) * 4);
    const target = gaussianTarget(mean, ar1Covariance(sds, 0.8));
    // The distance left is about Sigma g; the largest eigenvalue of this Sigma is near
    // 3.2^2 (1 + 0.8) / (1 - 0.8) ~ 90, so the gradient tolerance is set to 1e-8 for 1e-5.
    const r = maximizeLogDensity(target.logDensity, new Float64Array(d), { gradientTolerance: 1e-8 });
    expect(r.converged).toBe(true);
    for (let i = 0; i < d; i++) expect(Math.abs(r.position[i]! - mean[i]!)).toBeLessThan(1e-5);
    // An additive constant of -5000 (a log likelihood's usual size) raises the rounding noise of
    // the finite-difference gradient to ~eps * 5000 / 1e-5 ~ 1e-7, hence ~1e-5 in position;
    // the stop rule must not fire early because of the constant.
    const shifted = maximizeLogDensity((x) => target.logDensity(x) - 5000, new Float64Array(d), { gradientTolerance: 1e-8 });
    expect(shifted.converged).toBe(true);
    for (let i = 0; i < d; i++) expect(Math.abs(shifted.position[i]! - mean[i]!)).toBeLessThan(2e-4);
  });

  it('backtracks from trial points with log density -Infinity', () => {
    // product of Gamma(2, 1) kernels: log x - x on x > 0, -Infinity elsewhere; mode at x = 1
    // (mode of Gamma(k, 1) is k - 1). From 6 the first full step overshoots below 0.
    const gammaKernel: LogDensity = (x) => {
      let s = 0;
      for (const v of x) {
        if (!(v > 0)) return -Infinity;
        s += Math.log(v) - v;
      }
      return s;
    };
    const r = maximizeLogDensity(gammaKernel, Float64Array.from([6, 0.05, 3]));
    expect(r.converged).toBe(true);
    for (const v of r.position) expect(Math.abs(v - 1)).toBeLessThan(1e-5);
  });

  it('reports an infeasible start without throwing', () => {
    const r = maximizeLogDensity(() => -Infinity, Float64Array.from([0]));
    expect(r.reason).toBe('infeasible-start');
    expect(r.converged).toBe(false);
    expect(r.logDensity).toBe(-Infinity);
  });

  it('stops at maxIterations and says so', () => {
    const r = maximizeLogDensity(rosenbrock, rosenbrockStart(2), { maxIterations: 3 });
    expect(r.reason).toBe('max-iterations');
    expect(r.converged).toBe(false);
    expect(r.iterations).toBe(3);
  });

  it('is deterministic', () => {
    const a = maximizeLogDensity(rosenbrock, rosenbrockStart(6));
    const b = maximizeLogDensity(rosenbrock, rosenbrockStart(6));
    expect(Array.from(b.position)).toEqual(Array.from(a.position));
    expect(b.evaluations).toBe(a.evaluations);
  });
});

describe('findMode', () => {
  // Two bumps: a low one at -3 (height log 0.3) and a high one at 4 (height log 1).
  const twoBumps: LogDensity = (x) => {
    const v = x[0]!;
    return Math.log(0.3 * Math.exp(-0.5 * (v + 3) ** 2) + Math.exp(-0.5 * ((v - 4) / 0.5) ** 2));
  };

  it('keeps the best of several starts and reports every run', () => {
    const r = findMode(twoBumps, [Float64Array.from([-2]), Float64Array.from([3]), Float64Array.from([-4])]);
    expect(r.bestStart).toBe(1);
    expect(r.runs).toHaveLength(3);
    expect(Math.abs(r.position[0]! - 4)).toBeLessThan(1e-5);
    expect(Math.abs(r.runs[0]!.position[0]! + 3)).toBeLessThan(1e-4);
    expect(r.converged).toBe(true);
  });

  it('skips infeasible starts and fails clearly when all are', () => {
    const halfLine: LogDensity = (x) => (x[0]! > 0 ? -((x[0]! - 2) ** 2) : -Infinity);
    const r = findMode(halfLine, [Float64Array.from([-1]), Float64Array.from([5])]);
    expect(r.runs[0]!.reason).toBe('infeasible-start');
    expect(r.bestStart).toBe(1);
    expect(Math.abs(r.position[0]! - 2)).toBeLessThan(1e-6);
    expect(() => findMode(halfLine, [Float64Array.from([-1])])).toThrow(WaxwaneError);
    expect(() => findMode(halfLine, [])).toThrow(WaxwaneError);
    expect(() => findMode(halfLine, [Float64Array.from([1]), Float64Array.from([1, 2])])).toThrow(WaxwaneError);
  });

  it('rejects bad options with a WaxwaneError', () => {
    expect(() => findMode(rosenbrock, [rosenbrockStart(2)], { memory: 0 })).toThrow(WaxwaneError);
    expect(() => findMode(rosenbrock, [rosenbrockStart(2)], { relativeStep: -1 })).toThrow(WaxwaneError);
  });
});

describe('finiteDifferenceGradient', () => {
  it('matches the analytic gradient of sum (i + 1) x_i^3 to 1e-8 relative', () => {
    const f = (x: Float64Array) => x.reduce((s, v, i) => s + (i + 1) * v ** 3, 0);
    const x = Float64Array.from([0.5, -2, 3, 10]);
    const g = new Float64Array(4);
    expect(finiteDifferenceGradient(f, x, f(x), g)).toBe(true);
    x.forEach((v, i) => expect(Math.abs(g[i]! / (3 * (i + 1) * v * v) - 1)).toBeLessThan(1e-8));
    expect(Array.from(x)).toEqual([0.5, -2, 3, 10]);
  });

  it('falls back to a one-sided difference at the edge of the support', () => {
    const f = (x: Float64Array) => (x[0]! >= 1 ? x[0]! * x[0]! : Infinity);
    const x = Float64Array.from([1]);
    const g = new Float64Array(1);
    expect(finiteDifferenceGradient(f, x, f(x), g)).toBe(true);
    expect(Math.abs(g[0]! - 2)).toBeLessThan(1e-4); // forward difference: error h = 1e-5
    expect(finiteDifferenceGradient(() => Infinity, x, 1, g)).toBe(false);
    expect(Number.isNaN(g[0]!)).toBe(true);
  });
});

describe('forwardDifferenceGradient', () => {
  it('matches the analytic gradient of sum (i + 1) x_i^3 within the forward-difference error bound', () => {
    // |error| <= h |f''| / 2 (truncation, plus h^2 |f'''| / 6) + 2 eps |f| / h (rounding of two
    // values of f), Nocedal and Wright 2006, section 8.1; h = 1e-7 max(1, |x_i|)
    const f = (x: Float64Array) => x.reduce((s, v, i) => s + (i + 1) * v ** 3, 0);
    const x = Float64Array.from([0.5, -2, 3, 10]);
    const g = new Float64Array(4);
    const fx = f(x);
    expect(forwardDifferenceGradient(f, x, fx, g)).toBe(true);
    x.forEach((v, i) => {
      const h = 1e-7 * Math.max(1, Math.abs(v));
      const bound = (h * 6 * (i + 1) * Math.abs(v)) / 2 + h * h * (i + 1) + (2 * Number.EPSILON * Math.abs(fx)) / h;
      expect(Math.abs(g[i]! - 3 * (i + 1) * v * v)).toBeLessThan(bound);
    });
    expect(Array.from(x)).toEqual([0.5, -2, 3, 10]);
  });

  it('takes the backward side where the forward one is outside the support', () => {
    const f = (x: Float64Array) => (x[0]! <= 1 ? x[0]! * x[0]! : Infinity);
    const x = Float64Array.from([1]);
    const g = new Float64Array(1);
    expect(forwardDifferenceGradient(f, x, f(x), g)).toBe(true);
    expect(Math.abs(g[0]! - 2)).toBeLessThan(1e-6);
    expect(forwardDifferenceGradient(() => Infinity, x, 1, g)).toBe(false);
  });

  it('takes L-BFGS to the Rosenbrock minimum (1, 1) with forward differences too', () => {
    const r = maximizeLogDensity(rosenbrock, rosenbrockStart(2), { differences: 'forward' });
    for (const v of r.position) expect(Math.abs(v - 1)).toBeLessThan(1e-3);
    expect(() => maximizeLogDensity(rosenbrock, rosenbrockStart(2), { differences: 'sideways' as never })).toThrow(WaxwaneError);
  });
});
