/**
 * A comparison folder (the --out of `waxwane compare`) read back for its report: compare.json
 * (required), ranking.csv, scores.csv, estimates.csv, identification.csv and fits.csv
 * (required too: compare writes them all at once). Malformed files are WaxwaneErrors naming
 * the file, line and column, as for a run folder.
 */
import { existsSync, readFileSync, statSync } from 'node:fs';
import { join } from 'node:path';
import { WaxwaneError, inputError } from '../../errors.js';
import { readJsonDocument } from '../../io/json.js';
import { parsePriorSet } from '../../io/priors.js';
import type { PriorSet } from '../../model/prior-set.js';
import { levelOfColumn, numberColumn, readTextTable, requireColumns, type TextTable } from './csv.js';

export interface ComparePriorSet {
  label: string;
  file: string;
  set: PriorSet;
}

export interface RankingRecord {
  rank: number;
  priorSet: string;
  wis: number;
  relativeWis: number;
  wisVsBest: number;
  wisVsBestSe: number;
  crps: number;
  logScore: number;
  coverage50: number;
  coverage90: number;
  rankCrps: number;
  rankLogScore: number;
}

export interface ScoreRecord {
  priorSet: string;
  /** 1..H, or null for the row over every horizon */
  horizon: number | null;
  forecasts: number;
  wis: number;
  crps: number;
  logScore: number;
  coverage50: number;
  coverage90: number;
}

export interface EstimateRecord {
  priorSet: string;
  quantity: string;
  /** empty for a parameter */
  date: string;
  mean: number;
  q: number[];
}

export interface IdentificationRow {
  priorSet: string;
  parameter: string;
  contraction: number;
  shift: number;
  weak: boolean;
}

export interface FitRecordRow {
  priorSet: string;
  fit: string;
  lastDate: string;
  seconds: number;
  maxRhat: number;
  minEssBulk: number;
  minEssTail: number;
  converged: boolean;
}

export interface CompareFolder {
  dir: string;
  /** compare.json as written */
  raw: Record<string, unknown>;
  version: string;
  input: { file: string; sha256: string; region: string | null; firstDate: string; lastDate: string; days: number; population: number };
  priorSets: ComparePriorSet[];
  origins: string[];
  horizon: number;
  warnings: string[];
  caution: string;
  ranking: RankingRecord[];
  scores: ScoreRecord[];
  /** quantile levels of estimates.csv, ascending */
  levels: number[];
  estimates: EstimateRecord[];
  identification: IdentificationRow[];
  fits: FitRecordRow[];
}

type Json = Record<string, unknown>;
const FIX = 'run waxwane compare again; its output files are not meant to be edited';

function get(file: string, obj: Json, path: string): unknown {
  let v: unknown = obj;
  for (const key of path.split('.')) v = v !== null && typeof v === 'object' ? (v as Json)[key] : undefined;
  if (v === undefined) throw inputError({ file, field: path }, 'is missing', FIX);
  return v;
}

function str(file: string, obj: Json, path: string): string {
  const v = get(file, obj, path);
  if (typeof v !== 'string') throw inputError({ file, field: path }, `must be text, got ${JSON.stringify(v)}`, FIX);
  return v;
}

function numberAt(file: string, obj: Json, path: string): number {
  const v = get(file, obj, path);
  if (typeof v !== 'number' || !Number.isFinite(v)) throw inputError({ file, field: path }, `must be a number, got ${JSON.stringify(v)}`, FIX);
  return v;
}

function list(file: string, obj: Json, path: string): unknown[] {
  const v = get(file, obj, path);
  if (!Array.isArray(v)) throw inputError({ file, field: path }, 'must be a list', FIX);
  return v;
}

function table(dir: string, name: string, columns: readonly string[]): TextTable {
  const path = join(dir, name);
  const t = readTextTable(path, path);
  if (t === null) throw new WaxwaneError(`${dir}: no ${name} in this folder; the comparison is incomplete, run waxwane compare again`);
  requireColumns(t, columns);
  return t;
}

const yes = (file: string, column: string) => (v: string, i: number) => {
  if (v !== 'yes' && v !== 'no') throw inputError({ file, line: i + 2, column }, `"${v}" is not yes or no`, FIX);
  return v === 'yes';
};

/**
 * Reads a comparison folder.
 *
 * @throws WaxwaneError when the folder or one of its files is missing or malformed.
 */
