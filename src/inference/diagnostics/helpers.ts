/**
 * Building blocks of the convergence diagnostics of Vehtari, Gelman, Simpson, Carpenter and
 * Buerkner (2021), "Rank-normalization, folding, and localization: an improved R-hat for
 * assessing convergence of MCMC", Bayesian Analysis 16(2). They work on `chains`, one
 * Float64Array of draws per chain, all of one length, and return new arrays: the input is
 * never modified.
 */
import { WaxwaneError } from '../../errors.js';
import { normalQuantile } from '../../util/stdlib.js';

/** Draws of one quantity: one array per chain, all of one length. */
export type Chains = readonly Float64Array[];

/** Below this many draws per (split) chain every diagnostic is NaN. */
export const MIN_DRAWS_PER_SPLIT_CHAIN = 4;

/** Why a diagnostic is NaN for a set of draws. */
export type DrawsIssue = 'too-few-draws' | 'non-finite' | 'constant';

/**
 * The common length of the chains (0 for no chains).
 *
 * @throws WaxwaneError when the chains differ in length: that is a malformed draws array,
 * not a property of the sampler, so it is not folded into a NaN result.
 */
export function chainLength(chains: Chains): number {
  if (chains.length === 0) return 0;
  const n = chains[0]!.length;
  for (const chain of chains) {
    if (chain.length !== n) {
      throw new WaxwaneError(
        `convergence diagnostics need chains of equal length; got lengths ${chains
          .map((c) => c.length)
          .join(', ')}`,
      );
    }
  }
  return n;
}

/**
 * Why the diagnostics of these draws are undefined, or `undefined` when they are defined.
 * Checked in this order: `'too-few-draws'` (no chains, or fewer than `minPerChain` draws per
 * chain), `'non-finite'` (a NaN or an infinite draw), `'constant'` (every draw equal).
 *
 * @param minPerChain - 8 for chains that the diagnostic will split (at least
 * {@link MIN_DRAWS_PER_SPLIT_CHAIN} per half), 4 for chains used as given.
 */
export function drawsIssue(
  chains: Chains,
  minPerChain = 2 * MIN_DRAWS_PER_SPLIT_CHAIN,
): DrawsIssue | undefined {
  const n = chainLength(chains);
  if (chains.length === 0 || n < minPerChain) return 'too-few-draws';
  let min = Infinity;
  let max = -Infinity;
  for (const chain of chains) {
    for (let i = 0; i < n; i++) {
      const v = chain[i]!;
      if (!Number.isFinite(v)) return 'non-finite';
      if (v < min) min = v;
      if (v > max) max = v;
    }
  }
  return min === max ? 'constant' : undefined;
}

/**
 * Each chain cut into its first and second half; with an odd length the middle draw is
 * dropped, so the halves have equal length.
 *
 * @remarks Split chains let R-hat and ESS see a trend within a chain as disagreement between
 * chains (Gelman et al., Bayesian Data Analysis, 3rd ed., section 11.4; Vehtari et al. 2021).
 *
 * @example
 * ```ts
 * splitChains([Float64Array.of(1, 2, 3, 4, 5)]); // [[1, 2], [4, 5]]
 * ```
 */
export function splitChains(chains: Chains): Float64Array[] {
  const n = chainLength(chains);
  const half = Math.floor(n / 2);
  const out: Float64Array[] = [];
  for (const chain of chains) out.push(chain.slice(0, half), chain.slice(n - half));
  return out;
}

/** All draws of all chains in one array, chain after chain. */
export function pool(chains: Chains): Float64Array {
  const n = chainLength(chains);
  const out = new Float64Array(chains.length * n);
  chains.forEach((chain, j) => out.set(chain, j * n));
  return out;
}

/** Copies a pooled array back into `m` chains of length `n`. */
function unpool(values: Float64Array, m: number, n: number): Float64Array[] {
  const out: Float64Array[] = [];
  for (let j = 0; j < m; j++) out.push(values.slice(j * n, (j + 1) * n));
  return out;
}

const LITTLE_ENDIAN = new Uint8Array(new Uint16Array([1]).buffer)[0] === 1;

