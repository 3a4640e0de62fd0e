/**
 * growth.csv: the exponential growth rate r(t) and the doubling or halving time per observed
 * date (MODEL.md section 5), summarised over the draws.
 *
 * @remarks
 * r(t) is the root of R_eff = r D (1 + r L/m)^m / (1 - (1 + r D/n)^(-n)) for each draw and day
 * (Wallinga and Lipsitch 2007; model/growth.ts solves it with a bracketed, safeguarded Newton
 * method). The doubling time ln 2 / r is defined for a growing draw and the halving time
 * ln 2 / |r| for a declining one; a draw that does not grow never doubles, so its doubling
 * time is infinite (and likewise for halving). Both are monotone in r, so their quantiles are
 * the transformed quantiles of r: a 90% interval of the doubling time whose upper end is Inf
 * says that more than 5% of the draws do not grow.
 */
import { column, doublingOf, halvingOf, summarizeDraws, type LongRow } from './draw-summary.js';

export const GROWTH_QUANTITIES = ['growth_rate', 'doubling_time', 'halving_time'] as const;

/** Rows of growth.csv from a draws x days matrix of growth rates. */
export function growthRows(growth: Float64Array, dates: readonly string[], levels: readonly number[]): LongRow[] {
  const T = dates.length;
  const n = growth.length / T;
  const r = new Float64Array(n);
  const doubling = new Float64Array(n);
  const halving = new Float64Array(n);
  const rows: Record<(typeof GROWTH_QUANTITIES)[number], LongRow[]> = { growth_rate: [], doubling_time: [], halving_time: [] };
  for (let t = 0; t < T; t++) {
    column(growth, T, t, r);
    for (let d = 0; d < n; d++) {
      doubling[d] = doublingOf(r[d]);
      halving[d] = halvingOf(r[d]);
    }
    rows.growth_rate.push({ keys: ['growth_rate', dates[t]!], summary: summarizeDraws(r, levels) });
    rows.doubling_time.push({ keys: ['doubling_time', dates[t]!], summary: summarizeDraws(doubling, levels) });
    rows.halving_time.push({ keys: ['halving_time', dates[t]!], summary: summarizeDraws(halving, levels) });
  }
  return GROWTH_QUANTITIES.flatMap((q) => rows[q]);
}
