import { describe, it, expect } from 'vitest';
import { fileURLToPath } from 'node:url';
import { createSeirIntegrator } from '../../src/model/seir.js';
import { growthRate } from '../../src/model/growth.js';
import { createModel } from '../../src/model/posterior.js';
import { loadPriorSet } from '../../src/io/priors.js';
import { createRng } from '../../src/util/rng.js';

/** Runs the integrator from a fresh seed with constant beta; returns daily flows and the end state. */
function simulate(opts: {
  m: number;
  n: number;
  substeps: number;
  population: number;
  seed: number;
  latent: number;
  infectious: number;
  beta: number;
  days: number;
}) {
  const { m, n, substeps, population, seed, latent, infectious, beta, days } = opts;
  const seir = createSeirIntegrator(m, n, substeps);
  const betaOverN = new Float64Array(days).fill(beta / population);
  const infections = new Float64Array(days);
  const onsets = new Float64Array(days);
  const susceptible = new Float64Array(days);
  expect(seir.seed(population, seed, latent, infectious)).toBe(true);
  const ok = seir.run(betaOverN, 0, days, latent, infectious, infections, onsets, susceptible);
  return { ok, infections, onsets, susceptible, state: Float64Array.from(seir.state) };
}

/** Root of z = 1 - exp(-R0 z) in (0, 1] by bisection (R0 > 1). */
function finalSizeRoot(R0: number): number {
  let lo = 1e-12; // z - (1 - exp(-R0 z)) < 0 just above 0 when R0 > 1
  let hi = 1; // and > 0 at z = 1
  for (;;) {
    const mid = lo + (hi - lo) / 2;
    if (mid === lo || mid === hi) return mid;
    if (mid - (1 - Math.exp(-R0 * mid)) < 0) lo = mid;
    else hi = mid;
  }
}

const sum = (a: Float64Array, from = 0, to = a.length) => {
  let s = 0;
  for (let i = from; i < to; i++) s += a[i];
  return s;
};