/**
 * The permutation that sorts `values` ascending (`values[order[0]]` is the smallest); equal
 * values keep their input order. NaN must be absent; -0 comes just before +0.
 *
 * @remarks LSD radix sort (O(n)) on the IEEE-754 bit patterns, sign-flipped so that unsigned
 * order is numeric order, in passes of 16 bits: first the two passes of the high word (sign,
 * exponent and 20 bits of mantissa), then an insertion sort on the full values to order the
 * rare draws that share a high word. If that finishing step runs long (draws packed within a
 * relative 1e-6 of each other), the two low-word passes are made instead. Several times
 * faster here than a comparison sort, which matters because every parameter of every fit is
 * ranked.
 */
export function sortOrder(values: Float64Array): Uint32Array {
  const n = values.length;
  const words = new Uint32Array(values.buffer, values.byteOffset, 2 * n);
  const hiWord = LITTLE_ENDIAN ? 1 : 0;
  const hi = new Uint32Array(n);
  const lo = new Uint32Array(n);
  for (let i = 0; i < n; i++) {
    const h = words[2 * i + hiWord]!;
    const l = words[2 * i + 1 - hiWord]!;
    if (h >>> 31) {
      hi[i] = ~h >>> 0;
      lo[i] = ~l >>> 0;
    } else {
      hi[i] = (h | 0x80000000) >>> 0;
      lo[i] = l;
    }
  }
  const byHigh = radixPass(hi, radixPass(hi, identity(n), 0), 16);
  if (finishByInsertion(values, byHigh, n)) return byHigh;
  const byLow = radixPass(lo, radixPass(lo, identity(n), 0), 16);
  return radixPass(hi, radixPass(hi, byLow, 0), 16);
}

/** 0, 1, ..., n - 1. */
function identity(n: number): Uint32Array {
  const out = new Uint32Array(n);
  for (let i = 0; i < n; i++) out[i] = i;
  return out;
}

/**
 * One stable counting-sort pass of `order` on the 16-bit digit of `key` at `shift`; a digit
 * shared by every value leaves the order as it is.
 */
function radixPass(key: Uint32Array, order: Uint32Array, shift: number): Uint32Array {
  const n = order.length;
  const start = new Uint32Array(65536);
  for (let i = 0; i < n; i++) start[(key[i]! >>> shift) & 0xffff]++;
  if (n === 0 || start[(key[0]! >>> shift) & 0xffff] === n) return order;
  let sum = 0;
  for (let d = 0; d < 65536; d++) {
    const count = start[d]!;
    start[d] = sum;
    sum += count;
  }
  const next = new Uint32Array(n);
  for (let k = 0; k < n; k++) {
    const i = order[k]!;
    next[start[(key[i]! >>> shift) & 0xffff]++] = i;
  }
  return next;
}

/**
 * Stable insertion sort of `order` by `values`, in place; gives up (returning false, the
 * order then scrambled) once it has moved more than `budget` entries.
 */
function finishByInsertion(values: Float64Array, order: Uint32Array, budget: number): boolean {
  let moves = 0;
  for (let k = 1; k < order.length; k++) {
    const i = order[k]!;
    const v = values[i]!;
    let j = k - 1;
    while (j >= 0 && values[order[j]!]! > v) {
      order[j + 1] = order[j]!;
      j--;
      if (++moves > budget) return false;
    }
    order[j + 1] = i;
  }
  return true;
}

/**
 * Sample quantile of sorted values by linear interpolation between order statistics:
 * h = (S - 1) p, Q = x[floor h] + (h - floor h) (x[floor h + 1] - x[floor h]).
 *
 * @remarks Definition 7 of Hyndman and Fan (1996), "Sample quantiles in statistical
 * packages", The American Statistician 50(4); the default of R and NumPy.
 */
export function quantileOfSorted(sorted: Float64Array, p: number): number {
  const s = sorted.length;
  if (s === 0 || !(p >= 0 && p <= 1)) return NaN;
  const h = (s - 1) * p;
  const k = Math.floor(h);
  if (k >= s - 1) return sorted[s - 1]!;
  return sorted[k]! + (h - k) * (sorted[k + 1]! - sorted[k]!);
}

/** The pooled draws sorted ascending; NaN when any draw is NaN. */
export function sortedDraws(chains: Chains): Float64Array {
  const values = pool(chains);
  if (values.some(Number.isNaN)) return values.fill(NaN);
  return gather(values, sortOrder(values));
}

