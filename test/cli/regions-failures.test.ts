/**
 * A multi-region fit when things go wrong, through the real command line: a region with bad
 * data fails alone (the others are fitted, its reason is on the terminal, in run.json and in
 * regions.csv, and the exit code says so), `--regions` picks regions, populations come from a
 * file or a column, and a region without one, like other bad options, is an error (exit code
 * 2, one line naming it, nothing written). Three invented regions of 35 days and very short
 * fits: only the behaviour is checked, not the estimates.
 */
import { existsSync, readFileSync, readdirSync, writeFileSync } from 'node:fs';
import { join } from 'node:path';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { makeTempDir, removeDir, runCli, toolLines, type RunResult } from './helpers.js';

const SHORT = ['--chains', '2', '--warmup', '100', '--draws', '20', '--thin', '1', '--threads', '2', '--no-report'];
const POPULATION: Record<string, number> = { 'Fenwick Hollow': 40000, 'Marl, Upper': 25000, Tansy: 60000 };

/** Daily counts of a small outbreak, different per region (invented). */
function cases(withPopulation: boolean, edit: (region: string, day: number, count: string) => string = (_r, _d, c) => c): string {
  const lines = [`date,cases,region${withPopulation ? ',population' : ''}`];
  for (let d = 0; d < 35; d++) {
    const date = new Date(Date.UTC(2031, 1, 3 + d)).toISOString().slice(0, 10);
    Object.keys(POPULATION).forEach((r, k) => {
      const count = String(Math.round((3 + k) * Math.exp(0.05 * d * (k === 2 ? -0.5 : 1))) + (d % 3));
      const name = r.includes(',') ? `"${r}"` : r;
      lines.push(`${date},${edit(r, d, count)},${name}${withPopulation ? `,${POPULATION[r]}` : ''}`);
    });
  }
  return `${lines.join('\n')}\n`;
}

let work: string;
const at = (...p: string[]) => join(work, ...p);
const runs: Record<string, RunResult> = {};

beforeAll(async () => {
  work = makeTempDir('waxwane-regions-fail-');
  // the count of "Marl, Upper" on day 10 is negative: row 2 + 10 * 3 + 1 = line 33
  writeFileSync(at('bad.csv'), cases(true, (r, d, c) => (r === 'Marl, Upper' && d === 10 ? '-4' : c)));
  writeFileSync(at('plain.csv'), cases(false));
  writeFileSync(at('populations.csv'), 'region,population\nTansy,60000\n"Marl, Upper",25000\n');
  const [bad, pick] = await Promise.all([
    runCli(['fit', 'bad.csv', '--out', 'bad', ...SHORT], { cwd: work }),
    runCli(['fit', 'plain.csv', '--populations', 'populations.csv', '--regions', 'Tansy, "Marl, Upper"', '--out', 'pick', ...SHORT], { cwd: work }),
  ]);
  runs.bad = bad;
  runs.pick = pick;
});

afterAll(() => removeDir(work));

