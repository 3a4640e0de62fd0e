/**
 * Forecasts, scenarios, nowcast and growth from a fit's draws: `waxwane forecast RUN_DIR
 * --horizon H` (reading the run folder back, no refit), and `waxwane fit ... --horizon H`,
 * which calls the same code right after its fit. Both write forecast.csv, scenarios.csv,
 * nowcast.csv, growth.csv and forecast.json; for the same run, horizon, scenarios and seed the
 * CSV files are the same bytes, whichever command made them.
 */
import { existsSync } from 'node:fs';
import { basename, resolve } from 'node:path';
import { WaxwaneError } from '../errors.js';
import { addDays } from '../io/dates.js';
import { prepareOutputDir, OutputSet } from '../io/atomic.js';
import {
  quickScenarios,
  readScenarioFile,
  resolveScenarios,
  type ResolvedScenario,
  type ScenarioSet,
} from '../io/forecast-scenarios.js';
import { alignTriangle, readReportingTriangle } from '../io/reporting-triangle.js';
import { readRunFolder } from '../io/run-folder.js';
import type { ModelSettings } from '../model/prior-set.js';
import type { EpidemicModel } from '../model/posterior.js';
import { delayEvidence, uninformedDelays, type TriangleCounts } from '../model/observed-delay.js';
import { dailyDraws } from '../model/derived.js';
import { longCsv, type LongRow } from '../outputs/draw-summary.js';
import { forecastRows, forecastScenario, FORECAST_KEYS, type ScenarioForecast } from '../outputs/forecast.js';
import { formatNumber } from '../outputs/format.js';
import { growthRows } from '../outputs/growth-table.js';
import { nowcastDraws, nowcastRows } from '../outputs/nowcast.js';
import { scenarioRows, scenariosCsv, shareAt, type NamedTotals, type ScenarioRow } from '../outputs/scenarios.js';
import { createRng, deriveSeed } from '../util/rng.js';
import { VERSION } from '../version.js';
import { CAUTION } from './fit.js';
import type { Reporter } from './reporter.js';

/** Seed stream of the derived daily quantities behind growth.csv and the nowcast. */
const STREAM_DAILY = 0xf0cd;
import { MAX_HORIZON } from './limits.js';
export { MAX_HORIZON };
export const FORECAST_FILES = ['forecast.csv', 'scenarios.csv', 'nowcast.csv', 'growth.csv', 'forecast.json'] as const;

/** The forecast options shared by `fit` and `forecast`. */
export interface ForecastOptions {
  horizon: number;
  hold: boolean;
  scale?: number;
  from?: string;
  until?: string;
  scenarios?: string;
  triangle?: string;
}

export interface ForecastPlan {
  horizon: number;
  set: ScenarioSet;
  resolved: ResolvedScenario[];
  triangle: { file: string; sha256: string; counts: TriangleCounts } | null;
}

/** Whether any forecast option other than the horizon was given. */
function scenarioOptionGiven(o: ForecastOptions): string | null {
  if (o.scenarios !== undefined) return '--scenarios';
  if (o.hold) return '--hold';
  if (o.scale !== undefined) return '--scale';
  if (o.from !== undefined) return '--from';
  if (o.until !== undefined) return '--until';
  if (o.triangle !== undefined) return '--triangle';
  return null;
}

/**
 * Checks every forecast input against the run (dates, delay length) before any long work, and
 * reads the scenario and triangle files.
 *
 * @throws WaxwaneError for a bad option or file.
 */
export function planForecast(o: ForecastOptions, firstDate: string, lastDate: string, settings: ModelSettings): ForecastPlan {
  if (!Number.isInteger(o.horizon) || o.horizon < 1 || o.horizon > MAX_HORIZON) {
    throw new WaxwaneError(`--horizon must be a whole number of days from 1 to ${MAX_HORIZON}, got ${o.horizon}`);
  }
  if (o.scenarios !== undefined && (o.hold || o.scale !== undefined || o.from !== undefined || o.until !== undefined)) {
    throw new WaxwaneError(
      '--scenarios cannot be combined with --hold, --scale, --from or --until; put those futures in the scenario file, or drop --scenarios',
    );
  }
  const set = o.scenarios !== undefined ? readScenarioFile(o.scenarios) : quickScenarios(o);
  const resolved = resolveScenarios(set, firstDate, lastDate, settings.seed_days, o.horizon);
  let triangle: ForecastPlan['triangle'] = null;
  if (o.triangle !== undefined) {
    const tri = readReportingTriangle(o.triangle);
    const counts = alignTriangle(tri, firstDate, lastDate, settings.delay.max_days);
    const blind = uninformedDelays(delayEvidence(counts));
    if (blind.length > 0) {
      throw new WaxwaneError(
        `${o.triangle}: no report from onset dates early enough to show a delay of ${blind[0]} day${blind[0] === 1 ? '' : 's'}` +
          `${blind.length > 1 ? ` (nor ${blind.length - 1} longer delays)` : ''}, so the observed delays cannot be estimated; ` +
          `include onset dates at least ${settings.delay.max_days} days before ${lastDate}, or leave out --triangle to use the model's delay`,
      );
    }
    triangle = { file: o.triangle, sha256: tri.sha256, counts };
  }
  return { horizon: o.horizon, set, resolved, triangle };
}

