/**
 * Random walk on log beta over knots (MODEL.md section 2).
 *
 * @remarks
 * log beta_0 = log(R_start / D); w_0 = 0, w_k = w_{k-1} + sigma z_k (non-centred);
 * log beta(day s) = log beta_0 + w_{k(s)}, with k(s) = floor(s / knot_days) for the
 * piecewise-constant walk, or linear interpolation of w between knot days k * knot_days
 * (held flat after the last knot).
 */

/** Number of knots covering `days` simulated days: ceil(days / knotDays). */
export function knotCount(days: number, knotDays: number): number {
  return Math.ceil(days / knotDays);
}

/**
 * Fills `walk[0..K-1]` with the knot values w_k of the walk from the standardised steps
 * `steps[offset .. offset + K - 2]` (z_1..z_{K-1}).
 */
export function fillWalk(
  sigma: number,
  steps: ArrayLike<number>,
  offset: number,
  knots: number,
  walk: Float64Array,
): void {
  let w = 0;
  walk[0] = 0;
  for (let k = 1; k < knots; k++) {
    w += sigma * steps[offset + k - 1];
    walk[k] = w;
  }
}

/**
 * Fills `out[0..days-1]` with beta(s) / N from the knot values of the walk.
 * `linear` selects linear interpolation of the walk between knot days.
 */
export function fillBetaOverN(
  logBeta0: number,
  walk: Float64Array,
  knots: number,
  knotDays: number,
  linear: boolean,
  invN: number,
  days: number,
  out: Float64Array,
): void {
  if (!linear) {
    let s = 0;
    for (let k = 0; k < knots && s < days; k++) {
      const b = Math.exp(logBeta0 + walk[k]) * invN;
      const end = Math.min(days, s + knotDays);
      for (; s < end; s++) out[s] = b;
    }
    // days past the last knot (forecasts) keep the last knot's value
    const last = Math.exp(logBeta0 + walk[knots - 1]) * invN;
    for (; s < days; s++) out[s] = last;
    return;
  }
  for (let s = 0; s < days; s++) {
    const k = Math.floor(s / knotDays);
    let w: number;
    if (k + 1 < knots) {
      const frac = (s - k * knotDays) / knotDays;
      w = walk[k] + frac * (walk[k + 1] - walk[k]);
    } else {
      w = walk[knots - 1];
    }
    out[s] = Math.exp(logBeta0 + w) * invN;
  }
}
