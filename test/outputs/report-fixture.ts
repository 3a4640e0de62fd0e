/**
 * A run folder for the report tests, made in milliseconds without a fit: parameter vectors
 * drawn around a generic illness go through the real model (createModel, dailyDraws) and the
 * real output writers (summaryRows/summaryCsv, diagnosticRows/diagnosticsCsv, drawsCsv,
 * identification), so the folder has exactly the layout `waxwane fit` writes. run.json holds
 * the fields fit writes; forecast.csv and scenarios.csv, when asked for, follow the layout of
 * the forecast command (scenario, quantity, date, mean, sd, quantiles; scenario, quantity, mean,
 * sd, quantiles, date_ quantiles).
 */
import { mkdirSync, writeFileSync } from 'node:fs';
import { join } from 'node:path';
import { resolvePriorSet } from '../../src/io/priors.js';
import { addDays } from '../../src/io/dates.js';
import { createModel } from '../../src/model/posterior.js';
import { toUnconstrained } from '../../src/model/layout.js';
import { dailyDraws, sortedColumns } from '../../src/model/derived.js';
import { summaryRows, summaryCsv, diagnosticRows, diagnosticsCsv, drawsCsv, isConverged, DEFAULT_LEVELS } from '../../src/outputs/summary.js';
import { identification } from '../../src/outputs/identification.js';
import { formatNumber, toCsv } from '../../src/outputs/format.js';
import { quantileColumn, summarizeSample } from '../../src/outputs/stats.js';
import { createRng } from '../../src/util/rng.js';

export interface FixtureOptions {
  days?: number;
  region?: string | null;
  file?: string;
  chains?: number;
  drawsPerChain?: number;
  /** chains that disagree (shifted), so the run is not converged */
  shifted?: boolean;
  /** write forecast.csv and scenarios.csv with these scenario names */
  scenarios?: string[];
  /** write data.csv (default true) */
  data?: boolean;
  /** override the prior set's description */
  priorDescription?: string;
  warnings?: string[];
  levels?: readonly number[];
}

export const FIRST_DATE = '2031-03-01';

