import { createHash } from 'node:crypto';
import { mkdtempSync, readFileSync, rmSync, writeFileSync, mkdirSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { fileURLToPath } from 'node:url';
import { afterAll, describe, expect, it } from 'vitest';
import { WaxwaneError } from '../../src/errors.js';
import {
  checkPopulation,
  parseCases,
  readCases,
  totalCases,
  type CaseOptions,
  type CaseSeries,
} from '../../src/io/cases.js';

const FILE = 'reports.csv';
const FIXTURE = new URL('../fixtures/cases/two-regions-bom-crlf.csv', import.meta.url);

function thrown(fn: () => unknown): WaxwaneError {
  try {
    fn();
  } catch (err) {
    expect(err).toBeInstanceOf(WaxwaneError);
    return err as WaxwaneError;
  }
  throw new Error('expected a WaxwaneError, nothing was thrown');
}

function counts(series: CaseSeries): Array<number | null> {
  return Array.from(series.counts, (c) => (Number.isNaN(c) ? null : c));
}

interface Bad {
  name: string;
  text: string;
  /** line named in the message, when a line applies */
  line?: number;
  /** column named in the message, when a column applies */
  column?: string;
  /** the part of the message that says what to do */
  hint: RegExp;
  options?: CaseOptions;
}

const REGIONS = 'date,cases,region\n';

const BAD: Bad[] = [
  { name: 'a month 13', text: 'date,cases\n2031-01-31,4\n2031-13-01,5\n', line: 3, column: 'date', hint: /not a real calendar date; correct the date \(YYYY-MM-DD/ },
  { name: 'a day-first date', text: 'date,cases\n03/02/2031,5\n', line: 2, column: 'date', hint: /not an ISO date; write dates as YYYY-MM-DD/ },
  { name: 'February 30', text: 'date,cases\n2031-02-30,5\n', line: 2, column: 'date', hint: /not a real calendar date/ },
  // Gregorian rule (common knowledge): 2100 is not a leap year
  { name: '2100-02-29', text: 'date,cases\n2100-02-29,5\n', line: 2, column: 'date', hint: /not a real calendar date/ },
  { name: 'a date with a time', text: 'date,cases\n2031-02-03T00:00:00Z,5\n', line: 2, column: 'date', hint: /YYYY-MM-DD/ },
  { name: 'a one-digit month', text: 'date,cases\n2031-2-03,5\n', line: 2, column: 'date', hint: /YYYY-MM-DD/ },
  { name: 'a blank date', text: 'date,cases\n2031-02-01,1\n,5\n', line: 3, column: 'date', hint: /blank; write the date as YYYY-MM-DD, or delete the row/ },
  { name: 'a duplicated date', text: 'date,cases\n2031-02-01,1\n2031-02-02,2\n2031-02-01,3\n', line: 4, column: 'date', hint: /appears twice \(also on line 2\); keep one row per day/ },
  { name: 'a duplicated date within a region', text: `${REGIONS}2031-02-01,1,Oakmere\n2031-02-01,1,Tarn\n2031-02-01,3,Tarn\n`, line: 4, column: 'date', hint: /twice in region "Tarn" \(also on line 3\); keep one row per day/ },
  { name: 'a negative count', text: 'date,cases\n2031-02-01,-3\n', line: 2, column: 'cases', hint: /negative; correct it .*cannot be below 0/ },
  { name: 'a fractional count', text: 'date,cases\n2031-02-01,2.5\n', line: 2, column: 'cases', hint: /not a whole number; write a whole number/ },
  { name: 'a word as count', text: 'date,cases\n2031-02-01,many\n', line: 2, column: 'cases', hint: /not a number; write a whole number in plain digits/ },
  { name: 'NA as count', text: 'date,cases\n2031-02-01,1\n2031-02-02,NA\n', line: 3, column: 'cases', hint: /leave the cell blank if the day is unknown/ },
  { name: 'a thousands separator', text: 'date,cases\n2031-02-01,"1,234"\n', line: 2, column: 'cases', hint: /no thousands separators/ },
  { name: 'exponent notation', text: 'date,cases\n2031-02-01,1e3\n', line: 2, column: 'cases', hint: /exponent notation; write it in plain digits/ },
  { name: 'a plus sign', text: 'date,cases\n2031-02-01,+4\n', line: 2, column: 'cases', hint: /has a sign; write it in plain digits without "\+"/ },
  { name: 'a count beyond safe integers', text: 'date,cases\n2031-02-01,9007199254740993\n', line: 2, column: 'cases', hint: /too large; a count must be at most 9007199254740991/ },
  { name: 'an empty file (0 bytes)', text: '', hint: /empty; give a CSV file with a header line/ },
  { name: 'a file of blank lines', text: '  \n\n\r\n', hint: /empty; give a CSV file with a header line/ },
  { name: 'a byte-order mark alone', text: '\uFEFF', hint: /empty; give a CSV file/ },
  { name: 'a header and no rows', text: 'date,cases\n', hint: /no data rows; add one row per day/ },
  { name: 'a header and blank lines', text: 'date,cases\n\n\n', hint: /no data rows; add one row per day/ },
  { name: 'an empty first line', text: '\ndate,cases\n2031-02-01,1\n', line: 1, hint: /first line must be the header/ },
  { name: 'no date column', text: 'day,cases\n2031-02-01,1\n', line: 1, column: 'date', hint: /columns found: "day", "cases"\); rename the column in the header, or choose another with --date-column/ },
  { name: 'no count column', text: 'date,count\n2031-02-01,1\n', line: 1, column: 'cases', hint: /columns found: "date", "count"\); rename .*--count-column/ },
  { name: 'a count column with a stray space', text: 'date, cases\n2031-02-01,1\n', line: 1, column: 'cases', hint: /\(is it " cases"\?\), or choose another with --count-column/ },
  { name: 'a chosen count column that is absent', text: 'date,cases\n2031-02-01,1\n', options: { countColumn: 'reported' }, line: 1, column: 'reported', hint: /--count-column/ },
  { name: 'semicolons between values', text: 'date;cases\n2031-02-01;1\n', line: 1, column: 'date', hint: /seems to use ";" between values: save it with commas/ },
  { name: 'a column named twice', text: 'date,cases,cases\n2031-02-01,1,2\n', line: 1, column: 'cases', hint: /more than once; give each column a different name/ },
  { name: 'a NUL byte', text: 'date,cases\n2031-02-01,1\n2031-02-02,\u00003\n', line: 3, hint: /binary data .*U\+0000.*; give a plain-text CSV file/ },
  { name: 'binary bytes', text: 'date,cases\n\u0001\u0002\u0003\u00ff\n', line: 2, hint: /binary data/ },
  { name: 'a JSON array', text: '[{"date":"2031-02-01","cases":1}]\n', line: 1, hint: /JSON, not CSV; give a comma-separated file/ },
  { name: 'a JSON object', text: '{\n  "date": ["2031-02-01"],\n  "cases": [1]\n}\n', line: 1, hint: /JSON, not CSV/ },
  { name: 'too many fields', text: 'date,cases\n2031-02-01,1\n2031-02-02,2,7\n', line: 3, hint: /3 fields but the header has 2; check for missing or extra commas/ },
  { name: 'too few fields', text: 'date,cases,region\n2031-02-01,1,Oakmere\n2031-02-02,2\n', line: 3, hint: /2 fields but the header has 3/ },
  { name: 'an unclosed quote', text: 'date,cases,region\n2031-02-01,1,Oakmere\n2031-02-02,2,"Tarn\n2031-02-03,3,Tarn\n', line: 3, hint: /never closed; add the closing quote/ },
  { name: 'text after a closing quote', text: 'date,cases,region\n2031-02-01,1,"Oak"mere\n', line: 2, hint: /follows a closing quote.*; quote the whole field/ },
  { name: 'only blank counts', text: 'date,cases\n2031-02-01,\n2031-02-02,\n', column: 'cases', hint: /every count is blank; at least one day needs a reported count/ },
  { name: 'a region with only blank counts', text: `${REGIONS}2031-02-01,4,Oakmere\n2031-02-01,,Tarn\n`, column: 'cases', hint: /every count for region "Tarn" is blank; at least one day/ },
  { name: 'a blank region', text: `${REGIONS}2031-02-01,4,Oakmere\n2031-02-02,5,\n`, line: 3, column: 'region', hint: /region is blank; write the region name on every row/ },
  { name: 'a population that changes within a region', text: 'date,cases,population\n2031-02-01,1,5000\n2031-02-02,1,5000\n2031-02-03,1,5100\n', line: 4, column: 'population', hint: /5100 here but 5000 on line 2; write the same population on every row/ },
  { name: 'a population of 0', text: 'date,cases,population\n2031-02-01,0,0\n', line: 2, column: 'population', hint: /population is 0; write the number of people/ },
  { name: 'a population that is not a number', text: 'date,cases,population\n2031-02-01,1,lots\n', line: 2, column: 'population', hint: /population "lots" is not a number/ },
  { name: 'a population below the cases', text: 'date,cases,population\n2031-02-01,60,100\n2031-02-02,50,100\n', hint: /smaller than the total reported cases \(110\); check the population/ },
];

