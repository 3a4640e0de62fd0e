/**
 * Ascending in-place sort of a Float64Array, in the order of Float64Array.prototype.sort
 * (-0 before +0, NaN last), several times faster on the columns of posterior draws the
 * summaries sort by the thousand (model/derived.ts).
 *
 * @remarks LSD radix sort (counting sort per digit, stable) on the high 32 bits of the IEEE-754
 * pattern, sign-flipped so that unsigned order is numeric order (negatives: every bit flipped;
 * others: the sign bit set); three passes of 11, 11 and 10 bits, a pass skipped when every value
 * shares its digit. The high word holds the sign, the exponent and 20 bits of the mantissa, so
 * values it leaves tied differ by less than about 1e-6 relatively; an insertion sort on the full
 * values then orders those (and leaves equal values, and -0 before +0, as they are). Where that
 * finishing step would run long (values packed closer than that), the built-in sort finishes
 * instead. NaNs are set aside first and written back at the end.
 */

/** Below this length the built-in sort is as fast. */
const SMALL = 64;
const BITS = [11, 11, 10] as const;

let keys = new Uint32Array(0);
let keys2 = new Uint32Array(0);
let vals = new Float64Array(0);
let vals2 = new Float64Array(0);
const counts = new Uint32Array(1 << 11);
const word = new Float64Array(1);
const wordHi = new Uint32Array(word.buffer);
const HI = new Uint8Array(new Uint16Array([1]).buffer)[0] === 1 ? 1 : 0;

function ensure(n: number): void {
  if (keys.length >= n) return;
  const size = Math.max(n, 2 * keys.length);
  keys = new Uint32Array(size);
  keys2 = new Uint32Array(size);
  vals = new Float64Array(size);
  vals2 = new Float64Array(size);
}

/** Sorts `a` ascending in place (see the file header); returns `a`. */
export function sortFloat64(a: Float64Array): Float64Array {
  const n = a.length;
  if (n < SMALL) return a.sort();
  ensure(n);
  // keys of the values that are not NaN
  let m = 0;
  for (let i = 0; i < n; i++) {
    const v = a[i]!;
    if (v !== v) continue;
    word[0] = v;
    const h = wordHi[HI]!;
    keys[m] = h >>> 31 ? ~h >>> 0 : (h | 0x80000000) >>> 0;
    vals[m] = v;
    m++;
  }
  let k = keys;
  let x = vals;
  let k2 = keys2;
  let x2 = vals2;
  let shift = 0;
  for (const bits of BITS) {
    const mask = (1 << bits) - 1;
    const size = 1 << bits;
    counts.fill(0, 0, size);
    for (let i = 0; i < m; i++) counts[(k[i]! >>> shift) & mask]++;
    if (m > 0 && counts[(k[0]! >>> shift) & mask] !== m) {
      let sum = 0;
      for (let d = 0; d < size; d++) {
        const c = counts[d]!;
        counts[d] = sum;
        sum += c;
      }
      for (let i = 0; i < m; i++) {
        const j = counts[(k[i]! >>> shift) & mask]++;
        k2[j] = k[i]!;
        x2[j] = x[i]!;
      }
      const tk = k;
      k = k2;
      k2 = tk;
      const tx = x;
      x = x2;
      x2 = tx;
    }
    shift += bits;
  }
  // insertion sort on the full values: only values sharing a high word are out of order
  let moves = 0;
  let finished = true;
  for (let i = 1; i < m; i++) {
    const v = x[i]!;
    let j = i;
    while (j > 0 && x[j - 1]! > v) {
      x[j] = x[j - 1]!;
      j--;
    }
    if (j !== i) {
      x[j] = v;
      moves += i - j;
      if (moves > 4 * m) {
        finished = false;
        break;
      }
    }
  }
  a.set(x.subarray(0, m));
  if (!finished) a.subarray(0, m).sort();
  a.fill(NaN, m, n);
  return a;
}
