/**
 * `waxwane fit --horizon` and `waxwane forecast` end to end, as real processes, on the first 60
 * days of the Larkmere demo data. One SHORT fit (2 chains, 300 warm-up, 100 draws: it cannot
 * converge): only the files, their columns, the agreement of the two commands, the scenario
 * options and the refusals are checked here; the forecasts themselves are checked in
 * test/outputs/.
 */
import { existsSync, readFileSync, statSync, writeFileSync } from 'node:fs';
import { join } from 'node:path';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { listDir, makeTempDir, removeDir, runCli, toolLines, ROOT, type RunResult } from './helpers.js';

const DAYS = 60;
const HORIZON = 14;
const SHORT = ['--chains', '2', '--warmup', '300', '--draws', '100', '--thin', '1', '--seed', '3', '--threads', '1'];
const FORECAST_OUTPUTS = ['forecast.csv', 'scenarios.csv', 'nowcast.csv', 'growth.csv', 'forecast.json'];
const QUANTITIES = [
  'predicted_reports',
  'expected_reports',
  'infections',
  'onsets',
  'effective_reproduction',
  'transmission_rate',
  'growth_rate',
  'doubling_time',
  'halving_time',
  'cumulative_infections',
  'cumulative_reports',
];

let work: string;
let casesFile: string;
let scenarioFile: string;
let dates: string[];
let fit: RunResult;
const runDir = () => join(work, 'run');

function csv(dir: string, file: string): { header: string[]; rows: string[][] } {
  const text = readFileSync(join(dir, file), 'utf8');
  expect(text.endsWith('\n')).toBe(true);
  const lines = text.slice(0, -1).split('\n');
  return { header: lines[0]!.split(','), rows: lines.slice(1).map((l) => l.split(',')) };
}

beforeAll(async () => {
  work = makeTempDir('waxwane-forecast-');
  const lines = readFileSync(join(ROOT, 'data-demo', 'larkmere', 'cases.csv'), 'utf8').split('\n');
  casesFile = join(work, 'larkmere-60.csv');
  writeFileSync(casesFile, `${lines.slice(0, DAYS + 1).join('\n')}\n`);
  dates = lines.slice(1, DAYS + 1).map((l) => l.split(',')[0]!);
  scenarioFile = join(work, 'futures.json');
  writeFileSync(
    scenarioFile,
    JSON.stringify({
      scenarios: [
        { name: 'carry_on' },
        { name: 'hold', transmission: 'hold' },
        { name: 'half', transmission: 'walk', measures: [{ factor: 0.5, from: '2031-04-06', until: '2031-04-12' }] },
      ],
    }),
  );
  fit = await runCli(['fit', casesFile, '--population', '320000', '--out', runDir(), ...SHORT, '--horizon', String(HORIZON), '--scenarios', scenarioFile]);
}, 120_000);

afterAll(() => {
  removeDir(work);
});

