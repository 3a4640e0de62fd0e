/**
 * The Laplace approximation at the posterior mode: the inverse of the finite-difference Hessian
 * of -log density, used as the first proposal covariance and to spread the chains' starts.
 */
import { WaxwaneError } from '../errors.js';
import type { Rng } from '../util/rng.js';
import { cholesky, inverseSpd, lowerTriangularMultiply, makePositiveDefinite } from './linalg.js';
import { evaluate, type LogDensity } from './types.js';

export interface LaplaceOptions {
  /** finite-difference step h_i = relativeStep * max(1, |x_i|) (default 1e-4) */
  relativeStep?: number;
  /** eigenvalue floor, relative to the largest, when the Hessian must be adjusted (default 1e-8) */
  minRelativeEigenvalue?: number;
}

export interface LaplaceResult {
  /** row-major dim x dim, symmetric positive definite */
  covariance: Float64Array;
  /** true when the Hessian was not positive definite and had to be modified */
  adjusted: boolean;
}

/**
 * Hessian of -logDensity at `x` by central second differences, symmetric (row-major). Costs
 * 2 d^2 + 1 evaluations. A coordinate whose differences meet a non-finite value (edge of the
 * support) gets a step ten times smaller, up to four times.
 *
 * @remarks H_ii ~ (f(x + h_i e_i) - 2 f(x) + f(x - h_i e_i)) / h_i^2 and
 *   H_ij ~ (f(+,+) - f(+,-) - f(-,+) + f(-,-)) / (4 h_i h_j), errors O(h^2) + O(eps |f| / h^2);
 *   h near eps^(1/4) ~ 1e-4 balances the two (Nocedal and Wright 2006, "Numerical
 *   Optimization", section 8.1). Exact up to rounding for a quadratic f.
 * @throws WaxwaneError when `x` has log density -Infinity or no step gives finite differences.
 */
export function negLogDensityHessian(logDensity: LogDensity, x: Float64Array, relativeStep = 1e-4): Float64Array {
  const n = x.length;
  const p = new Float64Array(x);
  const f = (): number => -evaluate(logDensity, p);
  const f0 = f();
  if (!Number.isFinite(f0)) throw new WaxwaneError('cannot take the Hessian: the log density at the mode is -Infinity');
  const h = new Float64Array(n);
  for (let i = 0; i < n; i++) {
    const xi = x[i]!;
    h[i] = xi + relativeStep * Math.max(1, Math.abs(xi)) - xi;
  }
  for (let attempt = 0; attempt < 5; attempt++) {
    const bad = new Set<number>();
    const hess = new Float64Array(n * n);
    const at = (i: number, si: number, j = -1, sj = 0): number => {
      p[i] = x[i]! + si * h[i]!;
      if (j >= 0) p[j] = x[j]! + sj * h[j]!;
      const v = f();
      p[i] = x[i]!;
      if (j >= 0) p[j] = x[j]!;
      if (!Number.isFinite(v)) {
        bad.add(i);
        if (j >= 0) bad.add(j);
      }
      return v;
    };
    for (let i = 0; i < n; i++) {
      hess[i * n + i] = (at(i, 1) - 2 * f0 + at(i, -1)) / (h[i]! * h[i]!);
      for (let j = 0; j < i; j++) {
        const v = (at(i, 1, j, 1) - at(i, 1, j, -1) - at(i, -1, j, 1) + at(i, -1, j, -1)) / (4 * h[i]! * h[j]!);
        hess[i * n + j] = v;
        hess[j * n + i] = v;
      }
    }
    if (bad.size === 0) return hess;
    for (const i of bad) h[i] = x[i]! + h[i]! / 10 - x[i]!;
  }
  throw new WaxwaneError('cannot take the Hessian: the log density is -Infinity arbitrarily close to the mode in some coordinate (mode on the edge of the support?)');
}

