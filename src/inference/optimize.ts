/**
 * Posterior mode by limited-memory BFGS on -log density, with central finite-difference
 * gradients and a backtracking (Armijo) line search; several starts, the best one kept.
 * Deterministic: the same starts give the same mode, bit for bit.
 */
import { WaxwaneError } from '../errors.js';
import { evaluate, type LogDensity } from './types.js';

export interface OptimizeOptions {
  /** accepted steps at most, per start (default 1000) */
  maxIterations?: number;
  /**
   * stop when max_i |d log density / d x_i| <= this (default 1e-6). The distance left to the
   * mode is about Sigma g (Sigma the posterior covariance), so this suits posterior variances up
   * to ~10 for a distance near 1e-5.
   */
  gradientTolerance?: number;
  /**
   * stop when a step raises the log density by <= this * max(1, |value|) (default 1e-15, a few
   * rounding units: the log density no longer moves). A log density carries an arbitrary
   * constant, so a looser relative test would stop early when that constant is large.
   */
  functionTolerance?: number;
  /** L-BFGS memory, in correction pairs (default 10) */
  memory?: number;
  /** finite-difference step h_i = relativeStep * max(1, |x_i|) (default 1e-5; 1e-7 for forward differences) */
  relativeStep?: number;
  /**
   * 'central' (default) or 'forward' differences: forward costs one evaluation per coordinate
   * instead of two, with an error O(h) + O(eps |f| / h), about 1e-8 relative at h = 1e-7
   * against about 1e-10 for central; enough to head for the mode, not to pin it down
   */
  differences?: 'central' | 'forward';
}

/**
 * Why a run stopped. `gradient` and `function` count as converged; `line-search` means no step
 * along the steepest-descent direction improved (usually the noise floor of the finite-difference
 * gradient, sometimes a kink); `non-finite-gradient` that a gradient could not be evaluated on
 * either side of a coordinate; `infeasible-start` that the start has log density -Infinity.
 */
export type StopReason =
  | 'gradient'
  | 'function'
  | 'line-search'
  | 'max-iterations'
  | 'non-finite-gradient'
  | 'infeasible-start';

export interface OptimizeRun {
  position: Float64Array;
  logDensity: number;
  /** accepted steps */
  iterations: number;
  converged: boolean;
  reason: StopReason;
  /** log density evaluations */
  evaluations: number;
}

export interface ModeResult extends OptimizeRun {
  /** index of the start that gave the mode */
  bestStart: number;
  /** every start's run, in the order given */
  runs: OptimizeRun[];
}

/**
 * The highest mode reached from several starts: one L-BFGS run per start
 * ({@link maximizeLogDensity}), the run with the largest log density kept (the first on ties).
 * Comparing the runs' log densities tells whether the starts agreed.
 *
 * @throws WaxwaneError when no start is given, starts differ in length, or every start has log
 *   density -Infinity.
 */
export function findMode(logDensity: LogDensity, starts: Float64Array[], options: OptimizeOptions = {}): ModeResult {
  if (starts.length === 0) throw new WaxwaneError('findMode needs at least one start point');
  const dim = starts[0]!.length;
  if (dim < 1 || starts.some((s) => s.length !== dim)) {
    throw new WaxwaneError(`start points must all have the same, positive length (the first has ${dim})`);
  }
  const runs = starts.map((s) => maximizeLogDensity(logDensity, s, options));
  let best = -1;
  runs.forEach((r, i) => {
    if (r.logDensity > -Infinity && (best < 0 || r.logDensity > runs[best]!.logDensity)) best = i;
  });
  if (best < 0) {
    throw new WaxwaneError('every start point has log density -Infinity; give starts inside the support of the posterior');
  }
  return { ...runs[best]!, bestStart: best, runs };
}

/**
 * Maximises a log density from one start by L-BFGS on f = -log density.
 *
 * @remarks L-BFGS two-loop recursion with initial scaling H0 = (s'y / y'y) I: Nocedal (1980),
 *   "Updating quasi-Newton matrices with limited storage", Mathematics of Computation 35(151);
 *   Nocedal and Wright (2006), "Numerical Optimization", Algorithms 7.4-7.5. Step length by
 *   backtracking (halving) until the Armijo condition f(x + a p) <= f(x) + 1e-4 a g'p holds
 *   with f finite (Nocedal and Wright, Algorithm 3.1), so a trial point at -Infinity log density
 *   is simply backtracked from. Without a Wolfe curvature test a pair is stored only if
 *   s'y > 1e-10 |s| |y|, which keeps the inverse-Hessian approximation positive definite. When
 *   the L-BFGS direction fails to give a step, the memory is dropped and steepest descent is
 *   tried before giving up. Gradients: {@link finiteDifferenceGradient}.
 */
