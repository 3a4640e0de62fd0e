/**
 * The combined tables of a multi-region run, in the run folder beside regions/:
 *
 * - summary.csv, diagnostics.csv and (with a forecast) forecast.csv: every fitted region's
 *   own table, as written in its folder, with a `region` column in front, regions in
 *   JavaScript string order of their names;
 * - regions.csv: one row per region (failed ones too): its folder, status, population, dates,
 *   R_t on its last observed day (the summary row), the probability that R_t > 1 that day
 *   (share of the kept draws above 1), convergence figures, the number of warnings in its
 *   run.json, and the message of a failure.
 *
 * The fit and `waxwane merge` build them with these same functions from the same pieces, so a
 * merge of shards gives the bytes of the run without shards.
 */
import { WaxwaneError } from '../errors.js';
import { longCsv } from '../outputs/draw-summary.js';
import { FORECAST_KEYS } from '../outputs/forecast.js';
import { csvField, formatNumber, toCsv } from '../outputs/format.js';
import { quantileColumn } from '../outputs/stats.js';
import { diagnosticsCsv, summaryCsv } from '../outputs/summary.js';
import { splitRecords } from './csv-records.js';
import type { RegionOutcome, RegionStatus } from './region-task.js';

export const COMBINED_FILES = { summary: 'summary.csv', diagnostics: 'diagnostics.csv', forecast: 'forecast.csv', regions: 'regions.csv' } as const;

/** The quantity whose last-day row and probability regions.csv carries. */
export const LAST_DAY_QUANTITY = 'effective_reproduction';

function compareStrings(a: string, b: string): number {
  return a < b ? -1 : a > b ? 1 : 0;
}

/** The header line (no line break) of a region's summary, diagnostics and forecast tables. */
export function tableHeaders(levels: readonly number[]): { summary: string; diagnostics: string; forecast: string } {
  const first = (csv: string) => csv.slice(0, csv.indexOf('\n'));
  return {
    summary: first(summaryCsv([], levels)),
    diagnostics: first(diagnosticsCsv([])),
    forecast: first(longCsv(FORECAST_KEYS, [], levels)),
  };
}

export interface RegionTable {
  name: string;
  /** the table's text as written in the region's folder */
  text: string;
  /** where it comes from, for messages */
  file: string;
}

/**
 * The tables of several regions as one, with a `region` column in front.
 *
 * @throws WaxwaneError when a table's header is not `header` (a folder from another run or
 *   another version).
 */
export function combineTables(header: string, tables: readonly RegionTable[]): string {
  const out: string[] = [`region,${header}`];
  for (const t of [...tables].sort((a, b) => compareStrings(a.name, b.name))) {
    const lines = t.text.split('\n');
    if (lines[0] !== header || !t.text.endsWith('\n')) {
      throw new WaxwaneError(`${t.file}: the columns are "${lines[0]}", not "${header}" as the other regions' of this run; the folder comes from another run or version, fit the region again`);
    }
    const prefix = `${csvField(t.name)},`;
    for (let i = 1; i < lines.length - 1; i++) out.push(prefix + lines[i]);
  }
  return `${out.join('\n')}\n`;
}

/** The columns of regions.csv. */
export function regionsHeader(levels: readonly number[]): string[] {
  return [
    'region',
    'folder',
    'status',
    'population',
    'first_date',
    'last_date',
    'days',
    'rt_mean',
    'rt_sd',
    ...levels.map((p) => `rt_${quantileColumn(p)}`),
    'prob_rt_above_1',
    'max_rhat',
    'min_ess_bulk',
    'min_ess_tail',
    'warnings',
    'message',
  ];
}

/** The fields (mean, sd, quantiles) of a summary's row for `quantity` on `date`, as written. */
export function summaryFields(summary: string, quantity: string, date: string): string[] | null {
  const start = `${quantity},${date},`;
  const line = summary.split('\n').find((l) => l.startsWith(start));
  return line === undefined ? null : line.slice(start.length).split(',');
}

/** A region's row of regions.csv. */
export function regionRow(
  r: { name: string; folder: string; population: number | null; outcome: RegionOutcome },
  levels: readonly number[],
): string[] {
  const { outcome } = r;
  const width = 2 + levels.length;
  const population = r.population === null ? '' : String(r.population);
  if (outcome.status === 'failed' || outcome.run === null || outcome.files === null) {
    return [r.name, r.folder, 'failed', population, '', '', '', ...new Array<string>(width).fill(''), '', '', '', '', '', outcome.message ?? ''];
  }
  const run = outcome.run;
  const rt = summaryFields(outcome.files.summary, LAST_DAY_QUANTITY, run.lastDate);
  if (rt === null || rt.length !== width) {
    throw new Error(`regionRow: the summary of region ${JSON.stringify(r.name)} has no ${LAST_DAY_QUANTITY} row for ${run.lastDate} with ${width} values`);
  }
  return [
    r.name,
    r.folder,
    outcome.status,
    population,
    run.firstDate,
    run.lastDate,
    String(run.days),
    ...rt,
    outcome.probAbove1 === null ? '' : formatNumber(outcome.probAbove1),
    formatNumber(run.maxRhat, 6),
    formatNumber(run.minEssBulk, 6),
    formatNumber(run.minEssTail, 6),
    String(run.warnings),
    '',
  ];
}

/** regions.csv from its rows (any order; written in order of region name). */
export function regionsCsv(levels: readonly number[], rows: ReadonlyArray<readonly string[]>): string {
  return toCsv(
    regionsHeader(levels),
    [...rows].sort((a, b) => compareStrings(a[0]!, b[0]!)),
  );
}

/** A row of regions.csv read back: the fields by column name. */
export interface RegionsRow {
  region: string;
  folder: string;
  status: RegionStatus;
  fields: string[];
  get(column: string): string;
}

/**
 * Reads regions.csv back (for `waxwane merge` and the report).
 *
 * @throws WaxwaneError naming the file and line when the columns are not those of
 *   {@link regionsHeader} for `levels` or a row is malformed.
 */
export function parseRegionsCsv(text: string, file: string, levels: readonly number[]): RegionsRow[] {
  const header = regionsHeader(levels);
  let records;
  try {
    records = splitRecords(text);
  } catch (e) {
    throw new WaxwaneError(`${file}: ${e instanceof Error ? e.message : String(e)}; write the run folder again (waxwane fit)`);
  }
  const head = records[0]?.fields ?? [];
  if (head.join(',') !== header.join(',')) {
    throw new WaxwaneError(`${file}, line 1: the columns are "${head.join(',')}", expected "${header.join(',')}"; write the run folder again with this version of waxwane`);
  }
  const index = new Map(header.map((c, i) => [c, i]));
  return records.slice(1).map((r) => {
    const status = r.fields[2];
    if (r.fields.length !== header.length || (status !== 'ok' && status !== 'not_converged' && status !== 'failed')) {
      throw new WaxwaneError(`${file}, line ${r.line}: not a row of regions.csv (${r.fields.length} fields, status "${status ?? ''}"); write the run folder again (waxwane fit)`);
    }
    return {
      region: r.fields[0]!,
      folder: r.fields[1]!,
      status,
      fields: r.fields,
      get: (column: string) => r.fields[index.get(column)!]!,
    };
  });
}
