import { mkdirSync, mkdtempSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { afterAll, describe, expect, it } from 'vitest';
import { differingOptions, isRegionsRunFolder, namesDigest, readRegionsRun } from '../../src/regions/run-record.js';

const dir = mkdtempSync(join(tmpdir(), 'waxwane-run-record-'));
afterAll(() => rmSync(dir, { recursive: true, force: true }));

function folder(name: string, run: unknown): string {
  const d = join(dir, name);
  mkdirSync(d, { recursive: true });
  writeFileSync(join(d, 'run.json'), typeof run === 'string' ? run : JSON.stringify(run));
  return d;
}

const GOOD = {
  tool: 'waxwane',
  version: '0.1.0',
  command: 'fit',
  layout: 'regions',
  files: { cases: { file: 'c.csv', sha256: 'ab', region_column: 'region', regions_in_file: 2 }, populations: null, scenarios: null },
  priors: { file: 'default.json', set: {} },
  options: { quantiles: [0.05, 0.5, 0.95], seed: 1 },
  selection: { regions: 2, names_sha256: 'cd', shard: { index: 1, count: 2 } },
  regions: [{ name: 'A', folder: 'a', status: 'ok', message: null, seed: 5, population: 10, population_source: 'file', seconds: 1 }],
  warnings: [],
  caution: 'c',
};

describe('readRegionsRun', () => {
  it('reads the record of a multi-region run', () => {
    const d = folder('good', GOOD);
    expect(isRegionsRunFolder(d)).toBe(true);
    expect(readRegionsRun(d).regions[0]!.name).toBe('A');
  });

  it('tells a single-place run, a folder without run.json and a bad field apart', () => {
    const single = folder('single', { ...GOOD, layout: undefined });
    expect(isRegionsRunFolder(single)).toBe(false);
    expect(() => readRegionsRun(single)).toThrow(/the run of a single place, not of several regions/);
    expect(() => readRegionsRun(join(dir, 'none'))).toThrow(/no run\.json in this folder/);
    const bad = folder('bad', { ...GOOD, regions: [{ ...GOOD.regions[0], folder: '../x' }] });
    expect(() => readRegionsRun(bad)).toThrow(/field "regions\.0\.folder": must be a folder name/);
  });
});

describe('differingOptions', () => {
  it('lists the options whose values differ, arrays compared by value', () => {
    expect(differingOptions({ a: 1, q: [0.1, 0.9], s: null }, { a: 1, q: [0.1, 0.9], s: null })).toEqual([]);
    expect(differingOptions({ a: 1, q: [0.1, 0.9] }, { a: 2, q: [0.1, 0.5], b: true })).toEqual(['a', 'q', 'b']);
  });
});

describe('namesDigest', () => {
  it('tells selections apart, commas in names included', () => {
    expect(namesDigest(['a,b'])).not.toBe(namesDigest(['a', 'b']));
    expect(namesDigest(['a', 'b'])).toBe(namesDigest(['a', 'b']));
  });
});