describe('createSeirIntegrator', () => {
  it('seeds S = N - i0 and splits i0 over the stages by their mean durations', () => {
    // the split is MODEL.md section 1: L/m per E stage, D/n per I stage, in proportion
    const seir = createSeirIntegrator(2, 3, 4);
    expect(seir.seed(1000, 16, 3, 5)).toBe(true);
    const x = seir.state;
    expect(x[0]).toBe(984);
    for (let j = 1; j <= 2; j++) expect(x[j]).toBeCloseTo((16 * 1.5) / 8, 14);
    for (let j = 3; j <= 5; j++) expect(x[j]).toBeCloseTo((16 * (5 / 3)) / 8, 14);
    expect(sum(x, 1)).toBeCloseTo(16, 12);
  });

  it('reaches the final size z = 1 - exp(-R0 z) (m = n = 1 and 2; R0 = 1.5 and 2.5)', () => {
    // Kermack and McKendrick 1927 final size relation (e.g. Keeling and Rohani 2008, ch. 2);
    // it holds for Erlang latent and infectious stages too (it depends only on R0).
    // i0 = 1 in N = 1e7 and 1500 days bias z by ~1e-7 (observed 1e-8 to 1.2e-7); we ask 1e-5.
    for (const stages of [1, 2]) {
      for (const R0 of [1.5, 2.5]) {
        const N = 1e7;
        const D = 5;
        const run = simulate({
          m: stages,
          n: stages,
          substeps: 4,
          population: N,
          seed: 1,
          latent: 3,
          infectious: D,
          beta: R0 / D,
          days: 1500,
        });
        expect(run.ok).toBe(true);
        const z = 1 - run.state[0] / N;
        const zRef = finalSizeRoot(R0);
        expect(Math.abs(z - zRef)).toBeLessThan(1e-5);
      }
    }
  });

  it('grows at the Wallinga-Lipsitch rate while S ~ N (m = n = 1 and 2)', () => {
    // MODEL.md section 6: with S ~ N the epidemic grows at the root r of
    // R0 = r D (1 + r L/m)^m / (1 - (1 + r D/n)^(-n)) (Wallinga and Lipsitch 2007), and for
    // m = n = 1 at r = (-(a+g) + sqrt((a-g)^2 + 4 a beta)) / 2 (standard SEIR linearisation).
    // N = 1e12 keeps the depleted share below 3e-8 by day 45 (with N = 1e9 it biases the slope
    // by up to 1e-2 at R0 = 2.5 by day 90); days 30..45 are past the transient (the
    // slope there matches to ~1e-7, observed). Tolerance 1e-5 relative.
    const L = 3;
    const D = 5;
    for (const stages of [1, 2]) {
      for (const R0 of [1.5, 2.5]) {
        const run = simulate({
          m: stages,
          n: stages,
          substeps: 4,
          population: 1e12,
          seed: 10,
          latent: L,
          infectious: D,
          beta: R0 / D,
          days: 46,
        });
        expect(run.ok).toBe(true);
        const slope = Math.log(run.infections[45] / run.infections[30]) / 15;
        const onsetSlope = Math.log(run.onsets[45] / run.onsets[30]) / 15;
        const r = growthRate(R0, L, D, stages, stages);
        expect(Math.abs(slope / r - 1)).toBeLessThan(1e-5);
        expect(Math.abs(onsetSlope / r - 1)).toBeLessThan(1e-5);
        if (stages === 1) {
          const a = 1 / L;
          const g = 1 / D;
          const closed = (-(a + g) + Math.sqrt((a - g) ** 2 + (4 * a * R0) / D)) / 2;
          expect(Math.abs(slope / closed - 1)).toBeLessThan(1e-5);
        }
      }
    }
  });

  it('peaks at I_max / N = 1 - (1 + ln R0) / R0 when the latent stage is negligible', () => {
    // SIR peak prevalence (Kermack and McKendrick 1927; e.g. Keeling and Rohani 2008, ch. 2;
    // Hethcote 2000, SIAM Review 42). m = n = 1 with L / D = 2e-4 (L = 0.01, D = 50 days): the
    // latent stage shifts the peak by O(L / D) (observed 2e-4 relative; 2e-5 at L / D = 2e-5).
    // 200 sub-steps a day keep (m / L) h = 0.5 inside RK4's stability region. D = 50 makes the
    // daily read of I miss the true maximum by < 1e-4 relative. Tolerance 5e-4 relative.
    const N = 1e7;
    const L = 0.01;
    const D = 50;
    for (const R0 of [1.5, 2.5, 4]) {
      const seir = createSeirIntegrator(1, 1, 200);
      expect(seir.seed(N, 1, L, D)).toBe(true);
      const betaOverN = new Float64Array([R0 / D / N]);
      const onsets = new Float64Array(1);
      let maxI = 0;
      let falling = 0;
      for (let day = 0; day < 5000 && falling < 5; day++) {
        expect(seir.run(betaOverN, 0, 1, L, D, null, onsets, null)).toBe(true);
        const I = seir.state[2];
        if (I > maxI) {
          maxI = I;
          falling = 0;
        } else {
          falling++;
        }
      }
      expect(falling).toBe(5); // the peak was passed
      const expected = 1 - (1 + Math.log(R0)) / R0;
      expect(Math.abs(maxI / N / expected - 1)).toBeLessThan(5e-4);
    }
  });

  it('converges at fourth order in the step (classical RK4)', () => {
    // Classical Runge-Kutta is fourth order: halving h divides the error by ~16 (Butcher,
    // Numerical Methods for Ordinary Differential Equations; common practice). Reference:
    // 256 sub-steps a day. Observed ratios (max abs error of daily onsets over 120 days):
    // m = n = 1: 14.7, 15.3, 15.7 (orders 3.88, 3.94, 3.97); m = n = 2: 17.4, 16.2, 16.1.
    for (const stages of [1, 2]) {
      const onsetsAt = (substeps: number) =>
        simulate({
          m: stages,
          n: stages,
          substeps,
          population: 1e6,
          seed: 10,
          latent: 3,
          infectious: 5,
          beta: 2.5 / 5,
          days: 120,
        }).onsets;
      const ref = onsetsAt(256);
      const errors = [1, 2, 4, 8].map((s) => {
        const o = onsetsAt(s);
        let e = 0;
        for (let d = 0; d < ref.length; d++) e = Math.max(e, Math.abs(o[d] - ref[d]));
        return e;
      });
      const ratios = errors.slice(1).map((e, i) => errors[i] / e);
      expect(ratios[0]).toBeGreaterThan(12);
      expect(ratios[0]).toBeLessThan(20);
      for (const q of ratios.slice(1)) {
        expect(q).toBeGreaterThan(14);
        expect(q).toBeLessThan(18);
      }
      // the reference itself is converged far beyond these errors: (8 / 256)^4 ~ 1e-6 of them
      expect(errors[3]).toBeGreaterThan(0);
    }
  });

  it('conserves S + cumulative infections = N - i0 and E(t) - E(0) = infections - onsets', () => {
    // Linear invariants of the ODE, S' + (infection flow) = 0 and
    // (E_1 + ... + E_m)' = infection flow - onset flow, are kept exactly (to rounding) by any
    // Runge-Kutta method (e.g. Hairer, Lubich and Wanner, Geometric Numerical Integration,
    // 2006, ch. IV.1; from memory). Tolerance 1e-9 relative to N.
    const N = 5e6;
    const i0 = 40;
    const L = 3;
    const D = 5;
    for (const [m, n] of [
      [1, 1],
      [2, 2],
      [3, 1],
    ]) {
      const seir = createSeirIntegrator(m, n, 4);
      expect(seir.seed(N, i0, L, D)).toBe(true);
      const e0 = sum(seir.state, 1, 1 + m);
      const i0Stages = sum(seir.state, 1 + m);
      const days = 300;
      // a varying beta, so the check covers more than the constant case
      const betaOverN = new Float64Array(days);
      for (let d = 0; d < days; d++) betaOverN[d] = ((0.3 + 0.25 * Math.sin(d / 9)) / N) * 1.2;
      const infections = new Float64Array(days);
      const onsets = new Float64Array(days);
      let cumInf = 0;
      let cumOn = 0;
      let lastRecovered = 0;
      for (let d = 0; d < days; d++) {
        expect(seir.run(betaOverN, d, 1, L, D, infections, onsets, null)).toBe(true);
        cumInf += infections[d];
        cumOn += onsets[d];
        const S = seir.state[0];
        const E = sum(seir.state, 1, 1 + m);
        const I = sum(seir.state, 1 + m);
        expect(Math.abs(S + cumInf - (N - i0)) / N).toBeLessThan(1e-9);
        expect(Math.abs(E - e0 - (cumInf - cumOn)) / N).toBeLessThan(1e-9);
        // R = N - S - E - I never decreases (it only receives (n/D) I_n)
        const recovered = N - S - E - I;
        expect(recovered).toBeGreaterThanOrEqual(lastRecovered - 1e-9 * N);
        lastRecovered = recovered;
      }
      expect(cumInf).toBeGreaterThan(1e5); // an epidemic did happen
      expect(i0Stages).toBeGreaterThan(0);
    }
  });

  it('writes S at the start of each day and resumes where the last call stopped', () => {
    // one run of 30 days equals 30 runs of one day (state is carried), bit for bit
    const days = 30;
    const b = new Float64Array(days).fill(0.5 / 1e5);
    const whole = simulate({ m: 2, n: 2, substeps: 4, population: 1e5, seed: 5, latent: 3, infectious: 5, beta: 0.5, days });
    const seir = createSeirIntegrator(2, 2, 4);
    seir.seed(1e5, 5, 3, 5);
    const on = new Float64Array(days);
    const S = new Float64Array(days);
    for (let d = 0; d < days; d++) seir.run(b, d, 1, 3, 5, null, on, S);
    expect(Array.from(on)).toEqual(Array.from(whole.onsets));
    expect(S[0]).toBe(1e5 - 5);
    expect(Array.from(S)).toEqual(Array.from(whole.susceptible));
    for (let d = 1; d < days; d++) expect(S[d]).toBeCloseTo(S[d - 1] - whole.infections[d - 1], 6);
  });

  it('gives the same onsets, infections and susceptibles on the m = n = 2 fast path as on the generic path', () => {
    // run() takes a separate code path for m = n = 2. seir.ts promises the same bits when h/2
    // is a power of two (substeps 1, 2, 4, 8) and agreement to rounding otherwise (we ask
    // 1e-12 relative; 3 and 7 sub-steps)
    const days = 200;
    const betaOverN = new Float64Array(days);
    for (let d = 0; d < days; d++) betaOverN[d] = (0.45 + 0.2 * Math.cos(d / 11)) / 2e6;
    for (const substeps of [1, 2, 3, 4, 7, 8]) {
      for (const withTrajectory of [false, true]) {
        const fast = createSeirIntegrator(2, 2, substeps);
        const slow = createSeirIntegrator(2, 2, substeps, { generic: true });
        fast.seed(2e6, 30, 2.7, 5.5);
        slow.seed(2e6, 30, 2.7, 5.5);
        const onFast = new Float64Array(days);
        const onSlow = new Float64Array(days);
        const infFast = withTrajectory ? new Float64Array(days) : null;
        const sFast = withTrajectory ? new Float64Array(days) : null;
        const infSlow = new Float64Array(days);
        const sSlow = new Float64Array(days);
        // in two pieces, to cover resuming and a non-zero start
        expect(fast.run(betaOverN, 0, 120, 2.7, 5.5, infFast, onFast, sFast)).toBe(true);
        expect(fast.run(betaOverN, 120, 80, 2.7, 5.5, infFast, onFast, sFast)).toBe(true);
        expect(slow.run(betaOverN, 0, days, 2.7, 5.5, infSlow, onSlow, sSlow)).toBe(true);
        const pairs: Array<[Float64Array, Float64Array]> = [[onFast, onSlow]];
        if (infFast !== null && sFast !== null) pairs.push([infFast, infSlow], [sFast, sSlow]);
        if ((substeps & (substeps - 1)) === 0) {
          for (const [a, b] of pairs) expect(Array.from(a)).toEqual(Array.from(b));
          expect(Array.from(fast.state)).toEqual(Array.from(slow.state));
        } else {
          for (const [a, b] of pairs) for (let d = 0; d < days; d++) expect(Math.abs(a[d]! - b[d]!)).toBeLessThanOrEqual(1e-12 * b[d]!);
          for (let j = 0; j < 5; j++) expect(Math.abs(fast.state[j] - slow.state[j])).toBeLessThanOrEqual(1e-12 * 2e6);
        }
      }
    }
  });

  it('accepts or rejects the same inputs whether or not daily infections are asked for, on either path', () => {
    // Whether a parameter vector is possible must not depend on the outputs requested: the
    // log density runs onsets only, derived outputs ask for infections too. Here (R0 = 300,
    // far outside any prior, but reachable by an optimiser) RK4 makes S grow on day 3, so that
    // day's infections are negative: the generic path returns false on that.
    const betaOverN = new Float64Array(3).fill(380 / 1e6);
    const infections = new Float64Array(3);
    const runs = [
      { seir: createSeirIntegrator(2, 2, 4, { generic: true }), inf: infections },
      { seir: createSeirIntegrator(2, 2, 4), inf: new Float64Array(3) },
      { seir: createSeirIntegrator(2, 2, 4), inf: null },
    ].map(({ seir, inf }) => {
      seir.seed(1e6, 16000, 9, 0.8);
      return seir.run(betaOverN, 0, 3, 9, 0.8, inf, new Float64Array(3), null);
    });
    expect(infections[2]).toBeLessThan(0); // the premise of the case (observed -6863)
    expect(runs[1]).toBe(runs[0]);
    expect(runs[2]).toBe(runs[0]);
  });

  it('returns false, never throws, on absurd inputs', () => {
    const seir = createSeirIntegrator(2, 2, 4);
    const on = new Float64Array(10);
    expect(seir.seed(1e6, -5, 3, 5)).toBe(false); // negative seed
    expect(seir.seed(1e6, 2e6, 3, 5)).toBe(false); // seed larger than the population
    expect(seir.seed(1e6, NaN, 3, 5)).toBe(false);
    expect(seir.seed(1e6, 10, Infinity, 5)).toBe(false);
    // beta = 1e308: the infection flow overflows
    expect(seir.seed(1e6, 10, 3, 5)).toBe(true);
    expect(seir.run(new Float64Array(10).fill(1e308 / 1e6), 0, 10, 3, 5, null, on, null)).toBe(false);
    // beta so large that RK4 overshoots S below zero within a day
    expect(seir.seed(1e6, 1e3, 3, 5)).toBe(true);
    expect(seir.run(new Float64Array(10).fill(50 / 1e6), 0, 10, 3, 5, null, on, null)).toBe(false);
    // NaN beta, non-positive or NaN periods
    for (const [beta, L, D] of [
      [NaN, 3, 5],
      [0.5, 0, 5],
      [0.5, 3, -1],
      [0.5, NaN, 5],
    ]) {
      expect(seir.seed(1e6, 10, 3, 5)).toBe(true);
      expect(seir.run(new Float64Array(10).fill(beta / 1e6), 0, 10, L, D, null, on, null)).toBe(false);
    }
  });
});

