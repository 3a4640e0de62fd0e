/**
 * Nowcast (MODEL.md section 5): for each of the last Dmax onset days, the onsets that have
 * happened, the reports they will eventually give, the share of those already seen by the last
 * observed day, and the reports still to come, for every posterior draw.
 *
 * @remarks
 * Onsets of day t give reports on days t + d with probability p_d (d = 0..Dmax), times the
 * ascertainment rho and the weekday multiplier of the report day (MODEL.md section 3). The
 * eventual reports of day t have mean lambda_t = rho onsets_t sum_d p_d w_{t+d}; those already
 * seen by the last day T - 1 are the terms with d <= T - 1 - t.
 *
 * Without a reporting triangle the reports by onset day are not observed: reports_seen is the
 * model's expected value, reported_share the model's share, and reports_still to come are drawn
 * as negative binomial with the model's dispersion phi around their mean (the gamma-Poisson
 * mixture of MODEL.md section 3, applied per onset day).
 *
 * With a triangle the seen count n_t is observed and the share F_t = F(T - 1 - t) comes from the
 * observed delays (model/observed-delay.ts), one posterior draw of F per posterior draw. The
 * eventual reports of day t are Poisson with a gamma-distributed mean Lambda_t (shape phi,
 * mean lambda_t: the model's own prediction), of which n_t ~ Poisson(Lambda_t F_t) are seen and
 * the rest ~ Poisson(Lambda_t (1 - F_t)) independently given Lambda_t (thinning of a Poisson
 * count). Conjugacy gives Lambda_t | n_t ~ Gamma(phi + n_t, rate phi / lambda_t + F_t), from
 * which the rest is drawn (Gelman et al., Bayesian Data Analysis, 3rd ed., section 2.6, the
 * gamma-Poisson model; from memory).
 */
import type { EpidemicModel } from '../model/posterior.js';
import { toNatural } from '../model/layout.js';
import { drawNegBin } from '../model/trajectory.js';
import { delayEvidence, drawDelayCdf, type TriangleCounts } from '../model/observed-delay.js';
import { createRng, deriveSeed } from '../util/rng.js';
import { weekdayMultipliers } from '../model/derived.js';
import { column, summarizeDraws, type LongRow } from './draw-summary.js';

export const STREAM_NOWCAST = 0xf0cc;

export const NOWCAST_QUANTITIES = ['onsets', 'eventual_reports', 'reports_seen', 'reports_to_come', 'reported_share'] as const;
export type NowcastQuantity = (typeof NOWCAST_QUANTITIES)[number];

export interface NowcastDraws {
  /** observed-day index of the first nowcast day */
  first: number;
  days: number;
  draws: number;
  /** per quantity, draws x days (row-major) */
  values: Record<NowcastQuantity, Float64Array>;
  /** per quantity, one value per draw over the whole window (reported_share: seen / eventual) */
  totals: Record<NowcastQuantity, Float64Array>;
  /** whether the shares come from an observed reporting triangle */
  observedDelays: boolean;
}

/**
 * The nowcast for every draw. `onsets` is the draws x T matrix of daily onsets on the observed
 * days (derived.ts); `triangle`, when given, must be aligned on the same days.
 */
