import { describe, it, expect } from 'vitest';
import { growthRate, reproductionFromGrowth, doublingTime, growthDirection } from '../../src/model/growth.js';

/**
 * m = n = 1: the dominant eigenvalue of the SEIR system linearised at S = N,
 * r = (-(a + g) + sqrt((a - g)^2 + 4 a beta)) / 2, a = 1/L, g = 1/D, beta = R/D
 * (standard SEIR linearisation; MODEL.md section 6; e.g. Keeling and Rohani 2008, ch. 2).
 */
function closedFormSeir(R: number, L: number, D: number): number {
  const a = 1 / L;
  const g = 1 / D;
  const beta = R / D;
  return (-(a + g) + Math.sqrt((a - g) ** 2 + 4 * a * beta)) / 2;
}

/**
 * R = r D (1 + r L/m)^m / (1 - (1 + r D/n)^(-n)) written out plainly with pow (Wallinga and
 * Lipsitch 2007, Proc R Soc B 274, with Erlang stages; MODEL.md section 5), independently of
 * the log1p/expm1 form used by the code under test.
 */
function wallingaLipsitch(r: number, L: number, D: number, m: number, n: number): number {
  return (r * D * Math.pow(1 + (r * L) / m, m)) / (1 - Math.pow(1 + (r * D) / n, -n));
}

const relDiff = (a: number, b: number) => Math.abs(a - b) / Math.abs(b);

/** Plain bisection on the pow form, to the last bit (an independent solver for the same root). */
function bisectRoot(R: number, L: number, D: number, m: number, n: number): number {
  let lo = R < 1 ? -Math.min(m / L, n / D) : 0;
  let hi = R < 1 ? 0 : R / D; // R(r) >= rD for r > 0
  for (;;) {
    const mid = lo + (hi - lo) / 2;
    if (mid === lo || mid === hi) return mid;
    if (wallingaLipsitch(mid, L, D, m, n) > R) hi = mid;
    else lo = mid;
  }
}

