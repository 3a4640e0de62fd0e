import { describe, expect, it } from 'vitest';
import { sample } from '../../src/inference/driver.js';
import { buildMetropolisKernel, buildRwmKernel, initState } from '../../src/inference/kernel.js';
import { cholesky } from '../../src/inference/linalg.js';
import { gaussianRandomWalk } from '../../src/inference/proposal.js';
import type { ChainState, LogDensity } from '../../src/inference/types.js';
import { createRng } from '../../src/util/rng.js';
import { batchMeans } from './harness.js';

const stdNormal: LogDensity = (x) => -0.5 * x[0]! * x[0]!;

/** Counts `new Float64Array(...)` calls made while `fn` runs (module code sees the global). */
function countFloat64Allocations(fn: () => void): number {
  const original = globalThis.Float64Array;
  let count = 0;
  globalThis.Float64Array = new Proxy(original, {
    construct(target, args, newTarget) {
      count += 1;
      return Reflect.construct(target, args, newTarget);
    },
  });
  try {
    fn();
  } finally {
    globalThis.Float64Array = original;
  }
  return count;
}

describe('gaussianRandomWalk', () => {
  it('proposes x + scale L z with covariance scale^2 Sigma and returns log ratio 0', () => {
    const sigma = Float64Array.from([4, 1.2, 1.2, 1]);
    const propose = gaussianRandomWalk({ cholesky: cholesky(sigma, 2)!, scale: 0.5, dim: 2 });
    const rng = createRng(3);
    const x = Float64Array.from([1, -2]);
    const out = new Float64Array(2);
    const n = 40000;
    let s0 = 0, s1 = 0, s00 = 0, s01 = 0, s11 = 0;
    let ratios = 0;
    for (let t = 0; t < n; t++) {
      ratios += Math.abs(propose(rng, x, out));
      const a = out[0]! - 1, b = out[1]! + 2;
      s0 += a; s1 += b; s00 += a * a; s01 += a * b; s11 += b * b;
    }
    expect(ratios).toBe(0);
    expect(Array.from(x)).toEqual([1, -2]);
    // mean 0 (sd of the mean 1/sqrt(n) times the proposal sd); covariance 0.25 Sigma.
    // Relative sd of a variance estimate is sqrt(2 / n) = 0.7 %, so 4 % is over five of them.
    expect(Math.abs(s0 / n)).toBeLessThan(4 * 1 / Math.sqrt(n));
    expect(Math.abs(s1 / n)).toBeLessThan(4 * 0.5 / Math.sqrt(n));
    expect(Math.abs(s00 / n - 1)).toBeLessThan(0.04);
    expect(Math.abs(s01 / n - 0.3)).toBeLessThan(0.04 * Math.sqrt(1 * 0.25));
    expect(Math.abs(s11 / n - 0.25)).toBeLessThan(0.04 * 0.25);
  });

  it('allocates nothing per proposal (its buffers are made once)', () => {
    const propose = gaussianRandomWalk({ cholesky: Float64Array.from([1, 0, 0.5, 1]), scale: 1, dim: 2 });
    const rng = createRng(1);
    const x = new Float64Array(2);
    const out = new Float64Array(2);
    expect(countFloat64Allocations(() => { for (let i = 0; i < 1000; i++) propose(rng, x, out); })).toBe(0);
  });

  it('rejects a factor of the wrong size and a non-positive scale', () => {
    expect(() => gaussianRandomWalk({ cholesky: new Float64Array(3), scale: 1, dim: 2 })).toThrow(RangeError);
    expect(() => gaussianRandomWalk({ cholesky: new Float64Array(4), scale: 0, dim: 2 })).toThrow(RangeError);
  });
});

