/**
 * Intake of daily reported case counts from a CSV file: one row per day (and per region when
 * the file has a region column), validated row by row so that every problem is reported as a
 * one-line {@link WaxwaneError} naming the file, the line, the column and what to do.
 *
 * The text is split into fields by arquero with type inference off (every value stays a
 * string); a small quote-aware scan beside it supplies what a table does not keep: the line
 * on which each row starts and how many fields it really had.
 */
import { createHash } from 'node:crypto';
import { readFileSync } from 'node:fs';
import { fromCSV } from '../util/arquero.js';
import { WaxwaneError, inputError } from '../errors.js';
import { isoFromDay, parseIsoDate } from './dates.js';

export interface CaseOptions {
  /** column holding the ISO date of each row (default 'date') */
  dateColumn?: string;
  /** column holding the reported count of each row (default 'cases') */
  countColumn?: string;
  /** column naming the region of each row (default 'region'); used only if the file has it */
  regionColumn?: string;
}

export interface CaseSeries {
  /** region name exactly as written in the file; null when the file has no region column */
  region: string | null;
  /** ISO date of the first day */
  firstDate: string;
  /** every day from first to last, consecutive, ISO */
  dates: string[];
  /** one count per day; NaN = missing (blank in the file, or a day with no row) */
  counts: Float64Array;
  /** from a 'population' column, when the file has one with a value for this region */
  population?: number;
}

export interface CaseData {
  file: string;
  /** SHA-256 (hex) of the raw bytes of the file */
  sha256: string;
  /** one series per region, sorted by region name; a single series without a region column */
  series: CaseSeries[];
  warnings: string[];
}

/** Name of the optional column giving the population of each region. */
export const POPULATION_COLUMN = 'population';

const DEFAULT_DATE_COLUMN = 'date';
const DEFAULT_COUNT_COLUMN = 'cases';
const DEFAULT_REGION_COLUMN = 'region';
/** Most gaps listed by name in a warning; the rest are counted. */
const GAPS_LISTED = 5;

/**
 * Parses the text of a case CSV file.
 *
 * Format: a header line naming the columns, then one row per day. Comma separated, fields
 * quoted with `"` when needed (RFC 4180); a UTF-8 byte-order mark and CRLF line ends are
 * accepted; empty lines are ignored; rows may come in any order (they are sorted by date).
 *
 * - Dates: strict ISO `YYYY-MM-DD`, a real calendar date. Spaces around a value are ignored.
 * - Counts: plain whole numbers of digits (`0`, `17`, `0042`). A blank cell is a missing day.
 *   A whole number written with zero decimals (`12.0`, `12.00`, `12.`) is read as 12, because
 *   spreadsheets and data-frame libraries often write integer columns that way. Everything
 *   else is refused with its own message: a sign (`-3`, `+3`), other decimals (`2.5`),
 *   exponent notation (`1e3`: plain digits are the unambiguous way to write a count),
 *   words such as `NA` (leave the cell blank instead) and values above
 *   `Number.MAX_SAFE_INTEGER`.
 * - Regions: when the region column exists, rows are split by its value, kept exactly as
 *   written (never trimmed or interpreted); the same date may appear once per region. Series
 *   are sorted by region name in JavaScript string order (UTF-16 code units, independent of
 *   locale).
 * - Population: an optional `population` column, a positive whole number (same notation as
 *   counts), the same on every row of a region where it is not blank; it must be at least
 *   the region's total reported cases ({@link checkPopulation}).
 * - Days between the first and last date that have no row become missing days (NaN), with a
 *   warning naming them. Rows whose every field is empty are skipped, with a warning.
 *
 * @param text the file content (already decoded)
 * @param file the file name used in messages
 * @returns the series; `sha256` is the hash of the UTF-8 encoding of `text`
 * @throws WaxwaneError for every problem in the file (see the module notes)
 */
