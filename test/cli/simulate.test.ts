/**
 * `waxwane simulate` as a real process: it must reproduce the shipped demo data byte for byte
 * from the scenarios and seeds that scripts/make-demo-data.js records, be deterministic in its
 * seed, write the documented columns, and keep the truth consistent with the model's
 * definitions. Six short runs of the tool.
 */
import { readFileSync } from 'node:fs';
import { join } from 'node:path';
import { pathToFileURL } from 'node:url';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { makeTempDir, removeDir, runCli, ROOT } from './helpers.js';

interface DemoEntry {
  scenario: string;
  out: string;
  seed: number;
}

// the script is plain JavaScript without type declarations; importing it by URL keeps the
// type checker out of it, and its command-line part only runs when node runs it directly
const { DEMO_DATA } = (await import(pathToFileURL(join(ROOT, 'scripts', 'make-demo-data.js')).href)) as {
  DEMO_DATA: DemoEntry[];
};

interface ScenarioFile {
  start_date: string;
  days: number;
  places: Array<{ name: string; infectious_days: number }>;
}

const TRUTH_COLUMNS = ['transmission_rate', 'basic_reproduction', 'effective_reproduction', 'infections', 'onsets', 'expected_reports'];

let work: string;
beforeAll(() => {
  work = makeTempDir('waxwane-sim-');
});
afterAll(() => {
  removeDir(work);
});

/** Runs `simulate` into a new folder under `work`; returns the two files' bytes. */
async function simulate(entry: DemoEntry, seed: number, name: string): Promise<{ cases: Buffer; truth: Buffer }> {
  const out = join(work, name);
  const r = await runCli(['simulate', entry.scenario, '--out', out, '--seed', String(seed), '--quiet'], { cwd: ROOT });
  expect(r.code, r.stderr).toBe(0);
  expect(r.stderr).toBe('');
  return { cases: readFileSync(join(out, 'cases.csv')), truth: readFileSync(join(out, 'truth.csv')) };
}

function parseCsv(text: string): { header: string[]; rows: string[][] } {
  // the files hold no quoted fields (place names without commas), so a split is exact
  expect(text.endsWith('\n')).toBe(true);
  const lines = text.slice(0, -1).split('\n');
  return { header: lines[0]!.split(','), rows: lines.slice(1).map((l) => l.split(',')) };
}

/** ISO date `n` days after `iso`, through Date in UTC (independent of src/io/dates.ts). */
function plusDays(iso: string, n: number): string {
  return new Date(Date.parse(`${iso}T00:00:00Z`) + n * 86_400_000).toISOString().slice(0, 10);
}

it('DEMO_DATA lists the shipped demo folders', () => {
  expect(DEMO_DATA.map((d) => d.out).sort()).toEqual(['data-demo/districts', 'data-demo/larkmere']);
});

describe.each(DEMO_DATA)('simulate $scenario --seed $seed', (entry) => {
  const scenario = JSON.parse(readFileSync(join(ROOT, entry.scenario), 'utf8')) as ScenarioFile;
  const several = scenario.places.length > 1;
  let first: { cases: Buffer; truth: Buffer };

  beforeAll(async () => {
    first = await simulate(entry, entry.seed, `${entry.seed}-a`);
  });

  it('reproduces the shipped cases.csv and truth.csv byte for byte', () => {
    expect(first.cases.equals(readFileSync(join(ROOT, entry.out, 'cases.csv')))).toBe(true);
    expect(first.truth.equals(readFileSync(join(ROOT, entry.out, 'truth.csv')))).toBe(true);
  });

  it('writes the documented columns, one row per day and place, in date order', () => {
    const cases = parseCsv(first.cases.toString('utf8'));
    const truth = parseCsv(first.truth.toString('utf8'));
    expect(cases.header).toEqual(several ? ['date', 'cases', 'region'] : ['date', 'cases']);
    expect(truth.header).toEqual(['date', ...(several ? ['region'] : []), ...TRUTH_COLUMNS]);
    expect(cases.rows).toHaveLength(scenario.days * scenario.places.length);
    expect(truth.rows).toHaveLength(cases.rows.length);
    scenario.places.forEach((place, p) => {
      for (let t = 0; t < scenario.days; t++) {
        const row = p * scenario.days + t;
        const date = plusDays(scenario.start_date, t);
        expect(cases.rows[row]!.slice(0, 1)).toEqual([date]);
        expect(truth.rows[row]![0]).toBe(date);
        if (several) {
          expect(cases.rows[row]![2]).toBe(place.name);
          expect(truth.rows[row]![1]).toBe(place.name);
        }
        expect(cases.rows[row]![1]).toMatch(/^\d+$/);
      }
    });
  });

  it('keeps the truth consistent with the model definitions', () => {
    const { header, rows } = parseCsv(first.truth.toString('utf8'));
    const col = (name: string) => header.indexOf(name);
    const place = (row: string[]) => (several ? scenario.places.find((p) => p.name === row[1])! : scenario.places[0]!);
    for (const row of rows) {
      const beta = Number(row[col('transmission_rate')]);
      const basic = Number(row[col('basic_reproduction')]);
      const effective = Number(row[col('effective_reproduction')]);
      for (const name of TRUTH_COLUMNS) expect(Number.isFinite(Number(row[col(name)])), `${name} in ${row.join(',')}`).toBe(true);
      expect(beta).toBeGreaterThan(0);
      // basic reproduction R0(t) = beta(t) * D, D the mean infectious period (MODEL.md section 5;
      // for the SEIR model e.g. Keeling and Rohani 2008, ch. 2); the file rounds to 8 digits
      expect(Math.abs(basic - beta * place(row).infectious_days) / basic).toBeLessThanOrEqual(1e-6);
      // R_eff = R0 * S / N with S <= N (MODEL.md section 5)
      expect(effective).toBeGreaterThan(0);
      expect(effective).toBeLessThanOrEqual(basic);
      for (const name of ['infections', 'onsets', 'expected_reports']) expect(Number(row[col(name)])).toBeGreaterThanOrEqual(0);
    }
  });
});

describe('the seed', () => {
  const entry = DEMO_DATA.find((d) => d.out === 'data-demo/larkmere')!;

  it('the same seed gives the same bytes; another seed other cases on the same truth', async () => {
    const [a, b, c] = await Promise.all([
      simulate(entry, 77, 'seed-77-a'),
      simulate(entry, 77, 'seed-77-b'),
      simulate(entry, 78, 'seed-78'),
    ]);
    expect(a.cases.equals(b.cases)).toBe(true);
    expect(a.truth.equals(b.truth)).toBe(true);
    expect(a.cases.equals(c.cases)).toBe(false);
    // the noise is the only random part: the truth does not depend on the seed
    expect(a.truth.equals(c.truth)).toBe(true);
    // and the two case series differ on many days, not by a fluke on one
    const counts = (x: Buffer) => parseCsv(x.toString('utf8')).rows.map((r) => r[1]);
    const ca = counts(a.cases);
    const cc = counts(c.cases);
    expect(ca.filter((v, i) => v !== cc[i]).length).toBeGreaterThan(ca.length / 2);
  });
});
