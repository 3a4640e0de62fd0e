import { describe, expect, it } from 'vitest';
import fc from 'fast-check';
import { parseShard, regionList, selectRegions, shardRegions } from '../../src/regions/selection.js';

describe('parseShard', () => {
  it('reads K/N', () => {
    expect(parseShard('2/8')).toEqual({ index: 2, count: 8 });
    expect(parseShard(' 1 / 1 ')).toEqual({ index: 1, count: 1 });
  });

  it.each(['0/4', '5/4', '1/0', '1', '1/2/3', 'a/b', '-1/4', '1.5/4', '', '1/100001'])('refuses "%s"', (s) => {
    expect(() => parseShard(s)).toThrow(/--shard must be K\/N/);
  });
});

describe('shardRegions', () => {
  it('deals the sorted names round the shards', () => {
    const names = ['a', 'b', 'c', 'd', 'e'];
    expect(shardRegions(names, { index: 1, count: 2 })).toEqual(['a', 'c', 'e']);
    expect(shardRegions(names, { index: 2, count: 2 })).toEqual(['b', 'd']);
    expect(shardRegions(names, { index: 7, count: 7 })).toEqual([]);
    expect(shardRegions(names, null)).toEqual(names);
  });

  it('gives every name to exactly one of N shards, shard sizes within one of each other', () => {
    fc.assert(
      fc.property(fc.uniqueArray(fc.string(), { maxLength: 60 }), fc.integer({ min: 1, max: 12 }), (raw, n) => {
        const names = [...raw].sort();
        const shards = Array.from({ length: n }, (_, k) => shardRegions(names, { index: k + 1, count: n }));
        const all = shards.flat().sort();
        const sizes = shards.map((s) => s.length);
        return JSON.stringify(all) === JSON.stringify(names) && Math.max(...sizes) - Math.min(...sizes) <= 1;
      }),
    );
  });
});

describe('regionList', () => {
  it('splits at commas, ignores spaces around names, and reads quoted names as CSV does', () => {
    expect(regionList(' Tansy , "Marl, Upper",x')).toEqual(['Tansy', 'Marl, Upper', 'x']);
    expect(regionList('"say ""hi""" ,  "  padded "')).toEqual(['say "hi"', '  padded ']);
    expect(regionList('a,,b')).toEqual(['a', '', 'b']);
    expect(regionList('a,')).toEqual(['a', '']);
  });

  it('refuses an unclosed quote and text after one', () => {
    expect(() => regionList('a,"b')).toThrow(/a quoted name is never closed/);
    expect(() => regionList('"a"b,c')).toThrow(/text follows a quoted name/);
  });
});

describe('selectRegions', () => {
  const names = ['Ashgrove', 'Brindle Cross', 'Dunmarrow'];
  it('keeps the named regions in the order of the file, spaces around names ignored', () => {
    expect(selectRegions(names, 'Dunmarrow, Ashgrove', 'c.csv')).toEqual(['Ashgrove', 'Dunmarrow']);
    expect(selectRegions(names, undefined, 'c.csv')).toEqual(names);
  });

  it('names a region that is not in the file, and lists those that are', () => {
    expect(() => selectRegions(names, 'Ashgrove,Zed', 'c.csv')).toThrow(/^c\.csv: no region "Zed" in the file \(regions: "Ashgrove", "Brindle Cross", "Dunmarrow"\)/);
  });

  it('refuses an empty name and a name given twice', () => {
    expect(() => selectRegions(names, 'Ashgrove,,Dunmarrow', 'c.csv')).toThrow(/empty name/);
    expect(() => selectRegions(names, 'Ashgrove,Ashgrove', 'c.csv')).toThrow(/names "Ashgrove" more than once/);
  });
});
