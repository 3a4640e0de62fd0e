/**
 * One region's fit, as a worker thread (or this thread) runs it: the single-region fit of
 * `waxwane fit` (cli/fit.ts, fitSeries) into the region's own folder, then what the combined
 * outputs need from it: its summary, diagnostics and forecast tables as written, a few
 * figures of its run.json, and the probability that R_t > 1 on its last day. Every failure is
 * caught and becomes the region's status, so that one region never takes the others down.
 */
import { existsSync, readFileSync, readdirSync, rmdirSync } from 'node:fs';
import { join } from 'node:path';
import { performance } from 'node:perf_hooks';
import { WaxwaneError, oneLineMessage } from '../errors.js';
import type { CaseSeries } from '../io/cases.js';
import type { FitCliOptions } from '../cli/fit.js';
import type { Reporter } from '../cli/reporter.js';

export interface RegionTask {
  name: string;
  /** the region's output folder */
  folder: string;
  casesFile: string;
  /** SHA-256 of the case file */
  sha256: string;
  /** the region's own data warnings */
  warnings: string[];
  series: CaseSeries;
  population: number;
  seed: number;
  /** worker threads for the chains (0: the region's own thread) */
  threads: number;
  /** the run's options; out, seed, population and threads are the region's */
  options: FitCliOptions;
  /** the command line, for the log of an internal error */
  argv: string[];
}

export type RegionStatus = 'ok' | 'not_converged' | 'failed';

/** What a region's run.json says, as far as the combined outputs need it. */
export interface RegionRunFigures {
  converged: boolean;
  maxRhat: number;
  minEssBulk: number;
  minEssTail: number;
  firstDate: string;
  lastDate: string;
  days: number;
  warnings: number;
}

export interface RegionOutcome {
  name: string;
  status: RegionStatus;
  /** why the region failed; null otherwise */
  message: string | null;
  /** the region's tables exactly as written in its folder */
  files: { summary: string; diagnostics: string; forecast: string | null } | null;
  run: RegionRunFigures | null;
  /** share of the kept draws with R_t > 1 on the last observed day */
  probAbove1: number | null;
  /** messages for the terminal beyond run.json (a report that could not be written) */
  notes: string[];
  seconds: number;
}

/**
 * The share of `values` above 1: the posterior probability that R_t > 1, estimated by the
 * fraction of draws above it (a Monte Carlo estimate of P(R_t > 1 | data)); NaN for no draws.
 *
 * @example shareAbove(Float64Array.of(0.9, 1.2, 1.5, 0.7)) // 0.5
 */
export function shareAbove(values: ArrayLike<number>, threshold = 1): number {
  if (values.length === 0) return NaN;
  let above = 0;
  for (let i = 0; i < values.length; i++) if (values[i]! > threshold) above += 1;
  return above / values.length;
}

function numberOrNaN(v: unknown): number {
  return typeof v === 'number' ? v : NaN;
}

function removeIfEmpty(dir: string): void {
  try {
    if (readdirSync(dir).length === 0) rmdirSync(dir);
  } catch {
    // never created, or not empty: leave it
  }
}

export function failedOutcome(name: string, message: string, seconds = 0): RegionOutcome {
  return { name, status: 'failed', message: oneLineMessage(message), files: null, run: null, probAbove1: null, notes: [], seconds };
}

/** Runs one region's fit; never rejects. `onProgress` gets the fit's progress lines. */
export async function runRegionTask(task: RegionTask, onProgress: (message: string) => void): Promise<RegionOutcome> {
  const t0 = performance.now();
  const seconds = () => Number(((performance.now() - t0) / 1000).toPrecision(4));
  const notes: string[] = [];
  const lastDay: { values: Float64Array | null } = { values: null };
  const reporter: Reporter = {
    info() {},
    warn: (m) => notes.push(m),
    progress: (m) => onProgress(m),
    done() {},
  };
  const o: FitCliOptions = {
    ...task.options,
    out: task.folder,
    seed: task.seed,
    population: task.population,
    threads: task.threads,
    quiet: true,
  };
  try {
    const { fitSeries } = await import('../cli/fit.js');
    await fitSeries(task.casesFile, { sha256: task.sha256, warnings: task.warnings }, task.series, o, reporter, {
      lastDayReproduction: (v) => {
        lastDay.values = v;
      },
    });
  } catch (e) {
    if (e instanceof WaxwaneError) {
      removeIfEmpty(task.folder);
      return failedOutcome(task.name, e.message, seconds());
    }
    const { writeInternalErrorLog } = await import('../cli/internal-error.js');
    const log = writeInternalErrorLog(e, { outDir: task.folder, argv: task.argv });
    const what = e instanceof Error ? e.message : String(e);
    return failedOutcome(task.name, `internal error: ${what}${log === null ? '' : ` (trace in ${log})`}`, seconds());
  }
  const read = (file: string) => readFileSync(join(task.folder, file), 'utf8');
  const run = JSON.parse(read('run.json')) as Record<string, unknown>;
  const input = run.input as Record<string, unknown>;
  const converged = run.converged === true;
  const runWarnings = Array.isArray(run.warnings) ? run.warnings.length : 0;
  // the data warnings and the fit's own are in run.json; anything else the fit said is a note
  const inRun = new Set(Array.isArray(run.warnings) ? (run.warnings as unknown[]).map(String) : []);
  return {
    name: task.name,
    status: converged ? 'ok' : 'not_converged',
    message: null,
    files: {
      summary: read('summary.csv'),
      diagnostics: read('diagnostics.csv'),
      forecast: existsSync(join(task.folder, 'forecast.csv')) && task.options.horizon > 0 ? read('forecast.csv') : null,
    },
    run: {
      converged,
      maxRhat: numberOrNaN(run.max_rhat),
      minEssBulk: numberOrNaN(run.min_ess_bulk),
      minEssTail: numberOrNaN(run.min_ess_tail),
      firstDate: String(input.first_date),
      lastDate: String(input.last_date),
      days: Number(input.days),
      warnings: runWarnings,
    },
    probAbove1: lastDay.values === null ? null : shareAbove(lastDay.values),
    notes: notes.filter((n) => !inRun.has(n)),
    seconds: seconds(),
  };
}
