/**
 * Reading a case file of several regions so that one region's bad data fail that region
 * alone.
 *
 * The file is scanned once for the rows of each region, and each region is read on its own by
 * the case reader (src/io/cases.ts), which gives its series and its own warnings (days without
 * a row). When that is clean, as it usually is, nothing more is done, and no table of the whole
 * file is ever held. Otherwise the whole file is read by the case reader, so that every
 * message names the line of the file itself: when it refuses a row, the region of that row is
 * set aside (its lines emptied, so that every other line keeps its number) and the rest is read
 * again, until the rest is clean.
 *
 * What stays an error of the whole file (exit code 2, nothing written): a file that cannot be
 * read or is not CSV text, a bad header, a row whose field count differs from the header's, a
 * row without a region name, an unclosed quote.
 */
import { createHash } from 'node:crypto';
import { readFileSync } from 'node:fs';
import { WaxwaneError, oneLineMessage } from '../errors.js';
import { parseCases, readCases, type CaseData, type CaseOptions, type CaseSeries } from '../io/cases.js';
import { blankRecords, isBlankRecord, iterateRecords, type CsvRecord } from './csv-records.js';

export interface RegionCases {
  file: string;
  /** SHA-256 (hex) of the file's bytes */
  sha256: string;
  /** every region named in the file, failed ones included, in JavaScript string order */
  names: string[];
  /** the series of every region that was read without error */
  series: Map<string, CaseSeries>;
  /** each region's own warnings (days without a row) */
  regionWarnings: Map<string, string[]>;
  /** regions whose rows were refused, with the reader's message */
  failed: Map<string, string>;
  /** warnings about the file rather than one region (rows with no values) */
  fileWarnings: string[];
}

export type ColumnOptions = Required<CaseOptions>;

/** Where a record lies in the text. */
interface Span {
  start: number;
  end: number;
}

/** The text of a file, or null when it cannot be read or is not UTF-8 (the case reader then says why). */
function readText(file: string): { bytes: Buffer; text: string } | null {
  let bytes: Buffer;
  try {
    bytes = readFileSync(file);
  } catch {
    return null;
  }
  try {
    const text = new TextDecoder('utf-8', { fatal: true, ignoreBOM: true }).decode(bytes);
    return { bytes, text: text.startsWith('\uFEFF') ? text.slice(1) : text };
  } catch {
    return null;
  }
}

interface Layout {
  header: CsvRecord;
  regionIndex: number;
  /** where the rows of each region lie, in file order */
  byRegion: Map<string, Span[]>;
  /** rows that belong to no region: too many or too few fields, or a blank region name */
  strays: number;
  /** rows whose every field is empty (the case reader skips them with a warning) */
  empties: number;
}

/**
 * The rows of each region, or null when the text has no unique `regionColumn` (or no header).
 * `stopAt`: stop once that many regions are found (for a quick count).
 *
 * @throws CsvShapeError for malformed CSV.
 */
function layoutOf(text: string, regionColumn: string, stopAt = Infinity): Layout | null {
  const it = iterateRecords(text);
  const first = it.next();
  if (first.done === true) return null;
  const header = first.value;
  const regionIndex = header.fields.indexOf(regionColumn);
  if (regionIndex === -1 || header.fields.indexOf(regionColumn, regionIndex + 1) !== -1) return null;
  const layout: Layout = { header, regionIndex, byRegion: new Map(), strays: 0, empties: 0 };
  for (const r of it) {
    if (isBlankRecord(r)) continue;
    if (r.empty) {
      layout.empties += 1;
      continue;
    }
    const name = r.fields.length === header.fields.length ? r.fields[regionIndex]! : '';
    if (name === '') {
      layout.strays += 1;
      continue;
    }
    let list = layout.byRegion.get(name);
    if (list === undefined) {
      layout.byRegion.set(name, (list = []));
      if (layout.byRegion.size >= stopAt) break;
    }
    list.push({ start: r.start, end: r.end });
  }
  return layout;
}

/**
 * How many regions the file names in its region column (counting stops at `upTo`), or null
 * when that cannot be told (no such file, not UTF-8, no region column, malformed CSV): the case
 * reader then gives its own message. Never throws.
 */
export function countRegions(file: string, regionColumn: string, upTo = Infinity): number | null {
  const read = readText(file);
  if (read === null) return null;
  try {
    return layoutOf(read.text, regionColumn, upTo)?.byRegion.size ?? null;
  } catch {
    return null;
  }
}

function compareStrings(a: string, b: string): number {
  return a < b ? -1 : a > b ? 1 : 0;
}

/** The line a message of the case reader names first (`FILE, line N, ...`), or null. */
function lineOfMessage(message: string, file: string): number | null {
  const prefix = oneLineMessage(`${file}, line `);
  if (!message.startsWith(prefix)) return null;
  const m = /^(\d+)[,:]/.exec(message.slice(prefix.length));
  return m === null ? null : Number(m[1]);
}

/** The header and a region's rows: a case file of that region alone. */
function regionText(text: string, header: CsvRecord, spans: readonly Span[]): string {
  const withBreak = (s: string) => (/[\r\n]$/.test(s) ? s : `${s}\n`);
  return [header, ...spans].map((r) => withBreak(text.slice(r.start, r.end))).join('');
}

