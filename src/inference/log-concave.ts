/**
 * A one-dimensional log-concave density known up to its normalising constant: the log of that
 * constant by the trapezoid rule on a grid fitted to the density, and exact draws by rejection
 * from an envelope built on the same grid. Used to integrate the walk scale out of the sampler's
 * density and to draw it back afterwards (model/sampling-space.ts).
 */
import type { Rng } from '../util/rng.js';

/** Nodes of the grid at most; far more than any density this module is used on needs. */
const MAX_NODES = 4096;
/** The grid runs until the log density is this far below its maximum on both sides. */
const DROP = 40;
/** Grid step as a fraction of the local standard deviation 1 / sqrt(-f'') at the mode. */
const STEP_PER_SD = 1 / 3;

export interface LogConcaveIntegrator {
  /**
   * log of the integral of exp(f) over the real line, for a concave f (a log density up to a
   * constant) that is finite at `guess`; `scaleGuess` is a rough width of the density there and
   * `maxStep` the largest grid step allowed (see below). Keeps the grid for
   * {@link LogConcaveIntegrator.sample}. Returns NaN when f is not finite at `guess`, when no
   * mode is found, or when the grid would need more than 4096 nodes.
   *
   * @remarks
   * The mode m is found by Newton's method with central-difference derivatives and halving of
   * any step that would lower f; the grid step is d = min(s / 3, maxStep) with
   * s = (-f''(m))^-1/2, and the grid m + j d runs until f is 40 below its maximum on both sides.
   * For a concave f the mass left out beyond an end u_e is at most exp(f(u_e)) / |slope of the
   * last chord| (the chord bounds f from above outside it), a relative error below e^-40 here.
   * The trapezoid rule's relative error for an integrand analytic in the strip |Im u| < a is at
   * most about 2 M(a) exp(-2 pi a / d), M(a) the integral of |exp f| along Im u = +-a relative to
   * the real line (Trefethen and Weideman 2014, "The exponentially convergent trapezoidal rule",
   * SIAM Review 56(3), Theorem 5.1). A Gaussian of sd s with d = s / 3 gives about 2 e^-178; a
   * factor like exp(-c e^(-2u)) is analytic only for |Im u| < pi / 4, and there the caller
   * bounds d (e.g. d <= 0.05 gives e^-49 M(pi / 8)). The result is then the integral to the
   * rounding of the sum, like any special function in double precision.
   */
  logIntegral(f: (u: number) => number, guess: number, scaleGuess: number, maxStep?: number): number;
  /**
   * One exact draw from exp(f) / Z for the f of the last successful `logIntegral` call.
   *
   * @remarks
   * Rejection sampling (von Neumann 1951) from a piecewise envelope: on a grid cell
   * [u_j, u_j+1] a concave f lies below the chord through its left neighbours (extended to the
   * right) and below the chord through its right neighbours (extended to the left), so the
   * smaller of the two lines' maxima over the cell bounds f there; beyond the ends f lies below
   * the extension of the last chord, an exponential tail. This is the derivative-free envelope
   * of adaptive rejection sampling (Gilks 1992, "Derivative-free adaptive rejection sampling for
   * Gibbs sampling", Bayesian Statistics 4), on a fixed grid. A piece is chosen with probability
   * proportional to its envelope mass, a point drawn from the envelope on it and accepted with
   * probability exp(f(u) - envelope(u)).
   */
  sample(rng: Rng): number;
}

