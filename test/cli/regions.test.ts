/**
 * `waxwane fit` over the multi-district demo file (data-demo/districts: four invented districts
 * simulated by `waxwane simulate`), end to end as real processes: the whole file at once, the
 * same fit as two shards of a job array joined by `waxwane merge`, and one district fitted
 * alone. The fits are deliberately SHORT (2 chains, 200 warm-up, 50 draws): they cannot
 * converge, and what is checked is the structure of the outputs and that the same regions give
 * the same bytes however the work is split.
 */
import { cpSync, existsSync, readFileSync, readdirSync, writeFileSync } from 'node:fs';
import { join } from 'node:path';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { makeTempDir, removeDir, runCli, toolLines, ROOT, type RunResult } from './helpers.js';

const SHORT = ['--chains', '2', '--warmup', '200', '--draws', '50', '--thin', '1', '--seed', '5'];
const CASES = join(ROOT, 'data-demo', 'districts', 'cases.csv');
const scenario = JSON.parse(readFileSync(join(ROOT, 'data-demo', 'scenarios', 'districts.json'), 'utf8')) as { places: Array<{ name: string; population: number }> };
const NAMES = scenario.places.map((p) => p.name).sort();
const FOLDERS = ['ashgrove', 'brindle-cross', 'coldharbour-fen', 'dunmarrow'];
const COMBINED = ['summary.csv', 'diagnostics.csv', 'regions.csv'];
const REGION_FILES = ['data.csv', 'diagnostics.csv', 'draws.csv', 'run.json', 'summary.csv'];

let work: string;
let pops: string;
const runs: Record<string, RunResult> = {};
const dir = (name: string) => join(work, name);
const text = (...p: string[]) => readFileSync(join(work, ...p), 'utf8');

beforeAll(async () => {
  work = makeTempDir('waxwane-regions-');
  pops = join(work, 'populations.csv');
  writeFileSync(pops, `region,population\n${scenario.places.map((p) => `${p.name},${p.population}`).join('\n')}\n`);
  const fit = (name: string, ...extra: string[]) => runCli(['fit', CASES, '--populations', pops, '--out', dir(name), ...SHORT, ...extra]).then((r) => (runs[name] = r));
  await Promise.all([fit('all', '--threads', '2'), fit('shard1', '--shard', '1/2', '--threads', '1', '--no-report')]);
  await fit('shard2', '--shard', '2/2', '--threads', '1', '--no-report', '--quiet');
  runs.merged = await runCli(['merge', dir('shard2'), dir('shard1'), '--out', dir('merged'), '--no-report']);
});

afterAll(() => removeDir(work));