export function readCompareFolder(dir: string): CompareFolder {
  let isDir = false;
  try {
    isDir = statSync(dir).isDirectory();
  } catch {
    isDir = false;
  }
  if (!isDir) throw new WaxwaneError(`${dir}: no such folder; give the output folder of waxwane compare`);
  const jsonPath = join(dir, 'compare.json');
  if (!existsSync(jsonPath)) throw new WaxwaneError(`${dir}: no compare.json in this folder; give the output folder of waxwane compare`);
  const raw = readJsonDocument(readFileSync(jsonPath, 'utf8'), jsonPath, { what: 'a comparison record', emptyFix: FIX, layoutHint: 'give the output folder of waxwane compare' });
  if (raw.tool !== 'waxwane' || raw.command !== 'compare') {
    throw inputError({ file: jsonPath, field: 'command' }, 'this is not a comparison written by waxwane compare', 'give the output folder of waxwane compare');
  }
  const priorSets = list(jsonPath, raw, 'prior_sets').map((_, i) => {
    const entry = get(jsonPath, raw, `prior_sets.${i}`) as Json;
    return {
      label: str(jsonPath, entry, 'label'),
      file: str(jsonPath, entry, 'file'),
      set: parsePriorSet(JSON.stringify(get(jsonPath, entry, 'set')), `${jsonPath} (prior_sets.${i}.set)`),
    };
  });
  const region = get(jsonPath, raw, 'input.region');
  const warnings = list(jsonPath, raw, 'warnings').map(String);

  const rk = table(dir, 'ranking.csv', ['rank', 'prior_set', 'wis', 'relative_wis', 'wis_vs_best', 'wis_vs_best_se', 'crps', 'log_score', 'coverage_50', 'coverage_90', 'rank_crps', 'rank_log_score']);
  const col = (t: TextTable, c: string) => numberColumn(t, c);
  const rankCols = ['rank', 'wis', 'relative_wis', 'wis_vs_best', 'wis_vs_best_se', 'crps', 'log_score', 'coverage_50', 'coverage_90', 'rank_crps', 'rank_log_score'].map((c) => col(rk, c));
  const ranking = rk.column('prior_set').map((priorSet, i) => {
    const [rank, wis, relativeWis, wisVsBest, wisVsBestSe, crps, logScore, coverage50, coverage90, rankCrps, rankLogScore] = rankCols.map((c) => c[i]!) as [number, number, number, number, number, number, number, number, number, number, number];
    return { rank, priorSet, wis, relativeWis, wisVsBest, wisVsBestSe, crps, logScore, coverage50, coverage90, rankCrps, rankLogScore };
  });

  const sc = table(dir, 'scores.csv', ['prior_set', 'horizon', 'forecasts', 'wis', 'crps', 'log_score', 'coverage_50', 'coverage_90']);
  const scoreCols = ['forecasts', 'wis', 'crps', 'log_score', 'coverage_50', 'coverage_90'].map((c) => col(sc, c));
  const horizons = sc.column('horizon');
  const scores = sc.column('prior_set').map((priorSet, i) => {
    const h = horizons[i]!;
    if (h !== 'all' && !/^\d+$/.test(h)) throw inputError({ file: sc.file, line: i + 2, column: 'horizon' }, `"${h}" is neither a day count nor all`, FIX);
    const [forecasts, wis, crps, logScore, coverage50, coverage90] = scoreCols.map((c) => c[i]!) as [number, number, number, number, number, number];
    return { priorSet, horizon: h === 'all' ? null : Number(h), forecasts, wis, crps, logScore, coverage50, coverage90 };
  });

  const es = table(dir, 'estimates.csv', ['prior_set', 'quantity', 'date', 'mean', 'sd']);
  const qcols = es.columns
    .map((c) => ({ c, p: levelOfColumn(c) }))
    .filter((x): x is { c: string; p: number } => x.p !== null)
    .sort((a, b) => a.p - b.p);
  if (qcols.length === 0) throw inputError({ file: es.file }, 'no quantile columns (q05, q50, ...)', FIX);
  const qs = qcols.map(({ c }) => numberColumn(es, c, true));
  const means = numberColumn(es, 'mean', true);
  const quantity = es.column('quantity');
  const date = es.column('date');
  const estimates = es.column('prior_set').map((priorSet, i) => ({ priorSet, quantity: quantity[i]!, date: date[i]!, mean: means[i]!, q: qs.map((c) => c[i]!) }));

  const id = table(dir, 'identification.csv', ['prior_set', 'parameter', 'contraction', 'shift', 'weak']);
  const contraction = col(id, 'contraction');
  const shift = col(id, 'shift');
  const weak = id.column('weak').map(yes(id.file, 'weak'));
  const parameter = id.column('parameter');
  const identification = id.column('prior_set').map((priorSet, i) => ({ priorSet, parameter: parameter[i]!, contraction: contraction[i]!, shift: shift[i]!, weak: weak[i]! }));

  const ft = table(dir, 'fits.csv', ['prior_set', 'fit', 'last_date', 'seconds', 'max_rhat', 'min_ess_bulk', 'min_ess_tail', 'converged']);
  const fitCols = ['seconds', 'max_rhat', 'min_ess_bulk', 'min_ess_tail'].map((c) => col(ft, c));
  const kind = ft.column('fit');
  const last = ft.column('last_date');
  const converged = ft.column('converged').map(yes(ft.file, 'converged'));
  const fits = ft.column('prior_set').map((priorSet, i) => {
    const [seconds, maxRhat, minEssBulk, minEssTail] = fitCols.map((c) => c[i]!) as [number, number, number, number];
    return { priorSet, fit: kind[i]!, lastDate: last[i]!, seconds, maxRhat, minEssBulk, minEssTail, converged: converged[i]! };
  });

  return {
    dir,
    raw,
    version: str(jsonPath, raw, 'version'),
    input: {
      file: str(jsonPath, raw, 'input.file'),
      sha256: str(jsonPath, raw, 'input.sha256'),
      region: typeof region === 'string' ? region : null,
      firstDate: str(jsonPath, raw, 'input.first_date'),
      lastDate: str(jsonPath, raw, 'input.last_date'),
      days: numberAt(jsonPath, raw, 'input.days'),
      population: numberAt(jsonPath, raw, 'input.population'),
    },
    priorSets,
    origins: list(jsonPath, raw, 'backtest.origins').map(String),
    horizon: numberAt(jsonPath, raw, 'options.horizon'),
    warnings,
    caution: str(jsonPath, raw, 'caution'),
    ranking,
    scores,
    levels: qcols.map((x) => x.p),
    estimates,
    identification,
    fits,
  };
}