/**
 * Folded draws |x - median|, the median taken over all draws of all chains. R-hat of the
 * folded draws compares the chains' spreads rather than their locations.
 *
 * @remarks Vehtari et al. (2021) ("folded-split-R-hat"). A NaN draw makes every
 * folded draw NaN (no median is defined).
 *
 * @example
 * ```ts
 * fold([Float64Array.of(1, 4), Float64Array.of(2, 9)]); // median 3: [[2, 1], [1, 6]]
 * ```
 */
export function fold(chains: Chains): Float64Array[] {
  const median = quantileOfSorted(sortedDraws(chains), 0.5);
  return chains.map((chain) => distances(chain, median));
}

/** |x - center| elementwise, as a new array. */
function distances(x: Float64Array, center: number): Float64Array {
  const out = new Float64Array(x.length);
  for (let i = 0; i < x.length; i++) out[i] = Math.abs(x[i]! - center);
  return out;
}

/** Blom scores Phi^-1((r - 3/8) / (S + 1/4)) for r = 1, 1.5, 2, ..., S, filled on demand. */
let blomCache: { draws: number; scores: Float64Array } | undefined;

/**
 * The score table for `draws` draws; entry i belongs to rank i/2 + 1 and is NaN until
 * {@link blomScore} fills it. Every parameter of a fit has the same number of draws, so one
 * table serves them all.
 */
function blomTable(draws: number): Float64Array {
  if (blomCache === undefined || blomCache.draws !== draws) {
    blomCache = { draws, scores: new Float64Array(Math.max(2 * draws - 1, 0)).fill(NaN) };
  }
  return blomCache.scores;
}

function blomScore(table: Float64Array, halfRankIndex: number, draws: number): number {
  const rank = halfRankIndex / 2 + 1;
  const z = normalQuantile((rank - 0.375) / (draws + 0.25), 0, 1);
  table[halfRankIndex] = z;
  return z;
}

/**
 * Rank normalisation: each draw replaced by the normal score of its rank among all draws of
 * all chains, z = Phi^-1((r - 3/8) / (S + 1/4)), with S the number of draws and r the
 * fractional rank (tied draws share the average of their ranks).
 *
 * @remarks Vehtari et al. (2021), with Blom's offset 3/8 (Blom
 * 1958). R-hat and ESS of the scores are defined whatever the tails of the draws (a Cauchy
 * target included) and do not change under monotone transforms of the parameter. A NaN draw
 * makes every score NaN (no ranking is defined); infinite draws are ranked like any other.
 *
 * @example
 * ```ts
 * // ranks 1.5, 3, 1.5, 4 among S = 4 draws
 * rankNormalize([Float64Array.of(2, 5), Float64Array.of(2, 7)]);
 * // [[Phi^-1(1.125 / 4.25), Phi^-1(2.625 / 4.25)], [Phi^-1(1.125 / 4.25), Phi^-1(3.625 / 4.25)]]
 * // = [[-0.6289..., 0.2993...], [-0.6289..., 1.0491...]]
 * ```
 */
export function rankNormalize(chains: Chains): Float64Array[] {
  const n = chainLength(chains);
  const values = pool(chains);
  if (values.some(Number.isNaN)) return unpool(values.fill(NaN), chains.length, n);
  const order = sortOrder(values);
  return unpool(normalScores(gather(values, order), order), chains.length, n);
}

/** values[order[k]] for every k. */
function gather(values: Float64Array, order: Uint32Array): Float64Array {
  const out = new Float64Array(order.length);
  for (let k = 0; k < out.length; k++) out[k] = values[order[k]!]!;
  return out;
}

/**
 * Normal scores (see {@link rankNormalize}) of the values `sorted[k]` that sit at position
 * `order[k]`, returned in position order.
 */
function normalScores(sorted: Float64Array, order: Uint32Array): Float64Array {
  const draws = sorted.length;
  const table = blomTable(draws);
  const scores = new Float64Array(draws);
  for (let first = 0; first < draws; ) {
    const v = sorted[first]!;
    let last = first;
    while (last + 1 < draws && sorted[last + 1] === v) last++;
    // Average rank of positions first..last is (first + last) / 2 + 1, whose index among the
    // half-integer ranks 1, 1.5, 2, ... is first + last.
    let z = table[first + last]!;
    if (Number.isNaN(z)) z = blomScore(table, first + last, draws);
    for (let k = first; k <= last; k++) scores[order[k]!] = z;
    first = last + 1;
  }
  return scores;
}