describe('the multi-district demo file, fitted whole', () => {
  it('fits every district, says so per district, and exits 0 (not converged is said, not an error)', () => {
    const r = runs.all!;
    expect(r.stderr).not.toMatch(/internal error/);
    expect(r.code).toBe(0);
    for (const n of NAMES) expect(r.stderr).toMatch(new RegExp(`\\[\\d/4\\] ${n}: NOT converged .*; R_t on 2031-07-30 .*P\\(R_t > 1\\)`));
    expect(r.stderr).toMatch(/4 regions: 0 converged, 4 not converged, 0 failed/);
  });

  it('writes one folder per district with the files of a single fit, and the combined files', () => {
    expect(readdirSync(dir('all')).sort()).toEqual(['diagnostics.csv', 'regions', 'regions.csv', 'report.html', 'run.json', 'summary.csv']);
    expect(readdirSync(join(dir('all'), 'regions')).sort()).toEqual(FOLDERS);
    for (const f of FOLDERS) expect(readdirSync(join(dir('all'), 'regions', f)).sort()).toEqual([...REGION_FILES, 'report.html'].sort());
  });

  it('combines each district\'s own tables with a region column in front', () => {
    for (const file of ['summary.csv', 'diagnostics.csv']) {
      const combined = text('all', file).split('\n');
      expect(combined[0]).toBe(`region,${text('all', 'regions', 'ashgrove', file).split('\n')[0]}`);
      let expected = combined[0]!;
      NAMES.forEach((n, i) => {
        const own = text('all', 'regions', FOLDERS[i]!, file).split('\n').slice(1, -1);
        expected += own.map((l) => `\n${n},${l}`).join('');
      });
      expect(combined.join('\n')).toBe(`${expected}\n`);
    }
  });

  it('records each district\'s folder, seed, population and status in run.json and regions.csv', () => {
    const run = JSON.parse(text('all', 'run.json')) as { layout: string; regions: Array<{ name: string; folder: string; status: string; population: number; seed: number }>; counts: Record<string, number> };
    expect(run.layout).toBe('regions');
    expect(run.regions.map((r) => [r.name, r.folder, r.status, r.population])).toEqual(
      NAMES.map((n, i) => [n, FOLDERS[i], 'not_converged', scenario.places.find((p) => p.name === n)!.population]),
    );
    expect(new Set(run.regions.map((r) => r.seed)).size).toBe(4);
    const rows = text('all', 'regions.csv').trim().split('\n').map((l) => l.split(','));
    expect(rows[0]!.slice(0, 3)).toEqual(['region', 'folder', 'status']);
    for (const row of rows.slice(1)) {
      const col = (c: string) => row[rows[0]!.indexOf(c)]!;
      const p = Number(col('prob_rt_above_1'));
      expect(p).toBeGreaterThanOrEqual(0);
      expect(p).toBeLessThanOrEqual(1);
      // a share of draws above 1 agrees with the draws' own quantiles (common practice)
      if (Number(col('rt_q05')) > 1) expect(p).toBeGreaterThanOrEqual(0.9);
      if (Number(col('rt_q95')) < 1) expect(p).toBeLessThanOrEqual(0.1);
      if (Number(col('rt_q50')) > 1) expect(p).toBeGreaterThanOrEqual(0.45);
      if (Number(col('rt_q50')) < 1) expect(p).toBeLessThanOrEqual(0.55);
    }
  });

  it('writes a report page ranking the districts by P(R_t > 1), with small multiples of R_t', () => {
    const html = text('all', 'report.html');
    const rows = text('all', 'regions.csv').trim().split('\n').slice(1).map((l) => l.split(','));
    const prob = (n: string) => Number(rows.find((r) => r[0] === n)![14]);
    const order = [...NAMES].sort((a, b) => prob(b) - prob(a) || (a < b ? -1 : 1));
    const positions = order.map((n) => html.indexOf(`<a href="regions/${FOLDERS[NAMES.indexOf(n)]}/report.html">${n}</a>`));
    expect(positions.every((p) => p > 0)).toBe(true);
    expect([...positions].sort((a, b) => a - b)).toEqual(positions);
    expect(html).toContain('R_t across regions');
    expect((html.match(/<svg/g) ?? []).length).toBe(1);
    expect(html).not.toMatch(/<script/i);
  });

  it('is rewritten by waxwane report from the folder alone', async () => {
    const r = await runCli(['report', dir('all'), '--out', join(work, 'again.html')]);
    expect(r.code).toBe(0);
    expect(readFileSync(join(work, 'again.html'), 'utf8')).toContain('Regions ranked by P(R_t &gt; 1)');
  });
});