export function parseCases(text: string, file: string, options: CaseOptions = {}): CaseData {
  const dateColumn = options.dateColumn ?? DEFAULT_DATE_COLUMN;
  const countColumn = options.countColumn ?? DEFAULT_COUNT_COLUMN;
  const regionColumn = options.regionColumn ?? DEFAULT_REGION_COLUMN;
  if (dateColumn === countColumn) {
    throw new WaxwaneError(
      `${file}: the date column and the count column are both ${show(dateColumn)}; choose different columns with --date-column and --count-column`,
    );
  }

  const body = text.startsWith('\uFEFF') ? text.slice(1) : text;
  checkIsText(body, file);
  // arquero keeps a quoted last field verbatim (quotes included) when the text does not end
  // with a line break, so the text always gets one
  const csv = /[\r\n]$/.test(body) ? body : `${body}\n`;
  const shape = scanShape(csv, file);
  const header = shape[0]!;
  // arquero keeps column names as keys of a plain object, where a header naming "__proto__" or
  // "hasOwnProperty" breaks it; so it reads the header as a data row, under names of its own
  const table = fromCSV(csv, { autoType: false, header: false });
  const headerCells = table.columnNames().map((_, i) => table.columnAt(i)!.at(0));
  const names = headerCells.map((v) => (typeof v === 'string' ? v : ''));
  if (names.length !== header.fields || table.numRows() !== shape.length) {
    throw new Error(`parseCases: arquero read ${table.numRows()} rows of ${names.length} fields, the scan ${shape.length} rows of ${header.fields}`);
  }

  checkFieldCounts(shape, file);
  const dateIndex = requireColumn(names, dateColumn, 'date', '--date-column', file, csv);
  const countIndex = requireColumn(names, countColumn, 'count', '--count-column', file, csv);
  const regionIndex = uniqueIndex(names, regionColumn, file);
  const populationIndex = uniqueIndex(names, POPULATION_COLUMN, file);
  const columns = names.map((_, i) => table.columnAt(i)!);
  const value = (col: number, row: number): string => {
    const v: unknown = columns[col]!.at(row + 1);
    return typeof v === 'string' ? v : '';
  };

  const groups = new Map<string, Group>();
  const emptyRowLines: number[] = [];
  let dataRows = 0;
  for (let r = 0; r < table.numRows() - 1; r += 1) {
    const record = shape[r + 1]!;
    if (isBlankLine(record)) continue;
    if (record.empty) {
      emptyRowLines.push(record.line);
      continue;
    }
    dataRows += 1;
    const line = record.line;
    const region = regionIndex === null ? null : value(regionIndex, r);
    if (region === '') {
      throw inputError(
        { file, line, column: regionColumn },
        'the region is blank',
        'write the region name on every row (or remove the region column if the file holds one region)',
      );
    }
    const day = readDate(value(dateIndex, r), { file, line, column: dateColumn });
    const count = readCount(value(countIndex, r), { file, line, column: countColumn });

    const key = region ?? '';
    let group = groups.get(key);
    if (group === undefined) {
      group = { region, rows: [], lineOfDay: new Map() };
      groups.set(key, group);
    }
    const earlier = group.lineOfDay.get(day);
    if (earlier !== undefined) {
      const inRegion = region === null ? '' : ` in region ${show(region)}`;
      const hint =
        region === null
          ? '; if the file holds several regions, name the region column with --region-column'
          : '';
      throw inputError(
        { file, line, column: dateColumn },
        `date ${isoFromDay(day)} appears twice${inRegion} (also on line ${earlier})`,
        `keep one row per day: remove or merge the duplicate${hint}`,
      );
    }
    group.lineOfDay.set(day, line);
    group.rows.push({ day, count });

    if (populationIndex !== null) {
      readPopulation(group, value(populationIndex, r), { file, line, column: POPULATION_COLUMN });
    }
  }

  if (dataRows === 0) {
    throw inputError(
      { file },
      'the file has a header but no data rows',
      `add one row per day with a date in "${dateColumn}" and a count in "${countColumn}"`,
    );
  }

  const warnings: string[] = [];
  if (emptyRowLines.length > 0) {
    warnings.push(
      `${file}: ${plural(emptyRowLines.length, 'row')} with no values (${listLines(emptyRowLines)}) skipped`,
    );
  }
  const keys = [...groups.keys()].sort(compareStrings);
  const series = keys.map((key) => {
    const built = buildSeries(groups.get(key)!, file, countColumn, warnings);
    if (built.population !== undefined) checkPopulation(built, built.population, file);
    return built;
  });
  const sha256 = createHash('sha256').update(text, 'utf8').digest('hex');
  return { file, sha256, series, warnings };
}

/**
 * Reads a case CSV file (UTF-8) and parses it with {@link parseCases}; `sha256` is the hash of
 * the raw bytes.
 *
 * @throws WaxwaneError if the file is missing, unreadable, not UTF-8 text, or invalid.
 */
