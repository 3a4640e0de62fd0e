/**
 * `waxwane compare` end to end, as a real process, on the first 70 days of the Larkmere demo
 * data under a region name full of markup. The fits are deliberately SHORT (2 chains, 400
 * warm-up, 50 draws) so this file stays fast: only the structure of the outputs, the agreement
 * of the tables with one another, the report and the refusals of bad input are checked here;
 * the scores themselves are checked in test/evaluation/.
 */
import { readFileSync, writeFileSync } from 'node:fs';
import { join } from 'node:path';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { listDir, makeTempDir, removeDir, runCli, toolLines, ROOT, type RunResult } from './helpers.js';
import { buildCompareReport, readCompareFolder } from '../../src/outputs/report/compare-page.js';

const DAYS = 70;
const HOSTILE = `Vale <script>alert("x")</script> & 'Co'`;
const SHORT = ['--chains', '2', '--warmup', '400', '--draws', '50', '--thin', '2', '--backtest-warmup', '400', '--backtest-draws', '50', '--backtest-thin', '2'];
const BACKTEST = ['--window', '14', '--every', '7', '--horizon', '7'];

let work: string;
let casesFile: string;
let dates: string[];
let out: string;
let result: RunResult;

function table(file: string): { header: string[]; rows: string[][] } {
  const lines = readFileSync(join(out, file), 'utf8').trimEnd().split('\n');
  // no field of these tables holds a comma or a quote (prior set names and dates)
  return { header: lines[0]!.split(','), rows: lines.slice(1).map((l) => l.split(',')) };
}

beforeAll(async () => {
  work = makeTempDir('waxwane-compare-');
  const lines = readFileSync(join(ROOT, 'data-demo', 'larkmere', 'cases.csv'), 'utf8').trim().split('\n').slice(1, DAYS + 1);
  dates = lines.map((l) => l.split(',')[0]!);
  const quoted = `"${HOSTILE.replace(/"/g, '""')}"`;
  casesFile = join(work, 'cases.csv');
  writeFileSync(casesFile, `region,date,cases\n${lines.map((l) => `${quoted},${l}`).join('\n')}\n`);
  out = join(work, 'out');
  result = await runCli(['compare', casesFile, '--region', HOSTILE, '--priors', 'smooth', 'flexible', '--population', '320000', '--out', out, '--seed', '3', '--threads', '1', ...SHORT, ...BACKTEST], { timeoutMs: 120_000 });
}, 150_000);

afterAll(() => {
  removeDir(work);
});

