/**
 * The continuous ranked probability score of a predictive distribution given by samples.
 */

/**
 * CRPS of the empirical distribution of `sorted` (ascending samples) at the outcome `y`;
 * lower is better, in the units of the outcome. NaN when there are no samples or `y` is NaN.
 *
 * @remarks
 * CRPS(F, y) = E|X - y| - (1/2) E|X - X'| with X, X' independent draws from F (Gneiting and
 * Raftery 2007, "Strictly proper scoring rules, prediction, and estimation", JASA 102(477),
 * equation 21). For the empirical distribution of n sorted samples x_(1) <= ... <= x_(n),
 * E|X - X'| = (2 / n^2) sum_i (2i - n - 1) x_(i), so after sorting (O(n log n)) the score takes
 * one pass. This is the score of the samples' own distribution (the "n^2" form), the
 * predictive distribution a forecast from draws states; it exceeds the score of the
 * distribution the samples come from by E|X - X'| / (2n) on average.
 *
 * @example crpsSorted([0, 1], 0) === 0.25  // E|X - 0| = 0.5, E|X - X'| = 0.5
 */
export function crpsSorted(sorted: ArrayLike<number>, y: number): number {
  const n = sorted.length;
  if (n === 0 || Number.isNaN(y)) return NaN;
  let absError = 0;
  let spread = 0;
  for (let i = 0; i < n; i++) {
    const x = sorted[i];
    absError += Math.abs(x - y);
    spread += (2 * (i + 1) - n - 1) * x;
  }
  return absError / n - spread / (n * n);
}

/** {@link crpsSorted} of unsorted samples (a sorted copy is made). */
export function crpsFromSamples(samples: ArrayLike<number>, y: number): number {
  return crpsSorted(Float64Array.from(samples).sort(), y);
}