/**
 * Refuses forecast options without a horizon (for `fit`, where the horizon defaults to 0).
 */
export function checkForecastOptionsNeedHorizon(o: ForecastOptions): void {
  const given = scenarioOptionGiven(o);
  if (o.horizon === 0 && given !== null) {
    throw new WaxwaneError(`${given} needs a forecast: add --horizon H (days past the last observation, e.g. --horizon 28)`);
  }
}

export interface ForecastContext {
  model: EpidemicModel;
  /** unconstrained draws, row-major, in the order of draws.csv (as read back from it) */
  draws: Float64Array;
  dates: readonly string[];
  firstWeekday: number;
  seed: number;
  levels: readonly number[];
  command: 'fit' | 'forecast';
  /** the run folder the draws were read from (forecast), or null (fit) */
  runFolder: string | null;
  converged: boolean | null;
}

export interface ForecastResult {
  files: Array<[string, string]>;
  record: Record<string, unknown>;
  warnings: string[];
  /** lines for the terminal */
  keyLines: string[];
}

/** Computes every forecast output for a plan. */
export function computeForecast(plan: ForecastPlan, ctx: ForecastContext): ForecastResult {
  const { model, draws, dates, levels, seed } = ctx;
  const H = plan.horizon;
  const lastDate = dates[dates.length - 1]!;
  const forecastDates = Array.from({ length: H }, (_, h) => addDays(lastDate, h + 1));
  const warnings: string[] = [];
  // (a fit says so itself; a later forecast from its folder repeats it)
  if (ctx.converged === false && ctx.command === 'forecast') {
    warnings.push('the fit behind these forecasts did NOT converge (see its run.json); forecasts inherit that, so run the fit longer before using them');
  }

  // the observed days: growth and the nowcast
  const daily = dailyDraws(model, draws, ctx.firstWeekday, createRng(deriveSeed(seed, STREAM_DAILY)));
  const growthCsv = longCsv(['quantity', 'date'], growthRows(daily.growth_rate, dates, levels), levels);
  const nowcast = nowcastDraws(model, draws, daily.onsets, ctx.firstWeekday, seed, plan.triangle?.counts ?? null);
  const nowcastCsv = longCsv(['quantity', 'date'], nowcastRows(nowcast, dates, levels), levels);

  // the scenarios, one at a time (a scenario's draws x days matrices are dropped once summarised)
  const forecastLines: LongRow[] = [];
  const totals: NamedTotals[] = [];
  const scenarioRecords: Array<Record<string, unknown>> = [];
  for (const sc of plan.resolved) {
    const f: ScenarioForecast = forecastScenario(model, draws, ctx.firstWeekday, H, sc.beta, seed);
    forecastLines.push(...forecastRows(sc.name, f, forecastDates, levels));
    totals.push({ name: sc.name, totals: f.totals });
    if (f.failed > 0) {
      warnings.push(
        `scenario ${sc.name}: ${f.failed} of ${f.draws} draws gave an impossible epidemic (a compartment turned negative or non-finite: the walk reached an extreme transmission rate); they are left out of its summaries`,
      );
    }
    const lastDayShare = shareAt(f.totals.peakReportsDay, H);
    const firstDayShare = shareAt(f.totals.peakReportsDay, 1);
    scenarioRecords.push({
      name: sc.name,
      description: sc.description,
      transmission: sc.beta.transmission,
      measures: sc.measures,
      failed_draws: f.failed,
      peak_reports_on_last_day_share: round(lastDayShare),
      peak_reports_on_first_day_share: round(firstDayShare),
    });
  }
  const rows = scenarioRows(totals, lastDate, levels);

  const record = {
    tool: 'waxwane',
    version: VERSION,
    command: ctx.command,
    run_folder: ctx.runFolder,
    horizon: H,
    first_forecast_date: forecastDates[0],
    last_forecast_date: forecastDates[H - 1],
    seed,
    quantiles: levels,
    fit_converged: ctx.converged,
    draws: draws.length / model.layout.dim,
    scenario_file: plan.set.file === null ? null : basename(plan.set.file),
    scenario_description: plan.set.description,
    reference_scenario: plan.resolved[0]!.name,
    scenarios: scenarioRecords,
    nowcast: {
      first_date: dates[nowcast.first],
      last_date: lastDate,
      days: nowcast.days,
      delays: nowcast.observedDelays ? 'observed (reporting triangle)' : 'model (prior set delay distribution)',
      triangle: plan.triangle === null ? null : { file: basename(plan.triangle.file), sha256: plan.triangle.sha256 },
    },
    warnings,
    caution: CAUTION,
  };
  const files: Array<[string, string]> = [
    ['forecast.csv', longCsv(FORECAST_KEYS, forecastLines, levels)],
    ['scenarios.csv', scenariosCsv(rows, levels)],
    ['nowcast.csv', nowcastCsv],
    ['growth.csv', growthCsv],
    ['forecast.json', JSON.stringify(record, null, 2) + '\n'],
  ];
  return { files, record, warnings, keyLines: keyLines(rows, scenarioRecords, nowcastRows(nowcast, dates, levels), forecastDates, levels) };
}

