/**
 * The command-line program. Each command lives in its own module; this file wires options,
 * turns the tool's own errors into one line and exit code 2, and any other failure into one
 * line, a trace in a log file, and exit code 1.
 */
import { Command, CommanderError, InvalidArgumentError, Option } from 'commander';
import { existsSync, rmdirSync } from 'node:fs';
import { dirname, join, resolve } from 'node:path';
import { WaxwaneError, oneLineMessage } from '../errors.js';
import { reportInternalError } from './internal-error.js';
import { createReporter } from './reporter.js';
// Each command's module is loaded when that command runs: the report's charting library alone
// takes a noticeable part of a second to load, which every other command would otherwise pay.
import type { ReportCliOptions } from './report.js';
import type { ForecastCliOptions } from './forecast.js';
import { MAX_HORIZON } from './limits.js';
import { availableParallelism } from 'node:os';
import { DEFAULT_SAMPLER } from '../inference/fit.js';
import { VERSION } from '../version.js';
import type { FitCliOptions } from './fit.js';
import type { CompareCliOptions } from './compare.js';
import type { PriorCheckCliOptions } from './prior-check.js';
import type { CalibrateCliOptions } from './calibrate.js';
import type { MergeCliOptions } from './merge.js';
import { DEFAULT_LEVELS } from '../outputs/summary.js';

/** Parses a whole number within bounds, for commander. */
export function intOption(name: string, min: number, max = Number.MAX_SAFE_INTEGER) {
  return (value: string): number => {
    const v = Number(value);
    if (!/^[+-]?\d+$/.test(value.trim()) || !Number.isSafeInteger(v) || v < min || v > max) {
      throw new InvalidArgumentError(`${name} must be a whole number from ${min} to ${max}, got "${value}".`);
    }
    return v;
  };
}

/** Parses a positive finite number, for commander. */
export function positiveOption(name: string) {
  return (value: string): number => {
    const v = Number(value);
    if (value.trim() === '' || !Number.isFinite(v) || !(v > 0)) {
      throw new InvalidArgumentError(`${name} must be a positive number, got "${value}".`);
    }
    return v;
  };
}