export function readCases(file: string, options: CaseOptions = {}): CaseData {
  let bytes: Buffer;
  try {
    bytes = readFileSync(file);
  } catch (err) {
    throw readError(file, err);
  }
  const text = decodeUtf8(bytes, file);
  const data = parseCases(text, file, options);
  return { ...data, sha256: createHash('sha256').update(bytes).digest('hex') };
}

/**
 * Largest population accepted: over a hundred times the world's population. Far larger ones
 * (1e300) overflow the derived outputs (beta D S, infections) to Infinity and NaN; up to this
 * bound every count and trajectory value stays an exact or finite double.
 */
export const MAX_POPULATION = 1e12;

/**
 * Checks that `population` can hold the reported cases of `series`: a positive finite number,
 * at least the total of the non-missing counts, at most {@link MAX_POPULATION}.
 *
 * @throws WaxwaneError otherwise, naming the file and the region.
 */
export function checkPopulation(series: CaseSeries, population: number, file: string): void {
  const where = series.region === null ? '' : ` of region ${show(series.region)}`;
  if (!Number.isFinite(population) || population <= 0) {
    throw inputError(
      { file },
      `the population${where} is ${population}, not a positive number`,
      'give the number of people in the population the cases come from',
    );
  }
  if (population > MAX_POPULATION) {
    throw inputError(
      { file },
      `the population${where} (${population}) is above ${MAX_POPULATION}, more than a hundred times the world's`,
      'check the population (the number of people the cases come from)',
    );
  }
  const total = totalCases(series);
  if (population < total) {
    throw inputError(
      { file },
      `the population${where} (${population}) is smaller than the total reported cases (${total})`,
      'check the population (the number of people, not a rate) and the counts',
    );
  }
}

/** Sum of the non-missing counts of `series`. */
export function totalCases(series: CaseSeries): number {
  let total = 0;
  for (const c of series.counts) if (!Number.isNaN(c)) total += c;
  return total;
}

// ---------------------------------------------------------------------------------------
// Shape of the text: lines and field counts

interface RecordShape {
  /** 1-based line on which the record starts (the header is line 1) */
  line: number;
  fields: number;
  /** no text in any field (only commas, spaces, tabs or empty quotes) */
  empty: boolean;
}

const QUOTE = 34;
const COMMA = 44;
const LF = 10;
const CR = 13;

/**
 * Splits `csv` (which ends with a line break) into records the way arquero does: a line break
 * outside quotes ends a record, `"` opens a quoted field only at the start of a field, `""`
 * inside quotes is a quote. Stricter than arquero where it would guess: an unclosed quote or
 * text after a closing quote is an error.
 */
function scanShape(csv: string, file: string): RecordShape[] {
  const records: RecordShape[] = [];
  let line = 1;
  let start = 1;
  let fields = 1;
  let empty = true;
  let fieldStart = true;
  let inQuote = false;
  let quoteLine = 0;
  const n = csv.length;
  for (let i = 0; i < n; i += 1) {
    const c = csv.charCodeAt(i);
    if (inQuote) {
      if (c === QUOTE) {
        if (csv.charCodeAt(i + 1) === QUOTE) {
          i += 1;
          continue;
        }
        inQuote = false;
        const next = csv.charCodeAt(i + 1);
        if (next !== COMMA && next !== LF && next !== CR) {
          throw inputError(
            { file, line },
            'text follows a closing quote inside a field',
            'quote the whole field and double any quote inside it ("a ""b"" c")',
          );
        }
      } else {
        empty = false;
        if (c === LF || (c === CR && csv.charCodeAt(i + 1) !== LF)) line += 1;
      }
      continue;
    }
    if (c === COMMA) {
      fields += 1;
      fieldStart = true;
    } else if (c === LF || c === CR) {
      if (c === CR && csv.charCodeAt(i + 1) === LF) i += 1;
      records.push({ line: start, fields, empty });
      line += 1;
      start = line;
      fields = 1;
      empty = true;
      fieldStart = true;
    } else if (c === QUOTE && fieldStart) {
      inQuote = true;
      quoteLine = line;
      fieldStart = false;
    } else {
      if (c !== 32 && c !== 9) empty = false;
      fieldStart = false;
    }
  }
  if (inQuote) {
    throw inputError(
      { file, line: quoteLine },
      'a quoted field is never closed',
      'add the closing quote (") or remove the stray one',
    );
  }
  if (records.length === 0 || isBlankLine(records[0]!)) {
    throw inputError(
      { file, line: 1 },
      'the first line is empty',
      'the first line must be the header naming the columns (e.g. "date,cases")',
    );
  }
  return records;
}