export function nowcastDraws(
  model: EpidemicModel,
  draws: Float64Array,
  onsets: Float64Array,
  firstWeekday: number,
  seed: number,
  triangle: TriangleCounts | null,
): NowcastDraws {
  const dim = model.layout.dim;
  const n = draws.length / dim;
  const T = model.days;
  const p = model.delay;
  const D = p.length - 1;
  const W = Math.min(D, T);
  const first = T - W;
  const values = Object.fromEntries(NOWCAST_QUANTITIES.map((q) => [q, new Float64Array(n * W)])) as Record<NowcastQuantity, Float64Array>;
  const totals = Object.fromEntries(NOWCAST_QUANTITIES.map((q) => [q, new Float64Array(n)])) as Record<NowcastQuantity, Float64Array>;
  const evidence = triangle === null ? null : delayEvidence(triangle);
  const seenCounts = new Float64Array(W);
  if (triangle !== null) {
    if (triangle.maxDelay !== D || triangle.lastDay !== T - 1) throw new RangeError('nowcastDraws: the triangle is not aligned on the model');
    for (let j = 0; j < W; j++) {
      const r = first + j - triangle.firstOnset;
      if (r < 0) continue;
      for (let k = 0; k <= D; k++) seenCounts[j] += triangle.counts[r * (D + 1) + k];
    }
  }
  const cdf = new Float64Array(D + 1);
  for (let d = 0; d < n; d++) {
    const par = toNatural(model.layout, draws.subarray(d * dim, (d + 1) * dim));
    const wd = weekdayMultipliers(par.weekday);
    const rng = createRng(deriveSeed(seed, STREAM_NOWCAST, d));
    if (evidence !== null) drawDelayCdf(rng, evidence, cdf);
    let sumOnsets = 0;
    let sumEventual = 0;
    let sumSeen = 0;
    let sumRest = 0;
    for (let j = 0; j < W; j++) {
      const t = first + j;
      const u = T - 1 - t; // longest delay already seen
      let seenFactor = 0;
      let restFactor = 0;
      for (let k = 0; k <= D; k++) {
        const w = wd === null ? 1 : wd[(firstWeekday + t + k) % 7];
        if (k <= u) seenFactor += p[k] * w;
        else restFactor += p[k] * w;
      }
      const o = onsets[d * T + t];
      const scale = par.ascertainment * o;
      let seen: number;
      let rest: number;
      let share: number;
      if (evidence === null) {
        seen = scale * seenFactor;
        rest = drawNegBin(rng, scale * restFactor, par.dispersion);
        share = seenFactor / (seenFactor + restFactor);
      } else {
        share = cdf[Math.min(u, D)];
        seen = seenCounts[j];
        const lambda = scale * (seenFactor + restFactor);
        // Lambda | seen ~ Gamma(phi + seen, rate phi / lambda + F); should the model give no
        // mean at all (no onsets), the limit phi / lambda -> infinity leaves Lambda = 0
        const Lambda = lambda > 0 ? rng.gamma(par.dispersion + seen, par.dispersion / lambda + share) : 0;
        rest = Lambda > 0 && share < 1 ? rng.poisson(Lambda * (1 - share)) : 0;
      }
      const idx = d * W + j;
      values.onsets[idx] = o;
      values.reports_seen[idx] = seen;
      values.reports_to_come[idx] = rest;
      values.eventual_reports[idx] = seen + rest;
      values.reported_share[idx] = share;
      sumOnsets += o;
      sumSeen += seen;
      sumRest += rest;
      sumEventual += seen + rest;
    }
    totals.onsets[d] = sumOnsets;
    totals.reports_seen[d] = sumSeen;
    totals.reports_to_come[d] = sumRest;
    totals.eventual_reports[d] = sumEventual;
    totals.reported_share[d] = sumEventual > 0 ? sumSeen / sumEventual : NaN;
  }
  return { first, days: W, draws: n, values, totals, observedDelays: evidence !== null };
}

/**
 * Rows of nowcast.csv: every quantity on every nowcast date (onset dates), then the whole
 * window with an empty date.
 */
export function nowcastRows(nc: NowcastDraws, dates: readonly string[], levels: readonly number[]): LongRow[] {
  const rows: LongRow[] = [];
  const col = new Float64Array(nc.draws);
  for (const q of NOWCAST_QUANTITIES) {
    for (let j = 0; j < nc.days; j++) {
      column(nc.values[q], nc.days, j, col);
      rows.push({ keys: [q, dates[nc.first + j]!], summary: summarizeDraws(col, levels) });
    }
    rows.push({ keys: [q, ''], summary: summarizeDraws(nc.totals[q], levels) });
  }
  return rows;
}