describe('a region with bad data', () => {
  it('fails alone: the others are fitted, and the exit code is 4', () => {
    const r = runs.bad!;
    expect(r.code).toBe(4);
    expect(r.stderr).toContain('warning: region "Marl, Upper" failed: bad.csv, line 33, column "cases": the count "-4" is negative; correct it');
    expect(r.stderr).toMatch(/3 regions: 0 converged, 2 not converged, 1 failed/);
    expect(readdirSync(at('bad', 'regions')).sort()).toEqual(['fenwick-hollow', 'tansy']);
  });

  it('is recorded as failed with its reason, and left out of the combined tables', () => {
    const run = JSON.parse(readFileSync(at('bad', 'run.json'), 'utf8')) as { regions: Array<{ name: string; status: string; message: string | null }>; counts: Record<string, number> };
    expect(run.regions.map((x) => [x.name, x.status])).toEqual([
      ['Fenwick Hollow', 'not_converged'],
      ['Marl, Upper', 'failed'],
      ['Tansy', 'not_converged'],
    ]);
    expect(run.regions[1]!.message).toMatch(/^bad\.csv, line 33, column "cases": the count "-4" is negative/);
    expect(run.counts).toEqual({ regions: 3, ok: 0, not_converged: 2, failed: 1 });
    const regions = readFileSync(at('bad', 'regions.csv'), 'utf8');
    expect(regions).toMatch(/\n"Marl, Upper",marl-upper,failed(,){17}"bad\.csv, line 33, column ""cases"": the count ""-4"" is negative/);
    const summary = readFileSync(at('bad', 'summary.csv'), 'utf8');
    expect(summary).not.toContain('Marl');
    expect(new Set(summary.trim().split('\n').slice(1).map((l) => l.split(',')[0]))).toEqual(new Set(['Fenwick Hollow', 'Tansy']));
  });

  it('takes each population from the file\'s population column', () => {
    const run = JSON.parse(readFileSync(at('bad', 'run.json'), 'utf8')) as { regions: Array<{ name: string; population: number | null; population_source: string | null }> };
    expect(run.regions.map((x) => [x.name, x.population, x.population_source])).toEqual([
      ['Fenwick Hollow', 40000, 'column'],
      ['Marl, Upper', null, null],
      ['Tansy', 60000, 'column'],
    ]);
  });
});

describe('--regions and --populations', () => {
  it('fit only the regions named, with the populations of the file', () => {
    const r = runs.pick!;
    expect(r.code).toBe(0);
    expect(r.stderr).toMatch(/fitting 2 regions of plain\.csv \(3 in the file\)/);
    expect(readdirSync(at('pick', 'regions')).sort()).toEqual(['marl-upper', 'tansy']);
    const rows = readFileSync(at('pick', 'regions.csv'), 'utf8').trim().split('\n').slice(1);
    expect(rows.map((l) => l.replace(/^"[^"]*"/, (q) => q.replace(',', ';')).split(',').slice(0, 4))).toEqual([
      ['"Marl; Upper"', 'marl-upper', 'not_converged', '25000'],
      ['Tansy', 'tansy', 'not_converged', '60000'],
    ]);
  });
});

describe('bad options of a multi-region fit: exit code 2, one line, nothing written', () => {
  it.each([
    ['a region without a population', ['fit', 'plain.csv', '--populations', 'populations.csv'], /^waxwane: plain\.csv: no population for region "Fenwick Hollow"; give each region its population in a file passed with --populations FILE/],
    ['no population at all', ['fit', 'plain.csv'], /^waxwane: plain\.csv: no population for 3 regions: "Fenwick Hollow", "Marl, Upper", "Tansy"/],
    ['one --population for several regions', ['fit', 'plain.csv', '--population', '1000'], /^waxwane: plain\.csv: the file holds 3 regions \(Fenwick Hollow, Marl, Upper, Tansy\); choose one with --region/],
    ['a region --regions does not know', ['fit', 'plain.csv', '--populations', 'populations.csv', '--regions', 'Tansy,Tanzy'], /^waxwane: plain\.csv: no region "Tanzy" in the file/],
    ['a bad --shard', ['fit', 'plain.csv', '--populations', 'populations.csv', '--shard', '3/2'], /^waxwane: --shard must be K\/N with whole numbers 1 <= K <= N/],
    ['--shard with --region', ['fit', 'plain.csv', '--region', 'Tansy', '--population', '5', '--shard', '1/2'], /option '--shard <K\/N>' cannot be used with option '--region <name>'/],
    ['--triangle with several regions', ['fit', 'bad.csv', '--horizon', '7', '--triangle', 'populations.csv'], /^waxwane: --triangle holds the reports of one place/],
  ])('%s', async (_, args, message) => {
    const r = await runCli([...args, '--out', 'never', ...SHORT], { cwd: work });
    expect(r.code).toBe(2);
    expect(toolLines(r.stderr)).toEqual([expect.stringMatching(message)]);
    expect(existsSync(at('never'))).toBe(false);
  });
});
