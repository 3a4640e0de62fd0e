import { describe, expect, it } from 'vitest';
import { fromCSV } from 'arquero';
import { parseCases } from '../../src/io/cases.js';
import { blankRecords, isBlankRecord, splitRecords } from '../../src/regions/csv-records.js';

/** The fields arquero (a general-purpose table library) reads from `text`, row by row. */
function arqueroRows(text: string): string[][] {
  const csv = /[\r\n]$/.test(text) ? text : `${text}\n`;
  const t = fromCSV(csv, { autoType: false, header: false });
  const cols = t.columnNames();
  return Array.from({ length: t.numRows() }, (_, i) =>
    cols.map((c) => {
      const v: unknown = t.column(c)!.at(i);
      return typeof v === 'string' ? v : '';
    }),
  );
}

const TRICKY = [
  'date,cases,region\n2031-01-01,3,"Brack, Upper"\n2031-01-02,4,"say ""hi"""\n',
  'a,b,c\r\n1, 2 ,x y\r\n"",,""\r\n',
  'a,b\n"line\nbreak",2\n3,4',
  'a,b\r1,2\r3,4\r',
  'name,v\n  padded  ,1\n\ttab,2\n',
];

describe('splitRecords', () => {
  it.each(TRICKY.map((t, i) => [i, t] as const))('reads the same fields as arquero (text %i)', (_, text) => {
    // arquero's CSV reader is the reference for field values (quoting, doubled quotes, CRLF, lone CR)
    expect(splitRecords(text).map((r) => r.fields)).toEqual(arqueroRows(text));
  });

  it('numbers records by the line they start on, counting line breaks inside quotes', () => {
    const records = splitRecords('a,b\n"x\ny",1\n"p\r\nq",2\nlast,3');
    expect(records.map((r) => r.line)).toEqual([1, 2, 4, 6]);
    expect(records[3]!.end).toBe('a,b\n"x\ny",1\n"p\r\nq",2\nlast,3'.length);
  });

  it('refuses an unclosed quote and text after a closing quote, naming the line', () => {
    expect(() => splitRecords('a,b\n1,"open\n2,3\n')).toThrow(/line 2: a quoted field is never closed/);
    expect(() => splitRecords('a,b\n1,2\n"x"y,3\n')).toThrow(/line 3: text follows a closing quote/);
  });

  it('marks blank lines and rows of empty fields', () => {
    const r = splitRecords('a,b\n\n , \n"",""\n1,2\n');
    expect(r.map((x) => [isBlankRecord(x), x.empty])).toEqual([
      [false, false],
      [true, true],
      [false, true],
      [false, true],
      [false, false],
    ]);
  });
});

describe('blankRecords', () => {
  it('empties the records given and keeps every other line where it was', () => {
    const text = 'date,cases,region\n2031-01-01,1,A\n2031-01-01,-3,B\n"2031-01-02",2,"A"\n2031-01-02,x\ny,B\n';
    // (the last record is malformed on purpose: a bare line break ends it)
    const records = splitRecords(text);
    const b = records.filter((r) => r.fields[2] === 'B' || r.fields[0] === 'y');
    const out = blankRecords(text, b);
    expect(out.split('\n').length).toBe(text.split('\n').length);
    expect(out).toBe('date,cases,region\n2031-01-01,1,A\n\n"2031-01-02",2,"A"\n2031-01-02,x\n\n');
  });

  it('leaves a text the case reader reads with its original line numbers', () => {
    const text = 'date,cases,region\n2031-01-01,1,A\n2031-01-01,-3,B\n2031-01-02,2,A\n2031-01-03,x,A\n';
    const records = splitRecords(text);
    const out = blankRecords(text, records.filter((r) => r.fields[2] === 'B'));
    expect(() => parseCases(out, 'f.csv')).toThrow(/^f\.csv, line 5, column "cases": the count "x" is not a number/);
  });
});