export function buildProgram(): Command {
  const program = new Command();
  program
    .name('waxwane')
    .description(
      'Bayesian inference of the time-varying transmission rate of an epidemic from daily reported cases:\n' +
        'SEIR dynamics, a random walk on log beta, reporting delay, under-ascertainment and\n' +
        'negative-binomial noise, sampled by adaptive Metropolis with convergence diagnostics.\n' +
        'Estimates are model-based; they do not replace local public-health authority and judgement.',
    )
    .version(VERSION)
    .showHelpAfterError('(run with --help for usage)');

  program
    .command('simulate')
    .description('simulate reported cases with known truth from a simulation scenario file')
    .argument('<scenario>', 'simulation scenario (JSON; format in the README)')
    .requiredOption('--out <dir>', 'output folder for cases.csv and truth.csv')
    .addOption(new Option('--seed <n>', 'random seed').default(1).argParser(intOption('--seed', 0, 2 ** 32 - 1)))
    .option('--force', 'write into a non-empty output folder', false)
    .option('--quiet', 'print nothing but warnings and errors', false)
    .action(async (scenario: string, opts: { out: string; seed: number; force: boolean; quiet: boolean }) => {
      await leavingNoFolderOnFailure(opts.out, async () => (await import('./simulate.js')).runSimulate(scenario, opts, createReporter({ quiet: opts.quiet })));
    });

  program
    .command('fit')
    .description('fit the model to daily reported cases and write posterior summaries, diagnostics and draws')
    .argument('<cases>', 'CSV of daily reported cases (ISO date column and count column; optional region column)')
    .requiredOption('--out <dir>', 'output folder')
    .option('--priors <set>', 'prior set: a shipped name (default, smooth, flexible, long-latent) or a JSON file', 'default')
    .addOption(new Option('--population <n>', 'population N (or a "population" column in the data)').argParser(positiveOption('--population')))
    .addOption(new Option('--chains <n>', 'number of chains').default(DEFAULT_SAMPLER.chains).argParser(intOption('--chains', 2, 64)))
    .addOption(new Option('--warmup <n>', 'adaptive warm-up iterations per chain').default(DEFAULT_SAMPLER.warmup).argParser(intOption('--warmup', 100, 10_000_000)))
    .addOption(new Option('--draws <n>', 'kept draws per chain').default(DEFAULT_SAMPLER.draws).argParser(intOption('--draws', 10, 1_000_000)))
    .addOption(new Option('--thin <n>', 'keep every n-th sampling iteration').default(DEFAULT_SAMPLER.thin).argParser(intOption('--thin', 1, 10_000)))
    .addOption(new Option('--seed <n>', 'random seed').default(1).argParser(intOption('--seed', 0, 2 ** 32 - 1)))
    .addOption(new Option('--threads <n>', 'worker threads').default(availableParallelism(), 'number of cores').argParser(intOption('--threads', 1, 256)))
    .addOption(new Option('--quantiles <list>', 'comma-separated quantile levels').default([...DEFAULT_LEVELS], DEFAULT_LEVELS.join(',')).argParser(levelsOption))
    .option('--region <name>', 'region to fit when the file has a region column')
    .addOption(new Option('--regions <list>', 'with several regions: fit only these (comma-separated names)').conflicts('region'))
    .addOption(new Option('--populations <file>', 'with several regions: CSV "region,population" giving each its population').conflicts(['region', 'population']))
    .addOption(new Option('--shard <K/N>', 'with several regions: fit the K-th of N shares of them (one job of a job array)').conflicts('region'))
    .option('--date-column <name>', 'name of the date column', 'date')
    .option('--count-column <name>', 'name of the count column', 'cases')
    .option('--region-column <name>', 'name of the region column', 'region')
    .option('--require-converged', 'exit with code 3 when the chains have not converged', false)
    .option('--resume', 'continue an interrupted run from the checkpoint in the output folder', false)
    .addOption(new Option('--horizon <days>', 'also forecast this many days past the last observation (0: no forecast)').default(0).argParser(intOption('--horizon', 0, MAX_HORIZON)))
    .option('--scenarios <file>', 'forecast scenario file (JSON; format in the README)')
    .option('--hold', 'add a forecast scenario "hold": beta held at its last value', false)
    .addOption(new Option('--scale <factor>', 'add a forecast scenario "scaled": beta held and multiplied by this factor').argParser(positiveOption('--scale')))
    .option('--from <date>', 'first day of --scale (default: the first forecast day)')
    .option('--until <date>', 'last day of --scale (default: the last forecast day)')
    .option('--triangle <file>', 'reporting triangle (CSV onset_date,delay,count) for the nowcast')
    .option('--force', 'write into a non-empty output folder', false)
    .option('--quiet', 'print nothing but warnings and errors', false)
    .option('--no-report', 'do not write report.html')
    .action(async (cases: string, opts: FitCliOptions) => {
      process.exitCode = await leavingNoFolderOnFailure(opts.out, async () => (await import('./fit.js')).runFit(cases, opts, createReporter({ quiet: opts.quiet })));
    });

  program
    .command('forecast')
    .description('forecast, compare scenarios and nowcast from the saved draws of a fit (no refit)')
    .argument('<run>', 'run folder written by "waxwane fit --out"')
    .addOption(new Option('--horizon <days>', 'days to forecast past the last observation').default(28).argParser(intOption('--horizon', 1, MAX_HORIZON)))
    .option('--scenarios <file>', 'forecast scenario file (JSON; format in the README)')
    .option('--hold', 'add a scenario "hold": beta held at its last value', false)
    .addOption(new Option('--scale <factor>', 'add a scenario "scaled": beta held and multiplied by this factor').argParser(positiveOption('--scale')))
    .option('--from <date>', 'first day of --scale (default: the first forecast day)')
    .option('--until <date>', 'last day of --scale (default: the last forecast day)')
    .option('--triangle <file>', 'reporting triangle (CSV onset_date,delay,count) for the nowcast')
    .option('--out <dir>', 'output folder (default: the run folder)')
    .addOption(new Option('--seed <n>', "random seed (default: the fit's seed)").argParser(intOption('--seed', 0, 2 ** 32 - 1)))
    .addOption(new Option('--quantiles <list>', "comma-separated quantile levels (default: the fit's)").argParser(levelsOption))
    .option('--force', 'replace earlier forecast outputs', false)
    .option('--quiet', 'print nothing but warnings and errors', false)
    .option('--no-report', 'do not write report.html again')
    .action(async (run: string, opts: ForecastCliOptions & { report: boolean }) => {
      const reporter = createReporter({ quiet: opts.quiet });
      process.exitCode = await leavingNoFolderOnFailure(opts.out ?? run, async () => {
        if ((await import('../regions/run-record.js')).isRegionsRunFolder(run)) {
          throw new WaxwaneError(`${run}: the folder of a fit over several regions; forecast one region's folder (${run}/regions/NAME), or fit again with --horizon`);
        }
        const code = await (await import('./forecast.js')).runForecast(run, opts, reporter);
        // the report shows a run folder: it is written again when the forecast went into it
        if (opts.report && (opts.out === undefined || resolve(opts.out) === resolve(run))) await (await import('./report.js')).reportAfterRun(run, reporter);
        return code;
      });
    });

  program
    .command('merge')
    .description('join the output folders of the shards of a multi-region fit (waxwane fit --shard K/N) into one run folder')
    .argument('<dirs...>', 'the --out folders of the shards')
    .requiredOption('--out <dir>', 'output folder')
    .option('--force', 'write into a non-empty output folder', false)
    .option('--quiet', 'print nothing but warnings and errors', false)
    .option('--no-report', 'do not write report.html')
    .action(async (dirs: string[], opts: MergeCliOptions) => {
      process.exitCode = await leavingNoFolderOnFailure(opts.out, async () => (await import('./merge.js')).runMerge(dirs, opts, createReporter({ quiet: opts.quiet })));
    });

  program
    .command('compare')
    .description('fit the data under several prior sets, backtest each from rolling origins and rank them by proper forecast scores')
    .argument('<cases>', 'CSV of daily reported cases (as for fit)')
    .requiredOption('--priors <sets...>', 'the prior sets to compare: shipped names (default, smooth, flexible, long-latent) or JSON files')
    .requiredOption('--out <dir>', 'output folder')
    .addOption(new Option('--population <n>', 'population N (or a "population" column in the data)').argParser(positiveOption('--population')))
    .addOption(new Option('--window <days>', 'the last days of the data whose counts the backtest forecasts and scores').default(56).argParser(intOption('--window', 1, 100_000)))
    .addOption(new Option('--every <days>', 'days between backtest origins').default(7).argParser(intOption('--every', 1, 100_000)))
    .addOption(new Option('--horizon <days>', 'days forecast from each origin').default(14).argParser(intOption('--horizon', 1, 60)))
    .addOption(new Option('--chains <n>', 'chains of every fit').default(DEFAULT_SAMPLER.chains).argParser(intOption('--chains', 2, 64)))
    .addOption(new Option('--warmup <n>', 'warm-up iterations per chain of the fits on every day').default(DEFAULT_SAMPLER.warmup).argParser(intOption('--warmup', 100, 10_000_000)))
    .addOption(new Option('--draws <n>', 'kept draws per chain of the fits on every day').default(DEFAULT_SAMPLER.draws).argParser(intOption('--draws', 10, 1_000_000)))
    .addOption(new Option('--thin <n>', 'thinning of the fits on every day').default(DEFAULT_SAMPLER.thin).argParser(intOption('--thin', 1, 10_000)))
    // backtest fits are short: on the demo data (168 days, 4 chains) about 2.5 s each, lowest bulk
    // ESS about 90, R-hat about 1.04: plenty for forecast scores, too few for every tail quantile
    .addOption(new Option('--backtest-warmup <n>', 'warm-up iterations per chain of the backtest fits').default(5000).argParser(intOption('--backtest-warmup', 100, 10_000_000)))
    .addOption(new Option('--backtest-draws <n>', 'kept draws per chain of the backtest fits').default(250).argParser(intOption('--backtest-draws', 10, 1_000_000)))
    .addOption(new Option('--backtest-thin <n>', 'thinning of the backtest fits').default(20).argParser(intOption('--backtest-thin', 1, 10_000)))
    .addOption(new Option('--seed <n>', 'random seed').default(1).argParser(intOption('--seed', 0, 2 ** 32 - 1)))
    .addOption(new Option('--threads <n>', 'worker threads for the chains of each fit').default(availableParallelism(), 'number of cores').argParser(intOption('--threads', 1, 256)))
    .addOption(new Option('--quantiles <list>', 'comma-separated quantile levels of estimates.csv').default([...DEFAULT_LEVELS], DEFAULT_LEVELS.join(',')).argParser(levelsOption))
    .option('--region <name>', 'region to compare on when the file has a region column')
    .option('--date-column <name>', 'name of the date column', 'date')
    .option('--count-column <name>', 'name of the count column', 'cases')
    .option('--region-column <name>', 'name of the region column', 'region')
    .option('--force', 'write into a non-empty output folder', false)
    .option('--quiet', 'print nothing but warnings and errors', false)
    .option('--no-report', 'do not write report.html')
    .action(async (cases: string, opts: CompareCliOptions) => {
      process.exitCode = await leavingNoFolderOnFailure(opts.out, async () => (await import('./compare.js')).runCompare(cases, opts, createReporter({ quiet: opts.quiet })));
    });

  program
    .command('prior-check')
    .description('simulate epidemics from a prior set alone and say what it implies, flagging implausible mass')
    .argument('<priors>', 'prior set: a shipped name or a JSON file')
    .addOption(new Option('--population <n>', 'population N').makeOptionMandatory().argParser(positiveOption('--population')))
    .addOption(new Option('--days <n>', 'days of each simulated epidemic').makeOptionMandatory().argParser(intOption('--days', 1, 3650)))
    .addOption(new Option('--draws <n>', 'epidemics to simulate').default(1000).argParser(intOption('--draws', 10, 1_000_000)))
    .addOption(new Option('--max-reproduction <r>', 'R_t above this on any day counts as implausible').default(10).argParser(positiveOption('--max-reproduction')))
    .addOption(new Option('--seed <n>', 'random seed').default(1).argParser(intOption('--seed', 0, 2 ** 32 - 1)))
    .addOption(new Option('--quantiles <list>', 'comma-separated quantile levels of the summaries').default([...DEFAULT_LEVELS], DEFAULT_LEVELS.join(',')).argParser(levelsOption))
    .option('--out <dir>', 'also write the tables to this folder')
    .option('--force', 'write into a non-empty output folder', false)
    .option('--quiet', 'print nothing but warnings and errors', false)
    .action(async (priors: string, opts: PriorCheckCliOptions) => {
      const run = async () => (await import('./prior-check.js')).runPriorCheck(priors, opts, createReporter({ quiet: opts.quiet }));
      process.exitCode = opts.out === undefined ? await run() : await leavingNoFolderOnFailure(opts.out, run);
    });

  program
    .command('calibrate')
    .description('simulation-based calibration: fit epidemics drawn from the prior and test the ranks of the truth for uniformity')
    .argument('<priors>', 'prior set: a shipped name or a JSON file')
    .addOption(new Option('--population <n>', 'population N').makeOptionMandatory().argParser(positiveOption('--population')))
    .addOption(new Option('--days <n>', 'days of each simulated series').makeOptionMandatory().argParser(intOption('--days', 7, 3650)))
    .addOption(new Option('--reps <n>', 'replicates (simulate, fit, rank)').default(100).argParser(intOption('--reps', 2, 1_000_000)))
    .addOption(new Option('--thin-to <n>', 'posterior draws each rank is taken among (L); L + 1 must be a multiple of --bins').default(39).argParser(intOption('--thin-to', 1, 100_000)))
    .addOption(new Option('--bins <n>', 'bins of the rank histograms').default(10).argParser(intOption('--bins', 2, 1000)))
    .addOption(new Option('--alpha <p>', 'family-wise level of the uniformity tests').default(0.05).argParser(positiveOption('--alpha')))
    // on 35-day series: about 1.2 s a replicate in one thread, the fits' lowest bulk ESS median about 100
    .addOption(new Option('--chains <n>', 'chains of each fit').default(4).argParser(intOption('--chains', 2, 64)))
    .addOption(new Option('--warmup <n>', 'warm-up iterations per chain').default(10000).argParser(intOption('--warmup', 100, 10_000_000)))
    .addOption(new Option('--draws <n>', 'kept draws per chain').default(100).argParser(intOption('--draws', 10, 1_000_000)))
    .addOption(new Option('--thin <n>', 'keep every n-th sampling iteration').default(100).argParser(intOption('--thin', 1, 10_000)))
    .addOption(new Option('--seed <n>', 'random seed').default(1).argParser(intOption('--seed', 0, 2 ** 32 - 1)))
    .addOption(new Option('--threads <n>', 'worker threads for the chains of each fit (0: in the main thread, fastest for short series)').default(0).argParser(intOption('--threads', 0, 256)))
    .option('--out <dir>', 'also write the tables to this folder')
    .option('--force', 'write into a non-empty output folder', false)
    .option('--quiet', 'print nothing but warnings and errors', false)
    .action(async (priors: string, opts: CalibrateCliOptions) => {
      const run = async () => (await import('./calibrate.js')).runCalibrate(priors, opts, createReporter({ quiet: opts.quiet }));
      process.exitCode = opts.out === undefined ? await run() : await leavingNoFolderOnFailure(opts.out, run);
    });

  program
    .command('report')
    .description('write the self-contained HTML report of a run folder (report.html; needs no network to view)')
    .argument('<run>', 'run folder written by "waxwane fit --out"')
    .option('--out <file>', 'where to write the report (default: RUN/report.html)')
    .option('--quiet', 'print nothing but warnings and errors', false)
    .action(async (run: string, opts: ReportCliOptions) => {
      const reporter = createReporter({ quiet: opts.quiet });
      // a comparison of prior sets (waxwane compare) has its own page (outputs/report/compare-page.ts)
      if (existsSync(join(run, 'compare.json'))) {
        process.exitCode = await (await import('./compare.js')).runCompareReport(run, opts, reporter);
        return;
      }
      // the folder of a run over several regions gets its own page (outputs/report/regions-page.ts)
      const { isRegionsRunFolder } = await import('../regions/run-record.js');
      process.exitCode = isRegionsRunFolder(run)
        ? await (await import('./fit-regions.js')).runRegionsReport(run, opts, reporter)
        : await (await import('./report.js')).runReport(run, opts, reporter);
    });

  return program;
}

