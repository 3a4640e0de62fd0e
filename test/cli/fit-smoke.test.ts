/**
 * `waxwane fit` end to end, as a real process, on the first 60 days of the Larkmere demo data.
 * The fits are deliberately SHORT (2 chains, 300 warm-up, 100 draws: about two seconds each;
 * four of them, run together) so this file stays fast: they cannot converge, and only the
 * structure of the outputs, the exit codes and the reproducibility are checked here, not the
 * estimates.
 */
import { createHash } from 'node:crypto';
import { existsSync, readFileSync, writeFileSync } from 'node:fs';
import { join } from 'node:path';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { makeTempDir, removeDir, runCli, ROOT, type RunResult } from './helpers.js';

const DAYS = 60;
const SHORT = ['--chains', '2', '--warmup', '300', '--draws', '100', '--thin', '1', '--seed', '3'];
const DAILY = [
  'transmission_rate',
  'basic_reproduction',
  'effective_reproduction',
  'growth_rate',
  'infections',
  'onsets',
  'expected_reports',
  'predicted_reports',
];
/** The scalar parameters of MODEL.md section 4 (weekday effects are off by default). */
const MODEL_SCALARS = ['start_reproduction', 'walk_scale', 'ascertainment', 'dispersion', 'seed_infected', 'latent_days', 'infectious_days'];

const population = String(
  (JSON.parse(readFileSync(join(ROOT, 'data-demo', 'scenarios', 'larkmere.json'), 'utf8')) as { places: Array<{ population: number }> })
    .places[0]!.population,
);

let work: string;
let casesFile: string;
let casesBytes: Buffer;
let dates: string[];
const runs = {} as Record<'one' | 'two' | 'strict' | 'levels', { result: RunResult; out: string }>;

beforeAll(async () => {
  work = makeTempDir('waxwane-fit-');
  const lines = readFileSync(join(ROOT, 'data-demo', 'larkmere', 'cases.csv'), 'utf8').split('\n');
  casesBytes = Buffer.from(`${lines.slice(0, DAYS + 1).join('\n')}\n`, 'utf8');
  casesFile = join(work, 'larkmere-60.csv');
  writeFileSync(casesFile, casesBytes);
  dates = lines.slice(1, DAYS + 1).map((l) => l.split(',')[0]!);
  const fit = async (name: keyof typeof runs, ...extra: string[]) => {
    const out = join(work, name);
    runs[name] = { out, result: await runCli(['fit', casesFile, '--population', population, '--out', out, ...SHORT, ...extra]) };
  };
  await Promise.all([
    fit('one', '--threads', '1'),
    fit('two', '--threads', '2', '--quiet'),
    fit('strict', '--threads', '1', '--require-converged', '--quiet'),
    fit('levels', '--threads', '1', '--quantiles', '0.1,0.5,0.9', '--quiet'),
  ]);
});

afterAll(() => {
  removeDir(work);
});

function csv(name: keyof typeof runs, file: string): { header: string[]; rows: string[][] } {
  const text = readFileSync(join(runs[name].out, file), 'utf8');
  expect(text.endsWith('\n')).toBe(true);
  const lines = text.slice(0, -1).split('\n');
  // no field of these files is quoted (no commas in names or dates), so a split is exact
  return { header: lines[0]!.split(','), rows: lines.slice(1).map((l) => l.split(',')) };
}

/** Names of the sampled parameters: the draws.csv columns after chain, draw, log_density. */
function sampledParameters(): string[] {
  const { header } = csv('one', 'draws.csv');
  expect(header.slice(0, 3)).toEqual(['chain', 'draw', 'log_density']);
  return header.slice(3);
}

