import { describe, it, expect, beforeEach, afterEach } from 'vitest';
import { mkdtempSync, readFileSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { WaxwaneError } from '../../src/errors.js';
import { readRunFolder, roundTripDraws, parseDraws } from '../../src/io/run-folder.js';
import { drawsCsv } from '../../src/outputs/summary.js';
import { toCsv } from '../../src/outputs/format.js';
import { addDays } from '../../src/io/dates.js';
import { DEFAULT_PRIORS, syntheticDraws } from '../outputs/synthetic.js';

const DAYS = 30;
const FIRST = '2031-02-03';
let dir: string;
let draws: Float64Array;
let layoutDim: number;

/** A run folder as `waxwane fit` writes it (the parts later commands read). */
function writeRun(target: string): void {
  const s = syntheticDraws({ days: DAYS, population: 1e5, draws: 8, seed: 3 });
  draws = s.draws;
  layoutDim = s.model.layout.dim;
  const half = 4 * layoutDim;
  const chains = [draws.slice(0, half), draws.slice(half)];
  writeFileSync(join(target, 'draws.csv'), drawsCsv(s.model.layout, chains, [new Float64Array(4).fill(-100), new Float64Array(4).fill(-101)]));
  const dates = Array.from({ length: DAYS }, (_, t) => addDays(FIRST, t));
  writeFileSync(join(target, 'data.csv'), toCsv(['date', 'cases'], dates.map((d, t) => [d, t === 5 ? '' : String(t * 2)])));
  const run = {
    tool: 'waxwane',
    command: 'fit',
    input: { first_date: FIRST, last_date: dates[DAYS - 1], days: DAYS, population: 1e5, region: null },
    priors: { file: 'default.json', set: DEFAULT_PRIORS },
    options: { seed: 42, quantiles: [0.5, 0.1, 0.9] },
    converged: false,
  };
  writeFileSync(join(target, 'run.json'), JSON.stringify(run, null, 2));
}

beforeEach(() => {
  dir = mkdtempSync(join(tmpdir(), 'waxwane-run-'));
  writeRun(dir);
});
afterEach(() => rmSync(dir, { recursive: true, force: true }));

function refusal(pattern: RegExp): void {
  let error: unknown;
  try {
    readRunFolder(dir);
  } catch (e) {
    error = e;
  }
  expect(error).toBeInstanceOf(WaxwaneError);
  expect((error as Error).message).toMatch(pattern);
}

describe('readRunFolder', () => {
  it('rebuilds the model and gives the draws back as unconstrained vectors', () => {
    const run = readRunFolder(dir);
    expect(run.population).toBe(1e5);
    expect(run.dates).toHaveLength(DAYS);
    expect(run.dates[0]).toBe(FIRST);
    expect(Number.isNaN(run.counts[5])).toBe(true);
    expect(run.counts[6]).toBe(12);
    expect(run.firstWeekday).toBe(0); // 2031-02-03 is a Monday
    expect(run.seed).toBe(42);
    expect(run.quantiles).toEqual([0.1, 0.5, 0.9]);
    expect(run.converged).toBe(false);
    expect(run.drawCount).toBe(8);
    expect(run.model.layout.dim).toBe(layoutDim);
    expect(run.model.simDays).toBe(DAYS + 14);
    // 12 significant digits in natural units: within 1e-11 relative on each entry
    for (let i = 0; i < draws.length; i++) expect(Math.abs(run.draws[i]! - draws[i]!)).toBeLessThan(1e-10 * Math.max(1, Math.abs(draws[i]!)));
    // and exactly what roundTripDraws gives the fit
    expect(Array.from(run.draws)).toEqual(Array.from(roundTripDraws(run.model.layout, draws)));
  });

  it('refuses a folder without a fit record, or with missing files', () => {
    rmSync(join(dir, 'draws.csv'));
    refusal(/draws\.csv \(the posterior draws\) is missing/);
    rmSync(join(dir, 'run.json'));
    refusal(/run\.json \(the run record\) is missing; give the folder that "waxwane fit --out" wrote/);
  });

  it('refuses a run record of another command or without its fields', () => {
    const run = JSON.parse(readFileSync(join(dir, 'run.json'), 'utf8')) as Record<string, Record<string, unknown>>;
    writeFileSync(join(dir, 'run.json'), JSON.stringify({ ...run, command: 'simulate' }));
    refusal(/not the record of a "waxwane fit" run/);
    writeFileSync(join(dir, 'run.json'), JSON.stringify({ ...run, input: { ...run.input, population: -3 } }));
    refusal(/field "input\.population": must be a positive number/);
    writeFileSync(join(dir, 'run.json'), JSON.stringify({ ...run, priors: { set: { ...(run.priors!.set as object), priors: {} } } }));
    refusal(/run\.json \(priors\.set\)/);
  });

  it('refuses data.csv of another series and draws of another model', () => {
    const data = readFileSync(join(dir, 'data.csv'), 'utf8').split('\n');
    writeFileSync(join(dir, 'data.csv'), data.slice(0, -3).join('\n') + '\n');
    refusal(/data\.csv: the series \(28 days from 2031-02-03\) is not the one run\.json records \(30 days/);
  });
});

describe('parseDraws', () => {
  const { model } = syntheticDraws({ days: DAYS, population: 1e5, draws: 1, seed: 3 });
  const L = model.layout;
  const header = ['chain', 'draw', 'log_density', ...L.names].join(',');
  const row = (values: string[]) => ['1', '1', '-10', ...values].join(',');
  const good = L.names.map((name) => (name === 'ascertainment' ? '0.3' : name.startsWith('walk_step') ? '-0.5' : '2'));

  it('reads natural units: logs, logits and plain steps', () => {
    const theta = parseDraws(`${header}\n${row(good)}\n`, 'draws.csv', L);
    expect(theta[L.ascertainment]).toBeCloseTo(Math.log(0.3 / 0.7), 14);
    expect(theta[L.firstStep]).toBe(-0.5);
    expect(theta[L.walkScale]).toBeCloseTo(Math.log(2), 14);
  });

  it('refuses other columns, damaged rows and values outside a parameter range', () => {
    expect(() => parseDraws(`${header.replace('walk_scale', 'scale')}\n${row(good)}\n`, 'draws.csv', L)).toThrow(/line 1: the columns do not match.*"walk_scale", found "scale"/);
    expect(() => parseDraws(`${header}\n${row(good.slice(1))}\n`, 'draws.csv', L)).toThrow(/line 2: has/);
    expect(() => parseDraws(`${header}\n${row(good.map((v, i) => (i === 0 ? 'x' : v)))}\n`, 'draws.csv', L)).toThrow(/line 2, column "start_reproduction": "x" is not a finite number/);
    const bad = good.map((v, i) => (i === L.ascertainment ? '1.5' : v));
    expect(() => parseDraws(`${header}\n${row(bad)}\n`, 'draws.csv', L)).toThrow(/column "ascertainment": 1.5 is outside the range/);
    expect(() => parseDraws(`${header}\n`, 'draws.csv', L)).toThrow(/holds no draws/);
  });
});
