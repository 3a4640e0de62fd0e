/**
 * Fuzzing the reporting-triangle reader (src/io/reporting-triangle.ts): random bytes and text
 * edits of a valid triangle never make parseReportingTriangle, nor alignTriangle on the demo
 * run's days, throw anything but a one-line WaxwaneError.
 */
import fc from 'fast-check';
import { describe, expect, it } from 'vitest';
import { alignTriangle, parseReportingTriangle, type ReportingTriangle } from '../../src/io/reporting-triangle.js';
import { editedText, expectOnlyToolErrors, randomBytesAsText } from './mutations.js';

/** A small valid triangle: the last four onset days of a run ending 2031-08-03, delays 0..3. */
const BASE = [
  'onset_date,delay,count',
  ...['2031-07-31', '2031-08-01', '2031-08-02', '2031-08-03'].flatMap((d, i) =>
    [0, 1, 2, 3].filter((k) => i + k <= 3).map((k) => `${d},${k},${(i + 1) * (k + 2)}`),
  ),
].join('\n') + '\n';

function parsesAndAligns(text: string): void {
  const tri = expectOnlyToolErrors(() => parseReportingTriangle(text, 'triangle.csv'), text) as ReportingTriangle | undefined;
  if (tri !== undefined) expectOnlyToolErrors(() => alignTriangle(tri, '2031-02-03', '2031-08-03', 21), text);
}

describe('parseReportingTriangle and alignTriangle under fuzzing', () => {
  it('the base triangle is accepted and aligned', () => {
    const counts = alignTriangle(parseReportingTriangle(BASE, 'triangle.csv'), '2031-02-03', '2031-08-03', 21);
    expect(counts.lastDay - counts.firstOnset + 1).toBe(4);
  });

  it('random bytes and strings', () => {
    fc.assert(fc.property(fc.oneof(randomBytesAsText, fc.string({ maxLength: 200 })), parsesAndAligns), { seed: 0x7a0001, numRuns: 300 });
  });

  it('random text edits of a valid triangle (dates, delays, counts, quotes, columns)', () => {
    fc.assert(fc.property(editedText(BASE), parsesAndAligns), { seed: 0x7a0002, numRuns: 500 });
  });
});