function levelsOption(value: string): number[] {
  const parts = value.split(',').map((s) => s.trim());
  const levels = parts.map(Number);
  if (parts.some((s) => s === '') || levels.some((v) => !(v > 0 && v < 1))) {
    throw new InvalidArgumentError(`--quantiles must be comma-separated levels between 0 and 1, e.g. 0.05,0.5,0.95; got "${value}".`);
  }
  const sorted = [...new Set(levels)].sort((a, b) => a - b);
  if (sorted.length !== levels.length) throw new InvalidArgumentError(`--quantiles lists a level twice: "${value}".`);
  return sorted;
}

/** The output folder of the command running now: an internal error is logged there. */
let runningOutDir: string | undefined;

/**
 * Runs a command that writes into the folder `out`. The commands create `out` (and missing
 * parents) before their long work, to fail early on a folder that cannot be made; if the
 * command then fails, the folders this run created are removed again, deepest first and only
 * while empty (rmdir refuses a non-empty folder), so a failed run leaves nothing behind, but
 * for the log of an internal error, written into `out` (cli/internal-error.ts).
 */
async function leavingNoFolderOnFailure<T>(out: string, run: () => T | Promise<T>): Promise<T> {
  runningOutDir = out;
  const missing: string[] = [];
  for (let d = resolve(out); !existsSync(d) && dirname(d) !== d; d = dirname(d)) missing.push(d);
  try {
    return await run();
  } catch (e) {
    for (const d of missing) {
      try {
        rmdirSync(d);
      } catch {
        break; // not empty, or never created: leave it and everything above it
      }
    }
    throw e;
  }
}