describe('parseCases: bad input', () => {
  it.each(BAD)('refuses $name', ({ text, line, column, hint, options }) => {
    const err = thrown(() => parseCases(text, FILE, options));
    expect(err.exitCode).toBe(2);
    expect(err.message).not.toMatch(/[\r\n]/);
    expect(err.message.startsWith(`${FILE}`)).toBe(true);
    if (line !== undefined) expect(err.message).toMatch(new RegExp(`^${FILE}, line ${line}[,:]`));
    else expect(err.message).not.toMatch(new RegExp(`^${FILE}, line`));
    if (column !== undefined) expect(err.message).toContain(`column "${column}":`);
    // "where: what; what to do"
    expect(err.message).toMatch(/^[^:]+: .+; .+/);
    expect(err.message).toMatch(hint);
  });

  it('refuses the same column for dates and counts', () => {
    const err = thrown(() => parseCases('d\n2031-02-01\n', FILE, { dateColumn: 'd', countColumn: 'd' }));
    expect(err.exitCode).toBe(2);
    expect(err.message).toMatch(/--date-column and --count-column/);
  });

  it('counts lines from where a row starts, past quoted line breaks', () => {
    const text = `${REGIONS}2031-02-01,1,"North\nEnd"\r\n2031-02-02,2,"North\r\nEnd"\n2031-02-33,3,x\n`;
    expect(thrown(() => parseCases(text, FILE)).message).toMatch(/^reports\.csv, line 6, column "date"/);
  });

  it('counts lines ended by a lone carriage return', () => {
    const text = 'date,cases\r2031-02-01,1\r2031-02-02,-1\r';
    expect(thrown(() => parseCases(text, FILE)).message).toMatch(/^reports\.csv, line 3, column "cases"/);
  });
});

