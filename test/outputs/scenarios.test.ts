import { describe, it, expect } from 'vitest';
import { scenarioRows, scenariosCsv, shareAt } from '../../src/outputs/scenarios.js';
import type { ScenarioTotals } from '../../src/outputs/forecast.js';

const LEVELS = [0.05, 0.5, 0.95];

function totals(values: Partial<Record<keyof ScenarioTotals, number[]>>, n: number): ScenarioTotals {
  const filled = (k: keyof ScenarioTotals) => Float64Array.from(values[k] ?? Array.from({ length: n }, () => 1));
  return {
    peakReportsDay: filled('peakReportsDay'),
    peakReports: filled('peakReports'),
    peakInfectionsDay: filled('peakInfectionsDay'),
    peakInfections: filled('peakInfections'),
    cumulativeInfections: filled('cumulativeInfections'),
    cumulativeReports: filled('cumulativeReports'),
  };
}

describe('scenarioRows', () => {
  it('summarises each scenario and the infections averted against the first, draw by draw', () => {
    const ref = totals({ cumulativeInfections: [100, 200, 300, 400, 500], peakReportsDay: [1, 2, 3, 4, 5] }, 5);
    // the same reduction of 10% in each draw: averted 10% of each draw's own total
    const cut = totals({ cumulativeInfections: [90, 180, 270, 360, 450], peakReportsDay: [3, 3, 3, 3, 3] }, 5);
    const rows = scenarioRows([{ name: 'a', totals: ref }, { name: 'b', totals: cut }], '2031-08-03', LEVELS);
    const get = (s: string, q: string) => rows.find((r) => r.scenario === s && r.quantity === q)!;
    expect(rows.filter((r) => r.scenario === 'a').map((r) => r.quantity)).not.toContain('averted_infections');
    expect(get('b', 'averted_infections').summary.mean).toBeCloseTo(30, 12);
    // type-7 quantiles of 10, 20, 30, 40, 50 (Hyndman and Fan 1996): 12, 30, 48
    expect(get('b', 'averted_infections').summary.quantiles).toEqual([12, 30, 48]);
    const share = get('b', 'averted_share').summary;
    expect(share.sd).toBeCloseTo(0, 12);
    for (const q of share.quantiles) expect(q).toBeCloseTo(0.1, 12);
    // peak days 1..5: quantiles 1.2, 3, 4.8, dated from the day after the last observed day
    expect(get('a', 'peak_reports_day').dates).toEqual(['2031-08-04', '2031-08-06', '2031-08-08']);
    expect(get('a', 'peak_reports').dates).toBeNull();
  });

  it('writes the date columns on the _day rows only', () => {
    const t = totals({}, 3);
    const csv = scenariosCsv(scenarioRows([{ name: 'only', totals: t }], '2031-12-31', LEVELS), LEVELS);
    const lines = csv.trim().split('\n');
    expect(lines[0]).toBe('scenario,quantity,mean,sd,q05,q50,q95,date_q05,date_q50,date_q95');
    expect(lines[1]).toBe('only,peak_reports_day,1,0,1,1,1,2032-01-01,2032-01-01,2032-01-01');
    expect(lines[2]).toBe('only,peak_reports,1,0,1,1,1,,,');
    expect(lines).toHaveLength(1 + 6);
  });
});

describe('shareAt', () => {
  it('counts the draws at a value, NaN draws left out', () => {
    expect(shareAt(Float64Array.from([28, 28, 3, NaN]), 28)).toBeCloseTo(2 / 3, 15);
    expect(shareAt(Float64Array.from([NaN]), 28)).toBeNaN();
  });
});
