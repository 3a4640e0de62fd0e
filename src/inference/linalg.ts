/**
 * Small dense linear algebra on row-major `Float64Array` matrices (n x n, entry (i, j) at
 * `i * n + j`). The sampler works in 2 to ~50 dimensions, where plain loops beat any library
 * call overhead and keep every result bit-for-bit reproducible.
 */

/**
 * Lower Cholesky factor L of a symmetric positive-definite A (A = L L^T), written into `out`
 * (upper triangle set to zero). Reads only the lower triangle of `a`. `out` must not alias `a`.
 *
 * @returns `false` (leaving `out` partly written) when A is not numerically positive definite,
 *   or holds a non-finite value.
 * @remarks Cholesky-Banachiewicz order: L_ij = (A_ij - sum_{k<j} L_ik L_jk) / L_jj,
 *   L_ii = sqrt(A_ii - sum_{k<i} L_ik^2). Golub and Van Loan (2013), "Matrix Computations",
 *   4th ed., section 4.2.
 */
export function choleskyInto(a: Float64Array, n: number, out: Float64Array): boolean {
  for (let i = 0; i < n; i++) {
    const rowI = i * n;
    for (let j = 0; j <= i; j++) {
      const rowJ = j * n;
      let s = a[rowI + j]!;
      for (let k = 0; k < j; k++) s -= out[rowI + k]! * out[rowJ + k]!;
      if (i === j) {
        if (!(s > 0) || !Number.isFinite(s)) return false;
        out[rowI + i] = Math.sqrt(s);
      } else {
        out[rowI + j] = s / out[rowJ + j]!;
      }
    }
    for (let j = i + 1; j < n; j++) out[rowI + j] = 0;
  }
  return true;
}

/**
 * Lower Cholesky factor of a symmetric positive-definite matrix, or `null` if it is not
 * positive definite.
 *
 * @example cholesky([4,12,-16, 12,37,-43, -16,-43,98], 3) is [2,0,0, 6,1,0, -8,5,3].
 */
export function cholesky(a: Float64Array, n: number): Float64Array | null {
  checkSquare(a, n);
  const out = new Float64Array(n * n);
  return choleskyInto(a, n, out) ? out : null;
}

/**
 * Cholesky factor of A, or of A + eps * mean(diag A) * I for the smallest eps in
 * 1e-12, 1e-11, ..., 1e-4 that makes the factorisation succeed; `null` if none does.
 *
 * @remarks Adding a small multiple of the identity is how an adaptive Metropolis covariance is
 *   kept positive definite (Haario, Saksman and Tamminen 2001, "An adaptive Metropolis
 *   algorithm", Bernoulli 7(2), the epsilon * I_d term). Used where A is positive semi-definite in
 *   exact arithmetic and only rounding can break the factorisation.
 */
export function choleskyWithJitter(a: Float64Array, n: number): Float64Array | null {
  checkSquare(a, n);
  const out = new Float64Array(n * n);
  if (choleskyInto(a, n, out)) return out;
  let meanDiag = 0;
  for (let i = 0; i < n; i++) meanDiag += Math.abs(a[i * n + i]!) / n;
  if (!(meanDiag > 0) || !Number.isFinite(meanDiag)) return null;
  const work = new Float64Array(a);
  for (let e = -12; e <= -4; e++) {
    const jitter = meanDiag * 10 ** e;
    for (let i = 0; i < n; i++) work[i * n + i] = a[i * n + i]! + jitter;
    if (choleskyInto(work, n, out)) return out;
  }
  return null;
}

/**
 * `out = L z` for a lower-triangular L (upper triangle ignored). No allocation; `out` must not
 * alias `z`.
 */
export function lowerTriangularMultiply(
  l: Float64Array,
  z: Float64Array,
  n: number,
  out: Float64Array,
): Float64Array {
  for (let i = 0; i < n; i++) {
    const row = i * n;
    let s = 0;
    for (let k = 0; k <= i; k++) s += l[row + k]! * z[k]!;
    out[i] = s;
  }
  return out;
}

