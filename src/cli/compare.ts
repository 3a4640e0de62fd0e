/**
 * `waxwane compare CASES.csv --priors A B ... --population N --out DIR`: fits the data under
 * each prior set and puts them side by side (posterior medians and intervals of key
 * quantities; the shift and contraction of every parameter from prior to posterior), then
 * backtests each set from rolling origins and ranks the sets by proper scores of their 1 to H
 * day forecasts. Everything is validated before the first fit; all tables are written at once.
 *
 * Fits run one after another; each runs its chains on `--threads` worker threads. On the two
 * cores this tool is tuned for, one fit's four chains already keep both busy, so running fits
 * side by side would only add memory and interleave the progress lines.
 */
import { performance } from 'node:perf_hooks';
import { basename } from 'node:path';
import { WaxwaneError } from '../errors.js';
import { readCases, checkPopulation } from '../io/cases.js';
import { dayOfWeek } from '../io/dates.js';
import { resolvePriorSet, resolvePriorSetPath } from '../io/priors.js';
import { prepareOutputDir, OutputSet } from '../io/atomic.js';
import { fitPosterior, fitDailyColumns, DEFAULT_SAMPLER, type SamplerOptions } from '../inference/fit.js';
import type { PriorSet } from '../model/prior-set.js';
import { summaryRows, type SummaryRow } from '../outputs/summary.js';
import { identification, type Identification } from '../outputs/identification.js';
import { longCsv } from '../outputs/draw-summary.js';
import { formatNumber } from '../outputs/format.js';
import { VERSION } from '../version.js';
import { CAUTION, samplingOptionsRecord, selectSeries } from './fit.js';
import type { Reporter } from './reporter.js';
import { backtestOrigins, backtestPriorSet, MIN_TRAINING_DAYS, type BacktestResult } from '../evaluation/backtest.js';
import { pairedWisDifference, rankPriorSets, summarizeByHorizon, summarizeScores, type PairedDifference } from '../evaluation/comparison.js';
import { backtestCsv, backtestFitRows, fitsCsv, identificationCsv, rankingCsv, scoresCsv, type FitRow } from '../evaluation/compare-tables.js';
import { checkFit } from '../evaluation/fit-record.js';

export interface CompareCliOptions {
  priors: string[];
  population?: number;
  out: string;
  chains: number;
  warmup: number;
  draws: number;
  thin: number;
  seed: number;
  threads: number;
  quantiles: number[];
  region?: string;
  dateColumn: string;
  countColumn: string;
  regionColumn: string;
  window: number;
  every: number;
  horizon: number;
  backtestWarmup: number;
  backtestDraws: number;
  backtestThin: number;
  force: boolean;
  quiet: boolean;
  /** write report.html (false with --no-report) */
  report: boolean;
}

/** Most prior sets compared at once (the report's colour palette has six). */
export const MAX_PRIOR_SETS = 6;


/** Daily quantities kept in estimates.csv beside the scalar parameters. */
export const ESTIMATE_QUANTITIES = ['effective_reproduction', 'growth_rate', 'infections', 'expected_reports'] as const;

export const COMPARE_FILES = ['scores.csv', 'ranking.csv', 'backtest.csv', 'estimates.csv', 'identification.csv', 'fits.csv', 'compare.json'] as const;

interface PriorEntry {
  label: string;
  file: string;
  set: PriorSet;
}


/** Loads the prior sets and gives each a unique label: its name, else its file name. */
function loadPriorEntries(args: readonly string[]): PriorEntry[] {
  if (args.length === 0) throw new WaxwaneError('--priors needs at least one prior set, e.g. --priors smooth default flexible');
  if (args.length > MAX_PRIOR_SETS) throw new WaxwaneError(`--priors lists ${args.length} prior sets; compare at most ${MAX_PRIOR_SETS} at once`);
  const entries = args.map((a) => ({ file: resolvePriorSetPath(a), set: resolvePriorSet(a), arg: a }));
  const seenFiles = new Set<string>();
  for (const e of entries) {
    if (seenFiles.has(e.file)) throw new WaxwaneError(`--priors names the prior set ${e.arg} twice; list each set once`);
    seenFiles.add(e.file);
  }
  const nameCount = new Map<string, number>();
  for (const e of entries) nameCount.set(e.set.name, (nameCount.get(e.set.name) ?? 0) + 1);
  const labels = entries.map((e) => ((nameCount.get(e.set.name) ?? 0) > 1 ? basename(e.file).replace(/\.json$/i, '') : e.set.name));
  if (new Set(labels).size !== labels.length) {
    throw new WaxwaneError(`--priors: two prior sets share the name and file name "${labels.find((l, i) => labels.indexOf(l) !== i)}"; give them distinct "name" fields`);
  }
  return entries.map((e, i) => ({ label: labels[i]!, file: e.file, set: e.set }));
}

