// Sorted day columns of daily draws and their merge over chains (src/model/derived.ts): checked
// against sorting every day's values directly (ascending, NaN last, the order of
// Float64Array.prototype.sort in the ECMAScript specification, TypedArray SortCompare).
import { describe, expect, it } from 'vitest';
import { fileURLToPath } from 'node:url';
import { DAILY_QUANTITIES, chainDailyColumns, chainDailyDraws, mergeSortedColumns, sortedColumns, type DailyDraws } from '../../src/model/derived.js';
import { createModel } from '../../src/model/posterior.js';
import { loadPriorSet } from '../../src/io/priors.js';
import { createRng } from '../../src/util/rng.js';

/** Draw-ordered daily draws (n draws x days), ties and NaN mixed in. */
function fakeDaily(n: number, days: number, seed: number): DailyDraws {
  const rng = createRng(seed);
  return Object.fromEntries(
    DAILY_QUANTITIES.map((q, qi) => [
      q,
      Float64Array.from({ length: n * days }, () => {
        const u = rng.uniform();
        if (u < 0.03) return NaN;
        if (u < 0.06) return u < 0.045 ? -0 : 0;
        return qi % 2 === 0 ? Math.floor(u * 5) : rng.normal();
      }),
    ]),
  ) as DailyDraws;
}

/** The comparator of TypedArray SortCompare: numeric, -0 before +0, NaN last. */
const ascendingNaNLast = (a: number, b: number) =>
  Number.isNaN(a) ? (Number.isNaN(b) ? 0 : 1) : Number.isNaN(b) ? -1 : a !== b ? a - b : Object.is(a, -0) && Object.is(b, 0) ? -1 : Object.is(a, 0) && Object.is(b, -0) ? 1 : 0;

describe('sortedColumns and mergeSortedColumns', () => {
  const days = 9;
  const parts = [fakeDaily(40, days, 1), fakeDaily(25, days, 2), fakeDaily(1, days, 3), fakeDaily(33, days, 4)];

  it('sortedColumns holds each day of each draw once, ascending', () => {
    const cols = sortedColumns(parts[0]!, days);
    for (const q of DAILY_QUANTITIES) {
      for (let t = 0; t < days; t++) {
        const expected = Array.from({ length: 40 }, (_, d) => parts[0]![q][d * days + t]!).sort(ascendingNaNLast);
        expect(Array.from(cols[q].subarray(t * 40, (t + 1) * 40))).toEqual(expected);
      }
    }
  });

  it('merging the chains gives the sorted columns of all the draws together', () => {
    const merged = mergeSortedColumns(parts.map((p) => sortedColumns(p, days)), days);
    const n = 40 + 25 + 1 + 33;
    for (const q of DAILY_QUANTITIES) {
      expect(merged[q].length).toBe(n * days);
      for (let t = 0; t < days; t++) {
        const expected = parts.flatMap((p) => Array.from({ length: p[q].length / days }, (_, d) => p[q][d * days + t]!)).sort(ascendingNaNLast);
        expect(Array.from(merged[q].subarray(t * n, (t + 1) * n))).toEqual(expected);
      }
    }
  });

  it('merges any number of parts, the same multiset whatever the grouping', () => {
    const cols = parts.map((p) => sortedColumns(p, days));
    for (const k of [1, 2, 3, 4]) {
      const merged = mergeSortedColumns(cols.slice(0, k), days);
      const n = cols.slice(0, k).reduce((a, c) => a + c.transmission_rate.length / days, 0);
      for (const q of DAILY_QUANTITIES) {
        for (let t = 0; t < days; t++) {
          const expected = parts.slice(0, k).flatMap((p) => Array.from({ length: p[q].length / days }, (_, d) => p[q][d * days + t]!)).sort(ascendingNaNLast);
          expect(Array.from(merged[q].subarray(t * n, (t + 1) * n)), `${k} parts, ${q}, day ${t}`).toEqual(expected);
        }
      }
    }
  });
});

describe('chainDailyColumns', () => {
  // a short series through the real model, at random points near 0 on the unconstrained scale
  const priorSet = loadPriorSet(fileURLToPath(new URL('../../priors/default.json', import.meta.url)));
  const counts = Float64Array.from([3, 5, 4, 6, 8, 7, 10, 12, 11, 15, 18, 17, 22, 25, 24, 30, 28, 33, 31, 35, 30]);
  const model = createModel({ counts, population: 50_000, firstWeekday: 2 }, priorSet);

  it('equals sorting the columns of chainDailyDraws, to the last bit', () => {
    const dim = model.layout.dim;
    const rng = createRng(5);
    const n = 150;
    const draws = new Float64Array(n * dim);
    for (let i = 0; i < draws.length; i++) draws[i] = 0.3 * rng.normal();
    const direct = sortedColumns(chainDailyDraws(model, draws, 2, 99), model.days);
    const columns = chainDailyColumns(model, draws, 2, 99);
    // real epidemics, not a column of NaN
    expect(Array.from(direct.effective_reproduction).filter(Number.isFinite).length).toBeGreaterThan(n * model.days * 0.9);
    for (const q of DAILY_QUANTITIES) {
      expect(columns[q].length).toBe(n * model.days);
      expect(Array.from(columns[q]), q).toEqual(Array.from(direct[q]));
    }
  });
});
