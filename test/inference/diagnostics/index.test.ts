import { describe, expect, it } from 'vitest';
import {
  essBulk,
  essTail,
  mcseMean,
  rhat,
  summarizeDiagnostics,
} from '../../../src/inference/diagnostics/index.js';
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

describe('summarizeDiagnostics', () => {
  it('equals rhat, essBulk, essTail and mcseMean called one by one', () => {
    const rng = createRng(401);
    // Odd length, a shifted chain and rounded draws (ties): the shared ranking must still match.
    const chains = [0.2, 0.5, 0.8].map((a, j) => ar1(rng, a, 1001).map((v) => Math.round(8 * (v + j / 4)) / 8));
    expect(summarizeDiagnostics(chains)).toEqual({
      rhat: rhat(chains),
      essBulk: essBulk(chains),
      essTail: essTail(chains),
      mcseMean: mcseMean(chains),
    });
  });

  it('returns NaN in every field when the draws do not allow the diagnostics', () => {
    const nan = { rhat: NaN, essBulk: NaN, essTail: NaN, mcseMean: NaN };
    const rng = createRng(402);
    expect(summarizeDiagnostics([ar1(rng, 0, 7), ar1(rng, 0, 7)])).toEqual(nan);
    // The TSDoc example.
    expect(summarizeDiagnostics([Float64Array.of(1, 2, 3, 4, 5, 6, 7), Float64Array.of(7, 6, 5, 4, 3, 2, 1)])).toEqual(nan);
    const bad = [ar1(rng, 0, 50), ar1(rng, 0, 50)];
    bad[0]![9] = Infinity;
    expect(summarizeDiagnostics(bad)).toEqual(nan);
    expect(summarizeDiagnostics([new Float64Array(50), new Float64Array(50)])).toEqual(nan);
  });
});
