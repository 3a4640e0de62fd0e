/**
 * Everything a report shows, read back from a run folder: run.json (required), summary.csv
 * (required), and, when present, diagnostics.csv, draws.csv, data.csv, forecast.csv,
 * scenarios.csv and nowcast.csv. The report needs nothing but the folder, so a report can be
 * written again at any time (`waxwane report RUN_DIR`). Files a section needs but the folder
 * lacks are `null`; the section then says so instead of failing.
 */
import { existsSync, readFileSync, statSync } from 'node:fs';
import { join } from 'node:path';
import { WaxwaneError, inputError } from '../../errors.js';
import { readJsonDocument } from '../../io/json.js';
import { parsePriorSet } from '../../io/priors.js';
import type { PriorSet } from '../../model/prior-set.js';
import { levelOfColumn, numberColumn, readTextTable, requireColumns, type TextTable } from './csv.js';

/** A row of a long-form summary table (summary.csv, forecast.csv, nowcast.csv). */
export interface QuantileRow {
  quantity: string;
  /** ISO date; empty for a parameter */
  date: string;
  /** forecast.csv only; empty elsewhere */
  scenario: string;
  mean: number;
  sd: number;
  /** one value per level of the table, in level order */
  q: number[];
}

/** A long-form summary table and its quantile levels (ascending). */
export interface QuantileTable {
  levels: number[];
  rows: QuantileRow[];
}

export interface DiagnosticRecord {
  parameter: string;
  rhat: number;
  ess_bulk: number;
  ess_tail: number;
  mcse_mean: number;
}

/** Kept draws: chain number per row and one column per parameter (natural units). */
export interface DrawTable {
  chain: Int32Array;
  parameters: string[];
  values: Map<string, Float64Array>;
}

export interface ObservedDay {
  date: string;
  /** null: a missing day */
  cases: number | null;
}

export interface IdentificationRecord {
  parameter: string;
  priorSd: number;
  posteriorSd: number;
  contraction: number;
  shift: number;
  weak: boolean;
}

/** The fields of run.json the report relies on; `raw` keeps the whole document. */
export interface RunRecord {
  raw: Record<string, unknown>;
  command: string;
  version: string;
  input: {
    file: string;
    sha256: string;
    region: string | null;
    firstDate: string;
    lastDate: string;
    days: number;
    population: number;
  };
  priorFile: string;
  priorSet: PriorSet;
  options: Record<string, unknown>;
  seed: number | null;
  converged: boolean;
  convergenceRule: string;
  warnings: string[];
  caution: string;
  identification: IdentificationRecord[];
}

export interface RunFolder {
  dir: string;
  run: RunRecord;
  summary: QuantileTable;
  diagnostics: DiagnosticRecord[] | null;
  draws: DrawTable | null;
  data: ObservedDay[] | null;
  forecast: QuantileTable | null;
  /** scenarios.csv as text (scenario, quantity, mean, sd, quantiles, date_ quantiles) */
  scenarios: TextTable | null;
  nowcast: QuantileTable | TextTable | null;
  /** growth.csv: growth_rate, doubling_time and halving_time per date */
  growth: QuantileTable | null;
  /** forecast.json: the forecast's own record (horizon, scenarios and their descriptions) */
  forecastRecord: Record<string, unknown> | null;
}

/** The optional files, for the notes of sections that are left out. */
export const OPTIONAL_FILES = ['diagnostics.csv', 'draws.csv', 'data.csv', 'forecast.csv', 'scenarios.csv', 'nowcast.csv', 'growth.csv', 'forecast.json'] as const;

/**
 * Reads a run folder.
 *
 * @throws WaxwaneError when the folder, run.json or summary.csv is missing, or when a file
 *   present is malformed (file, line and column named).
 */
