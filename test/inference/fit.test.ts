// fitPosterior's orchestration: warm-up rounds pooled over the chains must leave every chain's
// draws a function of the seed alone: the same with the chains in this thread or on two worker
// threads, and the same when the run is resumed from the chains' latest snapshots taken at any
// moment (mid-round, between rounds, while sampling).
import { describe, expect, it } from 'vitest';
import { fileURLToPath } from 'node:url';
import { loadPriorSet } from '../../src/io/priors.js';
import { fitPosterior, fitDailyColumns, DEFAULT_SAMPLER, type SamplerOptions } from '../../src/inference/fit.js';
import { DAILY_QUANTITIES, chainDailyDraws } from '../../src/model/derived.js';
import type { ChainSnapshot } from '../../src/inference/chain.js';
import { roundEnds } from '../../src/inference/pooled-adaptation.js';

const priorSet = loadPriorSet(fileURLToPath(new URL('../../priors/default.json', import.meta.url)));
const counts = [3, 5, 4, 6, 8, 7, 10, 12, 11, 15, 18, 17, 22, 25, 24, 30, 28, 33, 31, 35, 30, 32, 29, 27, 30, 25, 24, 26];
const input = { counts, population: 50_000, firstWeekday: 2, priorSet };
// snapshots after every slice (checkpoints normally take one every 2 s at most), so that resumes are tried
// from many moments
const options: SamplerOptions = { ...DEFAULT_SAMPLER, chains: 3, warmup: 800, draws: 60, thin: 2, optimizerStarts: 1, slice: 100, seed: 77, snapshotIntervalMs: 0 };

describe('fitPosterior with pooled warm-up rounds', () => {
  it('pools at all (the warm-up is long enough for rounds)', () => {
    expect(roundEnds(options.warmup).length).toBeGreaterThan(0);
  });

  it('gives the same draws on 0 and 2 worker threads', async () => {
    const a = await fitPosterior(input, { ...options, threads: 0 });
    const b = await fitPosterior(input, { ...options, threads: 2 });
    expect(a.chains.length).toBe(3);
    for (let c = 0; c < 3; c++) {
      expect(a.chains[c]!.draws.length).toBe(60 * a.model.layout.dim);
      expect(Array.from(b.chains[c]!.draws)).toEqual(Array.from(a.chains[c]!.draws));
    }
    // the chains differ from one another
    expect(Array.from(a.chains[1]!.draws)).not.toEqual(Array.from(a.chains[0]!.draws));
  }, 60_000);

  it('gives the same daily derived quantities computed in the workers or afterwards in this thread', async () => {
    const a = await fitPosterior(input, { ...options, threads: 2, derived: true });
    const b = await fitPosterior(input, { ...options, threads: 0 });
    expect(a.chains.every((c) => c.dailyColumns !== undefined)).toBe(true);
    expect(b.chains.every((c) => c.dailyColumns === undefined)).toBe(true);
    const da = fitDailyColumns(a);
    const db = fitDailyColumns(b);
    const T = counts.length;
    const n = 3 * 60;
    for (const q of DAILY_QUANTITIES) {
      expect(da[q].length).toBe(n * T);
      expect(Array.from(da[q])).toEqual(Array.from(db[q]));
    }
    // each day's column holds every draw's value on that day, in ascending order: the same
    // multiset as computing each chain's draws directly (chainDailyDraws, its own stream)
    const direct = a.chains.map((c, i) => chainDailyDraws(a.model, c.draws, input.firstWeekday, a.jobs[i]!.seed));
    for (const t of [0, 13, T - 1]) {
      for (const q of ['effective_reproduction', 'predicted_reports'] as const) {
        const expected = direct.flatMap((d) => Array.from({ length: 60 }, (_, k) => d[q][k * T + t]!)).sort((x, y) => x - y);
        expect(Array.from(da[q].subarray(t * n, (t + 1) * n))).toEqual(expected);
      }
    }
  }, 60_000);

  it('gives the same draws when resumed from the latest snapshots at any moment', async () => {
    const events: Array<{ chain: number; snapshot: ChainSnapshot }> = [];
    const full = await fitPosterior(input, { ...options, threads: 0 }, { snapshot: (chain, snapshot) => events.push({ chain, snapshot }) });
    expect(events.length).toBeGreaterThan(20);
    for (const cut of [3, 10, 17, events.length - 2]) {
      const snapshots = new Map<number, ChainSnapshot>();
      for (const e of events.slice(0, cut)) snapshots.set(e.chain, JSON.parse(JSON.stringify(e.snapshot)) as ChainSnapshot);
      const resumed = await fitPosterior(input, { ...options, threads: 0 }, {}, { prepared: full, snapshots });
      for (let c = 0; c < 3; c++) expect(Array.from(resumed.chains[c]!.draws), `cut ${cut}, chain ${c}`).toEqual(Array.from(full.chains[c]!.draws));
    }
  }, 120_000);
});
