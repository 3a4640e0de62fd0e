/**
 * `waxwane calibrate` end to end, as a real process, with a run far too small to judge
 * calibration (6 replicates of 21 days, fits of 2 chains x 400 warm-up): only the outputs'
 * structure and the refusals of bad input are checked here; test/evaluation/calibration.test.ts
 * checks the calibration itself.
 */
import { readFileSync } from 'node:fs';
import { join } from 'node:path';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { listDir, makeTempDir, removeDir, runCli, toolLines } from './helpers.js';

const QUANTITIES = ['start_reproduction', 'walk_scale', 'ascertainment', 'dispersion', 'seed_infected', 'latent_days', 'infectious_days', 'effective_reproduction_last_day'];
const SMALL = ['--population', '100000', '--days', '21', '--reps', '6', '--bins', '2', '--thin-to', '9', '--chains', '2', '--warmup', '400', '--draws', '20', '--thin', '2'];

let work: string;
beforeAll(() => {
  work = makeTempDir('waxwane-calibrate-');
});
afterAll(() => {
  removeDir(work);
});

describe('waxwane calibrate', () => {
  it('prints the histograms and tests, and writes the tables', async () => {
    const out = join(work, 'small');
    const r = await runCli(['calibrate', 'default', ...SMALL, '--seed', '4', '--out', out]);
    expect(r.code, r.stderr).toBe(0);
    expect(r.stderr).toMatch(/rank histograms/);
    expect(r.stderr).toMatch(/fewer than 5 replicates per bin/);
    for (const q of QUANTITIES) expect(r.stderr).toContain(q);
    expect(listDir(out)).toEqual(['calibrate.json', 'histograms.csv', 'ranks.csv', 'uniformity.csv']);
    const ranks = readFileSync(join(out, 'ranks.csv'), 'utf8').trim().split('\n');
    expect(ranks[0]).toBe('replicate,quantity,truth,rank,max_rhat,min_ess_bulk,total_reports');
    expect(ranks).toHaveLength(1 + 6 * 8);
    for (const line of ranks.slice(1)) {
      const rank = Number(line.split(',')[3]);
      expect(Number.isInteger(rank) && rank >= 0 && rank <= 9, line).toBe(true);
    }
    const hist = readFileSync(join(out, 'histograms.csv'), 'utf8').trim().split('\n').slice(1).map((l) => l.split(','));
    expect(hist).toHaveLength(8 * 2);
    for (const q of QUANTITIES) {
      const rows = hist.filter((h) => h[0] === q);
      expect(rows.map((h) => `${h[2]}-${h[3]}`)).toEqual(['0-4', '5-9']);
      expect(rows.reduce((a, h) => a + Number(h[4]), 0)).toBe(6);
      // the histogram is the ranks.csv ranks binned
      const own = ranks.slice(1).map((l) => l.split(',')).filter((x) => x[1] === q).map((x) => Number(x[3]));
      expect(Number(rows[0]![4])).toBe(own.filter((x) => x <= 4).length);
    }
    const uni = readFileSync(join(out, 'uniformity.csv'), 'utf8').trim().split('\n');
    expect(uni[0]).toBe('quantity,replicates,chi_square,df,p_value,test_level,mean_rank_share,outer_share,flagged');
    expect(uni).toHaveLength(9);
    const record = JSON.parse(readFileSync(join(out, 'calibrate.json'), 'utf8')) as { test_level: number; quantities: string[] };
    expect(record.test_level).toBeCloseTo(0.05 / 8, 12);
    expect(record.quantities).toEqual(QUANTITIES);
  }, 60_000);

  const bad: Array<[string, string[], RegExp]> = [
    ['ranks that do not split into the bins', ['--thin-to', '10', '--bins', '3'], /--bins 3/],
    ['fewer kept draws than ranked ones', ['--thin-to', '39', '--bins', '10', '--chains', '2', '--draws', '10'], /fewer than --thin-to 39/],
    ['an alpha of 1.5', ['--alpha', '1.5'], /--alpha/],
    ['too few days', ['--days', '3'], /--days/],
  ];
  it.each(bad)('refuses %s (exit 2, one line, nothing written)', async (_name, args, message) => {
    const out = join(work, `bad-${Math.random().toString(36).slice(2)}`);
    const r = await runCli(['calibrate', 'default', '--population', '100000', '--days', '21', ...args, '--out', out]);
    expect(r.code, r.stderr).toBe(2);
    expect(toolLines(r.stderr)).toHaveLength(1);
    expect(toolLines(r.stderr)[0]).toMatch(message);
    expect(listDir(out)).toBeNull();
  });
});
