import { describe, expect, it } from 'vitest';
import {
  cholesky,
  choleskyWithJitter,
  inverseSpd,
  lowerTriangularMultiply,
  makePositiveDefinite,
  solveLower,
  symmetricEigen,
  symmetrize,
} from '../../src/inference/linalg.js';

const f64 = (a: number[]) => Float64Array.from(a);

function matmul(a: Float64Array, b: Float64Array, n: number): Float64Array {
  const c = new Float64Array(n * n);
  for (let i = 0; i < n; i++) for (let j = 0; j < n; j++) for (let k = 0; k < n; k++) c[i * n + j] += a[i * n + k]! * b[k * n + j]!;
  return c;
}
function transpose(a: Float64Array, n: number): Float64Array {
  const t = new Float64Array(n * n);
  for (let i = 0; i < n; i++) for (let j = 0; j < n; j++) t[j * n + i] = a[i * n + j]!;
  return t;
}
function expectClose(a: ArrayLike<number>, b: ArrayLike<number>, tol: number): void {
  expect(a.length).toBe(b.length);
  for (let i = 0; i < a.length; i++) expect(Math.abs(a[i]! - b[i]!), `entry ${i}: ${a[i]} vs ${b[i]}`).toBeLessThanOrEqual(tol);
}

describe('cholesky', () => {
  it('factors the textbook 3 x 3 example exactly', () => {
    // Worked example: A = [[4,12,-16],[12,37,-43],[-16,-43,98]] = L L^T with
    // L = [[2,0,0],[6,1,0],[-8,5,3]] (Cholesky decomposition article, Wikipedia; from memory).
    const l = cholesky(f64([4, 12, -16, 12, 37, -43, -16, -43, 98]), 3);
    expect(Array.from(l!)).toEqual([2, 0, 0, 6, 1, 0, -8, 5, 3]);
  });

  it('returns null for an indefinite matrix and for a non-finite entry', () => {
    expect(cholesky(f64([1, 2, 2, 1]), 2)).toBeNull();
    expect(cholesky(f64([1, 0, 0, NaN]), 2)).toBeNull();
    expect(cholesky(f64([Infinity, 0, 0, 1]), 2)).toBeNull();
  });

  it('rejects a matrix of the wrong size', () => {
    expect(() => cholesky(f64([1, 2, 3]), 2)).toThrow(RangeError);
  });
});

describe('choleskyWithJitter', () => {
  it('factors a singular positive semi-definite matrix after a tiny diagonal jitter', () => {
    const a = f64([1, 1, 1, 1]);
    expect(cholesky(a, 2)).toBeNull();
    const l = choleskyWithJitter(a, 2)!;
    expectClose(matmul(l, transpose(l, 2), 2), a, 1e-6);
  });

  it('gives up (null) on a clearly indefinite matrix', () => {
    expect(choleskyWithJitter(f64([1, 2, 2, 1]), 2)).toBeNull();
  });
});

describe('lowerTriangularMultiply and solveLower', () => {
  it('are inverse to each other', () => {
    const l = cholesky(f64([4, 12, -16, 12, 37, -43, -16, -43, 98]), 3)!;
    const z = f64([0.3, -1.7, 2.5]);
    const lz = lowerTriangularMultiply(l, z, 3, new Float64Array(3));
    // L z by hand: [2*0.3, 6*0.3 - 1.7, -8*0.3 - 5*1.7 + 3*2.5]
    expectClose(lz, [0.6, 0.1, -3.4], 1e-12);
    expectClose(solveLower(l, lz, 3, new Float64Array(3)), z, 1e-12);
  });
});

