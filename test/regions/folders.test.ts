import { describe, expect, it } from 'vitest';
import fc from 'fast-check';
import { folderStem, regionFolders } from '../../src/regions/folders.js';

describe('folderStem', () => {
  it.each([
    ['Brindle Cross', 'brindle-cross'],
    ['Coldharbour Fen', 'coldharbour-fen'],
    ['Öster Åby', 'oster-aby'],
    ['--rm -rf /; $(echo x)', 'rm-rf-echo-x'],
    ['../..', 'region'],
    ['CON', 'con-region'],
    ['新市', 'region'],
  ])('%s -> %s', (name, stem) => {
    expect(folderStem(name)).toBe(stem);
  });
});

describe('regionFolders', () => {
  it('makes names that differ only in case or punctuation unique, in name order', () => {
    const f = regionFolders(['brindle cross', 'Brindle Cross', 'Brindle-Cross']);
    expect([...f.entries()]).toEqual([
      ['Brindle Cross', 'brindle-cross'],
      ['Brindle-Cross', 'brindle-cross-2'],
      ['brindle cross', 'brindle-cross-3'],
    ]);
  });

  it('gives safe, unique folder names whatever the region names', () => {
    fc.assert(
      fc.property(fc.uniqueArray(fc.string({ unit: 'grapheme-composite', maxLength: 80 }), { maxLength: 40 }), (names) => {
        const folders = [...regionFolders(names).values()];
        return (
          folders.length === names.length &&
          new Set(folders).size === folders.length &&
          folders.every((f) => /^[a-z0-9][a-z0-9-]*$/.test(f) && f.length <= 60)
        );
      }),
    );
  });

  it('gives a region the same folder whatever the order the names come in', () => {
    const names = ['b', 'B', 'a b', 'a-b', 'A B'];
    expect(regionFolders(names)).toEqual(regionFolders([...names].reverse()));
  });
});