describe('parseCases: good input', () => {
  it('reads a BOM and CRLF line ends', () => {
    const data = parseCases('\uFEFFdate,cases\r\n2031-02-01,3\r\n2031-02-02,5\r\n', FILE);
    expect(data.series).toHaveLength(1);
    expect(data.series[0]!.region).toBeNull();
    expect(data.series[0]!.dates).toEqual(['2031-02-01', '2031-02-02']);
    expect(counts(data.series[0]!)).toEqual([3, 5]);
    expect(data.warnings).toEqual([]);
  });

  it('sorts rows that are out of order', () => {
    const data = parseCases('date,cases\n2031-02-03,30\n2031-01-31,1\n2031-02-01,10\n2031-02-02,20\n', FILE);
    const s = data.series[0]!;
    expect(s.firstDate).toBe('2031-01-31');
    expect(s.dates).toEqual(['2031-01-31', '2031-02-01', '2031-02-02', '2031-02-03']);
    expect(counts(s)).toEqual([1, 10, 20, 30]);
  });

  it('turns a gap into missing days and names it in a warning', () => {
    const data = parseCases('date,cases\n2031-02-02,4\n2031-02-03,5\n2031-02-07,6\n', 'cases.csv');
    const s = data.series[0]!;
    expect(s.dates).toEqual(['2031-02-02', '2031-02-03', '2031-02-04', '2031-02-05', '2031-02-06', '2031-02-07']);
    expect(counts(s)).toEqual([4, 5, null, null, null, 6]);
    expect(data.warnings).toEqual([
      'cases.csv: 3 days with no row (2031-02-04 to 2031-02-06) are treated as missing',
    ]);
  });

  it('names every gap, across a month end, and says "1 day" for a single one', () => {
    const one = parseCases('date,cases\n2031-01-31,1\n2031-02-02,2\n', 'cases.csv');
    expect(one.warnings).toEqual(['cases.csv: 1 day with no row (2031-02-01) is treated as missing']);
    const rows = ['2031-01-01', '2031-01-03', '2031-01-05', '2031-01-07', '2031-01-09', '2031-01-11', '2031-01-13', '2031-01-20'];
    const many = parseCases(`date,cases\n${rows.map((d) => `${d},1`).join('\n')}\n`, 'cases.csv');
    expect(many.warnings).toEqual([
      'cases.csv: 12 days with no row (2031-01-02; 2031-01-04; 2031-01-06; 2031-01-08; 2031-01-10; and 2 more gaps) are treated as missing',
    ]);
    expect(many.series[0]!.counts).toHaveLength(20);
  });

  it('reads a blank count as a missing day, without a warning', () => {
    const data = parseCases('date,cases\n2031-02-01,3\n2031-02-02,\n2031-02-03,  \n2031-02-04,""\n2031-02-05,8\n', FILE);
    expect(counts(data.series[0]!)).toEqual([3, null, null, null, 8]);
    expect(data.warnings).toEqual([]);
  });

  it('accepts whole numbers with zero decimals, leading zeros and spaces around values', () => {
    const data = parseCases('date,cases\n2031-02-01,12.0\n2031-02-02,0042\n 2031-02-03 , 7 \n2031-02-04,12.\n2031-02-05,0\n', FILE);
    expect(counts(data.series[0]!)).toEqual([12, 42, 7, 12, 0]);
  });

  it('accepts the largest safe integer', () => {
    const data = parseCases(`date,cases\n2031-02-01,${Number.MAX_SAFE_INTEGER}\n`, FILE);
    expect(data.series[0]!.counts[0]).toBe(Number.MAX_SAFE_INTEGER);
  });

  it('splits regions, sorts them by name and keeps names exactly', () => {
    const odd = ['<script>alert(1)</script>', ' Spaced ', 'Quote "Q" Town', 'North\nEnd', 'Ärnholm'];
    const quoted = (s: string) => `"${s.replace(/"/g, '""')}"`;
    const lines = [
      `2031-03-02,2,${quoted('Zell')}`,
      `2031-03-01,1,Zell`,
      ...odd.map((r, i) => `2031-03-0${i + 1},${i + 10},${quoted(r)}`),
      `2031-03-05,9,Abbot`,
    ];
    const data = parseCases(`${REGIONS}${lines.join('\n')}\n`, FILE);
    const names = data.series.map((s) => s.region);
    // JavaScript string order: space, quote, '<', capitals, then non-ASCII
    expect(names).toEqual([' Spaced ', '<script>alert(1)</script>', 'Abbot', 'North\nEnd', 'Quote "Q" Town', 'Zell', 'Ärnholm']);
    const zell = data.series.find((s) => s.region === 'Zell')!;
    expect(zell.dates).toEqual(['2031-03-01', '2031-03-02']);
    expect(counts(zell)).toEqual([1, 2]);
    const script = data.series.find((s) => s.region === '<script>alert(1)</script>')!;
    expect(script.firstDate).toBe('2031-03-01');
    expect(counts(script)).toEqual([10]);
    expect(data.warnings).toEqual([]);
  });

  it('allows the same date in two regions and gives each region its own span', () => {
    const data = parseCases(`${REGIONS}2031-02-01,1,Tarn\n2031-02-01,2,Oakmere\n2031-02-03,3,Oakmere\n`, FILE);
    expect(data.series.map((s) => s.region)).toEqual(['Oakmere', 'Tarn']);
    expect(data.series[0]!.dates).toEqual(['2031-02-01', '2031-02-02', '2031-02-03']);
    expect(data.series[1]!.dates).toEqual(['2031-02-01']);
    expect(data.warnings).toEqual([
      `${FILE}, region "Oakmere": 1 day with no row (2031-02-02) is treated as missing`,
    ]);
  });

  it('reads custom column names and ignores other columns', () => {
    const text = 'note,area,day,reported\nx,Tarn,2031-02-02,5\ny,Tarn,2031-02-01,4\nz,Oakmere,2031-02-01,1\n';
    const data = parseCases(text, FILE, { dateColumn: 'day', countColumn: 'reported', regionColumn: 'area' });
    expect(data.series.map((s) => [s.region, s.firstDate, counts(s)])).toEqual([
      ['Oakmere', '2031-02-01', [1]],
      ['Tarn', '2031-02-01', [4, 5]],
    ]);
  });

  it('treats a file without the region column as one series', () => {
    const data = parseCases('date,cases\n2031-02-01,1\n', FILE, { regionColumn: 'area' });
    expect(data.series.map((s) => s.region)).toEqual([null]);
  });

  it('reads a population column, constant within each region and blank on some rows', () => {
    const text = 'date,cases,region,population\n2031-02-01,1,Tarn,5000\n2031-02-02,2,Tarn,\n2031-02-01,3,Oakmere,900\n2031-02-01,3,Vell,\n';
    const data = parseCases(text, FILE);
    expect(data.series.map((s) => [s.region, s.population])).toEqual([
      ['Oakmere', 900],
      ['Tarn', 5000],
      ['Vell', undefined],
    ]);
    expect('population' in data.series[2]!).toBe(false);
  });

  it('skips rows with no values, with a warning', () => {
    const data = parseCases('date,cases\n2031-02-01,1\n,\n2031-02-02,2\n , \n', FILE);
    expect(counts(data.series[0]!)).toEqual([1, 2]);
    expect(data.warnings).toEqual([`${FILE}: 2 rows with no values (lines 3, 5) skipped`]);
  });

  it('reads a quoted last field when the file has no final line break', () => {
    const data = parseCases(`${REGIONS}2031-02-01,1,"Brack, Upper"`, FILE);
    expect(data.series[0]!.region).toBe('Brack, Upper');
  });

  it('hashes the UTF-8 text with SHA-256', () => {
    const text = 'date,cases\n2031-02-01,1\n';
    // reference: node:crypto
    expect(parseCases(text, FILE).sha256).toBe(createHash('sha256').update(Buffer.from(text, 'utf8')).digest('hex'));
    expect(parseCases(text, FILE).sha256).toMatch(/^[0-9a-f]{64}$/);
  });

  it('parses 10 regions over 2 years into 10 complete series', () => {
    const rows: string[] = ['date,cases,region'];
    const start = Date.UTC(2031, 0, 1);
    for (let r = 0; r < 10; r += 1) {
      for (let d = 0; d < 730; d += 1) {
        rows.push(`${new Date(start + d * 86_400_000).toISOString().slice(0, 10)},${(d * 7 + r) % 101},Place ${r}`);
      }
    }
    const data = parseCases(`${rows.join('\n')}\n`, FILE);
    expect(data.series).toHaveLength(10);
    // 2031 has 365 days and 2032 (a leap year) 366, so day 730 is the day before New Year's Eve
    expect(data.series[3]!.dates[729]).toBe('2032-12-30');
    expect(data.series[3]!.counts[729]).toBe((729 * 7 + 3) % 101);
  });
});