/**
 * Laplace covariance at a mode: (Hessian of -log density)^-1.
 *
 * If the Hessian is not positive definite (the point is a saddle, or rounding in a nearly flat
 * direction), it is made so before inverting: each eigenvalue lambda becomes
 * max(|lambda|, 1e-8 * max|lambda|) (symmetric Jacobi eigen-decomposition; see
 * `makePositiveDefinite` in linalg.ts), and `adjusted` is set so callers can say so. The result
 * is then a usable proposal shape, not a posterior covariance.
 *
 * @remarks Laplace approximation: posterior ~ N(mode, H^-1), H the Hessian of -log posterior at
 *   the mode (Tierney and Kadane 1986, "Accurate approximations for posterior moments and
 *   marginal densities", JASA 81(393)). Hessian: {@link negLogDensityHessian}.
 * @example For log density -x'A x / 2 with A = [[2, 1], [1, 2]] the covariance is
 *   A^-1 = [[2, -1], [-1, 2]] / 3, adjusted false.
 * @throws WaxwaneError when the log density at the mode is -Infinity or the Hessian is zero or
 *   not finite.
 */
export function laplaceCovariance(logDensity: LogDensity, mode: Float64Array, options: LaplaceOptions = {}): LaplaceResult {
  const n = mode.length;
  if (n < 1) throw new WaxwaneError('laplaceCovariance: the mode is empty');
  const hess = negLogDensityHessian(logDensity, mode, options.relativeStep ?? 1e-4);
  const pd = makePositiveDefinite(hess, n, options.minRelativeEigenvalue ?? 1e-8);
  if (pd === null) {
    throw new WaxwaneError('cannot form the Laplace covariance: the Hessian at the mode is zero or not finite (is the posterior flat there?)');
  }
  const covariance = inverseSpd(pd.matrix, n);
  if (covariance === null) throw new WaxwaneError('cannot form the Laplace covariance: the Hessian at the mode is numerically singular');
  return { covariance, adjusted: pd.adjusted };
}

/**
 * `count` over-dispersed starting points drawn from N(mode, inflate^2 covariance), each redrawn
 * (up to `maxTries` times) while its log density is -Infinity.
 *
 * @remarks Over-dispersed starts relative to the target make between-chain diagnostics
 *   meaningful (Gelman and Rubin 1992, "Inference from iterative simulation using multiple
 *   sequences", Statistical Science 7(4)); inflate = 2 is common practice.
 * @throws WaxwaneError if the covariance is not positive definite or a start cannot be found.
 */
export function dispersedStarts(
  logDensity: LogDensity,
  rng: Rng,
  mode: Float64Array,
  covariance: Float64Array,
  count: number,
  inflate = 2,
  maxTries = 100,
): Float64Array[] {
  const n = mode.length;
  if (!Number.isInteger(count) || count < 0) throw new WaxwaneError(`count must be a non-negative integer, got ${count}`);
  if (!(inflate >= 0) || !Number.isFinite(inflate)) throw new WaxwaneError(`inflate must be finite and >= 0, got ${inflate}`);
  if (!Number.isInteger(maxTries) || maxTries < 1) throw new WaxwaneError(`maxTries must be a positive integer, got ${maxTries}`);
  const l = covariance.length === n * n ? cholesky(covariance, n) : null;
  if (l === null) throw new WaxwaneError(`covariance must be a positive-definite ${n} x ${n} matrix`);
  const z = new Float64Array(n);
  const lz = new Float64Array(n);
  const starts: Float64Array[] = [];
  for (let c = 0; c < count; c++) {
    let found: Float64Array | null = null;
    // where the support is narrow around the mode, draws closer in (halving the spread, three
    // times at most) still give distinct starts; the deterministic sequence keeps runs reproducible
    for (let level = 0, spread = inflate; level < 4 && found === null; level++, spread /= 2) {
      for (let t = 0; t < maxTries && found === null; t++) {
        for (let i = 0; i < n; i++) z[i] = rng.normal();
        lowerTriangularMultiply(l, z, n, lz);
        const x = new Float64Array(n);
        for (let i = 0; i < n; i++) x[i] = mode[i]! + spread * lz[i]!;
        if (evaluate(logDensity, x) > -Infinity) found = x;
      }
    }
    if (found === null) {
      throw new WaxwaneError(
        `no starting point with a finite posterior density was found near the mode (${4 * maxTries} tries); ` +
          'the model cannot reproduce these data from nearby parameters: check the counts and the population, or try another prior set',
      );
    }
    starts.push(found);
  }
  return starts;
}
