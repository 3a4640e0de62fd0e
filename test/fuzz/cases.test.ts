/**
 * Fuzzing the case-file reader (src/io/cases.ts): random bytes and random edits of the demo
 * data never make parseCases or readCases throw anything but a one-line WaxwaneError, and
 * whatever they accept is a well-formed series (consecutive ISO dates; counts missing or whole,
 * non-negative and safe).
 */
import { mkdtempSync, readFileSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import fc from 'fast-check';
import { afterAll, describe, expect, it } from 'vitest';
import { parseCases, readCases, type CaseData } from '../../src/io/cases.js';
import { addDays } from '../../src/io/dates.js';
import { editedText, expectOnlyToolErrors, randomBytesAsText } from './mutations.js';

const ROOT = new URL('../../', import.meta.url);
/** The first 40 days of the demo town, and a few days of the demo districts (with a region column). */
const ONE_PLACE = readFileSync(new URL('data-demo/larkmere/cases.csv', ROOT), 'utf8').split('\n').slice(0, 41).join('\n') + '\n';
const DISTRICT_LINES = readFileSync(new URL('data-demo/districts/cases.csv', ROOT), 'utf8').split('\n');
const REGIONS = [DISTRICT_LINES[0], ...DISTRICT_LINES.slice(1).filter((_, i) => i % 45 < 6)].join('\n') + '\n';
const WITH_POPULATION = 'date,cases,population\n2031-02-03,4,5000\n2031-02-04,,5000\n2031-02-05,7,\n2031-02-07,0,5000\n';

/** What an accepted file must look like. */
function checkAccepted(data: CaseData, input: string): void {
  expect(data.series.length, input).toBeGreaterThan(0);
  for (const s of data.series) {
    expect(s.dates.length).toBe(s.counts.length);
    expect(s.dates[0]).toBe(s.firstDate);
    for (let i = 1; i < s.dates.length; i++) expect(s.dates[i]).toBe(addDays(s.dates[i - 1]!, 1));
    let seen = 0;
    for (const c of s.counts) {
      if (Number.isNaN(c)) continue;
      seen++;
      expect(Number.isSafeInteger(c) && c >= 0, `${c} in ${JSON.stringify(input)}`).toBe(true);
    }
    expect(seen).toBeGreaterThan(0);
    if (s.population !== undefined) expect(Number.isSafeInteger(s.population) && s.population > 0).toBe(true);
  }
  for (const w of data.warnings) expect(w).not.toMatch(/[\r\n]/);
}

function parsesOrRefuses(text: string): void {
  const data = expectOnlyToolErrors(() => parseCases(text, 'cases.csv'), text) as CaseData | undefined;
  if (data !== undefined) checkAccepted(data, text);
}

describe('parseCases under fuzzing', () => {
  it('random bytes: a series or a one-line WaxwaneError', () => {
    fc.assert(fc.property(randomBytesAsText, parsesOrRefuses), { seed: 0x5eed01, numRuns: 300 });
  });

  it('random printable and binary strings', () => {
    fc.assert(
      fc.property(fc.oneof(fc.string({ maxLength: 200 }), fc.string({ unit: 'binary', maxLength: 100 })), parsesOrRefuses),
      { seed: 0x5eed02, numRuns: 300 },
    );
  });

  it.each([
    ['the demo town (one place)', ONE_PLACE, 0x5eed03],
    ['the demo districts (region column)', REGIONS, 0x5eed04],
    ['a file with a population column and gaps', WITH_POPULATION, 0x5eed05],
  ])('random edits of %s', (_, base, seed) => {
    // the unedited file is accepted, so the edits are what the property is about
    checkAccepted(parseCases(base, 'cases.csv'), base);
    fc.assert(fc.property(editedText(base), parsesOrRefuses), { seed, numRuns: 400 });
  });

  it('other column options on edited files', () => {
    const options = fc.record({
      dateColumn: fc.constantFrom('date', 'cases', 'region', '', ' date', '__proto__', 'constructor'),
      countColumn: fc.constantFrom('cases', 'date', 'population', '', 'toString', '__proto__'),
      regionColumn: fc.constantFrom('region', 'date', 'cases', 'population', '', 'hasOwnProperty'),
    });
    fc.assert(
      fc.property(editedText(REGIONS, 3), options, (text, o) => {
        const data = expectOnlyToolErrors(() => parseCases(text, 'cases.csv', o), text) as CaseData | undefined;
        if (data !== undefined) checkAccepted(data, text);
      }),
      { seed: 0x5eed06, numRuns: 200 },
    );
  });
});

describe('parseCases with any header', () => {
  it('column names that are prototype members or odd text are just names', () => {
    // a table keyed by column name in a plain object breaks on "__proto__" or "hasOwnProperty"
    const names = ['date', 'cases', 'region', 'population', '', ' ', '"q"', ...Object.getOwnPropertyNames(Object.prototype), 'prototype'];
    const quote = (n: string) => (/[",\r\n]/.test(n) ? `"${n.replace(/"/g, '""')}"` : n);
    const file = fc
      .tuple(fc.shuffledSubarray(names, { minLength: 1, maxLength: 6 }), fc.array(fc.constantFrom('2031-02-03', '2031-02-04', '5', '', 'constructor', '__proto__'), { minLength: 6, maxLength: 24 }))
      .map(([header, cells]) => {
        const rows: string[] = [];
        for (let i = 0; i + header.length <= cells.length; i += header.length) rows.push(cells.slice(i, i + header.length).map(quote).join(','));
        return `${header.map(quote).join(',')}\n${rows.join('\n')}\n`;
      });
    fc.assert(fc.property(file, parsesOrRefuses), { seed: 0x5eed08, numRuns: 400 });
    // and one that must work
    const data = parseCases('hasOwnProperty,date,__proto__,cases,valueOf\nx,2031-02-03,y,4,z\n', 'cases.csv');
    expect(Array.from(data.series[0]!.counts)).toEqual([4]);
  });
});

describe('readCases under fuzzing (bytes from a file: encodings, archives, byte-order marks)', () => {
  const dir = mkdtempSync(join(tmpdir(), 'waxwane-fuzz-cases-'));
  afterAll(() => rmSync(dir, { recursive: true, force: true }));

  it('random bytes, and valid bytes with random bytes spliced in', () => {
    const file = join(dir, 'cases.csv');
    const base = Buffer.from(ONE_PLACE, 'utf8');
    const bytes = fc.oneof(
      fc.uint8Array({ maxLength: 200 }),
      fc
        .tuple(fc.nat({ max: base.length }), fc.uint8Array({ minLength: 1, maxLength: 8 }), fc.constantFrom([], [0xef, 0xbb, 0xbf], [0xff, 0xfe], [0x50, 0x4b, 3, 4]))
        .map(([at, piece, prefix]) => Buffer.concat([Buffer.from(prefix), base.subarray(0, at), piece, base.subarray(at)])),
    );
    fc.assert(
      fc.property(bytes, (b) => {
        writeFileSync(file, b);
        const data = expectOnlyToolErrors(() => readCases(file), Buffer.from(b).toString('hex')) as CaseData | undefined;
        if (data !== undefined) checkAccepted(data, Buffer.from(b).toString('hex'));
      }),
      { seed: 0x5eed07, numRuns: 200 },
    );
  });
});