export function createLogConcaveIntegrator(): LogConcaveIntegrator {
  const values = new Float64Array(MAX_NODES);
  const weights = new Float64Array(MAX_NODES + 1);
  const bounds = new Float64Array(MAX_NODES + 1);
  let fn: ((u: number) => number) | null = null;
  let origin = 0; // u of node 0
  let step = 0;
  let count = 0;
  let top = 0; // max of f over the grid

  /**
   * Newton's method on a concave f, each step halved until f does not decrease (so a poor guess,
   * far out on a nearly linear tail, cannot overshoot); returns the mode, and its local sd
   * (-f'')^-1/2 through `sdOut` (NaN when no mode is found).
   */
  const sdOut = new Float64Array(1);
  function findMode(f: (u: number) => number, guess: number, scale: number): number {
    sdOut[0] = NaN;
    let u = guess;
    let fu = f(u);
    if (!(fu > -Infinity && fu < Infinity)) return NaN;
    let width = scale > 0 && scale < Infinity ? scale : 1;
    let curved = false;
    for (let it = 0; it < 200; it++) {
      // a thousandth of the width, but not so small that rounding of f swamps the differences
      const e = Math.max(1e-3 * width, 1e-6 * Math.max(1, Math.abs(u)));
      const fp = f(u + e);
      const fm = f(u - e);
      if (!(fp > -Infinity && fm > -Infinity)) return NaN;
      const g1 = (fp - fm) / (2 * e);
      const g2 = (fp - 2 * fu + fm) / (e * e);
      let move: number;
      if (g2 < 0) {
        width = 1 / Math.sqrt(-g2);
        curved = true;
        move = -g1 / g2;
      } else {
        // no usable curvature here (a nearly linear stretch): walk uphill, wider each time
        curved = false;
        move = g1 > 0 ? width : -width;
        width *= 2;
      }
      let fNew = f(u + move);
      while (!(fNew >= fu) && Math.abs(move) > 1e-6 * width) {
        move *= 0.5;
        fNew = f(u + move);
      }
      if (!(fNew >= fu)) break; // no ascent left at this resolution: u is the mode
      u += move;
      fu = fNew;
      if (curved && Math.abs(move) < 1e-3 * width) break;
      if (it === 199) return NaN;
    }
    if (!curved) return NaN;
    sdOut[0] = width;
    return u;
  }

  function logIntegral(f: (u: number) => number, guess: number, scaleGuess: number, maxStep = Infinity): number {
    fn = null;
    const mode = findMode(f, guess, scaleGuess);
    const sd = sdOut[0]!;
    if (!(mode > -Infinity && mode < Infinity && sd > 0 && sd < Infinity)) return NaN;
    const d = Math.min(sd * STEP_PER_SD, maxStep);
    // left half into the top of the buffer (reversed), right half after it; then shift down
    let fmax = f(mode);
    let left = 0;
    for (let j = 1; ; j++) {
      if (left + 1 >= MAX_NODES / 2) return NaN;
      const v = f(mode - j * d);
      values[MAX_NODES / 2 - j] = v;
      left++;
      if (v > fmax) fmax = v;
      if (!(v > fmax - DROP)) break;
    }
    values[MAX_NODES / 2] = f(mode);
    let right = 0;
    for (let j = 1; ; j++) {
      if (right + 1 >= MAX_NODES / 2) return NaN;
      const v = f(mode + j * d);
      values[MAX_NODES / 2 + j] = v;
      right++;
      if (v > fmax) fmax = v;
      if (!(v > fmax - DROP)) break;
    }
    // (the maximum only grows, so the left end stays 40 below it)
    count = left + right + 1;
    values.copyWithin(0, MAX_NODES / 2 - left, MAX_NODES / 2 + right + 1);
    origin = mode - left * d;
    step = d;
    top = fmax;
    let sum = 0.5 * (Math.exp(values[0]! - fmax) + Math.exp(values[count - 1]! - fmax));
    for (let j = 1; j < count - 1; j++) sum += Math.exp(values[j]! - fmax);
    if (!(sum > 0 && sum < Infinity)) return NaN;
    fn = f;
    return fmax + Math.log(sum * d);
  }

  /** max over [a, b] of the line through (x1, y1), (x2, y2); no bound (Infinity) if one end is -Infinity */
  function lineMax(x1: number, y1: number, x2: number, y2: number, a: number, b: number): number {
    if (!(y1 > -Infinity && y2 > -Infinity)) return Infinity;
    const slope = (y2 - y1) / (x2 - x1);
    return y1 + slope * ((slope >= 0 ? b : a) - x1);
  }

  function sample(rng: Rng): number {
    const f = fn;
    if (f === null) throw new Error('sample() needs a successful logIntegral() first');
    const n = count;
    const d = step;
    const u = (j: number) => origin + j * d;
    // envelope: cells 0..n-2, then the left tail (index n-1) and the right tail (index n)
    let total = 0;
    for (let j = 0; j < n - 1; j++) {
      let b = Infinity;
      if (j >= 1) b = Math.min(b, lineMax(u(j - 1), values[j - 1]!, u(j), values[j]!, u(j), u(j + 1)));
      if (j + 2 <= n - 1) b = Math.min(b, lineMax(u(j + 1), values[j + 1]!, u(j + 2), values[j + 2]!, u(j), u(j + 1)));
      bounds[j] = b;
      total += weights[j] = d * Math.exp(b - top);
    }
    const slopeLeft = (values[1]! - values[0]!) / d; // > 0: the grid starts below the maximum
    const slopeRight = (values[n - 1]! - values[n - 2]!) / d; // < 0
    total += weights[n - 1] = Math.exp(values[0]! - top) / slopeLeft;
    total += weights[n] = Math.exp(values[n - 1]! - top) / -slopeRight;
    if (!(total > 0 && total < Infinity)) throw new Error(`log-concave envelope has mass ${total}; the density is not log-concave or the grid is too short`);
    for (;;) {
      let r = rng.uniform() * total;
      let piece = 0;
      while (piece < n && r >= weights[piece]!) {
        r -= weights[piece]!;
        piece++;
      }
      let x: number;
      let envelope: number;
      if (piece < n - 1) {
        x = u(piece) + d * rng.uniform();
        envelope = bounds[piece]!;
      } else if (piece === n - 1) {
        x = u(0) + Math.log(1 - rng.uniform()) / slopeLeft;
        envelope = values[0]! + slopeLeft * (x - u(0));
      } else {
        x = u(n - 1) - Math.log(1 - rng.uniform()) / -slopeRight;
        envelope = values[n - 1]! + slopeRight * (x - u(n - 1));
      }
      if (Math.log(1 - rng.uniform()) < f(x) - envelope) return x;
    }
  }

  return { logIntegral, sample };
}