/** Solves `L y = b` by forward substitution into `out` (may alias `b`). No allocation. */
export function solveLower(
  l: Float64Array,
  b: Float64Array,
  n: number,
  out: Float64Array,
): Float64Array {
  for (let i = 0; i < n; i++) {
    const row = i * n;
    let s = b[i]!;
    for (let k = 0; k < i; k++) s -= l[row + k]! * out[k]!;
    out[i] = s / l[row + i]!;
  }
  return out;
}

/**
 * A^-1 from the lower Cholesky factor L of A.
 *
 * @remarks A^-1 = L^-T L^-1; L^-1 is lower triangular, found column by column by forward
 *   substitution (Golub and Van Loan 2013, section 3.1).
 */
export function inverseFromCholesky(l: Float64Array, n: number): Float64Array {
  checkSquare(l, n);
  const linv = new Float64Array(n * n);
  const e = new Float64Array(n);
  const col = new Float64Array(n);
  for (let j = 0; j < n; j++) {
    e.fill(0);
    e[j] = 1;
    solveLower(l, e, n, col);
    for (let i = 0; i < n; i++) linv[i * n + j] = col[i]!;
  }
  const inv = new Float64Array(n * n);
  for (let i = 0; i < n; i++) {
    for (let j = 0; j <= i; j++) {
      let s = 0;
      for (let k = i; k < n; k++) s += linv[k * n + i]! * linv[k * n + j]!;
      inv[i * n + j] = s;
      inv[j * n + i] = s;
    }
  }
  return inv;
}

/** Inverse of a symmetric positive-definite matrix, or `null` if it is not positive definite. */
export function inverseSpd(a: Float64Array, n: number): Float64Array | null {
  const l = cholesky(a, n);
  return l === null ? null : inverseFromCholesky(l, n);
}

/** (A + A^T) / 2 as a new matrix. */
export function symmetrize(a: Float64Array, n: number): Float64Array {
  checkSquare(a, n);
  const out = new Float64Array(n * n);
  for (let i = 0; i < n; i++) {
    for (let j = 0; j < n; j++) out[i * n + j] = 0.5 * (a[i * n + j]! + a[j * n + i]!);
  }
  return out;
}

/**
 * Eigen-decomposition of a symmetric matrix by the cyclic Jacobi method: A = V diag(values) V^T,
 * eigenvalues ascending, eigenvector k in column k of `vectors` (row-major n x n).
 *
 * @remarks Each rotation zeroes one off-diagonal pair with t = sign(tau) / (|tau| +
 *   sqrt(1 + tau^2)), tau = (a_qq - a_pp) / (2 a_pq); sweeps repeat until the off-diagonal
 *   mass is below machine precision relative to the whole matrix. Golub and Van Loan (2013),
 *   section 8.5.2 ("The cyclic-by-row algorithm"). Quadratic convergence; fine up to a few
 *   hundred dimensions.
 * @example symmetricEigen([2,1, 1,2], 2).values is [1, 3].
 */