function round(x: number): number {
  return Number.isFinite(x) ? Number(x.toPrecision(4)) : x;
}

/** Median and outer interval of a summary, as text. */
function interval(s: { quantiles: number[] }, digits = 3): string {
  const q = s.quantiles;
  return `${formatNumber(q[Math.floor(q.length / 2)]!, digits)}  [${formatNumber(q[0]!, digits)}, ${formatNumber(q[q.length - 1]!, digits)}]`;
}

function keyLines(
  rows: ScenarioRow[],
  records: Array<Record<string, unknown>>,
  nowcast: LongRow[],
  forecastDates: string[],
  levels: readonly number[],
): string[] {
  const lo = Math.round(levels[0]! * 100);
  const hi = Math.round(levels[levels.length - 1]! * 100);
  const lines = [`forecast ${forecastDates[0]} to ${forecastDates[forecastDates.length - 1]} (median and ${lo}-${hi}% interval):`];
  const pick = (sc: string, q: string) => rows.find((r) => r.scenario === sc && r.quantity === q);
  for (const rec of records) {
    const name = String(rec.name);
    const day = pick(name, 'peak_reports_day');
    const mid = day?.dates?.[Math.floor(levels.length / 2)] ?? '';
    const parts = [
      `infections over the horizon ${interval(pick(name, 'cumulative_infections')!.summary)}`,
      `peak of reports ${interval(pick(name, 'peak_reports')!.summary)} per day, median date ${mid}`,
    ];
    const averted = pick(name, 'averted_infections');
    if (averted !== undefined) parts.push(`infections averted against ${String(records[0]!.name)} ${interval(averted.summary)}`);
    lines.push(`  ${name}: ${parts.join('; ')}`);
    if (Number(rec.peak_reports_on_first_day_share) > 0.5) {
      lines.push(`    (reports fall from the first forecast day in ${Math.round(Number(rec.peak_reports_on_first_day_share) * 100)}% of draws: their peak is behind)`);
    }
    if (Number(rec.peak_reports_on_last_day_share) > 0.5) {
      lines.push(`    (reports still rise on the last forecast day in ${Math.round(Number(rec.peak_reports_on_last_day_share) * 100)}% of draws: their peak lies beyond the horizon)`);
    }
  }
  const toCome = nowcast.find((r) => r.keys[0] === 'reports_to_come' && r.keys[1] === '');
  if (toCome !== undefined) lines.push(`nowcast: reports still to come from onsets of the last ${nowcast.filter((r) => r.keys[0] === 'onsets').length - 1} days ${interval(toCome.summary)}`);
  return lines;
}

export interface ForecastCliOptions extends ForecastOptions {
  out?: string;
  seed?: number;
  quantiles?: number[];
  force: boolean;
  quiet: boolean;
}

/** `waxwane forecast RUN_DIR --horizon H`: forecasts from a fit's saved draws, without refitting. */
export function runForecast(runDir: string, o: ForecastCliOptions, reporter: Reporter): number {
  const folder = readRunFolder(runDir);
  const lastDate = folder.dates[folder.dates.length - 1]!;
  const plan = planForecast(o, folder.dates[0]!, lastDate, folder.priorSet.model);
  const out = o.out ?? runDir;
  if (resolve(out) === resolve(runDir)) {
    const present = FORECAST_FILES.filter((f) => existsSync(resolve(out, f)));
    if (present.length > 0 && !o.force) {
      throw new WaxwaneError(
        `${out}: already holds forecast outputs (${present.join(', ')}); pass --force to replace them, or write elsewhere with --out DIR`,
      );
    }
  } else {
    prepareOutputDir(out, { force: o.force });
  }
  reporter.info(
    `forecasting ${plan.horizon} days past ${lastDate} from ${folder.drawCount} draws in ${runDir}: ${plan.resolved.map((s) => s.name).join(', ')}`,
  );
  const result = computeForecast(plan, {
    model: folder.model,
    draws: folder.draws,
    dates: folder.dates,
    firstWeekday: folder.firstWeekday,
    seed: o.seed ?? folder.seed,
    levels: o.quantiles ?? folder.quantiles,
    command: 'forecast',
    runFolder: basename(resolve(runDir)),
    converged: folder.converged,
  });
  const set = new OutputSet(out);
  for (const [name, text] of result.files) set.add(name, text);
  set.commit();
  reporter.info(result.keyLines.join('\n'));
  for (const w of result.warnings) reporter.warn(w);
  reporter.info(`outputs in ${out}/ (${FORECAST_FILES.join(', ')})`);
  reporter.info(`caution: ${CAUTION}`);
  return 0;
}
