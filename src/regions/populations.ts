/**
 * The population of each region: from a populations file (`--populations FILE`, a CSV with a
 * region column and a `population` column), else from the case file's own `population`
 * column. A region with neither is an error that names it, before anything is fitted.
 */
import { createHash } from 'node:crypto';
import { readFileSync } from 'node:fs';
import { WaxwaneError, inputError } from '../errors.js';
import { readWholeNumber, type CaseSeries } from '../io/cases.js';
import { CsvShapeError, isBlankRecord, splitRecords } from './csv-records.js';

export interface PopulationTable {
  file: string;
  sha256: string;
  values: Map<string, number>;
}

/** Names listed in a message before "and N more". */
const LISTED = 10;

function show(value: string): string {
  return JSON.stringify(value.length > 40 ? `${value.slice(0, 40)}…` : value);
}

/** `"A", "B", "C" and 4 more` */
export function listNames(names: readonly string[], limit = LISTED): string {
  const head = names.slice(0, limit).map(show).join(', ');
  return names.length > limit ? `${head} and ${names.length - limit} more` : head;
}

/**
 * Reads a populations file: a header naming a region column (`region`, or the case file's
 * region column name) and `population`, then one row per region with a positive whole number
 * written in plain digits (as in the case file). Other columns are ignored.
 *
 * @throws WaxwaneError naming the file, line and column of any problem: a missing column, a
 *   blank region, a region listed twice, a population that is not a positive whole number.
 */
export function readPopulations(file: string, regionColumn: string): PopulationTable {
  let bytes: Buffer;
  try {
    bytes = readFileSync(file);
  } catch (e) {
    const code = (e as NodeJS.ErrnoException).code ?? 'error';
    const why = code === 'ENOENT' ? 'no such file' : code === 'EISDIR' ? 'is a folder, not a file' : `the file cannot be read (${code})`;
    throw inputError({ file }, why, 'give the path of a CSV file with the columns region,population');
  }
  let text: string;
  try {
    text = new TextDecoder('utf-8', { fatal: true, ignoreBOM: true }).decode(bytes);
  } catch {
    throw inputError({ file }, 'the file is not UTF-8 text', 'save it as CSV with UTF-8 encoding');
  }
  if (text.startsWith('\uFEFF')) text = text.slice(1);
  let records;
  try {
    records = splitRecords(text).filter((r) => !isBlankRecord(r));
  } catch (e) {
    if (!(e instanceof CsvShapeError)) throw e;
    throw inputError({ file, line: e.line }, e.what, 'quote the whole field and double any quote inside it');
  }
  const header = records[0];
  if (header === undefined) throw inputError({ file }, 'the file is empty', 'write a header "region,population" and one row per region');
  const names = [...new Set(['region', regionColumn])];
  const regionIndex = names.map((n) => header.fields.indexOf(n)).find((i) => i !== -1) ?? -1;
  const populationIndex = header.fields.indexOf('population');
  if (regionIndex === -1 || populationIndex === -1) {
    throw inputError(
      { file, line: 1 },
      `the header must name a region column (${names.map((n) => `"${n}"`).join(' or ')}) and a "population" column, got ${header.fields.map((f) => show(f)).join(', ')}`,
      'write the header "region,population"',
    );
  }
  const values = new Map<string, number>();
  const lineOf = new Map<string, number>();
  for (const r of records.slice(1)) {
    if (r.fields.length !== header.fields.length) {
      throw inputError({ file, line: r.line }, `the row has ${r.fields.length} fields but the header has ${header.fields.length}`, 'check for missing or extra commas, and quote names that contain a comma');
    }
    const name = r.fields[regionIndex]!;
    if (name === '') throw inputError({ file, line: r.line, column: header.fields[regionIndex] }, 'the region is blank', 'write the region name exactly as in the case file');
    const raw = r.fields[populationIndex]!;
    const reading = readWholeNumber(raw);
    if (reading.kind !== 'value' || reading.value === 0) {
      throw inputError(
        { file, line: r.line, column: 'population' },
        `the population of region ${show(name)} is ${raw.trim() === '' ? 'blank' : show(raw.trim())}, not a positive whole number`,
        'write the number of people in plain digits (e.g. 95000)',
      );
    }
    const earlier = lineOf.get(name);
    if (earlier !== undefined) {
      throw inputError({ file, line: r.line, column: header.fields[regionIndex] }, `region ${show(name)} is listed twice (also on line ${earlier})`, 'keep one row per region');
    }
    lineOf.set(name, r.line);
    values.set(name, reading.value);
  }
  if (values.size === 0) throw inputError({ file }, 'the file has a header but no rows', 'add one row per region: its name and its population');
  return { file, sha256: createHash('sha256').update(bytes).digest('hex'), values };
}

export interface ResolvedPopulations {
  /** population of every region that has one (regions set aside included, when known) */
  values: Map<string, number>;
  /** where each came from */
  source: Map<string, 'file' | 'column'>;
  warnings: string[];
}

/**
 * The population of each region of `needed` (the regions to fit), from `table` first, then
 * from the case file's column; `known` (all regions of the file) only feeds the warnings.
 *
 * @throws WaxwaneError naming the regions of `needed` that have no population.
 */
export function resolvePopulations(
  needed: readonly string[],
  allNames: readonly string[],
  series: ReadonlyMap<string, CaseSeries>,
  table: PopulationTable | null,
  casesFile: string,
): ResolvedPopulations {
  const values = new Map<string, number>();
  const source = new Map<string, 'file' | 'column'>();
  const warnings: string[] = [];
  const differing: string[] = [];
  for (const name of allNames) {
    const fromFile = table?.values.get(name);
    const fromColumn = series.get(name)?.population;
    if (fromFile !== undefined) {
      values.set(name, fromFile);
      source.set(name, 'file');
      if (fromColumn !== undefined && fromColumn !== fromFile) differing.push(name);
    } else if (fromColumn !== undefined) {
      values.set(name, fromColumn);
      source.set(name, 'column');
    }
  }
  const missing = needed.filter((n) => !values.has(n));
  if (missing.length > 0) {
    throw new WaxwaneError(
      `${casesFile}: no population for ${missing.length === 1 ? 'region' : `${missing.length} regions:`} ${listNames(missing)}; ` +
        `give each region its population in a file passed with --populations FILE (CSV with the header "region,population") or in a "population" column of ${casesFile}`,
    );
  }
  if (table !== null && differing.length > 0) {
    warnings.push(`${table.file} and the "population" column of ${casesFile} differ for ${listNames(differing)}; the values of ${table.file} are used`);
  }
  if (table !== null) {
    const known = new Set(allNames);
    const unknown = [...table.values.keys()].filter((n) => !known.has(n));
    if (unknown.length > 0) {
      warnings.push(`${table.file}: ${unknown.length === 1 ? 'a region' : `${unknown.length} regions`} not in ${casesFile} (${listNames(unknown, 5)}) ignored; check the spelling if a region was meant`);
    }
  }
  return { values, source, warnings };
}