export function symmetricEigen(
  a: Float64Array,
  n: number,
): { values: Float64Array; vectors: Float64Array } {
  const m = symmetrize(a, n);
  const v = new Float64Array(n * n);
  for (let i = 0; i < n; i++) v[i * n + i] = 1;
  let total = 0;
  for (let i = 0; i < n * n; i++) total += m[i]! * m[i]!;
  if (!Number.isFinite(total)) throw new RangeError('symmetricEigen: matrix has a non-finite entry');
  for (let sweep = 0; sweep < 100; sweep++) {
    let off = 0;
    for (let p = 0; p < n; p++) for (let q = p + 1; q < n; q++) off += m[p * n + q]! ** 2;
    if (off <= 1e-32 * total || off === 0) break;
    for (let p = 0; p < n - 1; p++) {
      for (let q = p + 1; q < n; q++) {
        const apq = m[p * n + q]!;
        if (apq === 0) continue;
        const tau = (m[q * n + q]! - m[p * n + p]!) / (2 * apq);
        const t = (tau >= 0 ? 1 : -1) / (Math.abs(tau) + Math.sqrt(1 + tau * tau));
        const c = 1 / Math.sqrt(1 + t * t);
        const s = t * c;
        for (let k = 0; k < n; k++) {
          const mkp = m[k * n + p]!;
          const mkq = m[k * n + q]!;
          m[k * n + p] = c * mkp - s * mkq;
          m[k * n + q] = s * mkp + c * mkq;
        }
        for (let k = 0; k < n; k++) {
          const mpk = m[p * n + k]!;
          const mqk = m[q * n + k]!;
          m[p * n + k] = c * mpk - s * mqk;
          m[q * n + k] = s * mpk + c * mqk;
        }
        for (let k = 0; k < n; k++) {
          const vkp = v[k * n + p]!;
          const vkq = v[k * n + q]!;
          v[k * n + p] = c * vkp - s * vkq;
          v[k * n + q] = s * vkp + c * vkq;
        }
      }
    }
  }
  const order = Array.from({ length: n }, (_, i) => i).sort(
    (i, j) => m[i * n + i]! - m[j * n + j]! || i - j,
  );
  const values = new Float64Array(n);
  const vectors = new Float64Array(n * n);
  order.forEach((src, dst) => {
    values[dst] = m[src * n + src]!;
    for (let k = 0; k < n; k++) vectors[k * n + dst] = v[k * n + src]!;
  });
  return { values, vectors };
}

/**
 * A positive-definite version of the symmetric matrix A (its symmetric part is used).
 * If A already has a Cholesky factor it is returned unchanged (as a copy, `adjusted: false`).
 * Otherwise each eigenvalue lambda is replaced by max(|lambda|, floor) with
 * floor = `minRelativeEigenvalue` * max|lambda|, and the matrix rebuilt as V diag V^T
 * (`adjusted: true`). Returns `null` when every eigenvalue is zero or an entry is not finite.
 *
 * @remarks Eigenvalue modification of an indefinite Hessian, as in modified Newton methods:
 *   Nocedal and Wright (2006), "Numerical Optimization", 2nd ed., section 3.4 (from memory).
 *   Flipping the sign rather than clipping to the floor keeps the curvature's magnitude, so a
 *   saddle direction gets a width on the scale of the data rather than an arbitrary huge one.
 */
export function makePositiveDefinite(
  a: Float64Array,
  n: number,
  minRelativeEigenvalue = 1e-8,
): { matrix: Float64Array; adjusted: boolean } | null {
  const sym = symmetrize(a, n);
  for (let i = 0; i < n * n; i++) if (!Number.isFinite(sym[i]!)) return null;
  if (cholesky(sym, n) !== null) return { matrix: sym, adjusted: false };
  const { values, vectors } = symmetricEigen(sym, n);
  let maxAbs = 0;
  for (let k = 0; k < n; k++) maxAbs = Math.max(maxAbs, Math.abs(values[k]!));
  if (!(maxAbs > 0)) return null;
  const floor = minRelativeEigenvalue * maxAbs;
  const fixed = values.map((lambda) => Math.max(Math.abs(lambda), floor));
  const matrix = new Float64Array(n * n);
  for (let i = 0; i < n; i++) {
    for (let j = 0; j <= i; j++) {
      let s = 0;
      for (let k = 0; k < n; k++) s += vectors[i * n + k]! * fixed[k]! * vectors[j * n + k]!;
      matrix[i * n + j] = s;
      matrix[j * n + i] = s;
    }
  }
  return { matrix, adjusted: true };
}

function checkSquare(a: Float64Array, n: number): void {
  if (!Number.isInteger(n) || n < 1 || a.length !== n * n) {
    throw new RangeError(`expected a ${n} x ${n} matrix (length ${n * n}), got length ${a.length}`);
  }
}