/** A progress bar of `done` of `total`. */
function bar(done: number, total: number): string {
  const pct = Math.min(100, Math.floor((100 * done) / Math.max(1, total)));
  return `[${'#'.repeat(Math.floor(pct / 4)).padEnd(25, '.')}] ${pct}%`;
}

/** A progress line over the chains of one fit at a time (`total` iterations over all chains). */
function progressTracker(reporter: Reporter, prefix: () => string, total: number) {
  const done = new Map<number, number>();
  return {
    reset() {
      done.clear();
    },
    progress(chain: number, iteration: number) {
      done.set(chain, iteration);
      let sum = 0;
      for (const v of done.values()) sum += v;
      reporter.progress(`${prefix()} ${bar(sum, total)}`);
    },
  };
}

interface FullFit {
  rows: SummaryRow[];
  identification: Identification[];
  fitRow: FitRow;
  warnings: string[];
}

export async function runCompare(casesFile: string, o: CompareCliOptions, reporter: Reporter): Promise<number> {
  const started = performance.now();
  // 1. validate every input before anything is written
  const data = readCases(casesFile, { dateColumn: o.dateColumn, countColumn: o.countColumn, regionColumn: o.regionColumn });
  const series = selectSeries(data.series, o.region, casesFile);
  const population = o.population ?? series.population;
  if (population === undefined) throw new WaxwaneError(`${casesFile}: no population given; pass --population N or add a "population" column`);
  checkPopulation(series, population, casesFile);
  const priors = loadPriorEntries(o.priors);
  const T = series.dates.length;
  if (T < MIN_TRAINING_DAYS + o.horizon) {
    throw new WaxwaneError(`${casesFile}: ${T} days of data; a backtest needs at least ${MIN_TRAINING_DAYS} days to fit and ${o.horizon} more to score (--horizon)`);
  }
  const origins = backtestOrigins(T, { window: o.window, every: o.every, horizon: o.horizon });
  for (const w of data.warnings) reporter.warn(w);
  prepareOutputDir(o.out, { force: o.force });

  const firstWeekday = dayOfWeek(series.firstDate);
  const counts = Array.from(series.counts, (v) => (Number.isNaN(v) ? null : v)) as number[];
  const fullSampler: SamplerOptions = { ...DEFAULT_SAMPLER, chains: o.chains, warmup: o.warmup, draws: o.draws, thin: o.thin, seed: o.seed, threads: o.threads, derived: true };
  const shortSampler: SamplerOptions = { ...fullSampler, warmup: o.backtestWarmup, draws: o.backtestDraws, thin: o.backtestThin, derived: false };
  const lastDate = series.dates[T - 1]!;
  reporter.info(
    `comparing ${priors.length} prior set${priors.length === 1 ? '' : 's'} (${priors.map((p) => p.label).join(', ')}) on ${T} days (${series.firstDate} to ${lastDate})` +
      `${series.region !== null ? ` of ${series.region}` : ''}: a fit on every day, then ${origins.length} backtest fits each (origins ${series.dates[origins[0]!]} to ${series.dates[origins[origins.length - 1]!]}, every ${o.every} days, forecasts 1 to ${o.horizon} days ahead)`,
  );

  // 2. fits and backtests, one prior set at a time
  const full = new Map<string, FullFit>();
  const backtests = new Map<string, BacktestResult>();
  const fitRows: FitRow[] = [];
  const warnings: string[] = [...data.warnings];
  let fullSeconds = 0;
  let backtestSeconds = 0;
  for (const p of priors) {
    let stage = 'fit on every day';
    const iterations = (x: SamplerOptions) => x.chains * (x.warmup + x.draws * x.thin);
    const tracker = progressTracker(reporter, () => `[${p.label}] ${stage}`, iterations(fullSampler));
    const shortTracker = progressTracker(reporter, () => `[${p.label}] ${stage}`, iterations(shortSampler));
    const t0 = performance.now();
    const input = { counts, population, firstWeekday, priorSet: p.set };
    const fit = await fitPosterior(input, fullSampler, { progress: (c, i) => tracker.progress(c, i) }).catch((e: unknown) => {
      reporter.done();
      if (!(e instanceof WaxwaneError)) throw e;
      throw new WaxwaneError(`${casesFile}, population ${population}, prior set ${p.label}: ${e.message}`, e.exitCode);
    });
    const seconds = (performance.now() - t0) / 1000;
    fullSeconds += seconds;
    const chains = fit.chains.map((c) => c.draws);
    const daily = fitDailyColumns(fit);
    const check = checkFit(fit);
    const fitWarnings = fit.warnings.map((w) => `prior set ${p.label}, fit on every day: ${w}`);
    if (!check.converged) {
      fitWarnings.push(
        `prior set ${p.label}: the fit on every day did NOT converge (max R-hat ${formatNumber(check.maxRhat, 4)}, min bulk ESS ${Math.round(check.minEssBulk)}, min tail ESS ${Math.round(check.minEssTail)}); its estimates are not reliable: run longer (--warmup, --draws, --thin)`,
      );
    }
    full.set(p.label, {
      rows: summaryRows(fit.model.layout, chains, daily, series.dates, o.quantiles),
      identification: identification(fit.model, chains),
      fitRow: { label: p.label, fit: 'all', lastDate, days: T, seconds, check, failedForecastDraws: null },
      warnings: fitWarnings,
    });
    fitRows.push(full.get(p.label)!.fitRow);
    warnings.push(...fitWarnings);

    const t1 = performance.now();
    const bt = await backtestPriorSet({ counts: series.counts, dates: series.dates, population, firstWeekday }, p.set, origins, o.horizon, shortSampler, o.seed, {
      fitStarting: (j, n, origin) => {
        stage = `backtest ${j + 1}/${n} (data to ${series.dates[origin]})`;
        shortTracker.reset();
      },
      progress: (c, i) => shortTracker.progress(c, i),
    }).catch((e: unknown) => {
      reporter.done();
      throw e;
    });
    reporter.done();
    backtestSeconds += (performance.now() - t1) / 1000;
    backtests.set(p.label, bt);
    fitRows.push(...backtestFitRows(p.label, bt.fits, series.dates));
    reporter.info(`[${p.label}] fit on every day ${formatNumber(seconds, 3)} s (${check.converged ? 'converged' : 'NOT converged'}), ${origins.length} backtest fits ${formatNumber((performance.now() - t1) / 1000, 3)} s`);
  }

  // 3. scores and ranking
  const summaries = priors.map((p) => {
    const forecasts = backtests.get(p.label)!.forecasts;
    return { label: p.label, forecasts, overall: summarizeScores(forecasts), byHorizon: summarizeByHorizon(forecasts, o.horizon) };
  });
  const ranking = rankPriorSets(summaries);
  const best = ranking[0]!.label;
  const versusBest = new Map<string, PairedDifference>(summaries.map((s) => [s.label, pairedWisDifference(s.forecasts, backtests.get(best)!.forecasts)]));
  warnings.push(...rankingWarnings(ranking, versusBest));
  const loose = fitRows.filter((r) => r.fit === 'backtest' && !(r.check.maxRhat <= LOOSE_RHAT));
  if (loose.length > 0) {
    warnings.push(
      `${loose.length} of ${fitRows.filter((r) => r.fit === 'backtest').length} backtest fits have a max R-hat above ${LOOSE_RHAT} (worst ${formatNumber(Math.max(...loose.map((r) => r.check.maxRhat)), 3)}; see fits.csv): their forecasts carry extra Monte Carlo noise; lengthen them with --backtest-warmup, --backtest-draws or --backtest-thin`,
    );
  }
  const failedDraws = fitRows.reduce((a, r) => a + (r.failedForecastDraws ?? 0), 0);
  if (failedDraws > 0) warnings.push(`${failedDraws} forecast draws over all backtest fits gave an impossible epidemic and were left out of the scores (see fits.csv)`);

  // 4. write everything at once
  const out = new OutputSet(o.out);
  out.add('scores.csv', scoresCsv(summaries));
  out.add('ranking.csv', rankingCsv(ranking, versusBest));
  out.add('backtest.csv', backtestCsv(summaries, series.dates));
  out.add('estimates.csv', estimatesCsv(priors, full, o.quantiles));
  out.add('identification.csv', identificationCsv(priors.map((p) => ({ label: p.label, identification: full.get(p.label)!.identification }))));
  out.add('fits.csv', fitsCsv(fitRows));
  const record = {
    tool: 'waxwane',
    version: VERSION,
    command: 'compare',
    input: { file: basename(casesFile), sha256: data.sha256, region: series.region, first_date: series.firstDate, last_date: lastDate, days: T, population },
    prior_sets: priors.map((p) => ({ label: p.label, file: basename(p.file), set: p.set })),
    options: {
      ...samplingOptionsRecord(o),
      window: o.window,
      every: o.every,
      horizon: o.horizon,
      backtest_warmup: o.backtestWarmup,
      backtest_draws: o.backtestDraws,
      backtest_thin: o.backtestThin,
    },
    backtest: {
      origins: origins.map((t) => series.dates[t]),
      first_target: series.dates[origins[0]! + 1],
      last_target: series.dates[origins[origins.length - 1]! + o.horizon],
      forecast: 'carry_on: the random walk on log beta carried on (as waxwane forecast)',
      ranked_by: 'mean weighted interval score over every scored forecast (lower is better); ties by mean CRPS',
    },
    threads: o.threads,
    fits_at_once: 1,
    versions: { node: process.versions.node, waxwane: VERSION },
    timings_seconds: { fits_on_every_day: round(fullSeconds), backtests: round(backtestSeconds), total: round((performance.now() - started) / 1000) },
    converged: Object.fromEntries(priors.map((p) => [p.label, full.get(p.label)!.fitRow.check.converged])),
    ranking: ranking.map((r) => r.label),
    warnings,
    caution: CAUTION,
  };
  out.add('compare.json', JSON.stringify(record, null, 2) + '\n');
  out.commit();

  // 5. tell the user
  reporter.info(rankingLines(ranking, versusBest).join('\n'));
  reporter.info(keyLines(priors, full, lastDate).join('\n'));
  for (const w of warnings.slice(data.warnings.length)) reporter.warn(w);
  reporter.info(`outputs in ${o.out}/ (${COMPARE_FILES.join(', ')})`);
  if (o.report) await writeCompareReportAfterRun(o.out, reporter);
  reporter.info(`caution: ${CAUTION}`);
  return 0;
}

