import { describe, expect, it } from 'vitest';
import { mcseMean } from '../../../src/inference/diagnostics/mcse.js';
import { createRng, type Rng } from '../../../src/util/rng.js';

/** Stationary AR(1): x_t = a x_{t-1} + sqrt(1 - a^2) e_t, x_0 ~ N(0, 1). */
function ar1(rng: Rng, a: number, n: number): Float64Array {
  const x = new Float64Array(n);
  const s = Math.sqrt(1 - a * a);
  let v = rng.normal();
  for (let i = 0; i < n; i++) {
    x[i] = v;
    v = a * v + s * rng.normal();
  }
  return x;
}

describe('mcseMean', () => {
  it('is close to 1/sqrt(S) for independent N(0, 1) draws (within 10%)', () => {
    // Textbook standard error of a mean of S independent draws: sigma / sqrt(S).
    const rng = createRng(301);
    const chains = [0, 1, 2, 3].map(() => ar1(rng, 0, 5000));
    expect(Math.abs(mcseMean(chains) * Math.sqrt(20_000) - 1)).toBeLessThan(0.1);
  });

  it('is close to sqrt(tau / S) for AR(1) chains with a = 0.9 (within 10%)', () => {
    // Standard time-series result: the mean of S draws of a stationary AR(1) chain with unit
    // variance has variance tau / S, tau = (1 + a) / (1 - a) = 19.
    const rng = createRng(302);
    const chains = [0, 1, 2, 3].map(() => ar1(rng, 0.9, 20_000));
    expect(Math.abs(mcseMean(chains) / Math.sqrt(19 / 80_000) - 1)).toBeLessThan(0.1);
  });

  it('returns NaN for too few draws, a non-finite draw or constant draws', () => {
    const rng = createRng(303);
    expect(mcseMean([ar1(rng, 0, 7), ar1(rng, 0, 7)])).toBeNaN();
    expect(Number.isFinite(mcseMean([ar1(rng, 0, 8), ar1(rng, 0, 8)]))).toBe(true);
    const withNaN = [ar1(rng, 0, 40), ar1(rng, 0, 40)];
    withNaN[1]![0] = NaN;
    expect(mcseMean(withNaN)).toBeNaN();
    expect(mcseMean([new Float64Array(40).fill(3), new Float64Array(40).fill(3)])).toBeNaN();
  });
});