describe('waxwane fit --horizon 14 --scenarios FILE', () => {
  it('ends with exit code 0 and writes the forecast outputs beside the fit outputs', () => {
    expect(fit.code, fit.stderr).toBe(0);
    for (const f of ['summary.csv', 'draws.csv', 'run.json', ...FORECAST_OUTPUTS]) expect(existsSync(join(runDir(), f)), f).toBe(true);
    expect(fit.stderr).toMatch(/forecast 2031-04-04 to 2031-04-17/);
    const run = JSON.parse(readFileSync(join(runDir(), 'run.json'), 'utf8')) as { options: Record<string, unknown> };
    expect(run.options).toMatchObject({ horizon: HORIZON, scenarios: 'futures.json', hold: false, scale: null });
  });

  it('forecast.csv: every scenario, quantity and forecast date once, with ordered quantiles', () => {
    const { header, rows } = csv(runDir(), 'forecast.csv');
    expect(header.join(',')).toBe('scenario,quantity,date,mean,sd,q05,q25,q50,q75,q95');
    const forecastDates = Array.from({ length: HORIZON }, (_, h) => new Date(Date.UTC(2031, 3, 4 + h)).toISOString().slice(0, 10));
    const expected = ['carry_on', 'hold', 'half'].flatMap((s) => QUANTITIES.flatMap((q) => forecastDates.map((d) => `${s}|${q}|${d}`)));
    expect(rows.map((r) => `${r[0]}|${r[1]}|${r[2]}`)).toEqual(expected);
    for (const r of rows) {
      const q = r.slice(5).map((v) => (v === 'Inf' ? Infinity : Number(v)));
      expect(q.some((v) => Number.isNaN(v)), r.join(',')).toBe(false);
      for (let i = 1; i < q.length; i++) expect(q[i - 1]!, r.join(',')).toBeLessThanOrEqual(q[i]!);
    }
  });

  it('scenarios.csv, nowcast.csv and growth.csv have their columns and rows', () => {
    const sc = csv(runDir(), 'scenarios.csv');
    expect(sc.header.join(',')).toBe('scenario,quantity,mean,sd,q05,q25,q50,q75,q95,date_q05,date_q25,date_q50,date_q75,date_q95');
    expect(sc.rows.filter((r) => r[1] === 'averted_infections').map((r) => r[0])).toEqual(['hold', 'half']);
    const now = csv(runDir(), 'nowcast.csv');
    expect(now.header.join(',')).toBe('quantity,date,mean,sd,q05,q25,q50,q75,q95');
    // the last Dmax = 21 days, then the window as a whole
    expect(now.rows.filter((r) => r[0] === 'reports_to_come').map((r) => r[1])).toEqual([...dates.slice(DAYS - 21), '']);
    const growth = csv(runDir(), 'growth.csv');
    expect(growth.header.join(',')).toBe('quantity,date,mean,sd,q05,q25,q50,q75,q95');
    expect(growth.rows).toHaveLength(3 * DAYS);
    const record = JSON.parse(readFileSync(join(runDir(), 'forecast.json'), 'utf8')) as Record<string, unknown>;
    expect(record).toMatchObject({ command: 'fit', horizon: HORIZON, reference_scenario: 'carry_on', draws: 200, scenario_file: 'futures.json' });
  });
});

describe('waxwane forecast RUN_DIR', () => {
  it('gives the same bytes as the fit for the same horizon and scenarios, without refitting', async () => {
    const out = join(work, 'again');
    const r = await runCli(['forecast', runDir(), '--horizon', String(HORIZON), '--scenarios', scenarioFile, '--out', out, '--quiet']);
    expect(r.code, r.stderr).toBe(0);
    for (const f of ['forecast.csv', 'scenarios.csv', 'nowcast.csv', 'growth.csv']) {
      expect(readFileSync(join(out, f)).equals(readFileSync(join(runDir(), f))), f).toBe(true);
    }
    expect(listDir(out)).toEqual([...FORECAST_OUTPUTS].sort());
  });

  it('--scale 1 gives the same rows as --hold', async () => {
    const out = join(work, 'scale-one');
    const r = await runCli(['forecast', runDir(), '--horizon', '10', '--hold', '--scale', '1', '--out', out, '--quiet']);
    expect(r.code, r.stderr).toBe(0);
    const { rows } = csv(out, 'forecast.csv');
    const of = (s: string) => rows.filter((x) => x[0] === s).map((x) => x.slice(1).join(','));
    expect(of('scaled').length).toBe(QUANTITIES.length * 10);
    expect(of('scaled')).toEqual(of('hold'));
  });

  it('uses the observed delays of a reporting triangle for the nowcast', async () => {
    // a triangle holding 30 reports per onset day, split by delay 0..21 as 1, 2, ..., 3 (any split will do)
    const lines = ['onset_date,delay,count'];
    for (let t = 0; t < DAYS; t++) {
      for (let d = 0; d <= 21 && t + d < DAYS; d++) lines.push(`${dates[t]},${d},${d < 10 ? d + 1 : 3}`);
    }
    const triangle = join(work, 'triangle.csv');
    writeFileSync(triangle, `${lines.join('\n')}\n`);
    const out = join(work, 'with-triangle');
    const r = await runCli(['forecast', runDir(), '--horizon', '7', '--triangle', triangle, '--out', out, '--quiet']);
    expect(r.code, r.stderr).toBe(0);
    const seen = csv(out, 'nowcast.csv').rows.filter((x) => x[0] === 'reports_seen' && x[1] !== '');
    // the onset day 2 days before the last has delays 0, 1, 2 seen: 1 + 2 + 3
    expect(seen[seen.length - 3]!.slice(1, 4)).toEqual([dates[DAYS - 3], '6', '0']);
    const record = JSON.parse(readFileSync(join(out, 'forecast.json'), 'utf8')) as { nowcast: { delays: string; triangle: { file: string } } };
    expect(record.nowcast.delays).toMatch(/^observed/);
    expect(record.nowcast.triangle.file).toBe('triangle.csv');
  });
});

