import { describe, it, expect } from 'vitest';
import { WaxwaneError } from '../../src/errors.js';
import { alignTriangle, parseReportingTriangle } from '../../src/io/reporting-triangle.js';

const FILE = 'triangle.csv';
const FIRST = '2031-07-01';
const LAST = '2031-07-10';

function refused(text: string, pattern: RegExp, last = LAST): void {
  let error: unknown;
  try {
    alignTriangle(parseReportingTriangle(text, FILE), FIRST, last, 5);
  } catch (e) {
    error = e;
  }
  expect(error).toBeInstanceOf(WaxwaneError);
  expect((error as Error).message).toMatch(/^triangle\.csv/);
  expect((error as Error).message).toMatch(pattern);
}

describe('parseReportingTriangle and alignTriangle', () => {
  it('places each count at its onset row and delay; absent pairs are zero', () => {
    const text = '\uFEFFcount,onset_date,delay\r\n4,2031-06-29,0\r\n"11",2031-06-29,3\r\n\r\n6,2031-07-10,0\r\n';
    const tri = alignTriangle(parseReportingTriangle(text, FILE), FIRST, LAST, 5);
    // onset rows from 2031-06-29 (two days before the first observed day) to 2031-07-10
    expect(tri.firstOnset).toBe(-2);
    expect(tri.lastDay).toBe(9);
    expect(tri.maxDelay).toBe(5);
    expect(tri.counts.length).toBe(12 * 6);
    expect(tri.counts[0]).toBe(4);
    expect(tri.counts[3]).toBe(11);
    expect(tri.counts[11 * 6]).toBe(6);
    expect(tri.counts.reduce((a, b) => a + b, 0)).toBe(21);
  });

  it('refuses bad rows, naming the line and column', () => {
    refused('onset,delay,count\n2031-07-01,0,1\n', /line 1: no column "onset_date"/);
    refused('onset_date,delay,count\n07/01/2031,0,1\n', /line 2, column "onset_date": "07\/01\/2031" is not a date/);
    refused('onset_date,delay,count\n2031-07-01,-1,1\n', /line 2, column "delay".*not a whole number/);
    refused('onset_date,delay,count\n2031-07-01,0,2.5\n', /line 2, column "count".*not a whole number/);
    refused('onset_date,delay,count\n2031-07-01,0,1\n2031-07-01,0,2\n', /line 3: onset date 2031-07-01 with delay 0 was already given on line 2/);
    refused('onset_date,delay,count\n2031-07-01,0\n', /line 2: has 2 fields/);
    refused('onset_date,delay,count\n', /holds no rows/);
  });

  it("refuses delays beyond the model's longest and reports after the last observed day", () => {
    refused('onset_date,delay,count\n2031-07-01,6,1\n', /line 2, column "delay": the delay 6 is longer than the model's longest delay \(5 days/);
    refused('onset_date,delay,count\n2031-07-08,3,1\n', /line 2: onset 2031-07-08 plus delay 3 is after the last observed day 2031-07-10/);
  });
});