export function readRunFolder(dir: string): RunFolder {
  let isDir = false;
  try {
    isDir = statSync(dir).isDirectory();
  } catch {
    isDir = false;
  }
  if (!isDir) throw new WaxwaneError(`${dir}: no such folder; give the output folder of a run (the --out of waxwane fit)`);
  const runPath = join(dir, 'run.json');
  if (!existsSync(runPath)) {
    throw new WaxwaneError(`${dir}: no run.json in this folder; give the output folder of a run (the --out of waxwane fit)`);
  }
  const run = parseRunRecord(readFileSync(runPath, 'utf8'), join(dir, 'run.json'));
  const summaryTable = readTextTable(join(dir, 'summary.csv'), join(dir, 'summary.csv'));
  if (summaryTable === null) {
    throw new WaxwaneError(`${dir}: no summary.csv in this folder; the run is incomplete, fit again`);
  }
  const at = (name: string) => readTextTable(join(dir, name), join(dir, name));
  const diagnostics = at('diagnostics.csv');
  const draws = at('draws.csv');
  const data = at('data.csv');
  const forecast = at('forecast.csv');
  const nowcast = at('nowcast.csv');
  const growth = at('growth.csv');
  const forecastJson = join(dir, 'forecast.json');
  const forecastRecord = existsSync(forecastJson)
    ? readJsonDocument(readFileSync(forecastJson, 'utf8'), forecastJson, {
        what: 'a forecast record',
        emptyFix: 'run the forecast again',
        layoutHint: 'give the output folder of a waxwane run',
      })
    : null;
  return {
    dir,
    run,
    summary: quantileTable(summaryTable, false),
    diagnostics: diagnostics === null ? null : diagnosticRecords(diagnostics),
    draws: draws === null ? null : drawTable(draws),
    data: data === null ? null : observedDays(data),
    forecast: forecast === null ? null : quantileTable(forecast, true),
    scenarios: at('scenarios.csv'),
    nowcast: nowcast === null ? null : nowcast.columns.includes('quantity') && nowcast.columns.includes('date') ? quantileTable(nowcast, false) : nowcast,
    growth: growth === null ? null : quantileTable(growth, false),
    forecastRecord,
  };
}

/** Parses a long-form table: quantity, date, mean, sd, then quantile columns (scenario first in forecast.csv). */
export function quantileTable(table: TextTable, withScenario: boolean): QuantileTable {
  requireColumns(table, withScenario ? ['scenario', 'quantity', 'date', 'mean', 'sd'] : ['quantity', 'date', 'mean', 'sd']);
  const qcols = table.columns
    .map((c) => ({ c, p: levelOfColumn(c) }))
    .filter((x): x is { c: string; p: number } => x.p !== null)
    .sort((a, b) => a.p - b.p);
  if (qcols.length === 0) {
    throw inputError({ file: table.file }, 'no quantile columns (q05, q50, ...)', 'write the run folder again with this version of waxwane');
  }
  const quantity = table.column('quantity');
  const date = table.column('date');
  const scenario = withScenario ? table.column('scenario') : null;
  const mean = numberColumn(table, 'mean', true);
  const sd = numberColumn(table, 'sd', true);
  const qs = qcols.map(({ c }) => numberColumn(table, c, true));
  const rows: QuantileRow[] = [];
  for (let i = 0; i < table.rows; i++) {
    rows.push({
      quantity: quantity[i],
      date: date[i],
      scenario: scenario === null ? '' : scenario[i],
      mean: mean[i],
      sd: sd[i],
      q: qs.map((col) => col[i]),
    });
  }
  return { levels: qcols.map((x) => x.p), rows };
}

function diagnosticRecords(table: TextTable): DiagnosticRecord[] {
  requireColumns(table, ['parameter', 'rhat', 'ess_bulk', 'ess_tail', 'mcse_mean']);
  const parameter = table.column('parameter');
  const rhat = numberColumn(table, 'rhat');
  const bulk = numberColumn(table, 'ess_bulk');
  const tail = numberColumn(table, 'ess_tail');
  const mcse = numberColumn(table, 'mcse_mean');
  return parameter.map((p, i) => ({ parameter: p, rhat: rhat[i], ess_bulk: bulk[i], ess_tail: tail[i], mcse_mean: mcse[i] }));
}

function drawTable(table: TextTable): DrawTable {
  requireColumns(table, ['chain', 'draw', 'log_density']);
  const chainValues = numberColumn(table, 'chain');
  const parameters = table.columns.filter((c) => c !== 'chain' && c !== 'draw');
  const values = new Map<string, Float64Array>();
  for (const p of parameters) values.set(p, numberColumn(table, p));
  return { chain: Int32Array.from(chainValues), parameters, values };
}