/** An empty line, or one holding only spaces: ignored wherever it is. */
function isBlankLine(record: RecordShape): boolean {
  return record.empty && record.fields === 1;
}

function checkFieldCounts(shape: RecordShape[], file: string): void {
  const expected = shape[0]!.fields;
  for (let r = 1; r < shape.length; r += 1) {
    const record = shape[r]!;
    if (isBlankLine(record) || record.fields === expected) continue;
    throw inputError(
      { file, line: record.line },
      `the row has ${record.fields} fields but the header has ${expected}`,
      'check for missing or extra commas, and quote values that contain a comma',
    );
  }
}

/** Refuses content that is not text: empty, binary (control characters), JSON. */
function checkIsText(body: string, file: string): void {
  if (body.trim() === '') {
    throw inputError(
      { file },
      'the file is empty',
      'give a CSV file with a header line (e.g. "date,cases") and one row per day',
    );
  }
  // eslint-disable-next-line no-control-regex
  const control = /[\u0000-\u0008\u000B\u000C\u000E-\u001F\u007F]/.exec(body);
  if (control !== null) {
    const line = lineAt(body, control.index);
    const code = control[0].charCodeAt(0).toString(16).toUpperCase().padStart(4, '0');
    throw inputError(
      { file, line },
      `the file holds binary data (control character U+${code}), so it is not a CSV text file`,
      'give a plain-text CSV file (a spreadsheet must be saved as CSV)',
    );
  }
  const first = body.trimStart()[0];
  if (first === '{' || first === '[') {
    let isJson = true;
    try {
      JSON.parse(body);
    } catch {
      isJson = false;
    }
    if (isJson) {
      throw inputError(
        { file, line: 1 },
        'the file is JSON, not CSV',
        'give a comma-separated file with a header line (e.g. "date,cases") and one row per day',
      );
    }
  }
}

function lineAt(text: string, index: number): number {
  let line = 1;
  for (let i = 0; i < index; i += 1) {
    const c = text.charCodeAt(i);
    if (c === LF || (c === CR && text.charCodeAt(i + 1) !== LF)) line += 1;
  }
  return line;
}

// ---------------------------------------------------------------------------------------
// Header

function requireColumn(
  names: string[],
  wanted: string,
  role: string,
  option: string,
  file: string,
  csv: string,
): number {
  const index = uniqueIndex(names, wanted, file);
  if (index !== null) return index;
  const found = names.map((n) => show(n)).join(', ');
  const near = names.find((n) => n.trim().toLowerCase() === wanted.toLowerCase());
  const suggestion = near === undefined ? '' : ` (is it ${show(near)}?)`;
  const firstLine = csv.slice(0, csv.search(/[\r\n]/));
  const separator =
    names.length === 1 && firstLine.includes(';')
      ? '; the file seems to use ";" between values: save it with commas'
      : names.length === 1 && firstLine.includes('\t')
        ? '; the file seems to use tabs between values: save it with commas'
        : '';
  throw inputError(
    { file, line: 1, column: wanted },
    `no ${role} column named ${show(wanted)} (columns found: ${found})`,
    `rename the column in the header${suggestion}, or choose another with ${option} NAME${separator}`,
  );
}

function uniqueIndex(names: string[], wanted: string, file: string): number | null {
  const index = names.indexOf(wanted);
  if (index === -1) return null;
  if (names.indexOf(wanted, index + 1) !== -1) {
    throw inputError(
      { file, line: 1, column: wanted },
      `the header names the column ${show(wanted)} more than once`,
      'give each column a different name',
    );
  }
  return index;
}

// ---------------------------------------------------------------------------------------
// Values

type Where = { file: string; line: number; column: string };

function readDate(raw: string, where: Where): number {
  const s = raw.trim();
  if (s === '') {
    throw inputError(where, 'the date is blank', 'write the date as YYYY-MM-DD, or delete the row');
  }
  const day = parseIsoDate(s);
  if (day !== null) return day;
  if (/^\d{4}-\d{2}-\d{2}$/.test(s)) {
    throw inputError(
      where,
      `${show(s)} is not a real calendar date`,
      'correct the date (YYYY-MM-DD: month 01-12, day within the month)',
    );
  }
  throw inputError(
    where,
    `${show(s)} is not an ISO date`,
    'write dates as YYYY-MM-DD (e.g. 2031-02-03); other orders of day and month are ambiguous',
  );
}

type Refusal = 'negative' | 'fraction' | 'exponent' | 'signed' | 'too-large' | 'not-a-number';

