// The radix sort of util/float-sort.ts against the order the ECMAScript specification gives
// Float64Array.prototype.sort without a comparator (TypedArray SortCompare: numeric order,
// -0 before +0, NaN last), element by element with Object.is, so signed zeros and NaN count.
import { describe, expect, it } from 'vitest';
import { sortFloat64 } from '../../src/util/float-sort.js';
import { createRng } from '../../src/util/rng.js';

const rng = createRng(20261202);
const SPECIAL = [0, -0, Infinity, -Infinity, NaN, 5e-324, -5e-324, 1, -1, Number.MAX_VALUE, -Number.MAX_VALUE];

/** Value makers: continuous, integer ties, NaN-laced, special values, tightly packed, wide range. */
const KINDS: Record<string, () => number> = {
  uniform: () => 100 * rng.uniform() - 50,
  'small integers': () => Math.floor(20 * rng.uniform()),
  'NaN-laced': () => (rng.uniform() < 0.1 ? NaN : rng.normal()),
  'special values': () => SPECIAL[Math.floor(SPECIAL.length * rng.uniform())]!,
  // share the high 32 bits: only the insertion finish (or the fallback) orders them
  'packed within 1e-9': () => 1 + 1e-9 * rng.uniform(),
  'packed, with ties': () => 1 + 1e-12 * Math.floor(3 * rng.uniform()),
  'sixty decades, both signs': () => Math.exp(140 * rng.uniform() - 70) * (rng.uniform() < 0.5 ? -1 : 1),
  'NaN with the sign bit set': () => (rng.uniform() < 0.2 ? -NaN : rng.normal()),
};

describe('sortFloat64', () => {
  for (const [kind, make] of Object.entries(KINDS)) {
    it(`orders ${kind} values as Float64Array.prototype.sort does`, () => {
      for (const n of [0, 1, 2, 63, 64, 65, 200, 1000, 4001]) {
        const values = Float64Array.from({ length: n }, make);
        const expected = Float64Array.from(values).sort();
        const got = sortFloat64(Float64Array.from(values));
        expect(got.length).toBe(n);
        for (let i = 0; i < n; i++) {
          if (!Object.is(got[i], expected[i])) expect.fail(`${kind}, n = ${n}: index ${i} holds ${got[i]}, the built-in sort ${expected[i]}`);
        }
      }
    });
  }

  it('sorts in place and returns the same array', () => {
    const a = Float64Array.from({ length: 300 }, () => rng.normal());
    expect(sortFloat64(a)).toBe(a);
    for (let i = 1; i < a.length; i++) expect(a[i]! >= a[i - 1]!).toBe(true);
  });

  it('sorts a subarray without touching the rest of its buffer', () => {
    const a = Float64Array.from({ length: 500 }, () => rng.normal());
    const before = Float64Array.from(a);
    sortFloat64(a.subarray(100, 400));
    expect(Array.from(a.subarray(0, 100))).toEqual(Array.from(before.subarray(0, 100)));
    expect(Array.from(a.subarray(400))).toEqual(Array.from(before.subarray(400)));
    expect(Array.from(a.subarray(100, 400))).toEqual(Array.from(before.subarray(100, 400)).sort((x, y) => x - y));
  });
});