/**
 * |x - center| sorted, with the positions it came from, given x sorted (`sorted[k]` at
 * position `order[k]`): the values at or below the center, read downwards, and those above
 * it, read upwards, are both sorted by distance, so one merge does it in O(S).
 */
function foldSorted(
  sorted: Float64Array,
  order: Uint32Array,
  center: number,
): { sorted: Float64Array; order: Uint32Array } {
  const draws = sorted.length;
  let above = 0;
  while (above < draws && sorted[above]! <= center) above++;
  let below = above - 1;
  const outSorted = new Float64Array(draws);
  const outOrder = new Uint32Array(draws);
  for (let k = 0; k < draws; k++) {
    const down = below >= 0 ? center - sorted[below]! : Infinity;
    const up = above < draws ? sorted[above]! - center : Infinity;
    if (below >= 0 && down <= up) {
      outSorted[k] = down;
      outOrder[k] = order[below--]!;
    } else {
      outSorted[k] = up;
      outOrder[k] = order[above++]!;
    }
  }
  return { sorted: outSorted, order: outOrder };
}

/** What the rank-based diagnostics need from one quantity's draws, from a single sort. */
export interface SplitRankings {
  /** {@link splitChains} of the draws */
  split: Float64Array[];
  /** all split draws, sorted */
  sorted: Float64Array;
  /** {@link rankNormalize} of the split chains */
  ranked: Float64Array[];
  /** {@link rankNormalize} of {@link fold} of the split chains */
  foldedRanked: Float64Array[];
}

/**
 * Split chains with their normal scores and folded normal scores, sorting the draws once.
 * Draws must be finite (check with {@link drawsIssue} first).
 */
export function splitRankings(chains: Chains): SplitRankings {
  const split = splitChains(chains);
  const n = split.length > 0 ? split[0]!.length : 0;
  const values = pool(split);
  const order = sortOrder(values);
  const sorted = gather(values, order);
  const folded = foldSorted(sorted, order, quantileOfSorted(sorted, 0.5));
  return {
    split,
    sorted,
    ranked: unpool(normalScores(sorted, order), split.length, n),
    foldedRanked: unpool(normalScores(folded.sorted, folded.order), split.length, n),
  };
}

/** Arithmetic mean. */
export function mean(x: Float64Array): number {
  let s = 0;
  for (let i = 0; i < x.length; i++) s += x[i]!;
  return s / x.length;
}

/** Sample variance with denominator n - 1 (two-pass). */
export function sampleVariance(x: Float64Array): number {
  const m = mean(x);
  let ss = 0;
  for (let i = 0; i < x.length; i++) {
    const d = x[i]! - m;
    ss += d * d;
  }
  return ss / (x.length - 1);
}

/** Sample variance (divisor S - 1) of all draws of all chains pooled, two-pass. */
export function pooledVariance(chains: Chains): number {
  let count = 0;
  let sum = 0;
  for (const chain of chains) {
    for (let i = 0; i < chain.length; i++) sum += chain[i]!;
    count += chain.length;
  }
  const m = sum / count;
  let ss = 0;
  for (const chain of chains) {
    for (let i = 0; i < chain.length; i++) {
      const d = chain[i]! - m;
      ss += d * d;
    }
  }
  return ss / (count - 1);
}

/* ---------------------------------------------------------------------------------------
 * Autocovariance by FFT
 * ------------------------------------------------------------------------------------- */

interface FftPlan {
  size: number;
  /** stage twiddles: entry half + k holds cos and -sin of 2 pi k / span, span = 2 half */
  cos: Float64Array;
  sin: Float64Array;
  reversed: Uint32Array;
  /** scratch arrays of this size, owned by the plan and overwritten by every use */
  re: Float64Array;
  im: Float64Array;
  power: Float64Array;
}

const fftPlans = new Map<number, FftPlan>();

function fftPlan(size: number): FftPlan {
  let plan = fftPlans.get(size);
  if (plan === undefined) {
    const cos = new Float64Array(size);
    const sin = new Float64Array(size);
    for (let half = 1; half < size; half <<= 1) {
      for (let k = 0; k < half; k++) {
        cos[half + k] = Math.cos((Math.PI * k) / half);
        sin[half + k] = -Math.sin((Math.PI * k) / half);
      }
    }
    const bits = Math.round(Math.log2(size));
    const reversed = new Uint32Array(size);
    for (let i = 0; i < size; i++) {
      let r = 0;
      for (let b = 0, v = i; b < bits; b++, v >>= 1) r = (r << 1) | (v & 1);
      reversed[i] = r;
    }
    plan = {
      size,
      cos,
      sin,
      reversed,
      re: new Float64Array(size),
      im: new Float64Array(size),
      power: new Float64Array(size),
    };
    fftPlans.set(size, plan);
  }
  return plan;
}