export function maximizeLogDensity(logDensity: LogDensity, start: Float64Array, options: OptimizeOptions = {}): OptimizeRun {
  const o = resolveOptions(options);
  const n = start.length;
  let evaluations = 0;
  const f = (x: Float64Array): number => {
    evaluations += 1;
    return -evaluate(logDensity, x);
  };
  let x = new Float64Array(start);
  let fx = f(x);
  const finish = (reason: StopReason, iterations: number): OptimizeRun => ({
    position: x,
    logDensity: -fx,
    iterations,
    converged: reason === 'gradient' || reason === 'function',
    reason,
    evaluations,
  });
  if (!Number.isFinite(fx)) return finish('infeasible-start', 0);

  let g = new Float64Array(n);
  const gradient = o.differences === 'forward' ? forwardDifferenceGradient : finiteDifferenceGradient;
  if (!gradient(f, x, fx, g, o.relativeStep)) return finish('non-finite-gradient', 0);
  const memS: Float64Array[] = [];
  const memY: Float64Array[] = [];
  const memRho: number[] = [];
  const alphas = new Float64Array(o.memory);
  const d = new Float64Array(n);
  const xNew = new Float64Array(n);

  for (let iter = 0; iter < o.maxIterations; iter++) {
    if (normInf(g) <= o.gradientTolerance) return finish('gradient', iter);

    let step = -1;
    let fNew = NaN;
    for (let attempt = 0; attempt < 2 && step < 0; attempt++) {
      if (attempt === 1) {
        if (memS.length === 0) break;
        memS.length = 0;
        memY.length = 0;
        memRho.length = 0;
      }
      let gd = direction(g, memS, memY, memRho, alphas, d);
      if (!(gd < 0)) {
        for (let i = 0; i < n; i++) d[i] = -g[i]!;
        gd = -dot(g, g);
      }
      // steepest descent has no length scale: cap its first trial at a unit move
      let a = memS.length === 0 ? Math.min(1, 1 / Math.sqrt(dot(d, d))) : 1;
      for (let k = 0; k < 60; k++, a *= 0.5) {
        for (let i = 0; i < n; i++) xNew[i] = x[i]! + a * d[i]!;
        const fTrial = f(xNew);
        if (Number.isFinite(fTrial) && fTrial <= fx + 1e-4 * a * gd) {
          step = a;
          fNew = fTrial;
          break;
        }
      }
    }
    if (step < 0) return finish('line-search', iter);

    const gNew = new Float64Array(n);
    const gradientOk = gradient(f, xNew, fNew, gNew, o.relativeStep);
    const s = new Float64Array(n);
    const y = new Float64Array(n);
    for (let i = 0; i < n; i++) {
      s[i] = xNew[i]! - x[i]!;
      y[i] = gNew[i]! - g[i]!;
    }
    const fOld = fx;
    x = new Float64Array(xNew);
    fx = fNew;
    if (!gradientOk) return finish('non-finite-gradient', iter + 1);
    g = gNew;
    const sy = dot(s, y);
    if (sy > 1e-10 * Math.sqrt(dot(s, s) * dot(y, y))) {
      if (memS.length === o.memory) {
        memS.shift();
        memY.shift();
        memRho.shift();
      }
      memS.push(s);
      memY.push(y);
      memRho.push(1 / sy);
    }
    if (fOld - fx <= o.functionTolerance * Math.max(1, Math.abs(fOld), Math.abs(fx))) return finish('function', iter + 1);
  }
  return finish(normInf(g) <= o.gradientTolerance ? 'gradient' : 'max-iterations', o.maxIterations);
}

/**
 * Central-difference gradient of `f` at `x` into `out`; `fx` = f(x). Step
 * h_i = relativeStep * max(1, |x_i|), rounded so that x_i + h_i - x_i = h_i exactly. Where one
 * side is not finite (edge of the support) the one-sided difference from the other side is
 * used. Returns false if a component has neither side finite. `x` is restored before returning.
 *
 * @remarks f'(x) ~ (f(x + h) - f(x - h)) / (2h), error O(h^2) + O(eps |f| / h); with h near
 *   eps^(1/3) ~ 6e-6 the two balance (Nocedal and Wright 2006, section 8.1).
 */