describe('a short fit (--threads 1)', () => {
  it('ends with exit code 0 and says plainly that it has not converged', () => {
    const { result } = runs.one;
    expect(result.code, result.stderr).toBe(0);
    // 2 chains x 100 draws can never reach the bulk ESS of 400 that convergence needs
    expect(result.stderr).toMatch(/not converged/i);
    expect(result.stderr).not.toMatch(/^\s+at /m);
  });

  it('writes the four outputs', () => {
    for (const f of ['summary.csv', 'diagnostics.csv', 'draws.csv', 'run.json']) expect(existsSync(join(runs.one.out, f)), f).toBe(true);
  });

  it('summary.csv: every daily quantity once per date, every parameter once without a date', () => {
    const { header, rows } = csv('one', 'summary.csv');
    expect(header.join(',')).toBe('quantity,date,mean,sd,q05,q25,q50,q75,q95');
    const parameters = sampledParameters();
    for (const s of MODEL_SCALARS) expect(parameters).toContain(s);
    const expected = [...DAILY.flatMap((q) => dates.map((d) => `${q}|${d}`)), ...parameters.map((p) => `${p}|`)];
    const seen = rows.map((r) => `${r[0]}|${r[1]}`);
    expect(new Set(seen).size).toBe(seen.length);
    expect([...seen].sort()).toEqual([...expected].sort());
    expect(rows).toHaveLength(DAILY.length * DAYS + parameters.length);
  });

  it('summary.csv: finite numbers, sd >= 0 and ordered quantiles on every row', () => {
    const { rows } = csv('one', 'summary.csv');
    for (const r of rows) {
      expect(r, r.join(',')).toHaveLength(9);
      const values = r.slice(2).map(Number);
      // growth_rate could only be NaN if R were 0, which a positive walk on log beta excludes
      for (const v of values) expect(Number.isFinite(v), r.join(',')).toBe(true);
      const [, sd, ...q] = values as [number, number, ...number[]];
      expect(sd).toBeGreaterThanOrEqual(0);
      for (let i = 1; i < q.length; i++) expect(q[i - 1]!, r.join(',')).toBeLessThanOrEqual(q[i]!);
    }
  });

  it('diagnostics.csv: one row per sampled parameter, in the order of draws.csv', () => {
    const { header, rows } = csv('one', 'diagnostics.csv');
    expect(header.join(',')).toBe('parameter,rhat,ess_bulk,ess_tail,mcse_mean');
    expect(rows.map((r) => r[0])).toEqual(sampledParameters());
    for (const r of rows) expect(r).toHaveLength(5);
  });

  it('draws.csv: 2 chains x 100 draws, a finite value in every cell', () => {
    const { header, rows } = csv('one', 'draws.csv');
    expect(rows).toHaveLength(2 * 100);
    const keys = rows.map((r) => `${r[0]}:${r[1]}`);
    expect(new Set(keys).size).toBe(200);
    expect(new Set(rows.map((r) => r[0]))).toEqual(new Set(['1', '2']));
    for (const r of rows) {
      expect(r).toHaveLength(header.length);
      for (const v of r) expect(Number.isFinite(Number(v)), r.join(',')).toBe(true);
    }
  });

  it('run.json: input hash, convergence, seed and options', () => {
    const run = JSON.parse(readFileSync(join(runs.one.out, 'run.json'), 'utf8')) as {
      input: { sha256: string; days: number; first_date: string; last_date: string; population: number };
      converged: boolean;
      options: Record<string, unknown>;
    };
    // SHA-256 of the exact bytes written above, by node:crypto
    expect(run.input.sha256).toBe(createHash('sha256').update(casesBytes).digest('hex'));
    expect(run.input).toMatchObject({ days: DAYS, first_date: dates[0], last_date: dates[DAYS - 1], population: Number(population) });
    expect(run.converged).toBe(false);
    expect(run.options).toMatchObject({ chains: 2, warmup: 300, draws: 100, thin: 1, seed: 3, quantiles: [0.05, 0.25, 0.5, 0.75, 0.95] });
  });
});

describe('options of the same short fit', () => {
  it('--require-converged: exit code 3, the outputs still written and saying so', () => {
    const { result, out } = runs.strict;
    expect(result.code, result.stderr).toBe(3);
    expect(result.stderr).toMatch(/not converged/i);
    const run = JSON.parse(readFileSync(join(out, 'run.json'), 'utf8')) as { converged: boolean };
    expect(run.converged).toBe(false);
  });

  it('--quantiles 0.1,0.5,0.9: columns q10, q50, q90', () => {
    expect(runs.levels.result.code, runs.levels.result.stderr).toBe(0);
    const { header, rows } = csv('levels', 'summary.csv');
    expect(header.join(',')).toBe('quantity,date,mean,sd,q10,q50,q90');
    for (const r of rows) {
      const [q10, q50, q90] = r.slice(4).map(Number) as [number, number, number];
      expect(q10).toBeLessThanOrEqual(q50);
      expect(q50).toBeLessThanOrEqual(q90);
    }
  });

  it('--threads 2 gives the same bytes as --threads 1', () => {
    expect(runs.two.result.code, runs.two.result.stderr).toBe(0);
    for (const f of ['summary.csv', 'diagnostics.csv', 'draws.csv']) {
      const one = readFileSync(join(runs.one.out, f));
      const two = readFileSync(join(runs.two.out, f));
      expect(one.equals(two), f).toBe(true);
    }
  });
});
