/**
 * Mixing plots for one parameter: the trace of every chain, and the rank plot (Vehtari,
 * Gelman, Simpson, Carpenter and Buerkner 2021, "Rank-normalization, folding, and
 * localization: an improved R-hat", Bayesian Analysis 16(2), section 4.3): the draws of all
 * chains are ranked together, and each chain's ranks are binned. Chains that sample the same
 * distribution give flat histograms at the height total / (chains x bins); a chain stuck in
 * one region shows as a slope or a bump.
 */
import type { ChartSpec } from '../render.js';
import { CHAIN_COLOURS, CHART_CONFIG, COLOURS, SIZE } from '../theme.js';

/**
 * Ranks of values among themselves, 1..n, ties given their average rank (common practice;
 * the ranking of Vehtari et al. 2021 before normalisation).
 */
export function averageRanks(values: ArrayLike<number>): Float64Array {
  const n = values.length;
  const order = Array.from({ length: n }, (_, i) => i).sort((a, b) => values[a] - values[b]);
  const ranks = new Float64Array(n);
  let i = 0;
  while (i < n) {
    let j = i;
    while (j + 1 < n && values[order[j + 1]] === values[order[i]]) j++;
    const r = (i + j) / 2 + 1;
    for (let k = i; k <= j; k++) ranks[order[k]] = r;
    i = j + 1;
  }
  return ranks;
}

export interface RankBin {
  chain: number;
  /** 0-based bin number */
  bin: number;
  count: number;
}

/**
 * Rank histogram per chain: pooled ranks (1..n) cut into `bins` equal-width bins over
 * [0.5, n + 0.5], counted per chain.
 */
export function rankHistogram(values: ArrayLike<number>, chain: ArrayLike<number>, bins: number): { bins: RankBin[]; expected: number } {
  const n = values.length;
  const ranks = averageRanks(values);
  const chains = [...new Set(Array.from(chain))].sort((a, b) => a - b);
  const counts = new Map(chains.map((c) => [c, new Array<number>(bins).fill(0)]));
  for (let i = 0; i < n; i++) {
    const b = Math.min(bins - 1, Math.floor(((ranks[i] - 0.5) / n) * bins));
    counts.get(chain[i])![b] += 1;
  }
  const out: RankBin[] = [];
  for (const c of chains) counts.get(c)!.forEach((count, bin) => out.push({ chain: c, bin, count }));
  return { bins: out, expected: n / (chains.length * bins) };
}

/** Number of rank bins for `perChain` draws per chain: about 20, fewer for short chains. */
export function rankBinCount(perChain: number): number {
  return Math.max(4, Math.min(20, Math.floor(perChain / 10)));
}

function chainScale(chains: readonly number[]): Record<string, unknown> {
  return { domain: chains.map(String), range: chains.map((_, i) => CHAIN_COLOURS[i % CHAIN_COLOURS.length]) };
}

/** Trace plot: value against draw number, one line per chain. */
export function traceSpec(name: string, values: ArrayLike<number>, chain: ArrayLike<number>): ChartSpec {
  const draws: Array<{ chain: string; draw: number; value: number }> = [];
  const seen = new Map<number, number>();
  for (let i = 0; i < values.length; i++) {
    const k = (seen.get(chain[i]) ?? 0) + 1;
    seen.set(chain[i], k);
    draws.push({ chain: String(chain[i]), draw: k, value: values[i] });
  }
  const chains = [...seen.keys()].sort((a, b) => a - b);
  return {
    description: `trace of ${name}`,
    width: SIZE.half.width,
    height: SIZE.small.height,
    config: CHART_CONFIG,
    data: { values: draws },
    mark: { type: 'line', strokeWidth: 0.7, opacity: 0.8 },
    encoding: {
      x: { field: 'draw', type: 'quantitative', title: 'kept draw', axis: { tickCount: 5 } },
      y: { field: 'value', type: 'quantitative', title: name, scale: { zero: false } },
      color: { field: 'chain', type: 'nominal', scale: chainScale(chains), legend: null },
    },
  } as unknown as ChartSpec;
}

/** Rank plot: per chain, the binned ranks as a step line, the flat expectation dashed. */
export function rankSpec(name: string, values: ArrayLike<number>, chain: ArrayLike<number>, bins: number): ChartSpec {
  const h = rankHistogram(values, chain, bins);
  const chains = [...new Set(h.bins.map((b) => b.chain))];
  // a closing point per chain so the last bin's step is drawn to the right edge
  const rows = h.bins.map((b) => ({ chain: String(b.chain), x: b.bin, count: b.count }));
  for (const c of chains) {
    const last = h.bins.filter((b) => b.chain === c).at(-1)!;
    rows.push({ chain: String(c), x: bins, count: last.count });
  }
  return {
    description: `rank plot of ${name}`,
    width: SIZE.small.width,
    height: SIZE.small.height,
    config: CHART_CONFIG,
    layer: [
      {
        data: { values: rows },
        mark: { type: 'line', interpolate: 'step-after', strokeWidth: 1.4 },
        encoding: {
          x: { field: 'x', type: 'quantitative', title: 'rank bin (all chains pooled)', scale: { domain: [0, bins], nice: false }, axis: { labels: false, ticks: false } },
          y: { field: 'count', type: 'quantitative', title: 'draws', scale: { zero: true } },
          color: { field: 'chain', type: 'nominal', scale: chainScale(chains), legend: null },
        },
      },
      {
        data: { values: [{ expected: h.expected }] },
        mark: { type: 'rule', color: COLOURS.reference, strokeDash: [4, 3] },
        encoding: { y: { field: 'expected', type: 'quantitative' } },
      },
    ],
  } as unknown as ChartSpec;
}