describe('totalCases', () => {
  it('sums the non-missing counts', () => {
    const s = parseCases('date,cases\n2031-02-01,3\n2031-02-02,\n2031-02-04,39\n', FILE).series[0]!;
    expect(totalCases(s)).toBe(42);
  });
});

describe('checkPopulation', () => {
  const series = parseCases(`${REGIONS}2031-02-01,60,Tarn\n2031-02-02,40,Tarn\n`, FILE).series[0]!;

  it('accepts a population equal to the total cases', () => {
    expect(() => checkPopulation(series, 100, FILE)).not.toThrow();
  });

  it.each([
    { population: 99, what: /population of region "Tarn" \(99\) is smaller than the total reported cases \(100\)/ },
    { population: 0, what: /population of region "Tarn" is 0, not a positive number/ },
    { population: -5, what: /is -5, not a positive number/ },
    { population: Number.NaN, what: /is NaN, not a positive number/ },
    { population: Number.POSITIVE_INFINITY, what: /is Infinity, not a positive number/ },
  ])('refuses $population', ({ population, what }) => {
    const err = thrown(() => checkPopulation(series, population, FILE));
    expect(err.exitCode).toBe(2);
    expect(err.message.startsWith(`${FILE}: `)).toBe(true);
    expect(err.message).toMatch(what);
    expect(err.message).toMatch(/; (check|give) .*population/);
  });
});