/** R-hat above which a backtest fit is called out (a looser bar than the convergence rule; common practice for rough runs). */
export const LOOSE_RHAT = 1.1;

function round(x: number): number {
  return Number(x.toPrecision(4));
}

/** estimates.csv: the key daily quantities and the scalar parameters under each prior set. */
function estimatesCsv(priors: readonly PriorEntry[], full: ReadonlyMap<string, FullFit>, levels: readonly number[]): string {
  const scalars = new Set(full.get(priors[0]!.label)!.identification.map((i) => i.parameter));
  const keep = (r: SummaryRow) => (r.date === '' ? scalars.has(r.quantity) : (ESTIMATE_QUANTITIES as readonly string[]).includes(r.quantity));
  const rows = priors.flatMap((p) =>
    full
      .get(p.label)!
      .rows.filter(keep)
      .map((r) => ({ keys: [p.label, r.quantity, r.date], summary: { mean: r.mean, sd: r.sd, quantiles: r.quantiles } })),
  );
  return longCsv(['prior_set', 'quantity', 'date'], rows, levels);
}

/** Warnings about how clear the ranking is. */
function rankingWarnings(ranking: ReturnType<typeof rankPriorSets>, versusBest: ReadonlyMap<string, PairedDifference>): string[] {
  const out: string[] = [];
  if (ranking.length < 2) return out;
  const second = ranking[1]!;
  const d = versusBest.get(second.label)!;
  if (Number.isFinite(d.se) && d.mean < 2 * d.se) {
    out.push(
      `the ranking is not clear-cut: ${second.label}'s mean WIS exceeds ${ranking[0]!.label}'s by ${formatNumber(d.mean, 3)}, within two standard errors (${formatNumber(d.se, 3)}, over ${d.origins} origins); more origins (--window, --every) would sharpen it`,
    );
  }
  const top = ranking[0]!;
  if (top.rankCrps !== 1 || top.rankLogScore !== 1) {
    out.push(`the scores disagree on the best prior set: ${top.label} is first by WIS but ${top.rankCrps === 1 ? '' : `${ordinal(top.rankCrps)} by CRPS`}${top.rankCrps !== 1 && top.rankLogScore !== 1 ? ' and ' : ''}${top.rankLogScore === 1 ? '' : `${ordinal(top.rankLogScore)} by log score`}`);
  }
  return out;
}

