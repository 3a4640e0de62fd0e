/**
 * `waxwane fit CASES.csv --population N --out DIR`: validate everything, fit, summarise,
 * write all outputs at once (nothing half-written), print the key results and every warning.
 */
import { performance } from 'node:perf_hooks';
import { basename } from 'node:path';
import { WaxwaneError } from '../errors.js';
import { readCases, checkPopulation, type CaseData, type CaseSeries } from '../io/cases.js';
import { dayOfWeek } from '../io/dates.js';
import { resolvePriorSet, resolvePriorSetPath } from '../io/priors.js';
import { prepareOutputDir, OutputSet } from '../io/atomic.js';
import { fitPosterior, fitDailyColumns, prepareFit, DEFAULT_SAMPLER, type FitResult, type SamplerOptions, type PreparedFit } from '../inference/fit.js';
import { createChainPool } from '../inference/worker-pool.js';
import { availableParallelism } from 'node:os';
import { modelFromInput } from '../inference/chain-job.js';
import type { ChainSnapshot } from '../inference/chain.js';
import { CHECKPOINT_FILE, readCheckpoint, removeCheckpoint, writeCheckpoint, type Checkpoint, type RunFingerprint } from '../io/checkpoint.js';
import { existsSync } from 'node:fs';
import { join } from 'node:path';
import {
  summaryRows,
  summaryCsv,
  diagnosticRows,
  diagnosticsCsv,
  drawsCsv,
  isConverged,
  CONVERGENCE,
  type SummaryRow,
} from '../outputs/summary.js';
import { identification } from '../outputs/identification.js';
import { formatNumber, toCsv } from '../outputs/format.js';
import { VERSION } from '../version.js';
import type { Reporter } from './reporter.js';
import { roundTripDraws } from '../io/run-folder.js';
import { checkForecastOptionsNeedHorizon, computeForecast, planForecast, FORECAST_FILES, type ForecastOptions } from './forecast.js';

export interface FitCliOptions extends ForecastOptions {
  priors: string;
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
  quiet: boolean;
  requireConverged: boolean;
  force: boolean;
  /** write report.html after the outputs (false with --no-report) */
  report: boolean;
  /** continue an interrupted run from DIR/checkpoint.json */
  resume?: boolean;
  /** several regions (cli/fit-regions.ts): the regions to fit, comma-separated */
  regions?: string;
  /** several regions: a CSV file `region,population` */
  populations?: string;
  /** several regions: `K/N`, the K-th of N shares of the regions */
  shard?: string;
}

/** The options a run records in run.json (those that shape its results: not threads, not the folder). */
function runOptionsRecord(o: FitCliOptions): Record<string, unknown> {
  return {
    ...samplingOptionsRecord(o),
    require_converged: o.requireConverged,
    horizon: o.horizon,
    scenarios: o.scenarios === undefined ? null : basename(o.scenarios),
    hold: o.hold,
    scale: o.scale ?? null,
    from: o.from ?? null,
    until: o.until ?? null,
    triangle: o.triangle === undefined ? null : basename(o.triangle),
  };
}

/**
 * The options every fitting command records first in run.json (sampler, seed, quantiles, input
 * columns), under the same names and in the same order.
 */
export function samplingOptionsRecord(
  o: Pick<FitCliOptions, 'chains' | 'warmup' | 'draws' | 'thin' | 'seed' | 'quantiles' | 'dateColumn' | 'countColumn' | 'regionColumn'>,
): Record<string, unknown> {
  return {
    chains: o.chains,
    warmup: o.warmup,
    draws: o.draws,
    thin: o.thin,
    seed: o.seed,
    quantiles: o.quantiles,
    date_column: o.dateColumn,
    count_column: o.countColumn,
    region_column: o.regionColumn,
  };
}

/** Seconds between two checkpoint writes while sampling. */
const CHECKPOINT_SECONDS = 3;

export const CAUTION =
  'These are model-based estimates resting on the assumptions stated in the model description ' +
  '(SEIR dynamics, a smooth random walk in transmission, a fixed reporting delay, constant ascertainment). ' +
  'They inform, and do not replace, the judgement of local public-health authorities and trained epidemiologists.';