describe('growthRate', () => {
  it('matches the m = n = 1 closed form to 1e-10 relative', () => {
    const periods: Array<[number, number]> = [
      [3, 5],
      [1, 10],
      [0.5, 2],
      [10, 1],
      [5.2, 2.9],
    ];
    const rs = [0.05, 0.3, 0.5, 0.9, 0.999, 1.001, 1.3, 2, 3, 10, 50];
    for (const [L, D] of periods) {
      for (const R of rs) {
        const expected = closedFormSeir(R, L, D);
        const got = growthRate(R, L, D, 1, 1);
        // closed form: standard SEIR linearisation (MODEL.md section 6)
        expect(Math.abs(got - expected)).toBeLessThanOrEqual(1e-10 * Math.abs(expected) + 1e-16);
      }
    }
  });

  it('gives the documented example value', () => {
    // TSDoc example; value from the closed form above
    expect(relDiff(growthRate(2, 3, 5, 1, 1), closedFormSeir(2, 3, 5))).toBeLessThan(1e-12);
    expect(growthRate(2, 3, 5, 1, 1)).toBeCloseTo(0.104518, 6);
    // m = n = 1: R = (1 + rL)(1 + rD) (MODEL.md section 5)
    expect(reproductionFromGrowth(0.1, 3, 5, 1, 1)).toBeCloseTo(1.95, 14);
  });

  it('inverts the Wallinga-Lipsitch relation, R(r(R)) = R, for m, n in {1, 2, 3}', () => {
    for (const m of [1, 2, 3]) {
      for (const n of [1, 2, 3]) {
        for (const R of [0.5, 0.9, 1, 1.3, 3]) {
          const r = growthRate(R, 3, 5, m, n);
          if (R === 1) {
            expect(r).toBe(0);
            continue;
          }
          // sign: decline below 1, growth above (Wallinga and Lipsitch 2007)
          expect(Math.sign(r)).toBe(Math.sign(R - 1));
          // Wallinga and Lipsitch 2007 with Erlang stages, evaluated independently above
          expect(relDiff(wallingaLipsitch(r, 3, 5, m, n), R)).toBeLessThan(1e-10);
          expect(relDiff(reproductionFromGrowth(r, 3, 5, m, n), R)).toBeLessThan(1e-12);
        }
      }
    }
  });

  it('agrees with plain bisection over a grid of R, periods and stages to 1e-11 relative', () => {
    for (const m of [1, 2, 3, 4, 0.5]) {
      for (const n of [1, 2, 3, 5, 0.7]) {
        for (const [L, D] of [
          [3, 5],
          [0.3, 10],
          [8, 1],
          [1e-3, 5],
          [5, 0.05],
        ]) {
          for (let lr = -4; lr <= 4; lr += 0.25) {
            if (Math.abs(lr) < 0.1) continue; // the pow form cancels near r = 0 (next test)
            const R = Math.exp(lr);
            expect(relDiff(growthRate(R, L, D, m, n), bisectRoot(R, L, D, m, n))).toBeLessThan(1e-11);
          }
        }
      }
    }
  });

  it('holds the identity at the extremes of R and of the periods', () => {
    const cases: Array<[number, number, number, number, number]> = [
      [1e-6, 3, 5, 2, 2], // root near the edge of the domain, r -> -min(m/L, n/D)
      [1e-3, 0.2, 9, 1, 3],
      [0.01, 3, 5, 1, 1], // the Jensen lower bound leaves the domain here
      [1e4, 3, 5, 2, 2],
      [1e6, 0.001, 5, 1, 1],
      [2.5, 1e-3, 5, 1, 1],
      [2.5, 3, 5, 0.5, 1.5], // gamma shapes below and above 1
    ];
    for (const [R, L, D, m, n] of cases) {
      const r = growthRate(R, L, D, m, n);
      expect(Number.isFinite(r)).toBe(true);
      expect(r).toBeGreaterThan(-Math.min(m / L, n / D));
      // Wallinga and Lipsitch 2007 with gamma stages, evaluated independently above
      expect(relDiff(wallingaLipsitch(r, L, D, m, n), R)).toBeLessThan(1e-8);
    }
  });

  it('near R = 1 follows r = ln(R) / Tg, Tg the mean generation interval', () => {
    // R = 1 / M(-r), so log R = r Tg + O(r^2) with Tg = L + D (n + 1) / (2n), the mean of the
    // generation interval (Wallinga and Lipsitch 2007; from memory). The pow form above loses
    // its digits to cancellation this close to r = 0, so it cannot serve here.
    for (const [m, n] of [
      [1, 1],
      [2, 2],
      [1, 3],
    ]) {
      const tg = 3 + (5 * (n + 1)) / (2 * n);
      for (const R of [1 - 1e-9, 1 + 1e-9, 1 + 1e-13, 1 - 1e-15]) {
        const r = growthRate(R, 3, 5, m, n);
        expect(relDiff(r, Math.log(R) / tg)).toBeLessThan(1e-8);
      }
    }
  });

  it('tends to the fixed-period relation R = r D e^(rL) / (1 - e^(-rD)) for many stages', () => {
    // fixed latent and infectious periods, the m, n -> infinity limit of the Erlang relation
    // (Wallinga and Lipsitch 2007; from memory)
    for (const R of [0.7, 1.5, 3]) {
      const r = growthRate(R, 3, 5, 1e5, 1e5);
      const fixed = (r * 5 * Math.exp(r * 3)) / (-Math.expm1(-r * 5));
      expect(relDiff(fixed, R)).toBeLessThan(1e-4);
    }
  });

  it('returns NaN for R <= 0, non-finite inputs and non-positive periods or stages', () => {
    for (const R of [0, -1, NaN, Infinity, -Infinity]) expect(growthRate(R, 3, 5, 2, 2)).toBeNaN();
    expect(growthRate(2, 0, 5, 2, 2)).toBeNaN();
    expect(growthRate(2, 3, -5, 2, 2)).toBeNaN();
    expect(growthRate(2, NaN, 5, 2, 2)).toBeNaN();
    expect(growthRate(2, 3, Infinity, 2, 2)).toBeNaN();
    expect(growthRate(2, 3, 5, 0, 2)).toBeNaN();
    expect(growthRate(2, 3, 5, 2, NaN)).toBeNaN();
    expect(reproductionFromGrowth(NaN, 3, 5, 2, 2)).toBeNaN();
    expect(reproductionFromGrowth(-1, 3, 5, 2, 2)).toBe(0); // below the domain edge -0.4
  });

  it('is increasing in R', () => {
    let prev = -Infinity;
    for (let R = 0.05; R < 8; R *= 1.07) {
      const r = growthRate(R, 3, 5, 2, 2);
      expect(r).toBeGreaterThan(prev);
      prev = r;
    }
  });

  it('needs few evaluations: on average under 3, never more than 6, for integer stages', () => {
    // measured: mean 2.85, worst 4 (1: 81 solves, 2: 943, 3: 2331, 4: 533)
    // Counted through Math: each evaluation of log R(r) calls Math.log1p for the latent factor,
    // plus Math.log1p and Math.expm1 for the infectious factor unless it takes the series near
    // r = 0; the starting point calls Math.expm1 once. So evaluations = log1p - expm1 + 1.
    const { log1p, expm1 } = Math;
    let nLog1p = 0;
    let nExpm1 = 0;
    let worst = 0;
    let total = 0;
    let solves = 0;
    Math.log1p = (v: number) => (nLog1p++, log1p(v));
    Math.expm1 = (v: number) => (nExpm1++, expm1(v));
    try {
      for (const m of [1, 2, 3, 4]) {
        for (const n of [1, 2, 3, 4]) {
          for (const [L, D] of [
            [3, 5],
            [1, 8],
            [6, 2],
          ]) {
            for (let R = 0.2; R < 10; R *= 1.05) {
              nLog1p = 0;
              nExpm1 = 0;
              growthRate(R, L, D, m, n);
              const evaluations = nLog1p - nExpm1 + 1;
              worst = Math.max(worst, evaluations);
              total += evaluations;
              solves++;
            }
          }
        }
      }
    } finally {
      Math.log1p = log1p;
      Math.expm1 = expm1;
    }
    expect(total / solves).toBeLessThan(3);
    expect(worst).toBeLessThanOrEqual(6);
  });
});

describe('doublingTime', () => {
  it('is ln 2 / |r|, infinite at 0', () => {
    // definition: e^(r T) = 2 (or 1/2 for r < 0)
    expect(doublingTime(0.1)).toBeCloseTo(6.931471805599453, 14);
    expect(doublingTime(-0.1)).toBeCloseTo(6.931471805599453, 14);
    expect(Math.exp(0.07 * doublingTime(0.07))).toBeCloseTo(2, 14);
    expect(doublingTime(0)).toBe(Infinity);
    expect(doublingTime(NaN)).toBeNaN();
  });
});

describe('growthDirection', () => {
  it('says doubling, halving, level or unknown', () => {
    expect(growthDirection(growthRate(1.3, 3, 5, 2, 2))).toBe('doubling');
    expect(growthDirection(growthRate(0.7, 3, 5, 2, 2))).toBe('halving');
    expect(growthDirection(growthRate(1, 3, 5, 2, 2))).toBe('level');
    expect(growthDirection(growthRate(-1, 3, 5, 2, 2))).toBe('unknown');
  });
});
