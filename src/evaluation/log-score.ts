/**
 * The log score of a count forecast made of posterior draws, each with its own
 * negative-binomial observation model.
 */
import { negBinLogPmf } from '../model/observation.js';

/**
 * Negatively oriented log score -ln p(y) of the predictive distribution that mixes, with equal
 * weights, one negative binomial per draw: p(y) = (1/n) sum_d NB(y; mean mu_d, dispersion
 * phi_d). Lower is better. Exact for the draws (no kernel, no binning): the forecast's
 * predictive distribution of a count is that mixture. Draws whose mean is NaN (a failed
 * trajectory) are left out; Infinity when no draw gives y any probability; NaN when no draw is
 * left or y is NaN.
 *
 * @remarks
 * Logarithmic score (Good 1952; Gneiting and Raftery 2007, JASA 102(477), section 4.1), with
 * the sign that makes it a loss, as for the other scores here. The mixture is summed in the log
 * domain (log-sum-exp), so it neither underflows for far-off outcomes nor overflows.
 */
export function negBinMixtureLogScore(y: number, mu: ArrayLike<number>, phi: ArrayLike<number>): number {
  if (Number.isNaN(y)) return NaN;
  const n = mu.length;
  let max = -Infinity;
  let kept = 0;
  const logs = new Float64Array(n);
  for (let d = 0; d < n; d++) {
    if (Number.isNaN(mu[d])) {
      logs[d] = NaN;
      continue;
    }
    kept++;
    const lp = negBinLogPmf(y, mu[d], phi[d]);
    logs[d] = lp;
    if (lp > max) max = lp;
  }
  if (kept === 0) return NaN;
  if (max === -Infinity) return Infinity;
  let sum = 0;
  for (let d = 0; d < n; d++) if (!Number.isNaN(logs[d])) sum += Math.exp(logs[d] - max);
  return -(max + Math.log(sum / kept));
}