/**
 * In-place forward discrete Fourier transform X_k = sum_j x_j exp(-2 pi i j k / size) of a
 * power-of-two length >= 4: iterative decimation-in-time Cooley-Tukey (Cooley and Tukey 1965)
 * on bit-reversed input, the first two stages (twiddles 1 and -i) fused without
 * multiplications and the later stages fused two by two (radix 2^2), which halves the passes
 * over memory.
 */
function fft(re: Float64Array, im: Float64Array, plan: FftPlan): void {
  const { size, cos, sin, reversed } = plan;
  for (let i = 0; i < size; i++) {
    const j = reversed[i]!;
    if (j > i) {
      let t = re[i]!;
      re[i] = re[j]!;
      re[j] = t;
      t = im[i]!;
      im[i] = im[j]!;
      im[j] = t;
    }
  }
  for (let a = 0; a < size; a += 4) {
    const r0 = re[a]!, i0 = im[a]!, r1 = re[a + 1]!, i1 = im[a + 1]!;
    const r2 = re[a + 2]!, i2 = im[a + 2]!, r3 = re[a + 3]!, i3 = im[a + 3]!;
    const sr = r0 + r1, si = i0 + i1, dr = r0 - r1, di = i0 - i1;
    const tr = r2 + r3, ti = i2 + i3, ur = r2 - r3, ui = i2 - i3;
    re[a] = sr + tr;
    im[a] = si + ti;
    re[a + 2] = sr - tr;
    im[a + 2] = si - ti;
    // (ur + i ui) times -i is ui - i ur
    re[a + 1] = dr + ui;
    im[a + 1] = di - ur;
    re[a + 3] = dr - ui;
    im[a + 3] = di + ur;
  }
  // Stages of half-span h and 2h together: for each k < h, the points k, k+h, k+2h, k+3h of a
  // block of 4h take twiddle w1 = W_{2h}^k in the first stage, w2 = W_{4h}^k and -i w2 in the
  // second.
  let h = 4;
  for (; 4 * h <= size; h <<= 2) {
    for (let start = 0; start < size; start += 4 * h) {
      for (let k = 0; k < h; k++) {
        const w1r = cos[h + k]!, w1i = sin[h + k]!;
        const w2r = cos[2 * h + k]!, w2i = sin[2 * h + k]!;
        const p0 = start + k, p1 = p0 + h, p2 = p1 + h, p3 = p2 + h;
        let xr = re[p1]!, xi = im[p1]!;
        let tr = xr * w1r - xi * w1i, ti = xr * w1i + xi * w1r;
        const x0r = re[p0]!, x0i = im[p0]!;
        const a0r = x0r + tr, a0i = x0i + ti, a1r = x0r - tr, a1i = x0i - ti;
        xr = re[p3]!;
        xi = im[p3]!;
        tr = xr * w1r - xi * w1i;
        ti = xr * w1i + xi * w1r;
        const x2r = re[p2]!, x2i = im[p2]!;
        const a2r = x2r + tr, a2i = x2i + ti, a3r = x2r - tr, a3i = x2i - ti;
        const ur = a2r * w2r - a2i * w2i, ui = a2r * w2i + a2i * w2r;
        const vr = a3r * w2r - a3i * w2i, vi = a3r * w2i + a3i * w2r;
        re[p0] = a0r + ur;
        im[p0] = a0i + ui;
        re[p2] = a0r - ur;
        im[p2] = a0i - ui;
        // v times -i is vi - i vr
        re[p1] = a1r + vi;
        im[p1] = a1i - vr;
        re[p3] = a1r - vi;
        im[p3] = a1i + vr;
      }
    }
  }
  // An odd number of stages leaves one plain radix-2 stage spanning the whole array.
  if (2 * h === size) {
    for (let k = 0; k < h; k++) {
      const wr = cos[h + k]!, wi = sin[h + k]!;
      const b = k + h;
      const br = re[b]!, bi = im[b]!;
      const xr = br * wr - bi * wi, xi = br * wi + bi * wr;
      const ar = re[k]!, ai = im[k]!;
      re[b] = ar - xr;
      im[b] = ai - xi;
      re[k] = ar + xr;
      im[k] = ai + xi;
    }
  }
}