describe('inverseSpd', () => {
  it('inverts [[2,1],[1,2]] to [[2,-1],[-1,2]] / 3', () => {
    // 2 x 2 inverse: [[a,b],[b,d]]^-1 = [[d,-b],[-b,a]] / (ad - b^2)
    expectClose(inverseSpd(f64([2, 1, 1, 2]), 2)!, [2 / 3, -1 / 3, -1 / 3, 2 / 3], 1e-15);
  });

  it('gives A A^-1 = I for the 3 x 3 example', () => {
    const a = f64([4, 12, -16, 12, 37, -43, -16, -43, 98]);
    expectClose(matmul(a, inverseSpd(a, 3)!, 3), [1, 0, 0, 0, 1, 0, 0, 0, 1], 1e-10);
  });

  it('returns null when not positive definite', () => {
    expect(inverseSpd(f64([1, 2, 2, 1]), 2)).toBeNull();
  });
});

describe('symmetricEigen', () => {
  it('finds the eigenvalues 2 - 2 cos(k pi / (n + 1)) of the second-difference matrix', () => {
    // tridiag(-1, 2, -1) of order n has eigenvalues 2 - 2 cos(k pi / (n + 1)), k = 1..n
    // (Strang, "Introduction to Applied Mathematics" 1986, section 1.5; from memory).
    const n = 7;
    const a = new Float64Array(n * n);
    for (let i = 0; i < n; i++) {
      a[i * n + i] = 2;
      if (i > 0) a[i * n + i - 1] = a[(i - 1) * n + i] = -1;
    }
    const { values, vectors } = symmetricEigen(a, n);
    const expected = Array.from({ length: n }, (_, k) => 2 - 2 * Math.cos(((k + 1) * Math.PI) / (n + 1)));
    expectClose(values, expected, 1e-12);
    // V orthonormal and V diag V^T = A
    expectClose(matmul(transpose(vectors, n), vectors, n), makeIdentity(n), 1e-12);
    const d = new Float64Array(n * n);
    for (let k = 0; k < n; k++) d[k * n + k] = values[k]!;
    expectClose(matmul(matmul(vectors, d, n), transpose(vectors, n), n), a, 1e-12);
  });

  it('returns [1, 3] for [[2,1],[1,2]]', () => {
    expectClose(symmetricEigen(f64([2, 1, 1, 2]), 2).values, [1, 3], 1e-15);
  });
});

describe('makePositiveDefinite', () => {
  it('leaves a positive-definite matrix as it is', () => {
    const r = makePositiveDefinite(f64([2, 1, 1, 2]), 2)!;
    expect(r.adjusted).toBe(false);
    expect(Array.from(r.matrix)).toEqual([2, 1, 1, 2]);
  });

  it('flips the negative eigenvalue of [[1,2],[2,1]], giving [[2,1],[1,2]]', () => {
    // eigenpairs 3 (1,1)/sqrt2 and -1 (1,-1)/sqrt2; |eigenvalues| 3 and 1 rebuild [[2,1],[1,2]]
    const r = makePositiveDefinite(f64([1, 2, 2, 1]), 2)!;
    expect(r.adjusted).toBe(true);
    expectClose(r.matrix, [2, 1, 1, 2], 1e-12);
  });

  it('floors a zero eigenvalue at the relative floor', () => {
    const r = makePositiveDefinite(f64([1, 0, 0, 0]), 2, 1e-6)!;
    expect(r.adjusted).toBe(true);
    expectClose(r.matrix, [1, 0, 0, 1e-6], 1e-18);
  });

  it('returns null for the zero matrix and for a non-finite entry', () => {
    expect(makePositiveDefinite(f64([0, 0, 0, 0]), 2)).toBeNull();
    expect(makePositiveDefinite(f64([1, NaN, NaN, 1]), 2)).toBeNull();
  });
});

describe('symmetrize', () => {
  it('averages A and its transpose', () => {
    expect(Array.from(symmetrize(f64([1, 2, 4, 3]), 2))).toEqual([1, 3, 3, 3]);
  });
});

function makeIdentity(n: number): Float64Array {
  const m = new Float64Array(n * n);
  for (let i = 0; i < n; i++) m[i * n + i] = 1;
  return m;
}