describe('waxwane compare (short fits)', () => {
  it('ends with exit code 0 and prints the ranking', () => {
    expect(result.code, result.stderr).toBe(0);
    expect(result.stderr).toMatch(/ranking by the mean weighted interval score/);
    expect(result.stderr).not.toMatch(/^\s+at /m);
  });

  it('writes every table and the report', () => {
    expect(listDir(out)).toEqual(['backtest.csv', 'compare.json', 'estimates.csv', 'fits.csv', 'identification.csv', 'ranking.csv', 'report.html', 'scores.csv']);
  });

  it('backtests from the origins the window and spacing give, on every horizon', () => {
    const run = JSON.parse(readFileSync(join(out, 'compare.json'), 'utf8')) as { backtest: { origins: string[] }; prior_sets: Array<{ label: string }>; ranking: string[] };
    // 70 days, window 14: first origin day 55 (0-based), then 62 = 69 - 7
    expect(run.backtest.origins).toEqual([dates[55], dates[62]]);
    expect(run.prior_sets.map((p) => p.label)).toEqual(['smooth', 'flexible']);
    const { header, rows } = table('backtest.csv');
    expect(header.join(',')).toBe('prior_set,origin,date,horizon,observed,mean,q05,q25,q50,q75,q95,wis,crps,log_score,in_50,in_90');
    expect(rows).toHaveLength(2 * 2 * 7);
    for (const r of rows) {
      const origin = dates.indexOf(r[1]!);
      expect(dates.indexOf(r[2]!)).toBe(origin + Number(r[3]));
      expect(Number(r[4])).toBe(Number(readFileSync(casesFile, 'utf8').trim().split('\n')[1 + origin + Number(r[3])]!.split(',').at(-1)));
    }
  });

  it('scores.csv, ranking.csv and backtest.csv agree: means by horizon and overall of the scored forecasts', () => {
    const bt = table('backtest.csv').rows;
    const scores = table('scores.csv');
    expect(scores.header.join(',')).toBe('prior_set,horizon,forecasts,wis,crps,log_score,coverage_50,coverage_90');
    expect(scores.rows).toHaveLength(2 * (7 + 1));
    const mean = (xs: number[]) => xs.reduce((a, b) => a + b, 0) / xs.length;
    // the tables hold 6 significant digits (coverages 4)
    const close = (a: number, b: number, tol = 2e-5) => expect(Math.abs(a - b), `${a} against ${b}`).toBeLessThanOrEqual(tol * Math.max(1, Math.abs(b)));
    for (const set of ['smooth', 'flexible']) {
      const mine = bt.filter((r) => r[0] === set);
      const all = scores.rows.find((r) => r[0] === set && r[1] === 'all')!;
      expect(Number(all[2])).toBe(14);
      close(Number(all[3]), mean(mine.map((r) => Number(r[11]))));
      close(Number(all[7]), mean(mine.map((r) => Number(r[15]))), 1e-4);
      for (let h = 1; h <= 7; h++) {
        const row = scores.rows.find((r) => r[0] === set && r[1] === String(h))!;
        expect(Number(row[2])).toBe(2);
        close(Number(row[4]), mean(mine.filter((r) => r[3] === String(h)).map((r) => Number(r[12]))));
      }
    }
    const ranking = table('ranking.csv');
    expect(ranking.header.join(',')).toBe('rank,prior_set,wis,relative_wis,wis_vs_best,wis_vs_best_se,crps,log_score,coverage_50,coverage_90,rank_crps,rank_log_score');
    expect(ranking.rows.map((r) => r[0])).toEqual(['1', '2']);
    const [first, second] = ranking.rows as [string[], string[]];
    expect(Number(first[2])).toBeLessThanOrEqual(Number(second[2]));
    expect(Number(first[4])).toBe(0);
    for (const r of ranking.rows) close(Number(r[2]), Number(scores.rows.find((s) => s[0] === r[1] && s[1] === 'all')![3]));
  });

  it('puts the estimates and identification of both prior sets side by side, and lists every fit', () => {
    const est = table('estimates.csv');
    expect(est.header.join(',')).toBe('prior_set,quantity,date,mean,sd,q05,q25,q50,q75,q95');
    for (const set of ['smooth', 'flexible']) {
      expect(est.rows.filter((r) => r[0] === set && r[1] === 'effective_reproduction').map((r) => r[2])).toEqual(dates);
      expect(est.rows.filter((r) => r[0] === set && r[2] === '').map((r) => r[1])).toEqual(['start_reproduction', 'walk_scale', 'ascertainment', 'dispersion', 'seed_infected', 'latent_days', 'infectious_days']);
    }
    const id = table('identification.csv');
    expect(id.header.join(',')).toBe('prior_set,parameter,prior_sd,posterior_sd,contraction,shift,weak');
    expect(id.rows).toHaveLength(14);
    for (const r of id.rows) {
      // contraction = 1 - (posterior sd / prior sd)^2 (outputs/identification.ts), as written
      expect(Number(r[4])).toBeCloseTo(1 - (Number(r[3]) / Number(r[2])) ** 2, 4);
      expect(r[6]).toBe(Number(r[3]) > 0.5 * Number(r[2]) ? 'yes' : 'no');
    }
    const fits = table('fits.csv');
    expect(fits.rows.map((r) => `${r[0]}:${r[1]}:${r[2]}`)).toEqual([
      `smooth:all:${dates[69]}`,
      `smooth:backtest:${dates[55]}`,
      `smooth:backtest:${dates[62]}`,
      `flexible:all:${dates[69]}`,
      `flexible:backtest:${dates[55]}`,
      `flexible:backtest:${dates[62]}`,
    ]);
  });

  it('writes a report with the scores, the R_t overlay and the region name as text', async () => {
    const page = readFileSync(join(out, 'report.html'), 'utf8');
    expect(page).toContain('Forecast scores and ranking');
    expect(page).toContain('Reproduction number under each prior set');
    expect(page).not.toMatch(/<script/i);
    expect(page).toContain('Vale &lt;script&gt;alert(&quot;x&quot;)&lt;/script&gt; &amp; &#39;Co&#39;');
    expect((page.match(/<svg/g) ?? []).length).toBeGreaterThanOrEqual(3);
    // the page again from the folder alone: the chart library has nothing to warn about
    const again = await buildCompareReport(readCompareFolder(out));
    expect(again.chartWarnings).toEqual([]);
  }, 30_000);

  it('waxwane report writes the page of a comparison folder again', async () => {
    const file = join(work, 'again.html');
    const r = await runCli(['report', out, '--out', file]);
    expect(r.code, r.stderr).toBe(0);
    const page = readFileSync(file, 'utf8');
    expect(page).toContain('comparison of prior sets');
    expect(page).toContain('Vale &lt;script&gt;');
  }, 30_000);
});

describe('waxwane compare refuses bad input before fitting (exit 2, one line, nothing written)', () => {
  const cases: Array<[string, string[], RegExp]> = [
    ['an unknown prior set', ['--priors', 'default', 'nosuch'], /nosuch/],
    ['a prior set named twice', ['--priors', 'default', 'default'], /twice/],
    ['a window longer than the data allow', ['--priors', 'default', '--window', '60'], /leaves 10 days to fit/],
    ['a window shorter than the horizon', ['--priors', 'default', '--window', '5'], /shorter than --horizon/],
    ['a horizon of 0', ['--priors', 'default', '--horizon', '0'], /--horizon/],
    ['no prior sets', [], /--priors/],
  ];
  it.each(cases)('%s', async (_name, args, message) => {
    const dir = join(work, `bad-${Math.random().toString(36).slice(2)}`);
    const r = await runCli(['compare', casesFile, '--region', HOSTILE, '--population', '320000', '--out', dir, ...args]);
    expect(r.code, r.stderr).toBe(2);
    const lines = toolLines(r.stderr);
    expect(lines).toHaveLength(1);
    expect(lines[0]).toMatch(message);
    expect(listDir(dir)).toBeNull();
  });
});
