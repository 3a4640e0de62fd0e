/**
 * `waxwane prior-check` end to end, as a real process: the summary on the terminal, the tables
 * with --out, the flags for a prior no epidemic could follow, and the refusals of bad input.
 */
import { readFileSync, writeFileSync } from 'node:fs';
import { join } from 'node:path';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { listDir, makeTempDir, removeDir, runCli, toolLines, ROOT } from './helpers.js';

let work: string;
beforeAll(() => {
  work = makeTempDir('waxwane-prior-check-');
});
afterAll(() => {
  removeDir(work);
});

describe('waxwane prior-check', () => {
  it('summarises the default prior set and writes its tables with --out', async () => {
    const out = join(work, 'default');
    const r = await runCli(['prior-check', 'default', '--population', '320000', '--days', '60', '--draws', '200', '--out', out]);
    expect(r.code, r.stderr).toBe(0);
    expect(r.stderr).toMatch(/what the prior implies/);
    expect(r.stderr).toMatch(/share of the population infected/);
    expect(listDir(out)).toEqual(['prior-check.csv', 'prior-check.json', 'prior-daily.csv']);
    const summary = readFileSync(join(out, 'prior-check.csv'), 'utf8').trim().split('\n');
    expect(summary[0]).toBe('quantity,mean,sd,q05,q25,q50,q75,q95');
    expect(summary.slice(1).map((l) => l.split(',')[0])).toEqual([
      'max_basic_reproduction',
      'max_effective_reproduction',
      'min_effective_reproduction',
      'last_effective_reproduction',
      'peak_reports',
      'peak_reports_day',
      'total_reports',
      'reports_per_person',
      'attack_rate',
    ]);
    const daily = readFileSync(join(out, 'prior-daily.csv'), 'utf8').trim().split('\n');
    expect(daily).toHaveLength(1 + 4 * 60);
    const record = JSON.parse(readFileSync(join(out, 'prior-check.json'), 'utf8')) as { findings: Array<{ name: string; share: number; flagged: boolean }>; options: { draws: number } };
    expect(record.options.draws).toBe(200);
    expect(record.findings.map((f) => f.name)).toEqual(['impossible_epidemic', 'more_reports_than_people', 'everyone_infected', 'reproduction_above_bound', 'no_reports']);
  });

  it('flags a prior whose epidemics outgrow the town, and writes nothing without --out', async () => {
    const set = JSON.parse(readFileSync(join(ROOT, 'priors', 'default.json'), 'utf8')) as { name: string; priors: Record<string, unknown> };
    set.name = 'wild';
    set.priors.start_reproduction = { family: 'lognormal', median: 15, sdlog: 0.3 };
    set.priors.ascertainment = { family: 'beta', a: 50, b: 2 };
    set.priors.dispersion = { family: 'inverse_sqrt_half_normal', scale: 3 };
    const file = join(work, 'wild.json');
    writeFileSync(file, JSON.stringify(set));
    const before = listDir(work);
    const r = await runCli(['prior-check', file, '--population', '2000', '--days', '120', '--draws', '200'], { cwd: work });
    expect(r.code, r.stderr).toBe(0);
    expect(r.stderr).toMatch(/^ {2}FLAG .*population infected/m);
    expect(r.stderr).toMatch(/^warning: .*R_0\(t\) = beta D above 10/m);
    expect(listDir(work)).toEqual(before);
  });

  const bad: Array<[string, string[], RegExp]> = [
    ['no population', ['default', '--days', '30'], /--population/],
    ['0 days', ['default', '--population', '1000', '--days', '0'], /--days/],
    ['an unknown prior set', ['nosuch', '--population', '1000', '--days', '30'], /nosuch/],
    ['a population above the cap', ['default', '--population', '1e13', '--days', '30'], /--population/],
  ];
  it.each(bad)('refuses %s (exit 2, one line, nothing written)', async (_name, args, message) => {
    const out = join(work, `bad-${Math.random().toString(36).slice(2)}`);
    const r = await runCli(['prior-check', ...args, '--out', out]);
    expect(r.code, r.stderr).toBe(2);
    expect(toolLines(r.stderr)).toHaveLength(1);
    expect(toolLines(r.stderr)[0]).toMatch(message);
    expect(listDir(out)).toBeNull();
  });
});
