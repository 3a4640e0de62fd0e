import { describe, expect, it } from 'vitest';
import { regionSeed } from '../../src/regions/seeds.js';

describe('regionSeed', () => {
  it('depends on the run seed and the name only', () => {
    expect(regionSeed(7, 'Ashgrove')).toBe(regionSeed(7, 'Ashgrove'));
    expect(regionSeed(7, 'Ashgrove')).not.toBe(regionSeed(8, 'Ashgrove'));
    expect(regionSeed(7, 'Ashgrove')).not.toBe(regionSeed(7, 'ashgrove'));
  });

  it('gives a thousand regions a thousand different seeds, each a valid 32-bit seed', () => {
    const seeds = Array.from({ length: 1000 }, (_, i) => regionSeed(1, `district ${i}`));
    expect(new Set(seeds).size).toBe(1000);
    expect(seeds.every((s) => Number.isInteger(s) && s >= 1 && s <= 2 ** 32 - 1)).toBe(true);
  });
});