function ordinal(n: number): string {
  return n === 1 ? '1st' : n === 2 ? '2nd' : n === 3 ? '3rd' : `${n}th`;
}

function rankingLines(ranking: ReturnType<typeof rankPriorSets>, versusBest: ReadonlyMap<string, PairedDifference>): string[] {
  const width = Math.max(9, ...ranking.map((r) => r.label.length));
  const cell = (x: string, w: number) => x.padStart(w);
  const num = (x: number, d = 4) => formatNumber(x, d);
  const lines = [
    `ranking by the mean weighted interval score of the backtest forecasts (lower is better; ${ranking[0]!.overall.forecasts} forecasts each):`,
    `  rank  ${'prior set'.padEnd(width)}${cell('WIS', 9)}${cell('above best (se)', 18)}${cell('CRPS', 9)}${cell('log score', 11)}${cell('50% cover', 11)}${cell('90% cover', 11)}`,
  ];
  for (const r of ranking) {
    const d = versusBest.get(r.label)!;
    const vs = r.rank === 1 ? '-' : `${num(d.mean, 3)} (${num(d.se, 2)})`;
    const o = r.overall;
    lines.push(`  ${cell(String(r.rank), 4)}  ${r.label.padEnd(width)}${cell(num(o.wis), 9)}${cell(vs, 18)}${cell(num(o.crps), 9)}${cell(num(o.logScore), 11)}${cell(num(o.coverage50, 3), 11)}${cell(num(o.coverage90, 3), 11)}`);
  }
  return lines;
}

