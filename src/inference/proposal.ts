/**
 * Gaussian random-walk proposals. A proposal fills a caller-owned buffer and returns the log
 * Hastings ratio, so a Metropolis-Hastings kernel can take any proposal and accept in one line.
 */
import type { Rng } from '../util/rng.js';
import { lowerTriangularMultiply } from './linalg.js';

/**
 * Fills `out` with a proposed point from `x` and returns log q(x | out) - log q(out | x)
 * (0 for a symmetric proposal). Must not mutate `x`; `out` must not alias `x`.
 */
export type Propose = (rng: Rng, x: Float64Array, out: Float64Array) => number;

/** A Gaussian random walk N(x, scale^2 L L^T). */
export interface RandomWalkParams {
  /** lower Cholesky factor L of the proposal shape (row-major dim x dim) */
  cholesky: Float64Array;
  /** global scale multiplying L */
  scale: number;
  dim: number;
}

/**
 * One Gaussian random-walk draw: `out = x + scale * L z`, z ~ N(0, I), with `z` a scratch buffer
 * of length `dim` owned by the caller. No allocation. Returns 0, the log Hastings ratio of a
 * symmetric proposal.
 *
 * @remarks Random-walk Metropolis proposal (Metropolis, Rosenbluth, Rosenbluth, Teller and
 *   Teller 1953); L z has covariance L L^T.
 */
export function randomWalkInto(
  rng: Rng,
  x: Float64Array,
  out: Float64Array,
  cholesky: Float64Array,
  scale: number,
  dim: number,
  z: Float64Array,
): number {
  for (let i = 0; i < dim; i++) z[i] = rng.normal();
  lowerTriangularMultiply(cholesky, z, dim, out);
  for (let i = 0; i < dim; i++) out[i] = x[i]! + scale * out[i]!;
  return 0;
}

/**
 * A fixed Gaussian random-walk proposal. The factor is copied once; the returned function owns
 * one scratch buffer, reused on every call (so it is not re-entrant).
 *
 * @example gaussianRandomWalk({ cholesky: new Float64Array([1]), scale: 0.5, dim: 1 }) proposes
 *   x + 0.5 z, z ~ N(0, 1), and returns 0.
 */
export function gaussianRandomWalk(params: RandomWalkParams): Propose {
  const { dim, scale } = params;
  if (!Number.isInteger(dim) || dim < 1) throw new RangeError(`dim must be a positive integer, got ${dim}`);
  if (params.cholesky.length !== dim * dim) {
    throw new RangeError(`cholesky must hold ${dim * dim} entries, got ${params.cholesky.length}`);
  }
  if (!(scale > 0) || !Number.isFinite(scale)) throw new RangeError(`scale must be positive and finite, got ${scale}`);
  const cholesky = new Float64Array(params.cholesky);
  const z = new Float64Array(dim);
  return (rng, x, out) => randomWalkInto(rng, x, out, cholesky, scale, dim, z);
}
