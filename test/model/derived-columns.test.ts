// Sorted day columns of daily draws and their merge over chains (src/model/derived.ts): checked
// against sorting every day's values directly (ascending, NaN last, the order of
// Float64Array.prototype.sort in the ECMAScript specification, TypedArray SortCompare).
import { describe, expect, it } from 'vitest';
import { DAILY_QUANTITIES, mergeSortedColumns, sortedColumns, type DailyDraws } from '../../src/model/derived.js';
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
        return qi % 2 === 0 ? Math.floor(u * 5) : rng.normal();
      }),
    ]),
  ) as DailyDraws;
}

const ascendingNaNLast = (a: number, b: number) => (Number.isNaN(a) ? (Number.isNaN(b) ? 0 : 1) : Number.isNaN(b) ? -1 : a - b);

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
});