export function finiteDifferenceGradient(
  f: (x: Float64Array) => number,
  x: Float64Array,
  fx: number,
  out: Float64Array,
  relativeStep = 1e-5,
): boolean {
  let ok = true;
  for (let i = 0; i < x.length; i++) {
    const xi = x[i]!;
    const h0 = relativeStep * Math.max(1, Math.abs(xi));
    x[i] = xi + h0;
    const h = x[i]! - xi;
    const fPlus = f(x);
    x[i] = xi - h;
    const fMinus = f(x);
    x[i] = xi;
    const plusOk = Number.isFinite(fPlus);
    const minusOk = Number.isFinite(fMinus);
    if (plusOk && minusOk) out[i] = (fPlus - fMinus) / (2 * h);
    else if (plusOk) out[i] = (fPlus - fx) / h;
    else if (minusOk) out[i] = (fx - fMinus) / h;
    else {
      out[i] = NaN;
      ok = false;
    }
  }
  return ok;
}

/**
 * Forward-difference gradient of `f` at `x` into `out` (`fx` = f(x)), as
 * {@link finiteDifferenceGradient} but one evaluation per coordinate; where the forward side is
 * not finite the backward one is used. Returns false if a component has neither.
 *
 * @remarks f'(x) ~ (f(x + h) - f(x)) / h, error O(h) + O(eps |f| / h), balanced near
 *   h ~ eps^(1/2) ~ 1e-8 (Nocedal and Wright 2006, section 8.1).
 */
export function forwardDifferenceGradient(
  f: (x: Float64Array) => number,
  x: Float64Array,
  fx: number,
  out: Float64Array,
  relativeStep = 1e-7,
): boolean {
  let ok = true;
  for (let i = 0; i < x.length; i++) {
    const xi = x[i]!;
    x[i] = xi + relativeStep * Math.max(1, Math.abs(xi));
    const h = x[i]! - xi;
    const fPlus = f(x);
    if (Number.isFinite(fPlus)) {
      out[i] = (fPlus - fx) / h;
    } else {
      x[i] = xi - h;
      const fMinus = f(x);
      if (Number.isFinite(fMinus)) out[i] = (fx - fMinus) / h;
      else {
        out[i] = NaN;
        ok = false;
      }
    }
    x[i] = xi;
  }
  return ok;
}

/** L-BFGS two-loop recursion: d = -H g; returns g'd. */
function direction(
  g: Float64Array,
  memS: Float64Array[],
  memY: Float64Array[],
  memRho: number[],
  alphas: Float64Array,
  d: Float64Array,
): number {
  const n = g.length;
  const m = memS.length;
  for (let i = 0; i < n; i++) d[i] = -g[i]!;
  for (let k = m - 1; k >= 0; k--) {
    const a = memRho[k]! * dot(memS[k]!, d);
    alphas[k] = a;
    const y = memY[k]!;
    for (let i = 0; i < n; i++) d[i] -= a * y[i]!;
  }
  if (m > 0) {
    const y = memY[m - 1]!;
    const gamma = dot(memS[m - 1]!, y) / dot(y, y);
    for (let i = 0; i < n; i++) d[i] *= gamma;
  }
  for (let k = 0; k < m; k++) {
    const b = memRho[k]! * dot(memY[k]!, d);
    const s = memS[k]!;
    const coef = alphas[k]! - b;
    for (let i = 0; i < n; i++) d[i] += coef * s[i]!;
  }
  return dot(g, d);
}

function dot(a: Float64Array, b: Float64Array): number {
  let s = 0;
  for (let i = 0; i < a.length; i++) s += a[i]! * b[i]!;
  return s;
}

function normInf(a: Float64Array): number {
  let m = 0;
  for (let i = 0; i < a.length; i++) m = Math.max(m, Math.abs(a[i]!));
  return m;
}

function resolveOptions(options: OptimizeOptions): Required<OptimizeOptions> {
  const o = {
    maxIterations: options.maxIterations ?? 1000,
    gradientTolerance: options.gradientTolerance ?? 1e-6,
    functionTolerance: options.functionTolerance ?? 1e-15,
    memory: options.memory ?? 10,
    relativeStep: options.relativeStep ?? (options.differences === 'forward' ? 1e-7 : 1e-5),
    differences: options.differences ?? 'central',
  };
  if (!Number.isInteger(o.maxIterations) || o.maxIterations < 1) throw new WaxwaneError(`maxIterations must be a positive integer, got ${o.maxIterations}`);
  if (!Number.isInteger(o.memory) || o.memory < 1) throw new WaxwaneError(`memory must be a positive integer, got ${o.memory}`);
  if (o.differences !== 'central' && o.differences !== 'forward') throw new WaxwaneError(`differences must be 'central' or 'forward', got ${String(o.differences)}`);
  for (const k of ['gradientTolerance', 'functionTolerance', 'relativeStep'] as const) {
    if (!(o[k] > 0) || !Number.isFinite(o[k])) throw new WaxwaneError(`${k} must be positive, got ${o[k]}`);
  }
  return o;
}