/** The one series a single fit uses: the --region named, or the file's only series. */
export function selectSeries(series: CaseSeries[], region: string | undefined, file: string): CaseSeries {
  if (region !== undefined) {
    const s = series.find((x) => x.region === region);
    if (s === undefined) {
      const names = series.map((x) => x.region).filter((x) => x !== null);
      throw new WaxwaneError(
        names.length === 0
          ? `${file}: --region "${region}" was given but the file has no region column; drop --region or name the column with --region-column`
          : `${file}: no region "${region}" in the file (regions: ${names.slice(0, 10).join(', ')}${names.length > 10 ? ', ...' : ''}); choose one of them with --region`,
      );
    }
    return s;
  }
  if (series.length > 1) {
    const names = series.map((x) => x.region);
    throw new WaxwaneError(
      `${file}: the file holds ${series.length} regions (${names.slice(0, 10).join(', ')}${names.length > 10 ? ', ...' : ''}); choose one with --region`,
    );
  }
  return series[0];
}

export async function runFit(casesFile: string, o: FitCliOptions, reporter: Reporter): Promise<number> {
  // a file of several regions, without --region, fits every region (cli/fit-regions.ts)
  if (o.region === undefined) {
    const many = await import('./fit-regions.js');
    if (many.wantsManyRegions(casesFile, o)) return many.runFitRegions(casesFile, o, reporter);
  }
  const started = performance.now();
  // 1. validate every input before anything is written
  const data = readCases(casesFile, { dateColumn: o.dateColumn, countColumn: o.countColumn, regionColumn: o.regionColumn });
  const series = selectSeries(data.series, o.region, casesFile);
  return fitSeries(casesFile, data, series, o, reporter, {}, started);
}

/** What a caller fitting many series learns of each fit beyond its output files. */
export interface SeriesFitHooks {
  /** the effective reproduction number R_t of every kept draw on the last observed day */
  lastDayReproduction?(values: Float64Array): void;
}

/**
 * Fits one series of a case file and writes the run folder `o.out`: the body of `waxwane fit`,
 * which the multi-region path (cli/fit-regions.ts) also runs once per region.
 */