describe('readCases', () => {
  const dir = mkdtempSync(join(tmpdir(), 'waxwane-cases-'));
  afterAll(() => rmSync(dir, { recursive: true, force: true }));

  it('reads the fixture (BOM, CRLF, quoted region, population) and hashes the raw bytes', () => {
    const path = fileURLToPath(FIXTURE);
    const data = readCases(path);
    expect(data.file).toBe(path);
    // reference: node:crypto over the bytes on disk, byte-order mark included
    expect(data.sha256).toBe(createHash('sha256').update(readFileSync(path)).digest('hex'));
    expect(data.series.map((s) => [s.region, s.firstDate, counts(s), s.population])).toEqual([
      ['Brack, Upper', '2031-03-01', [0, 1], 800],
      ['Lower Fennick', '2031-03-01', [2, 4, null, 7], 12000],
    ]);
    expect(data.warnings).toEqual([]);
  });

  it.each([
    { name: 'a missing file', make: () => join(dir, 'absent.csv'), what: /: no such file; check the path/ },
    { name: 'a folder', make: () => { const p = join(dir, 'folder.csv'); mkdirSync(p); return p; }, what: /: is a folder, not a file; give the path of the CSV file/ },
    { name: 'Latin-1 text', make: () => write('latin1.csv', Buffer.from('date,cases,region\n2031-02-01,1,Ume\xe5\n', 'latin1')), what: /not valid UTF-8 text; save it as CSV with UTF-8 encoding/ },
    { name: 'a zip archive', make: () => write('book.xlsx', Buffer.from([0x50, 0x4b, 3, 4, 20, 0, 6, 0, 0xff])), what: /zip archive .*; save the sheet as CSV/ },
    { name: 'UTF-16 text', make: () => write('u16.csv', Buffer.from('\ufeffdate,cases\n', 'utf16le')), what: /UTF-16 text; save it as CSV with UTF-8/ },
    { name: 'binary bytes', make: () => write('blob.csv', Buffer.from([0, 0x9f, 0x92, 0x96, 1, 2])), what: /binary data.*; give a plain-text CSV file/ },
    { name: 'an empty file', make: () => write('empty.csv', Buffer.alloc(0)), what: /the file is empty/ },
  ])('refuses $name', ({ make, what }) => {
    const path = make();
    const err = thrown(() => readCases(path));
    expect(err.exitCode).toBe(2);
    expect(err.message.startsWith(`${path}: `)).toBe(true);
    expect(err.message).toMatch(what);
  });

  function write(name: string, bytes: Buffer): string {
    const p = join(dir, name);
    writeFileSync(p, bytes);
    return p;
  }
});