describe('createModel().logDensity', () => {
  // A total function (STYLE.md): finite or -Infinity, never NaN, never a throw, whatever the
  // unconstrained vector. Invented data; the default prior set and three variants of it.
  const defaultPriors = fileURLToPath(new URL('../../priors/default.json', import.meta.url));
  it('is finite or -Infinity over 2000 random vectors in [-50, 50]^dim', () => {
    const base = loadPriorSet(defaultPriors);
    const counts = Array.from({ length: 60 }, (_, t) => Math.round(5 * Math.exp(0.05 * t) + (t % 3)));
    counts[10] = NaN;
    counts[11] = 0;
    const variants: Array<[string, (p: typeof base) => void]> = [
      ['default', () => {}],
      ['weekday effects', (p) => (p.model.weekday_effect = true)],
      ['m = n = 1', (p) => ((p.model.latent_stages = 1), (p.model.infectious_stages = 1))],
      ['linear walk', (p) => (p.model.interpolation = 'linear')],
    ];
    for (const [name, change] of variants) {
      const priorSet = structuredClone(base);
      change(priorSet);
      const model = createModel({ counts, population: 1e6, firstWeekday: 2 }, priorSet);
      const rng = createRng(20240611);
      const theta = new Float64Array(model.layout.dim);
      let finite = 0;
      for (let i = 0; i < 2000; i++) {
        // every other vector in [-3, 3]^dim, so that finite values are well represented too
        const width = i % 2 === 0 ? 50 : 3;
        for (let j = 0; j < theta.length; j++) theta[j] = (2 * rng.uniform() - 1) * width;
        const v = model.logDensity(theta);
        if (!(v === -Infinity || Number.isFinite(v))) throw new Error(`${name}: logDensity ${v} at ${theta.join(',')}`);
        if (Number.isFinite(v)) finite++;
      }
      expect(finite, name).toBeGreaterThan(200);
    }
  });
});
