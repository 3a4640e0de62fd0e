import { mkdtempSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { afterAll, describe, expect, it } from 'vitest';
import type { CaseSeries } from '../../src/io/cases.js';
import { readPopulations, resolvePopulations } from '../../src/regions/populations.js';

const dir = mkdtempSync(join(tmpdir(), 'waxwane-populations-'));
afterAll(() => rmSync(dir, { recursive: true, force: true }));

function file(name: string, text: string): string {
  const path = join(dir, name);
  writeFileSync(path, text);
  return path;
}

function series(region: string, population?: number): CaseSeries {
  return { region, firstDate: '2031-02-01', dates: ['2031-02-01'], counts: Float64Array.of(1), ...(population === undefined ? {} : { population }) };
}

describe('readPopulations', () => {
  it('reads region,population rows, quoted names and extra columns included', () => {
    const t = readPopulations(file('ok.csv', '\uFEFFpopulation,region,note\r\n95000,"Brack, Upper",x\r\n180000,Ashgrove,\r\n'), 'region');
    expect([...t.values]).toEqual([
      ['Brack, Upper', 95000],
      ['Ashgrove', 180000],
    ]);
    expect(t.sha256).toMatch(/^[0-9a-f]{64}$/);
  });

  it('accepts the case file\'s region column name', () => {
    expect(readPopulations(file('district.csv', 'district,population\nA,10\n'), 'district').values.get('A')).toBe(10);
  });

  it.each([
    ['no population column', 'region,people\nA,10\n', /line 1: the header must name a region column \("region"\) and a "population" column/],
    ['zero', 'region,population\nA,0\n', /line 2, column "population": the population of region "A" is "0", not a positive whole number/],
    ['blank', 'region,population\nA,\n', /line 2, column "population": the population of region "A" is blank/],
    ['a fraction', 'region,population\nA,10\nB,2.5\n', /line 3, column "population": the population of region "B" is "2\.5"/],
    ['a region twice', 'region,population\nA,10\nB,5\nA,11\n', /line 4, column "region": region "A" is listed twice \(also on line 2\)/],
    ['a blank region', 'region,population\n,10\n', /line 2, column "region": the region is blank/],
    ['a short row', 'region,population\nA\n', /line 2: the row has 1 fields but the header has 2/],
    ['no rows', 'region,population\n', /the file has a header but no rows/],
  ])('refuses %s, naming the line', (_, text, message) => {
    expect(() => readPopulations(file('bad.csv', text), 'region')).toThrow(message);
  });

  it('refuses a missing file', () => {
    expect(() => readPopulations(join(dir, 'none.csv'), 'region')).toThrow(/none\.csv: no such file/);
  });
});

describe('resolvePopulations', () => {
  const all = ['A', 'B', 'C'];
  const s = new Map([
    ['A', series('A', 100)],
    ['B', series('B')],
    ['C', series('C', 300)],
  ]);

  it('takes the file first, then the population column', () => {
    const table = { file: 'p.csv', sha256: '', values: new Map([['B', 200], ['C', 333]]) };
    const r = resolvePopulations(all, all, s, table, 'c.csv');
    expect([...r.values]).toEqual([['A', 100], ['B', 200], ['C', 333]]);
    expect([...r.source]).toEqual([['A', 'column'], ['B', 'file'], ['C', 'file']]);
    expect(r.warnings).toEqual(['p.csv and the "population" column of c.csv differ for "C"; the values of p.csv are used']);
  });

  it('names every region that has no population', () => {
    expect(() => resolvePopulations(all, all, s, null, 'c.csv')).toThrow(/^c\.csv: no population for region "B"; give each region its population/);
    const none = new Map(all.map((n) => [n, series(n)]));
    expect(() => resolvePopulations(all, all, none, null, 'c.csv')).toThrow(/no population for 3 regions: "A", "B", "C"/);
    // a region outside the selection needs none
    expect(resolvePopulations(['A'], all, s, null, 'c.csv').values.get('A')).toBe(100);
  });

  it('warns of populations for regions the case file does not have', () => {
    const table = { file: 'p.csv', sha256: '', values: new Map([['B', 200], ['Bee', 1]]) };
    expect(resolvePopulations(all, all, s, table, 'c.csv').warnings).toEqual([
      'p.csv: a region not in c.csv ("Bee") ignored; check the spelling if a region was meant',
    ]);
  });
});