export async function fitSeries(
  casesFile: string,
  data: Pick<CaseData, 'sha256' | 'warnings'>,
  series: CaseSeries,
  o: FitCliOptions,
  reporter: Reporter,
  hooks: SeriesFitHooks = {},
  started = performance.now(),
): Promise<number> {
  const population = o.population ?? series.population;
  if (population === undefined) {
    throw new WaxwaneError(`${casesFile}: no population given; pass --population N or add a "population" column`);
  }
  checkPopulation(series, population, casesFile);
  const priorPath = resolvePriorSetPath(o.priors);
  const priorSet = resolvePriorSet(o.priors);
  checkForecastOptionsNeedHorizon(o);
  const forecastPlan = o.horizon > 0 ? planForecast(o, series.firstDate, series.dates[series.dates.length - 1], priorSet.model) : null;
  for (const w of data.warnings) reporter.warn(w);
  // a resume must match the input and every option that shapes the outputs (as run.json lists them)
  const fingerprint: RunFingerprint = { input_sha256: data.sha256, region: series.region, population, priors: priorSet, ...runOptionsRecord(o) };
  const checkpoint: Checkpoint | null = o.resume === true ? readCheckpoint(o.out, fingerprint) : null;
  if (checkpoint === null && !o.force && existsSync(join(o.out, CHECKPOINT_FILE))) {
    throw new WaxwaneError(
      `${o.out}: holds an interrupted run (${CHECKPOINT_FILE}); pass --resume to continue it, or --force to start afresh`,
    );
  }
  prepareOutputDir(o.out, { force: o.force || checkpoint !== null });

  // 2. fit
  const sampler: SamplerOptions = {
    ...DEFAULT_SAMPLER,
    chains: o.chains,
    warmup: o.warmup,
    draws: o.draws,
    thin: o.thin,
    seed: o.seed,
    threads: o.threads,
    derived: true,
  };
  const counts = Array.from(series.counts, (v) => (Number.isNaN(v) ? null : v)) as number[];
  const input = { counts, population, firstWeekday: dayOfWeek(series.firstDate), priorSet };
  reporter.info(
    `fitting ${series.dates.length} days (${series.firstDate} to ${series.dates[series.dates.length - 1]})` +
      `${series.region !== null ? ` of ${series.region}` : ''}: ${o.chains} chains x (${o.warmup} warm-up + ${o.draws * o.thin}) iterations`,
  );
  const iterationsDone = new Map<number, number>();
  const perChain = o.warmup + o.draws * o.thin;
  const totalIterations = o.chains * perChain;
  const cores = availableParallelism();
  let preloadReport = o.report && o.threads > 0;
  const snapshots = new Map<number, ChainSnapshot>();
  // the chains' workers start loading now, while this thread looks for the mode
  const pool = createChainPool(o.threads, o.chains);
  let fit: FitResult;
  let prepareSeconds = 0;
  try {
    const prepareStarted = performance.now();
    let prepared: PreparedFit;
    if (checkpoint !== null) {
      for (const [chain, snap] of Object.entries(checkpoint.snapshots)) snapshots.set(Number(chain), snap);
      const p = checkpoint.prepared;
      prepared = {
        model: modelFromInput(input),
        mode: Float64Array.from(p.mode),
        modeLogDensity: p.modeLogDensity,
        laplaceAdjusted: p.laplaceAdjusted,
        jobs: p.jobs,
        warnings: p.warnings,
      };
      reporter.info(`resuming from ${join(o.out, CHECKPOINT_FILE)} (${snapshots.size} of ${o.chains} chains under way)`);
    } else {
      prepared = await Promise.resolve()
        .then(() => prepareFit(input, sampler))
        .catch((e: unknown) => {
          if (!(e instanceof WaxwaneError)) throw e;
          throw new WaxwaneError(`${casesFile}, population ${population}: ${e.message}`, e.exitCode);
        });
    }
    const saveCheckpoint = () =>
      writeCheckpoint(o.out, {
        format: 'waxwane-checkpoint',
        version: 1,
        fingerprint,
        prepared: {
          mode: Array.from(prepared.mode),
          modeLogDensity: prepared.modeLogDensity,
          laplaceAdjusted: prepared.laplaceAdjusted,
          jobs: prepared.jobs,
          warnings: prepared.warnings,
        },
        snapshots: Object.fromEntries([...snapshots].map(([c, snap]) => [String(c), snap])),
      });
    prepareSeconds = (performance.now() - prepareStarted) / 1000;
    saveCheckpoint();
    let lastSave = performance.now();
    fit = await fitPosterior(input, sampler, {
      snapshot: (chain, snap) => {
        snapshots.set(chain, snap);
        if (performance.now() - lastSave >= CHECKPOINT_SECONDS * 1000) {
          saveCheckpoint();
          lastSave = performance.now();
        }
      },
      progress: (chain, iteration) => {
        iterationsDone.set(chain, iteration);
        let done = 0;
        let finished = 0;
        for (const v of iterationsDone.values()) {
          done += v;
          if (v >= perChain) finished += 1;
        }
        // once a core is left idle by the chains, load the report's code on it (vega and the
        // chart specifications take most of a second to load), so that the report after the
        // run waits less; a failed load surfaces when the report is made
        if (preloadReport && (o.threads < cores || finished > o.chains - o.threads)) {
          preloadReport = false;
          import('./report.js').catch(() => {});
        }
        const pct = Math.floor((100 * done) / totalIterations);
        const bar = '#'.repeat(Math.floor(pct / 4)).padEnd(25, '.');
        reporter.progress(`sampling [${bar}] ${pct}%`);
      },
    }, { prepared, snapshots }, pool).catch((e: unknown) => {
      reporter.done(); // end an open progress line, so the error gets a line of its own
      // the fit's own refusals (e.g. no start point with a finite density) come from the data
      if (!(e instanceof WaxwaneError)) throw e;
      throw new WaxwaneError(`${casesFile}, population ${population}: ${e.message}`, e.exitCode);
    });
  } finally {
    await pool.close();
  }
  reporter.done();

  // 3. summarise
  const model = fit.model;
  const chains = fit.chains.map((c) => c.draws);
  const diagnostics = diagnosticRows(model.layout, chains);
  const converged = isConverged(diagnostics);
  const allDraws = new Float64Array(chains.reduce((a, c) => a + c.length, 0));
  {
    let off = 0;
    for (const c of chains) {
      allDraws.set(c, off);
      off += c.length;
    }
  }
  const daily = fitDailyColumns(fit);
  {
    const T = series.dates.length;
    const r = daily.effective_reproduction;
    // the last day's column: every draw's R_t on that day (in ascending order)
    hooks.lastDayReproduction?.(r.slice(((T - 1) * r.length) / T));
  }
  const rows = summaryRows(model.layout, chains, daily, series.dates, o.quantiles);
  const ident = identification(model, chains);
  const warnings = [...data.warnings, ...fit.warnings];
  const weak = ident.filter((x) => x.weak);
  if (weak.length > 0) {
    warnings.push(
      `weakly identified by these data (posterior sd above half the prior sd): ${weak
        .map((w) => `${w.parameter} (${formatNumber(w.posteriorSd / w.priorSd, 2)} of prior sd)`)
        .join(', ')}; their intervals mostly restate the prior`,
    );
  }
  const worstRhat = Math.max(...diagnostics.map((d) => d.rhat));
  const minBulk = Math.min(...diagnostics.map((d) => d.ess_bulk));
  const minTail = Math.min(...diagnostics.map((d) => d.ess_tail));
  if (!converged) {
    warnings.push(
      `NOT CONVERGED: max R-hat ${formatNumber(worstRhat, 4)} (needs <= ${CONVERGENCE.maxRhat}), min bulk ESS ${Math.round(minBulk)}, ` +
        `min tail ESS ${Math.round(minTail)} (need >= ${CONVERGENCE.minEss}); run longer (--warmup, --draws, --thin) before using these results`,
    );
  }
  // a diagnostic is NaN where it is undefined for the draws (src/inference/diagnostics: too few
  // draws per chain, or a chain that barely moved); diagnostics.csv writes NaN, JSON can only
  // write null, so the reason is said here rather than left to a blank
  const undefinedDiagnostics = diagnostics.filter((d) => [d.rhat, d.ess_bulk, d.ess_tail, d.mcse_mean].some(Number.isNaN));
  if (undefinedDiagnostics.length > 0) {
    warnings.push(
      `convergence diagnostics undefined (NaN in diagnostics.csv, null in run.json) for ${undefinedDiagnostics.map((d) => d.parameter).join(', ')}: ` +
        'the chains kept too few distinct draws to compute them; run longer (--warmup, --draws)',
    );
  }

  // forecasts from the draws exactly as draws.csv keeps them, so `waxwane forecast` on this
  // folder later gives the same bytes
  const forecast =
    forecastPlan === null
      ? null
      : computeForecast(forecastPlan, {
          model,
          draws: roundTripDraws(model.layout, allDraws),
          dates: series.dates,
          firstWeekday: input.firstWeekday,
          seed: o.seed,
          levels: o.quantiles,
          command: 'fit',
          runFolder: null,
          converged,
        });
  if (forecast !== null) warnings.push(...forecast.warnings);

  // 4. write everything at once
  const out = new OutputSet(o.out);
  for (const [name, text] of forecast?.files ?? []) out.add(name, text);
  out.add('summary.csv', summaryCsv(rows, o.quantiles));
  out.add('diagnostics.csv', diagnosticsCsv(diagnostics));
  out.add('draws.csv', drawsCsv(model.layout, chains, fit.chains.map((c) => c.logDensity)));
  // the series as fitted (after sorting and gap filling), so later commands need only the run folder
  out.add('data.csv', toCsv(['date', 'cases'], series.dates.map((d, t) => [d, Number.isNaN(series.counts[t]) ? '' : String(series.counts[t])])));
  const run = {
    tool: 'waxwane',
    version: VERSION,
    command: 'fit',
    input: { file: basename(casesFile), sha256: data.sha256, region: series.region, first_date: series.firstDate, last_date: series.dates[series.dates.length - 1], days: series.dates.length, population },
    priors: { file: basename(priorPath), set: priorSet },
    options: runOptionsRecord(o),
    threads: o.threads,
    versions: { node: process.versions.node, waxwane: VERSION },
    timings_seconds: {
      prepare: round(prepareSeconds),
      sampling: round(fit.timings.samplingSeconds),
      total: round((performance.now() - started) / 1000),
    },
    mode_log_density: fit.modeLogDensity,
    acceptance: fit.chains.map((c) => ({
      warmup: round(c.acceptRateWarmup),
      sampling: round(c.acceptRateSampling),
      scale: round(c.finalScale),
      // the walk-scale move (inference/walk-scale-move.ts), when the sampler has one: off when
      // warm-up found it moving the walk scale too little to be worth its cost
      ...(c.auxiliaryScale !== undefined
        ? { walk_scale_move: c.auxiliaryOff === true ? 'off' : 'on', walk_scale_move_acceptance: c.auxiliaryOff === true ? null : round(c.auxiliaryAcceptRate ?? NaN) }
        : {}),
    })),
    converged,
    convergence_rule: `every sampled parameter: R-hat <= ${CONVERGENCE.maxRhat}, bulk and tail ESS >= ${CONVERGENCE.minEss}`,
    max_rhat: worstRhat,
    min_ess_bulk: minBulk,
    min_ess_tail: minTail,
    identification: ident,
    warnings,
    caution: CAUTION,
  };
  out.add('run.json', JSON.stringify(run, null, 2) + '\n');
  out.commit();
  removeCheckpoint(o.out);

  // 5. tell the user
  printKeyResults(reporter, rows, series.dates[series.dates.length - 1]);
  if (forecast !== null) reporter.info(forecast.keyLines.join('\n'));
  for (const w of warnings.slice(data.warnings.length)) reporter.warn(w);
  reporter.info(
    converged
      ? `converged: max R-hat ${formatNumber(worstRhat, 4)}, min bulk ESS ${Math.round(minBulk)}, min tail ESS ${Math.round(minTail)}`
      : 'not converged: see the warning above',
  );
  reporter.info(`outputs in ${o.out}/ (summary.csv, diagnostics.csv, draws.csv, data.csv, run.json${forecast === null ? '' : `, ${FORECAST_FILES.join(', ')}`})`);
  if (o.report) await (await import('./report.js')).reportAfterRun(o.out, reporter);
  reporter.info(`caution: ${CAUTION}`);
  return !converged && o.requireConverged ? 3 : 0;
}

