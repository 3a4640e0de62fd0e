import { describe, expect, it } from 'vitest';
import { createRng } from '../../src/util/rng.js';
import { summaryCsv, diagnosticsCsv } from '../../src/outputs/summary.js';
import { combineTables, parseRegionsCsv, regionRow, regionsCsv, regionsHeader, summaryFields, tableHeaders } from '../../src/regions/combined.js';
import type { RegionOutcome } from '../../src/regions/region-task.js';

const LEVELS = [0.05, 0.5, 0.95];

function summaryOf(rows: Array<[string, string, number]>): string {
  return summaryCsv(rows.map(([quantity, date, v]) => ({ quantity, date, mean: v, sd: v / 10, quantiles: [v * 0.8, v, v * 1.2] })), LEVELS);
}

describe('combineTables', () => {
  const h = tableHeaders(LEVELS);
  it('puts a region column in front, regions in name order, names quoted as CSV needs', () => {
    const a = summaryOf([['effective_reproduction', '2031-02-01', 1.5]]);
    const b = summaryOf([['effective_reproduction', '2031-02-01', 0.5], ['ascertainment', '', 0.25]]);
    const out = combineTables(h.summary, [
      { name: 'Brack, Upper', text: b, file: 'b' },
      { name: 'Ashgrove', text: a, file: 'a' },
    ]);
    expect(out).toBe(
      'region,quantity,date,mean,sd,q05,q50,q95\n' +
        'Ashgrove,effective_reproduction,2031-02-01,1.5,0.15,1.2,1.5,1.8\n' +
        '"Brack, Upper",effective_reproduction,2031-02-01,0.5,0.05,0.4,0.5,0.6\n' +
        '"Brack, Upper",ascertainment,,0.25,0.025,0.2,0.25,0.3\n',
    );
  });

  it('writes the header alone when no region was fitted', () => {
    expect(combineTables(h.diagnostics, [])).toBe(`region,${diagnosticsCsv([])}`);
  });

  it('refuses a table with other columns, naming its file', () => {
    const other = summaryCsv([], [0.1, 0.9]);
    expect(() => combineTables(h.summary, [{ name: 'A', text: other, file: 'regions/a/summary.csv' }])).toThrow(/^regions\/a\/summary\.csv: the columns are/);
  });
});

describe('regions.csv', () => {
  const ok: RegionOutcome = {
    name: 'Ashgrove',
    status: 'ok',
    message: null,
    files: { summary: summaryOf([['effective_reproduction', '2031-02-01', 2], ['effective_reproduction', '2031-02-02', 1.25]]), diagnostics: '', forecast: null },
    run: { converged: true, maxRhat: 1.004, minEssBulk: 812.5, minEssTail: 900, firstDate: '2031-02-01', lastDate: '2031-02-02', days: 2, warnings: 1 },
    probAbove1: 0.875,
    notes: [],
    seconds: 1,
  };
  const failed: RegionOutcome = { ...ok, name: 'B "x", y', status: 'failed', message: 'c.csv, line 3: bad', files: null, run: null, probAbove1: null };

  it('carries the last day\'s R_t row as written and the probability, failed regions with their message', () => {
    const text = regionsCsv(LEVELS, [regionRow({ name: failed.name, folder: 'b-x-y', population: null, outcome: failed }, LEVELS), regionRow({ name: 'Ashgrove', folder: 'ashgrove', population: 180000, outcome: ok }, LEVELS)]);
    expect(text).toBe(
      `${regionsHeader(LEVELS).join(',')}\n` +
        'Ashgrove,ashgrove,ok,180000,2031-02-01,2031-02-02,2,1.25,0.125,1,1.25,1.5,0.875,1.004,812.5,900,1,\n' +
        '"B ""x"", y",b-x-y,failed,,,,,,,,,,,,,,,"c.csv, line 3: bad"\n',
    );
    const rows = parseRegionsCsv(text, 'regions.csv', LEVELS);
    expect(rows.map((r) => [r.region, r.status, r.get('prob_rt_above_1'), r.get('message')])).toEqual([
      ['Ashgrove', 'ok', '0.875', ''],
      ['B "x", y', 'failed', '', 'c.csv, line 3: bad'],
    ]);
    // read back and written again: the same bytes (what a merge relies on)
    expect(regionsCsv(LEVELS, rows.map((r) => r.fields))).toBe(text);
  });

  it('refuses a regions.csv of other quantile levels', () => {
    const text = regionsCsv([0.1, 0.9], []);
    expect(() => parseRegionsCsv(text, 'regions.csv', LEVELS)).toThrow(/regions\.csv, line 1: the columns are/);
  });

  it('summaryFields finds a row by quantity and date', () => {
    expect(summaryFields(ok.files!.summary, 'effective_reproduction', '2031-02-01')).toEqual(['2', '0.2', '1.6', '2', '2.4']);
    expect(summaryFields(ok.files!.summary, 'effective_reproduction', '2031-03-01')).toBeNull();
  });
});

describe('P(R_t > 1) from draws', () => {
  it('is the share of draws above 1 (Monte Carlo estimate of a normal tail)', async () => {
    const { shareAbove } = await import('../../src/regions/region-task.js');
    expect(shareAbove(Float64Array.of(0.9, 1.2, 1.5, 0.7, 1))).toBe(0.4);
    expect(Number.isNaN(shareAbove(new Float64Array(0)))).toBe(true);
    // draws from Normal(1.2, 0.2): P(X > 1) = 1 - Phi(-1) = 0.841344746 (Phi from @stdlib's
    // normal CDF); 200,000 draws give a standard error of 0.0008
    const { createRequire } = await import('node:module');
    const cdf = createRequire(import.meta.url)('@stdlib/stats/base/dists/normal/cdf') as (x: number, mu: number, sigma: number) => number;
    const rng = createRng(11);
    const draws = Float64Array.from({ length: 200_000 }, () => 1.2 + 0.2 * rng.normal());
    expect(shareAbove(draws)).toBeCloseTo(1 - cdf(1, 1.2, 0.2), 2);
  });
});
