import { mkdtempSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { afterAll, describe, expect, it } from 'vitest';
import { readCases } from '../../src/io/cases.js';
import { countRegions, readRegionCases } from '../../src/regions/read-cases.js';

const dir = mkdtempSync(join(tmpdir(), 'waxwane-read-regions-'));
afterAll(() => rmSync(dir, { recursive: true, force: true }));
const COLUMNS = { dateColumn: 'date', countColumn: 'cases', regionColumn: 'region' };

function file(name: string, text: string): string {
  const path = join(dir, name);
  writeFileSync(path, text);
  return path;
}

/** Three regions over four days, rows interleaved; `edit` changes the row of (region, day). */
function threeRegions(edit: (region: string, day: number, count: string) => string = (_r, _d, c) => c): string {
  const lines = ['date,cases,region'];
  for (let d = 1; d <= 4; d++) for (const r of ['A', 'B', 'C']) lines.push(`2031-02-0${d},${edit(r, d, String(d + r.charCodeAt(0) - 64))},${r}`);
  return `${lines.join('\n')}\n`;
}

describe('readRegionCases', () => {
  it('reads a clean file as the case reader does', () => {
    const f = file('clean.csv', threeRegions());
    const r = readRegionCases(f, COLUMNS);
    const whole = readCases(f, COLUMNS);
    expect(r.names).toEqual(['A', 'B', 'C']);
    expect(r.failed.size).toBe(0);
    expect(r.sha256).toBe(whole.sha256);
    for (const s of whole.series) expect(r.series.get(s.region!)).toEqual(s);
  });

  it('sets a region with a refused row aside, with the message and line the whole file gets', () => {
    // row of B on day 2 is line 6 (header 1, then A, B, C per day)
    const f = file('negative.csv', threeRegions((r, d, c) => (r === 'B' && d === 2 ? '-3' : c)));
    expect(() => readCases(f, COLUMNS)).toThrow(/, line 6, column "cases": the count "-3" is negative/);
    const r = readRegionCases(f, COLUMNS);
    expect([...r.failed.keys()]).toEqual(['B']);
    expect(r.failed.get('B')).toBe(`${f}, line 6, column "cases": the count "-3" is negative; correct it (a count cannot be below 0), or leave the cell blank if the day is unknown`);
    expect([...r.series.keys()]).toEqual(['A', 'C']);
    expect(Array.from(r.series.get('C')!.counts)).toEqual([4, 5, 6, 7]);
  });

  it('sets several regions aside, each with its own first refused row', () => {
    const f = file('two-bad.csv', threeRegions((r, d, c) => (r === 'C' && d === 1 ? '2.5' : r === 'A' && d >= 3 ? 'NA' : c)));
    const r = readRegionCases(f, COLUMNS);
    expect([...r.failed.keys()].sort()).toEqual(['A', 'C']);
    expect(r.failed.get('C')).toMatch(/, line 4, column "cases": the count "2\.5" is not a whole number/);
    expect(r.failed.get('A')).toMatch(/, line 8, column "cases": the count "NA" is not a number/);
    expect([...r.series.keys()]).toEqual(['B']);
  });

  it('sets aside a region refused after its rows are read: every count blank, a duplicated day', () => {
    const blank = file('blank.csv', threeRegions((r, _d, c) => (r === 'A' ? '' : c)));
    const r1 = readRegionCases(blank, COLUMNS);
    expect(r1.failed.get('A')).toMatch(/every count for region "A" is blank/);
    const dup = file('dup.csv', `${threeRegions()}2031-02-02,9,C\n`);
    const r2 = readRegionCases(dup, COLUMNS);
    expect(r2.failed.get('C')).toMatch(/, line 14, column "date": date 2031-02-02 appears twice in region "C" \(also on line 7\)/);
    expect([...r2.series.keys()]).toEqual(['A', 'B']);
  });

  it('sets aside a region whose population column is below its cases', () => {
    const text = 'date,cases,region,population\n2031-02-01,5,A,100\n2031-02-01,50,B,20\n2031-02-02,5,A,100\n2031-02-02,50,B,20\n';
    const r = readRegionCases(file('pop.csv', text), COLUMNS);
    expect(r.failed.get('B')).toMatch(/the population of region "B" \(20\) is smaller than the total reported cases \(100\)/);
    expect(r.series.get('A')!.population).toBe(100);
  });

  it('keeps a problem of the whole file an error of the whole file', () => {
    expect(() => readRegionCases(file('fields.csv', `${threeRegions()}2031-02-05,1\n`), COLUMNS)).toThrow(/line 14: the row has 2 fields but the header has 3/);
    expect(() => readRegionCases(file('noregion.csv', `${threeRegions()}2031-02-05,1,\n`), COLUMNS)).toThrow(/line 14, column "region": the region is blank/);
    expect(() => readRegionCases(file('header.csv', threeRegions().replace('cases', 'count')), COLUMNS)).toThrow(/line 1, column "cases": no count column/);
    expect(() => readRegionCases(file('plain.csv', 'date,cases\n2031-02-01,3\n'), COLUMNS)).toThrow(/no region column "region"/);
  });

  it('tells a region its own gaps and the file its empty rows', () => {
    const text = 'date,cases,region\n2031-02-01,1,A\n2031-02-03,1,A\n,,\n2031-02-01,1,B\n2031-02-02,1,B\n';
    const f = file('gaps.csv', text);
    const r = readRegionCases(f, COLUMNS);
    expect(r.regionWarnings.get('A')).toEqual([`${f}, region "A": 1 day with no row (2031-02-02) is treated as missing`]);
    expect(r.regionWarnings.get('B')).toEqual([]);
    expect(r.fileWarnings).toEqual([`${f}: 1 row with no values (line 4) skipped`]);
  });

  it('fails every region, and nothing else, when every region is refused', () => {
    const r = readRegionCases(file('all-bad.csv', threeRegions((_r, d, c) => (d === 4 ? '-1' : c))), COLUMNS);
    expect([...r.failed.keys()].sort()).toEqual(['A', 'B', 'C']);
    expect(r.series.size).toBe(0);
  });
});

describe('countRegions', () => {
  it('counts the regions named, or says it cannot tell', () => {
    expect(countRegions(file('count.csv', threeRegions()), 'region')).toBe(3);
    expect(countRegions(file('count-plain.csv', 'date,cases\n2031-02-01,3\n'), 'region')).toBeNull();
    expect(countRegions(join(dir, 'missing.csv'), 'region')).toBeNull();
    expect(countRegions(file('count-quote.csv', 'date,cases,region\n2031-02-01,3,"A\n'), 'region')).toBeNull();
  });
});