/** Writes a run folder into `dir` (created) and returns `dir`. */
export function writeFixtureRun(dir: string, o: FixtureOptions = {}): string {
  mkdirSync(dir, { recursive: true });
  const days = o.days ?? 56;
  const chainsN = o.chains ?? 2;
  const perChain = o.drawsPerChain ?? 60;
  const levels = o.levels ?? DEFAULT_LEVELS;
  const base = resolvePriorSet('default');
  const priorSet = o.priorDescription === undefined ? base : { ...base, description: o.priorDescription };
  const population = 250_000;
  const model = createModel({ counts: new Float64Array(days).fill(NaN), population, firstWeekday: 0 }, priorSet);
  const L = model.layout;
  const rng = createRng(20310301);
  const chains: Float64Array[] = [];
  const logDensity: Float64Array[] = [];
  for (let c = 0; c < chainsN; c++) {
    const draws = new Float64Array(perChain * L.dim);
    const shift = o.shifted === true ? 0.4 * c : 0;
    for (let k = 0; k < perChain; k++) {
      const steps: number[] = [];
      for (let j = 1; j < L.knots; j++) steps.push(-0.6 + 0.3 * rng.normal() + shift);
      const theta = toUnconstrained(L, {
        start_reproduction: 1.8 + 0.1 * rng.normal(),
        walk_steps: steps,
        walk_scale: 0.12 * Math.exp(0.1 * rng.normal()),
        ascertainment: 0.3 + 0.03 * rng.normal(),
        dispersion: 25 * Math.exp(0.1 * rng.normal()),
        seed_infected: 20 * Math.exp(0.2 * rng.normal()),
        latent_days: 3 * Math.exp(0.05 * rng.normal()),
        infectious_days: 5 * Math.exp(0.05 * rng.normal()),
        weekday: [],
      });
      draws.set(theta, k * L.dim);
    }
    chains.push(draws);
    logDensity.push(Float64Array.from({ length: perChain }, () => -500 + rng.normal()));
  }
  const all = new Float64Array(chainsN * perChain * L.dim);
  chains.forEach((c, i) => all.set(c, i * c.length));
  const dates = Array.from({ length: days }, (_, t) => addDays(FIRST_DATE, t));
  const daily = sortedColumns(dailyDraws(model, all, 0, createRng(7)), days);
  const rows = summaryRows(L, chains, daily, dates, levels);
  const diagnostics = diagnosticRows(L, chains);
  writeFileSync(join(dir, 'summary.csv'), summaryCsv(rows, levels));
  writeFileSync(join(dir, 'diagnostics.csv'), diagnosticsCsv(diagnostics));
  writeFileSync(join(dir, 'draws.csv'), drawsCsv(L, chains, logDensity));
  if (o.data !== false) {
    // counts: one predicted report per day from the first draw, a blank (missing) day at t = 9
    writeFileSync(join(dir, 'data.csv'), toCsv(['date', 'cases'], dates.map((d, t) => [d, t === 9 ? '' : String(daily.predicted_reports[t])])));
  }
  const converged = isConverged(diagnostics);
  const run = {
    tool: 'waxwane',
    version: '0.0.0-test',
    command: 'fit',
    input: { file: o.file ?? 'cases.csv', sha256: 'ab'.repeat(32), region: o.region ?? null, first_date: dates[0], last_date: dates[days - 1], days, population },
    priors: { file: 'default.json', set: priorSet },
    options: { chains: chainsN, warmup: 100, draws: perChain, thin: 1, seed: 11, quantiles: [...levels], date_column: 'date', count_column: 'cases', region_column: 'region', require_converged: false },
    threads: 1,
    versions: { node: process.versions.node, waxwane: '0.0.0-test' },
    timings_seconds: { prepare: 0.1, sampling: 0.2, total: 0.3 },
    acceptance: chains.map(() => ({ warmup: 0.23, sampling: 0.24, scale: 0.8 })),
    converged,
    convergence_rule: 'every sampled parameter: R-hat <= 1.01, bulk and tail ESS >= 400',
    max_rhat: Math.max(...diagnostics.map((d) => d.rhat)),
    identification: identification(model, chains),
    warnings: o.warnings ?? [],
    caution: 'These are model-based estimates (test fixture).',
  };
  writeFileSync(join(dir, 'run.json'), JSON.stringify(run, null, 2) + '\n');
  if (o.scenarios !== undefined) writeForecast(dir, o.scenarios, dates[days - 1], levels);
  return dir;
}

function writeForecast(dir: string, scenarios: readonly string[], last: string, levels: readonly number[]): void {
  const rng = createRng(99);
  const q = levels.map(quantileColumn);
  const rows: string[][] = [];
  const horizon = 14;
  scenarios.forEach((s, i) => {
    for (const [quantity, level] of [['predicted_reports', 40], ['infections', 300], ['effective_reproduction', 0.9], ['onsets', 250]] as const) {
      for (let h = 1; h <= horizon; h++) {
        const values = Float64Array.from({ length: 200 }, () => level * (1 - 0.02 * h * (i + 1)) * Math.exp(0.1 * Math.sqrt(h) * rng.normal()));
        const sm = summarizeSample(values, levels);
        rows.push([s, quantity, addDays(last, h), formatNumber(sm.mean), formatNumber(sm.sd), ...sm.quantiles.map((v) => formatNumber(v))]);
      }
    }
  });
  writeFileSync(join(dir, 'forecast.csv'), toCsv(['scenario', 'quantity', 'date', 'mean', 'sd', ...q], rows));
  const out: string[][] = [];
  for (const s of scenarios) {
    out.push([s, 'peak_reports_day', '1', '0', ...levels.map(() => '1'), ...levels.map(() => addDays(last, 1))]);
    out.push([s, 'cumulative_infections', '4000', '300', ...levels.map((p) => String(3500 + 1000 * p)), ...levels.map(() => '')]);
  }
  writeFileSync(join(dir, 'scenarios.csv'), toCsv(['scenario', 'quantity', 'mean', 'sd', ...q, ...q.map((c) => `date_${c}`)], out));
}