/** What a cell holding a count (or a population) says. */
export type WholeNumberReading = { kind: 'value'; value: number } | { kind: 'missing' } | { kind: Refusal };

const DIGITS_WITH_ZERO_DECIMALS = /^(\d+)(?:\.0*)?$/;
const DECIMAL_NUMBER = /^[+-]?(?:\d+\.?\d*|\.\d+)(?:[eE][+-]?\d+)?$/;

/**
 * Reads a non-negative whole number written in plain digits, optionally with zero decimals
 * ("12.0"). See {@link parseCases} for what is refused and why.
 */
export function readWholeNumber(raw: string): WholeNumberReading {
  const s = raw.trim();
  if (s === '') return { kind: 'missing' };
  const plain = DIGITS_WITH_ZERO_DECIMALS.exec(s);
  if (plain !== null) {
    const value = Number(plain[1]);
    return Number.isSafeInteger(value) ? { kind: 'value', value } : { kind: 'too-large' };
  }
  if (!DECIMAL_NUMBER.test(s)) return { kind: 'not-a-number' };
  if (s.startsWith('-')) return { kind: 'negative' };
  if (/[eE]/.test(s)) return { kind: 'exponent' };
  if (s.startsWith('+')) return { kind: 'signed' };
  return { kind: 'fraction' };
}

function readCount(raw: string, where: Where): number {
  const reading = readWholeNumber(raw);
  switch (reading.kind) {
    case 'value':
      return reading.value;
    case 'missing':
      return Number.NaN;
    default:
      throw numberError(reading.kind, raw.trim(), 'count', where);
  }
}

function numberError(
  kind: Refusal,
  s: string,
  what: 'count' | 'population',
  where: Where,
): WaxwaneError {
  const blank =
    what === 'count'
      ? 'leave the cell blank if the day is unknown'
      : 'leave the cell blank if it is unknown';
  switch (kind) {
    case 'negative':
      return inputError(where, `the ${what} ${show(s)} is negative`, `correct it (a ${what} cannot be below 0), or ${blank}`);
    case 'fraction':
      return inputError(where, `the ${what} ${show(s)} is not a whole number`, `write a whole number, or ${blank}`);
    case 'exponent':
      return inputError(where, `the ${what} ${show(s)} is in exponent notation`, 'write it in plain digits (e.g. 1000 rather than 1e3)');
    case 'signed':
      return inputError(where, `the ${what} ${show(s)} has a sign`, 'write it in plain digits without "+"');
    case 'too-large':
      return inputError(where, `the ${what} ${show(s)} is too large`, `a ${what} must be at most ${Number.MAX_SAFE_INTEGER}; check the value`);
    case 'not-a-number':
      return inputError(
        where,
        `the ${what} ${show(s)} is not a number`,
        `write a whole number in plain digits (no thousands separators or words such as NA), or ${blank}`,
      );
  }
}

interface Group {
  region: string | null;
  rows: Array<{ day: number; count: number }>;
  lineOfDay: Map<number, number>;
  population?: { value: number; line: number };
}

function readPopulation(group: Group, raw: string, where: Where): void {
  const reading = readWholeNumber(raw);
  if (reading.kind === 'missing') return;
  if (reading.kind !== 'value') throw numberError(reading.kind, raw.trim(), 'population', where);
  if (reading.value === 0) {
    throw inputError(where, 'the population is 0', 'write the number of people, a positive whole number');
  }
  const known = group.population;
  if (known === undefined) {
    group.population = { value: reading.value, line: where.line };
  } else if (known.value !== reading.value) {
    const inRegion = group.region === null ? '' : ` of region ${show(group.region)}`;
    throw inputError(
      where,
      `the population${inRegion} is ${reading.value} here but ${known.value} on line ${known.line}`,
      'write the same population on every row of a region',
    );
  }
}

// ---------------------------------------------------------------------------------------
// Series