/** Smallest power of two >= n, and at least 4 (the fused first stages need 4). */
function nextPowerOfTwo(n: number): number {
  let p = 4;
  while (p < n) p <<= 1;
  return p;
}

/**
 * Mean over the series of their biased autocovariances around the given means, at lags
 * 0..maxLag: c_t = (1/M) sum_j (1/n) sum_{i < n - t} (x_j[i] - mu_j) (x_j[i + t] - mu_j).
 *
 * @remarks Wiener-Khinchin: the autocorrelation of a series zero-padded to length P >= n + t
 * is the inverse transform of its power spectrum, exact up to lag P - n. Two real series x, y
 * ride in one complex transform Z of x + iy; as X_k = (Z_k + conj Z_{P-k}) / 2 and
 * Y_k = (Z_k - conj Z_{P-k}) / 2i, the sum of their power spectra is
 * |X_k|^2 + |Y_k|^2 = (|Z_k|^2 + |Z_{P-k}|^2) / 2. The spectra of all series are summed before
 * the single inverse transform, which is linear.
 */
export function meanAutocovarianceFft(
  series: Chains,
  means: ArrayLike<number>,
  maxLag: number,
): Float64Array {
  const m = series.length;
  const n = chainLength(series);
  if (m === 0 || n === 0) return new Float64Array(0);
  const lags = Math.min(Math.max(maxLag, 0), n - 1) + 1;
  const size = nextPowerOfTwo(n + lags - 1);
  const plan = fftPlan(size);
  const { re, im, power } = plan;
  power.fill(0);
  for (let j = 0; j < m; j += 2) {
    re.fill(0);
    im.fill(0);
    const x = series[j]!;
    const mx = means[j]!;
    for (let i = 0; i < n; i++) re[i] = x[i]! - mx;
    if (j + 1 < m) {
      const y = series[j + 1]!;
      const my = means[j + 1]!;
      for (let i = 0; i < n; i++) im[i] = y[i]! - my;
    }
    fft(re, im, plan);
    for (let k = 0; k < size; k++) {
      const r = (size - k) & (size - 1);
      power[k] += 0.5 * (re[k]! * re[k]! + im[k]! * im[k]! + re[r]! * re[r]! + im[r]! * im[r]!);
    }
  }
  // The power spectrum is real and even, so its forward transform is size times its inverse.
  im.fill(0);
  fft(power, im, plan);
  const out = new Float64Array(lags);
  const scale = 1 / (size * n * m);
  for (let t = 0; t < lags; t++) out[t] = power[t]! * scale;
  return out;
}

/**
 * Mean over the series of their biased autocovariances around the given means at lags `lag`
 * and `lag + 1`, summed directly in one pass, O(M n); cheaper than the transform while only
 * the first few lags are needed.
 */
export function meanAutocovariancePair(
  series: Chains,
  means: ArrayLike<number>,
  lag: number,
): [number, number] {
  const n = chainLength(series);
  let total0 = 0;
  let total1 = 0;
  const end = n - lag - 1;
  for (let j = 0; j < series.length; j++) {
    const y = series[j]!;
    const mu = means[j]!;
    let s0 = 0;
    let s1 = 0;
    for (let i = 0; i < end; i++) {
      const yi = y[i]! - mu;
      s0 += yi * (y[i + lag]! - mu);
      s1 += yi * (y[i + lag + 1]! - mu);
    }
    if (end >= 0) s0 += (y[end]! - mu) * (y[n - 1]! - mu);
    total0 += s0;
    total1 += s1;
  }
  const scale = 1 / (n * series.length);
  return [total0 * scale, total1 * scale];
}

/**
 * Biased autocovariance of one series around its mean, at every lag t = 0..n-1:
 * gamma_t = (1/n) sum_{i < n - t} (x_i - xbar)(x_{i+t} - xbar).
 *
 * @remarks The divisor n rather than n - t is the choice Geyer (1992), "Practical Markov
 * chain Monte Carlo", Statistical Science 7(4), recommends and Vehtari et al. (2021) use; it
 * keeps the sequence positive semi-definite. Computed by FFT with zero padding, O(n log n).
 */
export function autocovariance(x: Float64Array): Float64Array {
  return meanAutocovarianceFft([x], [mean(x)], x.length - 1);
}