function keyLines(priors: readonly PriorEntry[], full: ReadonlyMap<string, FullFit>, lastDate: string): string[] {
  const lines = [`estimates under each prior set (posterior median and outer interval; last day ${lastDate}):`];
  const items: Array<[string, string, string]> = [
    ['R_t on the last day', 'effective_reproduction', lastDate],
    ['growth rate per day', 'growth_rate', lastDate],
    ['walk scale', 'walk_scale', ''],
    ['ascertainment', 'ascertainment', ''],
  ];
  const width = Math.max(...priors.map((p) => p.label.length));
  for (const [label, q, date] of items) {
    lines.push(`  ${label}`);
    for (const p of priors) {
      const r = full.get(p.label)!.rows.find((x) => x.quantity === q && x.date === date);
      const s = r === undefined ? 'n/a' : `${formatNumber(r.quantiles[Math.floor(r.quantiles.length / 2)]!, 3)}  [${formatNumber(r.quantiles[0]!, 3)}, ${formatNumber(r.quantiles[r.quantiles.length - 1]!, 3)}]`;
      lines.push(`    ${p.label.padEnd(width)}  ${s}`);
    }
  }
  return lines;
}

/**
 * Writes report.html of a comparison folder after its tables are on disk; a problem the user
 * can fix becomes a warning (the tables are complete), anything else propagates.
 */
async function writeCompareReportAfterRun(dir: string, reporter: Reporter): Promise<void> {
  try {
    const { writeCompareReport } = await import('../outputs/report/compare-page.js');
    reporter.info(`report: ${await writeCompareReport(dir)}`);
  } catch (e) {
    if (!(e instanceof WaxwaneError)) throw e;
    reporter.warn(`report.html not written (${e.message}); the other outputs are complete; try again with "waxwane report ${dir}"`);
  }
}

/** `waxwane report DIR` on a comparison folder: writes its report again from its files. */
export async function runCompareReport(dir: string, o: { out?: string; quiet: boolean }, reporter: Reporter): Promise<number> {
  if (o.out !== undefined && !o.out.toLowerCase().endsWith('.html')) {
    throw new WaxwaneError(`--out ${o.out}: the report is an HTML page; give a file name ending in .html`);
  }
  const { writeCompareReport } = await import('../outputs/report/compare-page.js');
  const path = await writeCompareReport(dir, o.out);
  reporter.info(`report written: ${path} (open it in a browser; it needs no network)`);
  return 0;
}