function buildSeries(group: Group, file: string, countColumn: string, warnings: string[]): CaseSeries {
  const rows = group.rows.slice().sort((a, b) => a.day - b.day);
  const first = rows[0]!.day;
  const last = rows[rows.length - 1]!.day;
  const length = last - first + 1;
  const counts = new Float64Array(length).fill(Number.NaN);
  const present = new Uint8Array(length);
  let anyCount = false;
  for (const { day, count } of rows) {
    counts[day - first] = count;
    present[day - first] = 1;
    if (!Number.isNaN(count)) anyCount = true;
  }
  const label = group.region === null ? file : `${file}, region ${show(group.region)}`;
  if (!anyCount) {
    const inRegion = group.region === null ? '' : ` for region ${show(group.region)}`;
    throw inputError(
      { file, column: countColumn },
      `every count${inRegion} is blank`,
      'at least one day needs a reported count; fill in the counts (or choose the right column with --count-column)',
    );
  }
  const gap = gapWarning(present, first, label);
  if (gap !== null) warnings.push(gap);
  const dates = new Array<string>(length);
  for (let i = 0; i < length; i += 1) dates[i] = isoFromDay(first + i);
  const series: CaseSeries = { region: group.region, firstDate: dates[0]!, dates, counts };
  if (group.population !== undefined) series.population = group.population.value;
  return series;
}

function gapWarning(present: Uint8Array, first: number, label: string): string | null {
  const ranges: string[] = [];
  let missing = 0;
  let i = 0;
  while (i < present.length) {
    if (present[i] === 1) {
      i += 1;
      continue;
    }
    let j = i;
    while (j + 1 < present.length && present[j + 1] === 0) j += 1;
    missing += j - i + 1;
    ranges.push(i === j ? isoFromDay(first + i) : `${isoFromDay(first + i)} to ${isoFromDay(first + j)}`);
    i = j + 1;
  }
  if (missing === 0) return null;
  const listed = ranges.slice(0, GAPS_LISTED).join('; ');
  const more = ranges.length > GAPS_LISTED ? `; and ${ranges.length - GAPS_LISTED} more gaps` : '';
  const verb = missing === 1 ? 'is' : 'are';
  return `${label}: ${plural(missing, 'day')} with no row (${listed}${more}) ${verb} treated as missing`;
}

// ---------------------------------------------------------------------------------------
// Small helpers

function decodeUtf8(bytes: Buffer, file: string): string {
  if (bytes.length >= 4 && bytes[0] === 0x50 && bytes[1] === 0x4b && bytes[2] === 3 && bytes[3] === 4) {
    throw inputError(
      { file },
      'the file is a zip archive (such as a spreadsheet workbook), not CSV text',
      'save the sheet as CSV (comma separated, UTF-8) and give that file',
    );
  }
  if (bytes.length >= 2 && ((bytes[0] === 0xff && bytes[1] === 0xfe) || (bytes[0] === 0xfe && bytes[1] === 0xff))) {
    throw inputError({ file }, 'the file is UTF-16 text', 'save it as CSV with UTF-8 encoding');
  }
  try {
    return new TextDecoder('utf-8', { fatal: true, ignoreBOM: true }).decode(bytes);
  } catch {
    const binary = bytes.includes(0);
    throw inputError(
      { file },
      binary ? 'the file holds binary data, so it is not a CSV text file' : 'the file is not valid UTF-8 text',
      binary ? 'give a plain-text CSV file (a spreadsheet must be saved as CSV)' : 'save it as CSV with UTF-8 encoding',
    );
  }
}

function readError(file: string, err: unknown): WaxwaneError {
  const code =
    typeof err === 'object' && err !== null && 'code' in err && typeof err.code === 'string' ? err.code : '';
  if (code === 'ENOENT') return inputError({ file }, 'no such file', 'check the path of the case file');
  if (code === 'EISDIR') return inputError({ file }, 'is a folder, not a file', 'give the path of the CSV file itself');
  if (code === 'EACCES' || code === 'EPERM') {
    return inputError({ file }, 'the file cannot be read (permission denied)', 'check its permissions');
  }
  const why = code !== '' ? code : err instanceof Error ? err.message : String(err);
  return inputError({ file }, `the file cannot be read (${why})`, 'check the path and the file');
}

/** A value from the file, quoted and escaped for a one-line message, and shortened. */
function show(value: string): string {
  const short = value.length > 40 ? `${value.slice(0, 40)}…` : value;
  return JSON.stringify(short);
}

function plural(n: number, word: string): string {
  return `${n} ${word}${n === 1 ? '' : 's'}`;
}

function listLines(lines: number[]): string {
  const head = lines.slice(0, GAPS_LISTED).join(', ');
  const more = lines.length > GAPS_LISTED ? ` and ${lines.length - GAPS_LISTED} more` : '';
  return `line${lines.length === 1 ? '' : 's'} ${head}${more}`;
}

function compareStrings(a: string, b: string): number {
  return a < b ? -1 : a > b ? 1 : 0;
}