describe('the same fit as two shards, merged', () => {
  it('splits the districts between the shards', () => {
    expect(runs.shard1!.code).toBe(0);
    expect(runs.shard2!.code).toBe(0);
    expect(readdirSync(join(dir('shard1'), 'regions')).sort()).toEqual(['ashgrove', 'coldharbour-fen']);
    expect(readdirSync(join(dir('shard2'), 'regions')).sort()).toEqual(['brindle-cross', 'dunmarrow']);
  });

  it('gives the bytes of the fit without shards, combined files and every district\'s files', () => {
    expect(runs.merged!.code).toBe(0);
    for (const f of COMBINED) expect(text('merged', f)).toBe(text('all', f));
    for (const folder of FOLDERS) {
      for (const f of ['summary.csv', 'diagnostics.csv', 'draws.csv', 'data.csv']) expect(text('merged', 'regions', folder, f)).toBe(text('all', 'regions', folder, f));
    }
    const merged = JSON.parse(text('merged', 'run.json')) as { command: string; merged_from: unknown[]; regions: unknown[] };
    const whole = JSON.parse(text('all', 'run.json')) as { regions: Array<Record<string, unknown>> };
    expect(merged.command).toBe('merge');
    expect(merged.merged_from).toHaveLength(2);
    const noTime = (rs: unknown[]) => (rs as Array<Record<string, unknown>>).map(({ seconds: _, ...r }) => r);
    expect(noTime(merged.regions)).toEqual(noTime(whole.regions));
  });

  it('refuses a missing shard, a shard twice, other options and other data, naming the folders', async () => {
    const missing = await runCli(['merge', dir('shard1'), '--out', join(work, 'm1')]);
    expect(missing.code).toBe(2);
    expect(toolLines(missing.stderr)).toEqual([expect.stringMatching(/^waxwane: shard 2\/2 missing: no folder given for it/)]);
    expect(existsSync(join(work, 'm1'))).toBe(false);

    cpSync(dir('shard1'), join(work, 'copy1'), { recursive: true });
    const twice = await runCli(['merge', dir('shard1'), join(work, 'copy1'), '--out', join(work, 'm2')]);
    expect(toolLines(twice.stderr)).toEqual([expect.stringMatching(/^waxwane: shard 1\/2 is given twice: .*shard1 and .*copy1/)]);

    const edit = (name: string, change: (run: Record<string, any>) => void) => {
      cpSync(dir('shard2'), join(work, name), { recursive: true });
      const run = JSON.parse(text(name, 'run.json')) as Record<string, any>;
      change(run);
      writeFileSync(join(work, name, 'run.json'), JSON.stringify(run));
      return join(work, name);
    };
    const draws = await runCli(['merge', dir('shard1'), edit('other-draws', (r) => (r.options.draws = 60)), '--out', join(work, 'm3')]);
    expect(draws.code).toBe(2);
    expect(toolLines(draws.stderr)).toEqual([expect.stringMatching(/are not shards of one run: different options: draws 60 and 50/)]);
    const data = await runCli(['merge', dir('shard1'), edit('other-data', (r) => (r.files.cases.sha256 = '0'.repeat(64))), '--out', join(work, 'm4')]);
    expect(toolLines(data.stderr)).toEqual([expect.stringMatching(/are not shards of one run: they fitted different case files/)]);
    const single = await runCli(['merge', dir('shard1'), join(dir('all'), 'regions', 'ashgrove'), '--out', join(work, 'm5')]);
    expect(toolLines(single.stderr)).toEqual([expect.stringMatching(/ashgrove: the run of a single place, not of several regions/)]);
  });
});

describe('a district of the run', () => {
  it('has the files of a single fit of that district with its seed', async () => {
    const run = JSON.parse(text('all', 'run.json')) as { regions: Array<{ name: string; folder: string; seed: number; population: number }> };
    const d = run.regions.find((r) => r.name === 'Coldharbour Fen')!;
    const r = await runCli(['fit', CASES, '--region', d.name, '--population', String(d.population), '--out', dir('alone'), ...SHORT, '--seed', String(d.seed), '--threads', '1', '--no-report', '--quiet']);
    expect(r.code).toBe(0);
    for (const f of ['summary.csv', 'diagnostics.csv', 'draws.csv', 'data.csv']) expect(text('alone', f)).toBe(text('all', 'regions', d.folder, f));
  });
});
