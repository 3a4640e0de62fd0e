/**
 * The page of a multi-region run (src/outputs/report/regions-page.ts), built from a folder
 * written here by the same functions as a fit writes it (regions/combined.ts, run-record.ts),
 * with invented numbers: ranking, small multiples, failures, escaping.
 */
import { mkdirSync, mkdtempSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { summaryCsv } from '../../src/outputs/summary.js';
import { regionRow, regionsCsv } from '../../src/regions/combined.js';
import { countStatuses, regionsRunJson, type RegionRecord, type RegionsRun } from '../../src/regions/run-record.js';
import type { RegionOutcome } from '../../src/regions/region-task.js';
import { buildRegionsReport, readRegionsFolder } from '../../src/outputs/report/regions-page.js';

const LEVELS = [0.05, 0.25, 0.5, 0.75, 0.95];
const DATES = ['2031-03-01', '2031-03-02', '2031-03-03'];
const EVIL = '<script>alert(1)</script> & "Co"';
let dir: string;

/** A region whose R_t moves from `from` to `to`, P(R_t > 1) = p. */
function outcome(name: string, from: number, to: number, p: number): RegionOutcome {
  const rt = DATES.map((date, t) => {
    const v = from + ((to - from) * t) / (DATES.length - 1);
    return { quantity: 'effective_reproduction', date, mean: v, sd: 0.1, quantiles: [v - 0.2, v - 0.1, v, v + 0.1, v + 0.2] };
  });
  return {
    name,
    status: 'ok',
    message: null,
    files: { summary: summaryCsv(rt, LEVELS), diagnostics: '', forecast: null },
    run: { converged: true, maxRhat: 1.002, minEssBulk: 900, minEssTail: 950, firstDate: DATES[0]!, lastDate: DATES[2]!, days: 3, warnings: 0 },
    probAbove1: p,
    notes: [],
    seconds: 1,
  };
}

beforeAll(() => {
  dir = mkdtempSync(join(tmpdir(), 'waxwane-regions-page-'));
  const regions = [
    { name: 'Ashgrove', folder: 'ashgrove', outcome: outcome('Ashgrove', 1.4, 0.8, 0.05) },
    { name: EVIL, folder: 'script-alert-1-script-co', outcome: outcome(EVIL, 0.9, 1.3, 0.97) },
    { name: 'Tansy', folder: 'tansy', outcome: outcome('Tansy', 1, 1.05, 0.6) },
    { name: 'Marl', folder: 'marl', outcome: { ...outcome('Marl', 1, 1, 0), status: 'failed' as const, message: 'c.csv, line 9: <bad>', files: null, run: null, probAbove1: null } },
  ];
  for (const r of regions) {
    if (r.outcome.files === null) continue;
    mkdirSync(join(dir, 'regions', r.folder), { recursive: true });
    writeFileSync(join(dir, 'regions', r.folder, 'summary.csv'), r.outcome.files.summary);
  }
  writeFileSync(join(dir, 'regions', 'tansy', 'report.html'), '<!DOCTYPE html>');
  writeFileSync(join(dir, 'regions.csv'), regionsCsv(LEVELS, regions.map((r) => regionRow({ ...r, population: 1000 }, LEVELS))));
  const records: RegionRecord[] = regions.map((r) => ({ name: r.name, folder: r.folder, status: r.outcome.status, message: r.outcome.message, seed: 1, population: 1000, population_source: 'file', seconds: 1 }));
  const run: RegionsRun = {
    tool: 'waxwane',
    version: '0.1.0',
    command: 'fit',
    layout: 'regions',
    files: { cases: { file: 'cases.csv', sha256: 'ab'.repeat(32), region_column: 'region', regions_in_file: 4 }, populations: null, scenarios: null },
    priors: { file: 'default.json', set: { name: 'default' } },
    options: { seed: 3, quantiles: LEVELS, horizon: 0 },
    selection: { regions: 4, names_sha256: 'cd', shard: null },
    merged_from: [],
    threads: 2,
    workers: 2,
    threads_per_region: 1,
    versions: {},
    timings_seconds: { total: 1 },
    counts: countStatuses(records),
    regions: records,
    warnings: [],
    caution: 'Model-based estimates.',
  };
  writeFileSync(join(dir, 'run.json'), regionsRunJson(run));
});

afterAll(() => rmSync(dir, { recursive: true, force: true }));

describe('buildRegionsReport', () => {
  it('ranks the regions by P(R_t > 1), failed last, and links those that have a report', async () => {
    const { html, chartWarnings } = await buildRegionsReport(readRegionsFolder(dir));
    expect(chartWarnings).toEqual([]);
    const table = html.slice(html.indexOf('<table>'), html.indexOf('</table>'));
    const order = ['&lt;script&gt;alert(1)&lt;/script&gt; &amp; &quot;Co&quot;', 'Tansy', 'Ashgrove', 'Marl'].map((n) => table.indexOf(`${n}<`));
    expect(order.every((i) => i > 0)).toBe(true);
    expect([...order].sort((a, b) => a - b)).toEqual(order);
    expect(table).toContain('<a href="regions/tansy/report.html">Tansy</a>');
    expect(table).not.toContain('href="regions/ashgrove/report.html"');
    expect(table).toContain('0.97');
    expect(html).toContain('1 failed');
  });

  it('draws the fitted regions as small multiples and lists the failure with its reason, all text escaped', async () => {
    const { html } = await buildRegionsReport(readRegionsFolder(dir));
    expect((html.match(/<svg/g) ?? []).length).toBe(1);
    expect(html).not.toMatch(/<script/i);
    expect(html).toContain('c.csv, line 9: &lt;bad&gt;');
    // the SVG names each panel (the chart library escapes its text)
    const svg = html.slice(html.indexOf('<svg'), html.indexOf('</svg>'));
    for (const n of ['Ashgrove', 'Tansy', '&lt;script&gt;']) expect(svg).toContain(n);
    expect(svg).not.toContain('Marl');
  });
});
