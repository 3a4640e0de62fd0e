/**
 * The onset-to-report delay as observed in a reporting triangle (counts by onset day and
 * delay), for nowcasts that use the observed delays directly.
 *
 * @remarks
 * The last rows of a triangle are right-truncated: onsets of day s are seen only up to delay
 * u_s = last - s. Conditioning on what can be seen, the likelihood factorises over the
 * reverse-time conditional probabilities q_k = P(delay = k | delay <= k), k = 1..Dmax:
 *
 *     P(delay = d | delay <= u) = q_d * prod_{k = d+1..u} (1 - q_k),   q_0 = 1,
 *
 * so q_k meets B_k "successes" (reports at delay k from onset days with u_s >= k) against A_k
 * "failures" (reports at delays below k from the same onset days), a binomial likelihood for
 * each k apart (the reverse-time hazard of Kalbfleisch and Lawless 1991, J Am Stat Assoc 86,
 * and Lawless 1994, Canadian Journal of Statistics 22, for reporting delays; from memory). With
 * independent Jeffreys priors Beta(1/2, 1/2) each q_k has the posterior Beta(B_k + 1/2,
 * A_k + 1/2), and the delay distribution function follows as F(Dmax) = 1,
 * F(k - 1) = F(k) (1 - q_k). The point estimate q_k = B_k / (A_k + B_k) gives the chain-ladder
 * development factors F(k) / F(k - 1) of actuarial reserving.
 */
import type { Rng } from '../util/rng.js';

/** Counts of a reporting triangle aligned on the observed days (day 0 = first observed day). */
export interface TriangleCounts {
  /** longest delay, Dmax */
  maxDelay: number;
  /** day index of the first onset row (negative for onsets before the first observed day) */
  firstOnset: number;
  /** day index of the last report day (T - 1): nothing later can have been seen */
  lastDay: number;
  /** (lastDay - firstOnset + 1) rows x (maxDelay + 1) counts, row-major; zero where unseen */
  counts: Float64Array;
}

/** The evidence on each q_k, k = 1..Dmax (index k; index 0 unused). */
export interface DelayEvidence {
  /** B_k: reports at delay k from onset days that can show delay k */
  atDelay: Float64Array;
  /** A_k: reports at delays below k from the same onset days */
  belowDelay: Float64Array;
}

export const JEFFREYS = 0.5;

export function delayEvidence(tri: TriangleCounts): DelayEvidence {
  const D = tri.maxDelay;
  const width = D + 1;
  const rows = tri.lastDay - tri.firstOnset + 1;
  const atDelay = new Float64Array(D + 1);
  const belowDelay = new Float64Array(D + 1);
  for (let r = 0; r < rows; r++) {
    const u = tri.lastDay - (tri.firstOnset + r);
    let below = 0;
    for (let k = 0; k <= Math.min(u, D); k++) {
      const c = tri.counts[r * width + k];
      if (k >= 1) {
        atDelay[k] += c;
        belowDelay[k] += below;
      }
      below += c;
    }
  }
  return { atDelay, belowDelay };
}

/** Delays k whose q_k the triangle says nothing about (no report at delay <= k from onset days that can show k). */
export function uninformedDelays(ev: DelayEvidence): number[] {
  const out: number[] = [];
  for (let k = 1; k < ev.atDelay.length; k++) if (ev.atDelay[k] + ev.belowDelay[k] === 0) out.push(k);
  return out;
}

/** F(0..Dmax) from the conditional probabilities q_1..q_Dmax (q[0] unused). */
export function cdfFromConditionals(q: ArrayLike<number>, out: Float64Array): Float64Array {
  const D = out.length - 1;
  out[D] = 1;
  for (let k = D; k >= 1; k--) out[k - 1] = out[k] * (1 - q[k]);
  return out;
}

/** The chain-ladder point estimate of F(0..Dmax): q_k = B_k / (A_k + B_k). */
export function chainLadderCdf(ev: DelayEvidence): Float64Array {
  const D = ev.atDelay.length - 1;
  const q = new Float64Array(D + 1);
  for (let k = 1; k <= D; k++) {
    const total = ev.atDelay[k] + ev.belowDelay[k];
    q[k] = total > 0 ? ev.atDelay[k] / total : NaN;
  }
  return cdfFromConditionals(q, new Float64Array(D + 1));
}

/** One draw of F(0..Dmax) from the posterior (independent Beta(B_k + 1/2, A_k + 1/2) for q_k). */
export function drawDelayCdf(rng: Rng, ev: DelayEvidence, out: Float64Array): Float64Array {
  const D = ev.atDelay.length - 1;
  const q = new Float64Array(D + 1);
  for (let k = 1; k <= D; k++) {
    // Beta(a, b) as X / (X + Y), X ~ Gamma(a), Y ~ Gamma(b) (a standard identity)
    const x = rng.gamma(ev.atDelay[k] + JEFFREYS, 1);
    const y = rng.gamma(ev.belowDelay[k] + JEFFREYS, 1);
    q[k] = x + y > 0 ? x / (x + y) : 0.5;
  }
  return cdfFromConditionals(q, out);
}