/** The case reader's error for the whole file (it is expected to refuse it). */
function wholeFileError(file: string, columns: ColumnOptions, otherwise: string): WaxwaneError {
  try {
    readCases(file, columns);
  } catch (e) {
    if (e instanceof WaxwaneError) return e;
    throw e;
  }
  return new WaxwaneError(otherwise);
}

/**
 * Reads a case file with a region column, setting aside the regions whose rows are refused.
 *
 * @throws WaxwaneError for a problem of the whole file (see the module notes), and when the
 *   file has no region column.
 */
export function readRegionCases(file: string, columns: ColumnOptions): RegionCases {
  const noRegions = `${file}: no region column "${columns.regionColumn}" with region names; --regions, --shard and --populations need a file with a region column: name it with --region-column`;
  const read = readText(file);
  let layout: Layout | null = null;
  try {
    layout = read === null ? null : layoutOf(read.text, columns.regionColumn);
  } catch {
    layout = null; // malformed CSV: the case reader says where
  }
  if (read === null || layout === null || layout.byRegion.size === 0 || columns.dateColumn === columns.countColumn) {
    throw wholeFileError(file, columns, noRegions);
  }
  const { text } = read;
  const lay = layout;
  const names = [...lay.byRegion.keys()].sort(compareStrings);
  const series = new Map<string, CaseSeries>();
  const regionWarnings = new Map<string, string[]>();
  const failed = new Map<string, string>();
  const readAlone = (name: string): CaseData => parseCases(regionText(text, lay.header, lay.byRegion.get(name)!), file, columns);

  // each region on its own: the usual, clean case ends here
  let clean = lay.strays === 0;
  for (const name of names) {
    if (!clean) break;
    try {
      const alone = readAlone(name);
      series.set(name, alone.series[0]!);
      regionWarnings.set(name, alone.warnings);
    } catch (e) {
      if (!(e instanceof WaxwaneError)) throw e;
      clean = false;
    }
  }
  let fileWarnings: string[] = [];
  if (!clean || lay.empties > 0) {
    // the whole file, so that messages name its own lines
    series.clear();
    regionWarnings.clear();
    fileWarnings = readWhole(file, text, lay, names, columns, failed);
    for (const name of names) {
      if (failed.has(name)) continue;
      let alone: CaseData;
      try {
        alone = readAlone(name);
      } catch (e) {
        // the whole file was read without this error, so it cannot come from the region's rows
        throw new Error(`readRegionCases: region ${JSON.stringify(name)} read alone fails (${e instanceof Error ? e.message : String(e)})`);
      }
      series.set(name, alone.series[0]!);
      regionWarnings.set(name, alone.warnings);
    }
    const own = new Set([...regionWarnings.values()].flat());
    fileWarnings = fileWarnings.filter((w) => !own.has(w));
  }
  for (const [name, s] of series) {
    if (s.region !== name) throw new Error(`readRegionCases: region ${JSON.stringify(name)} was read as ${JSON.stringify(s.region)}`);
  }
  return { file, sha256: createHash('sha256').update(read.bytes).digest('hex'), names, series, regionWarnings, failed, fileWarnings };
}

/**
 * Reads the whole file with the case reader, setting regions aside one refusal at a time
 * (into `failed`) until the rest is read without error; returns the reader's warnings.
 *
 * @throws WaxwaneError for a problem of the whole file.
 */
function readWhole(file: string, text: string, lay: Layout, names: readonly string[], columns: ColumnOptions, failed: Map<string, string>): string[] {
  let error: WaxwaneError | null = null;
  let atLine: Map<number, string> | null = null;
  const regionAt = (line: number): string | undefined => {
    if (atLine === null) {
      atLine = new Map();
      for (const r of iterateRecords(text)) {
        if (r.line > 1 && r.fields.length === lay.header.fields.length && r.fields[lay.regionIndex] !== '') atLine.set(r.line, r.fields[lay.regionIndex]!);
      }
    }
    return atLine.get(line);
  };
  for (;;) {
    const aside = [...failed.keys()].flatMap((n) => lay.byRegion.get(n)!);
    if (failed.size === names.length) return [];
    try {
      return parseCases(blankRecords(text, aside), file, columns).warnings;
    } catch (e) {
      if (!(e instanceof WaxwaneError)) throw e;
      error = e;
    }
    const line = lineOfMessage(error.message, file);
    if (line !== null) {
      const name = regionAt(line);
      if (name === undefined || failed.has(name)) throw error;
      failed.set(name, error.message);
      continue;
    }
    // refused after every row was read (every count blank, a population below the cases):
    // the regions read alone say which
    let found = 0;
    for (const name of names) {
      if (failed.has(name)) continue;
      try {
        parseCases(regionText(text, lay.header, lay.byRegion.get(name)!), file, columns);
      } catch (e) {
        if (!(e instanceof WaxwaneError)) throw e;
        failed.set(name, e.message);
        found += 1;
      }
    }
    if (found === 0) throw error;
  }
}