function round(x: number): number {
  return Number(x.toPrecision(4));
}

function printKeyResults(reporter: Reporter, rows: SummaryRow[], lastDate: string): void {
  const pick = (q: string, date: string) => rows.find((r) => r.quantity === q && r.date === date);
  const lines: string[] = [`key results (posterior median and 90% interval; last day ${lastDate}):`];
  const fmt = (r: SummaryRow | undefined, digits = 3) =>
    r === undefined ? 'n/a' : `${formatNumber(r.quantiles[Math.floor(r.quantiles.length / 2)], digits)}  [${formatNumber(r.quantiles[0], digits)}, ${formatNumber(r.quantiles[r.quantiles.length - 1], digits)}]`;
  const items: Array<[string, string, string]> = [
    ['effective reproduction R_t', 'effective_reproduction', lastDate],
    ['growth rate per day', 'growth_rate', lastDate],
    ['infections per day', 'infections', lastDate],
    ['transmission rate beta', 'transmission_rate', lastDate],
    ['ascertainment', 'ascertainment', ''],
    ['walk scale', 'walk_scale', ''],
  ];
  for (const [label, q, d] of items) lines.push(`  ${label.padEnd(28)} ${fmt(pick(q, d))}`);
  reporter.info(lines.join('\n'));
}