describe('refusals: exit code 2, one line, nothing written', () => {
  const cases: Array<[string, () => string[], RegExp]> = [
    ['a folder that no fit wrote', () => ['forecast', work, '--out', join(work, 'x1')], /run\.json \(the run record\) is missing/],
    ['a measure within the observed days', () => ['forecast', runDir(), '--scale', '0.5', '--from', '2031-03-01', '--out', join(work, 'x2')], /--from 2031-03-01: the measure starts on 2031-03-01, within the observed days/],
    ['--scenarios with --hold', () => ['forecast', runDir(), '--scenarios', scenarioFile, '--hold', '--out', join(work, 'x3')], /--scenarios cannot be combined with --hold/],
    ['a horizon of 0 days', () => ['forecast', runDir(), '--horizon', '0', '--out', join(work, 'x4')], /--horizon must be a whole number from 1 to 365/],
    ['a scale of minus one', () => ['forecast', runDir(), '--scale', '-1', '--out', join(work, 'x5')], /--scale must be a positive number/],
    ['a triangle with a delay beyond the longest', () => {
      const bad = join(work, 'bad-triangle.csv');
      writeFileSync(bad, `onset_date,delay,count\n${dates[10]},22,1\n`);
      return ['forecast', runDir(), '--triangle', bad, '--out', join(work, 'x6')];
    }, /line 2, column "delay": the delay 22 is longer than the model's longest delay/],
    ['fit --hold without --horizon', () => ['fit', casesFile, '--population', '320000', '--out', join(work, 'x7'), ...SHORT, '--hold'], /--hold needs a forecast: add --horizon H/],
  ];
  const results = new Map<string, { result: RunResult; out: string }>();

  beforeAll(async () => {
    // all at once: each fails before any long work
    await Promise.all(
      cases.map(async ([what, args]) => {
        const argv = args();
        results.set(what, { result: await runCli(argv), out: argv[argv.indexOf('--out') + 1]! });
      }),
    );
  }, 120_000);

  for (const [what, , pattern] of cases) {
    it(what, () => {
      const { result: r, out } = results.get(what)!;
      expect(r.code, r.stderr).toBe(2);
      const lines = toolLines(r.stderr);
      expect(lines).toHaveLength(1);
      expect(lines[0]).toMatch(pattern);
      expect(existsSync(out)).toBe(false);
    });
  }

  it('replaces the forecast files of a run folder only with --force', async () => {
    const before = statSync(join(runDir(), 'forecast.csv')).mtimeMs;
    const refused = await runCli(['forecast', runDir(), '--horizon', '7']);
    expect(refused.code).toBe(2);
    expect(toolLines(refused.stderr)[0]).toMatch(/already holds forecast outputs.*pass --force/);
    expect(statSync(join(runDir(), 'forecast.csv')).mtimeMs).toBe(before);
    const forced = await runCli(['forecast', runDir(), '--horizon', '7', '--force', '--quiet']);
    expect(forced.code, forced.stderr).toBe(0);
    expect(csv(runDir(), 'forecast.csv').rows).toHaveLength(QUANTITIES.length * 7);
  });
});