function observedDays(table: TextTable): ObservedDay[] {
  requireColumns(table, ['date', 'cases']);
  const date = table.column('date');
  const cases = numberColumn(table, 'cases', true);
  return date.map((d, i) => ({ date: d, cases: Number.isNaN(cases[i]) ? null : cases[i] }));
}

// ---------------------------------------------------------------------------------------------
// run.json

type Json = Record<string, unknown>;

function field<T>(file: string, obj: Json, path: string, check: (v: unknown) => v is T, what: string): T {
  let v: unknown = obj;
  for (const key of path.split('.')) v = v !== null && typeof v === 'object' ? (v as Json)[key] : undefined;
  if (!check(v)) {
    throw inputError({ file, field: path }, `must be ${what}, got ${v === undefined ? 'nothing' : JSON.stringify(v)}`, 'write the run folder again with this version of waxwane');
  }
  return v;
}

const isString = (v: unknown): v is string => typeof v === 'string';
const isNumber = (v: unknown): v is number => typeof v === 'number' && Number.isFinite(v);
const isBoolean = (v: unknown): v is boolean => typeof v === 'boolean';
const isObject = (v: unknown): v is Json => v !== null && typeof v === 'object' && !Array.isArray(v);
const isStringOrNull = (v: unknown): v is string | null => v === null || typeof v === 'string';
const isStringArray = (v: unknown): v is string[] => Array.isArray(v) && v.every(isString);
const isArray = (v: unknown): v is unknown[] => Array.isArray(v);

/** Parses and checks the text of run.json. */
export function parseRunRecord(text: string, file: string): RunRecord {
  const raw = readJsonDocument(text, file, {
    what: 'a run record',
    emptyFix: 'write the run folder again (waxwane fit)',
    layoutHint: 'give the output folder of a waxwane run',
  });
  if (raw.tool !== 'waxwane') {
    throw inputError({ file, field: 'tool' }, 'this is not a run record written by waxwane', 'give the output folder of a waxwane run');
  }
  const priorSet = parsePriorSet(JSON.stringify(field(file, raw, 'priors.set', isObject, 'an object')), `${file} (priors.set)`);
  const options = field(file, raw, 'options', isObject, 'an object');
  const seed = options.seed;
  const identification = field(file, raw, 'identification', isArray, 'a list').map((_, i) => {
    const path = `identification.${i}`;
    const o = field(file, raw, path, isObject, 'an object');
    return {
      parameter: field(file, o, 'parameter', isString, 'a name'),
      priorSd: field(file, o, 'priorSd', isNumber, 'a number'),
      posteriorSd: field(file, o, 'posteriorSd', isNumber, 'a number'),
      contraction: field(file, o, 'contraction', isNumber, 'a number'),
      shift: field(file, o, 'shift', isNumber, 'a number'),
      weak: field(file, o, 'weak', isBoolean, 'true or false'),
    };
  });
  return {
    raw,
    command: field(file, raw, 'command', isString, 'a command name'),
    version: field(file, raw, 'version', isString, 'a version'),
    input: {
      file: field(file, raw, 'input.file', isString, 'a file name'),
      sha256: field(file, raw, 'input.sha256', isString, 'a hash'),
      region: field(file, raw, 'input.region', isStringOrNull, 'a region name or null'),
      firstDate: field(file, raw, 'input.first_date', isString, 'a date'),
      lastDate: field(file, raw, 'input.last_date', isString, 'a date'),
      days: field(file, raw, 'input.days', isNumber, 'a number'),
      population: field(file, raw, 'input.population', isNumber, 'a number'),
    },
    priorFile: field(file, raw, 'priors.file', isString, 'a file name'),
    priorSet,
    options,
    seed: isNumber(seed) ? seed : null,
    converged: field(file, raw, 'converged', isBoolean, 'true or false'),
    convergenceRule: field(file, raw, 'convergence_rule', isString, 'a sentence'),
    warnings: field(file, raw, 'warnings', isStringArray, 'a list of sentences'),
    caution: field(file, raw, 'caution', isString, 'a sentence'),
    identification,
  };
}