export async function main(argv: string[]): Promise<void> {
  // a reader that stops early (`waxwane fit ... 2>&1 | head`) closes the pipe: the run goes on
  // and its files are written; only the messages are lost, which is what the reader asked for
  const ignoreClosedPipe = (e: NodeJS.ErrnoException) => {
    if (e.code !== 'EPIPE') throw e;
  };
  process.stdout.on('error', ignoreClosedPipe);
  process.stderr.on('error', ignoreClosedPipe);
  const program = buildProgram();
  program.exitOverride();
  // failures outside the awaited command (a stray callback, a rejected promise nobody awaits)
  // get the same one line and log, never a raw trace
  const fatal = (e: unknown) => {
    process.stderr.write(reportInternalError(e, { outDir: runningOutDir, argv }));
    process.exit(1);
  };
  process.on('uncaughtException', fatal);
  process.on('unhandledRejection', fatal);
  // every message line of the tool starts with "waxwane:", commander's usage errors too;
  // subcommands copied the output settings when they were made, so each gets them here
  const output = {
    writeErr: (s: string) => process.stderr.write(s),
    outputError: (s: string, write: (s: string) => void) => write(`waxwane: ${s.replace(/^error: /, '')}`),
  };
  program.configureOutput(output);
  for (const c of program.commands) c.exitOverride().configureOutput(output);
  try {
    await program.parseAsync(argv);
  } catch (e) {
    if (e instanceof CommanderError) {
      // help and version end with exit code 0; usage errors are the user's to fix: 2
      process.exitCode = e.exitCode === 0 ? 0 : 2;
      return;
    }
    if (e instanceof WaxwaneError) {
      process.stderr.write(`waxwane: ${oneLineMessage(e.message)}\n`);
      process.exitCode = e.exitCode;
      return;
    }
    process.stderr.write(reportInternalError(e, { outDir: runningOutDir, argv }));
    process.exitCode = 1;
  }
}