describe('buildRwmKernel', () => {
  it('never mutates the input state; a rejection returns the same object, an acceptance a new array', () => {
    const kernel = buildRwmKernel(stdNormal, { cholesky: Float64Array.from([1]), scale: 3, dim: 1 });
    const rng = createRng(11);
    let state: ChainState = initState(stdNormal, Float64Array.from([0.5]));
    let accepted = 0;
    for (let i = 0; i < 500; i++) {
      const before = { position: state.position[0], logDensity: state.logDensity, array: state.position };
      const step = kernel(rng, state);
      expect(state.position[0]).toBe(before.position);
      expect(state.logDensity).toBe(before.logDensity);
      if (step.info.accepted) {
        accepted += 1;
        expect(step.state).not.toBe(state);
        expect(step.state.position).not.toBe(before.array);
        expect(step.state.logDensity).toBe(step.info.logDensity);
      } else {
        expect(step.state).toBe(state);
      }
      state = step.state;
    }
    expect(accepted).toBeGreaterThan(50);
    expect(accepted).toBeLessThan(450);
  });

  it('allocates one position array per accepted step and nothing else', () => {
    const kernel = buildRwmKernel(stdNormal, { cholesky: Float64Array.from([1]), scale: 2.4, dim: 1 });
    const rng = createRng(5);
    let state = initState(stdNormal, Float64Array.from([0]));
    let accepted = 0;
    const allocations = countFloat64Allocations(() => {
      for (let i = 0; i < 2000; i++) {
        const step = kernel(rng, state);
        if (step.info.accepted) accepted += 1;
        state = step.state;
      }
    });
    expect(allocations).toBe(accepted);
  });

  it('reports acceptProb = min(1, exp(lp1 - lp0)) and accepts at the 1-D optimal rate (2/pi) atan(2/sigma)', () => {
    // For a N(0,1) target and N(x, sigma^2) proposal the stationary acceptance rate is
    // (2/pi) arctan(2/sigma): 0.442 at sigma = 2.4 (Gelman, Roberts and Gilks 1996, "Efficient
    // Metropolis jumping rules", Bayesian Statistics 5; from memory).
    const sigma = 2.4;
    const kernel = buildRwmKernel(stdNormal, { cholesky: Float64Array.from([1]), scale: sigma, dim: 1 });
    const rng = createRng(2024);
    let state = initState(stdNormal, Float64Array.from([0]));
    const n = 60000;
    const xs = new Float64Array(n);
    let sumProb = 0;
    let worstProbError = 0;
    for (let t = 0; t < n; t++) {
      const step = kernel(rng, state);
      const exact = Math.min(1, Math.exp(step.info.logDensity - state.logDensity));
      worstProbError = Math.max(worstProbError, Math.abs(step.info.acceptProb - exact));
      sumProb += step.info.acceptProb;
      state = step.state;
      xs[t] = state.position[0]!;
    }
    expect(worstProbError).toBeLessThan(1e-14);
    const expected = (2 / Math.PI) * Math.atan(2 / sigma);
    // mean of acceptProb has sd < 0.5 / sqrt(n / tau) with tau ~ 5: about 0.005
    expect(Math.abs(sumProb / n - expected)).toBeLessThan(0.015);
    // and the draws are N(0, 1): mean within 4 batch-means standard errors, E[x^2] within 5 %
    const m = batchMeans([xs]);
    expect(Math.abs(m.mean) / m.mcse).toBeLessThan(4);
    const v = batchMeans([xs.map((x) => x * x)]);
    expect(Math.abs(v.mean - 1)).toBeLessThan(Math.max(0.05, 4 * v.mcse));
  });

  it('always rejects a proposal outside the support (-Infinity or NaN), with acceptProb 0', () => {
    const halfLine: LogDensity = (x) => (x[0]! > 0 ? -x[0]! : x[0]! < -1 ? NaN : -Infinity);
    const kernel = buildRwmKernel(halfLine, { cholesky: Float64Array.from([1]), scale: 2, dim: 1 });
    const rng = createRng(9);
    let state = initState(halfLine, Float64Array.from([0.2]));
    let outside = 0;
    let wrong = 0;
    for (let i = 0; i < 2000; i++) {
      const step = kernel(rng, state);
      if (!(step.info.logDensity > -Infinity)) {
        outside += 1;
        if (step.info.accepted || step.info.acceptProb !== 0 || step.info.logDensity !== -Infinity) wrong += 1;
      }
      state = step.state;
      if (!(state.position[0]! > 0)) wrong += 1;
    }
    expect(outside).toBeGreaterThan(100);
    expect(wrong).toBe(0);
  });
});

describe('buildMetropolisKernel', () => {
  it('applies the Hastings ratio of an asymmetric proposal', () => {
    // Independence proposal q = N(0, 2^2) on a N(0, 1) target: the log ratio
    // log q(x) - log q(x') must be added for the chain to keep N(0, 1) (Hastings 1970).
    const q = (v: number) => -0.5 * (v / 2) ** 2;
    const kernel = buildMetropolisKernel(
      stdNormal,
      (rng, x, out) => {
        out[0] = 2 * rng.normal();
        return q(x[0]!) - q(out[0]!);
      },
      1,
    );
    const rng = createRng(77);
    let state = initState(stdNormal, Float64Array.from([3]));
    const n = 40000;
    const xs = new Float64Array(n);
    for (let t = 0; t < n; t++) {
      state = kernel(rng, state).state;
      xs[t] = state.position[0]!;
    }
    const v = batchMeans([xs.map((x) => x * x)]);
    // Without the ratio the chain would settle on a density proportional to target x proposal,
    // N(0, 4/5), so E[x^2] = 0.8 would fail this check.
    expect(Math.abs(v.mean - 1) / v.mcse).toBeLessThan(4);
    expect(Math.abs(v.mean - 1)).toBeLessThan(0.05);
  });
});

describe('sample', () => {
  const kernel = buildRwmKernel(
    (x) => -0.5 * (x[0]! * x[0]! + x[1]! * x[1]!),
    { cholesky: Float64Array.from([1, 0, 0, 1]), scale: 1.7, dim: 2 },
  );
  const start = () => initState((x) => -0.5 * (x[0]! * x[0]! + x[1]! * x[1]!), Float64Array.from([1, 1]));

  it('yields n steps, each from the previous state', () => {
    const steps = [...sample(kernel, start(), createRng(4), 300)];
    expect(steps).toHaveLength(300);
    for (let i = 1; i < steps.length; i++) {
      if (!steps[i]!.info.accepted) expect(steps[i]!.state).toBe(steps[i - 1]!.state);
    }
  });

  it('replays the same draws from the same seed, and other draws from another seed', () => {
    const run = (seed: number) => [...sample(kernel, start(), createRng(seed), 200)].flatMap((s) => Array.from(s.state.position));
    expect(run(42)).toEqual(run(42));
    expect(run(42)).not.toEqual(run(43));
  });

  it('leaves the generator right after the last step taken when stopped early', () => {
    const rngA = createRng(8);
    let i = 0;
    for (const _ of sample(kernel, start(), rngA, 1000)) if (++i === 50) break;
    const rngB = createRng(8);
    for (const _ of sample(kernel, start(), rngB, 50)) void _;
    expect(rngA.uniform()).toBe(rngB.uniform());
  });
});
