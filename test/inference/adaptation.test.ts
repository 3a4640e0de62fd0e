import { describe, expect, it } from 'vitest';
import {
  adaptationFromJSON,
  adaptationToJSON,
  adaptedCovariance,
  adaptiveMetropolis,
  installShape,
  type AdaptationState,
} from '../../src/inference/adaptation.js';
import type { ChainState, StepInfo } from '../../src/inference/types.js';
import { WaxwaneError } from '../../src/errors.js';
import { createRng } from '../../src/util/rng.js';

const identity = (d: number) => {
  const m = new Float64Array(d * d);
  for (let i = 0; i < d; i++) m[i * d + i] = 1;
  return m;
};
const info = (acceptProb: number): StepInfo => ({ accepted: acceptProb > 0.5, acceptProb, logDensity: 0 });
const at = (position: Float64Array): ChainState => ({ position, logDensity: 0 });

function randomPoints(n: number, d: number, seed: number): Float64Array[] {
  const rng = createRng(seed);
  return Array.from({ length: n }, () => Float64Array.from({ length: d }, (_, i) => (i + 1) * rng.normal() + i));
}

describe('adaptiveMetropolis', () => {
  it('init starts at the initial covariance and scale 2.38 / sqrt(d)', () => {
    const a = adaptiveMetropolis().init(4, identity(4));
    expect(Math.exp(a.logScale)).toBeCloseTo(2.38 / 2, 14);
    expect(Array.from(adaptedCovariance(a))).toEqual(Array.from(identity(4)));
    expect(a.settings.priorWeight).toBe(4);
  });

  it('update keeps the Welford moments equal to the two-pass mean and covariance, shrunk toward the prior', () => {
    // Two-pass sample covariance sum (x - xbar)(x - xbar)^T (textbook formula) mixed as
    // (n0 Sigma0 + M) / (n0 + n).
    const d = 3;
    const n0 = 5;
    const prior = Float64Array.from([2, 0.5, 0, 0.5, 1, 0.2, 0, 0.2, 3]);
    const m = adaptiveMetropolis({ priorWeight: n0 });
    let a = m.init(d, prior);
    const pts = randomPoints(257, d, 1);
    for (const p of pts) a = m.update(a, at(p), info(0.3));
    const mean = new Float64Array(d);
    for (const p of pts) for (let i = 0; i < d; i++) mean[i] += p[i]! / pts.length;
    for (let i = 0; i < d; i++) expect(a.mean[i]).toBeCloseTo(mean[i]!, 12);
    const cov = adaptedCovariance(a);
    for (let i = 0; i < d; i++) {
      for (let j = 0; j < d; j++) {
        let s = 0;
        for (const p of pts) s += (p[i]! - mean[i]!) * (p[j]! - mean[j]!);
        const expected = (n0 * prior[i * d + j]! + s) / (n0 + pts.length);
        expect(Math.abs(cov[i * d + j]! - expected)).toBeLessThan(1e-11 * Math.max(1, Math.abs(expected)));
      }
    }
  });

  it('moves log scale by the Robbins-Monro steps t^-0.6 (alpha_t - 0.234)', () => {
    // log s_T = log s_0 + sum_t t^-kappa (alpha_t - target) (Andrieu and Thoms 2008, Algorithm 4)
    const m = adaptiveMetropolis();
    let a = m.init(2, identity(2));
    const start = a.logScale;
    let expected = start;
    const rng = createRng(5);
    for (let t = 1; t <= 300; t++) {
      const alpha = rng.uniform();
      expected += Math.pow(t, -0.6) * (alpha - 0.234);
      a = m.update(a, at(new Float64Array(2)), info(alpha));
    }
    expect(a.logScale).toBeCloseTo(expected, 12);
  });

  it('steers the scale toward acceptance 0.234 on a Gaussian target', () => {
    // In d = 1 with the shape equal to the target variance, acceptance (2/pi) atan(2/s) is 0.234
    // at s = 2 / tan(0.234 pi / 2) = 5.27 (Gelman, Roberts and Gilks 1996; from memory).
    const m = adaptiveMetropolis({ stepExponent: 0.6 });
    let a = m.init(1, identity(1), 0.1);
    const rng = createRng(31);
    let x = 0;
    for (let t = 0; t < 20000; t++) {
      const s = Math.exp(a.logScale);
      const y = x + s * rng.normal();
      const alpha = Math.min(1, Math.exp(-0.5 * (y * y - x * x)));
      if (rng.uniform() < alpha) x = y;
      a = m.update(a, at(Float64Array.from([x])), info(alpha));
    }
    // (the proposal here keeps the unit shape, so the scale alone sets the acceptance)
    expect(Math.abs(Math.exp(a.logScale) / (2 / Math.tan((0.234 * Math.PI) / 2)) - 1)).toBeLessThan(0.1);
  });

  it('refreshes the proposal factor only every refreshEvery updates', () => {
    const m = adaptiveMetropolis({ refreshEvery: 10 });
    let a = m.init(2, identity(2));
    const pts = randomPoints(35, 2, 2);
    const changedAt: number[] = [];
    let previous = Array.from(a.cholesky);
    pts.forEach((p, k) => {
      a = m.update(a, at(p), info(0.2));
      const now = Array.from(a.cholesky);
      if (now.some((v, i) => v !== previous[i])) changedAt.push(k + 1);
      previous = now;
    });
    expect(changedAt).toEqual([10, 20, 30]);
  });

  it('resets the running moments at resetAt, keeping the estimate as the new prior', () => {
    const d = 2;
    const m = adaptiveMetropolis({ resetAt: 40, refreshEvery: 1000 });
    let a = m.init(d, identity(d));
    const pts = randomPoints(60, d, 3);
    for (const p of pts) a = m.update(a, at(p), info(0.2));
    // prior after the reset: (n0 I + two-pass M of the first 40 points) / (n0 + 40), n0 = d
    const first = pts.slice(0, 40);
    const mean = [0, 1].map((i) => first.reduce((s, p) => s + p[i]!, 0) / 40);
    for (let i = 0; i < d; i++) {
      for (let j = 0; j < d; j++) {
        const ss = first.reduce((s, p) => s + (p[i]! - mean[i]!) * (p[j]! - mean[j]!), 0);
        const expected = (d * (i === j ? 1 : 0) + ss) / (d + 40);
        expect(Math.abs(a.priorCov[i * d + j]! - expected)).toBeLessThan(1e-12 * Math.max(1, Math.abs(expected)));
      }
    }
    // running moments hold only the 20 points after the reset
    expect(a.count).toBe(20);
    const after = pts.slice(40);
    for (let i = 0; i < d; i++) expect(a.mean[i]).toBeCloseTo(after.reduce((s, p) => s + p[i]!, 0) / 20, 12);
  });

  it('final freezes the factor of the current estimate and the current scale, leaving the state alone', () => {
    const m = adaptiveMetropolis();
    let a = m.init(3, identity(3));
    for (const p of randomPoints(500, 3, 4)) a = m.update(a, at(p), info(0.1));
    const json = JSON.stringify(adaptationToJSON(a));
    const { cholesky, scale } = m.final(a);
    expect(JSON.stringify(adaptationToJSON(a))).toBe(json);
    expect(scale).toBe(Math.exp(a.logScale));
    const cov = adaptedCovariance(a);
    for (let i = 0; i < 3; i++) {
      for (let j = 0; j < 3; j++) {
        let s = 0;
        for (let k = 0; k < 3; k++) s += cholesky[i * 3 + k]! * cholesky[j * 3 + k]!;
        expect(Math.abs(s - cov[i * 3 + j]!)).toBeLessThan(1e-12 * cov[i * 3 + i]!);
      }
    }
  });

  it('rejects a non-positive-definite initial covariance and bad settings with a WaxwaneError', () => {
    expect(() => adaptiveMetropolis().init(2, Float64Array.from([1, 2, 2, 1]))).toThrow(WaxwaneError);
    expect(() => adaptiveMetropolis().init(2, identity(3))).toThrow(WaxwaneError);
    expect(() => adaptiveMetropolis({ targetAccept: 1.2 }).init(2, identity(2))).toThrow(WaxwaneError);
    expect(() => adaptiveMetropolis({ stepExponent: 0.5 }).init(2, identity(2))).toThrow(WaxwaneError);
    expect(() => adaptiveMetropolis({ refreshEvery: 0 }).init(2, identity(2))).toThrow(WaxwaneError);
  });
});

describe('adaptationToJSON / adaptationFromJSON', () => {
  it('round-trips through JSON text and continues identically', () => {
    const m = adaptiveMetropolis({ refreshEvery: 7, resetAt: 30 });
    let a: AdaptationState = m.init(3, identity(3));
    const pts = randomPoints(80, 3, 6);
    for (const p of pts.slice(0, 25)) a = m.update(a, at(p), info(0.4));
    let b = adaptationFromJSON(JSON.parse(JSON.stringify(adaptationToJSON(a))));
    for (const p of pts.slice(25)) {
      a = m.update(a, at(p), info(0.4));
      b = m.update(b, at(p), info(0.4));
    }
    expect(adaptationToJSON(b)).toEqual(adaptationToJSON(a));
  });

  it('rejects a damaged state', () => {
    const json = adaptationToJSON(adaptiveMetropolis().init(2, identity(2)));
    expect(() => adaptationFromJSON({ ...json, mean: [0] })).toThrow(WaxwaneError);
    expect(() => adaptationFromJSON({ ...json, logScale: NaN })).toThrow(WaxwaneError);
  });
});

describe('installShape', () => {
  it('sets the factor, the scale and a fresh Robbins-Monro clock, and restarts the moments', () => {
    const m = adaptiveMetropolis({ learnShape: false });
    let a = m.init(2, identity(2));
    for (const p of randomPoints(30, 2, 4)) a = m.update(a, at(p), info(0.5));
    const cov = Float64Array.from([4, 1, 1, 2]);
    installShape(a, cov, Math.log(0.7));
    // Cholesky of [[4, 1], [1, 2]]: [[2, 0], [0.5, sqrt(1.75)]] (direct computation)
    expect(a.cholesky[0]).toBeCloseTo(2, 14);
    expect(a.cholesky[2]).toBeCloseTo(0.5, 14);
    expect(a.cholesky[3]).toBeCloseTo(Math.sqrt(1.75), 14);
    expect(a.count).toBe(0);
    expect(a.installed).toBe(1);
    expect(a.restartedAt).toBe(30);
    a = m.update(a, at(Float64Array.from([0, 0])), info(0.734));
    // first step after the install: (t - t0)^-0.6 = 1, so log s moves by 0.734 - 0.234
    expect(a.logScale).toBeCloseTo(Math.log(0.7) + 0.5, 14);
    // with learnShape false the factor stays and final() freezes it
    for (const p of randomPoints(200, 2, 5)) a = m.update(a, at(p), info(0.234));
    expect(Array.from(m.final(a).cholesky)).toEqual(Array.from(a.cholesky));
    expect(a.cholesky[0]).toBeCloseTo(2, 14);
  });

  it('survives the JSON round trip and rejects a shape that is not positive definite', () => {
    const m = adaptiveMetropolis({ learnShape: false });
    const a = m.init(2, identity(2));
    installShape(a, Float64Array.from([2, 0, 0, 3]), 0.1);
    const back = adaptationFromJSON(JSON.parse(JSON.stringify(adaptationToJSON(a))));
    expect(back.installed).toBe(1);
    expect(back.settings.learnShape).toBe(false);
    expect(adaptationToJSON(back)).toEqual(adaptationToJSON(a));
    expect(() => installShape(a, Float64Array.from([1, 2, 2, 1]), 0)).toThrow(WaxwaneError);
    expect(() => installShape(a, identity(3), 0)).toThrow(WaxwaneError);
  });
});
