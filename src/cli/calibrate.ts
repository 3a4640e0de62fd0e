/**
 * `waxwane calibrate PRIORS --population N --days T --reps R`: simulation-based calibration of
 * the engine under a prior set (evaluation/calibration.ts): each replicate draws the truth from
 * the prior, simulates reported counts, fits them, and records the rank of the truth among
 * thinned posterior draws; the rank histograms and a chi-square uniformity test per quantity
 * say whether the engine's posteriors are right. Prints the histograms and tests; with --out
 * also writes the tables.
 */
import { basename } from 'node:path';
import { WaxwaneError } from '../errors.js';
import { MAX_POPULATION } from '../io/cases.js';
import { resolvePriorSet, resolvePriorSetPath } from '../io/priors.js';
import { prepareOutputDir, OutputSet } from '../io/atomic.js';
import { DEFAULT_SAMPLER, type SamplerOptions } from '../inference/fit.js';
import { formatNumber, toCsv } from '../outputs/format.js';
import { VERSION } from '../version.js';
import { CALIBRATION_QUANTITIES, runCalibration, type CalibrationResult } from '../evaluation/calibration.js';
import type { Reporter } from './reporter.js';

export interface CalibrateCliOptions {
  population: number;
  days: number;
  reps: number;
  thinTo: number;
  bins: number;
  alpha: number;
  chains: number;
  warmup: number;
  draws: number;
  thin: number;
  seed: number;
  threads: number;
  out?: string;
  force: boolean;
  quiet: boolean;
}

export const CALIBRATE_FILES = ['ranks.csv', 'histograms.csv', 'uniformity.csv', 'calibrate.json'] as const;

export async function runCalibrate(priors: string, o: CalibrateCliOptions, reporter: Reporter): Promise<number> {
  if (!(o.population <= MAX_POPULATION)) throw new WaxwaneError(`--population ${o.population} is above ${MAX_POPULATION}; give the population of one place`);
  if (!(o.alpha > 0 && o.alpha < 1)) throw new WaxwaneError(`--alpha must be a level between 0 and 1, e.g. 0.05; got ${o.alpha}`);
  if ((o.thinTo + 1) % o.bins !== 0) {
    throw new WaxwaneError(`--thin-to ${o.thinTo} gives ${o.thinTo + 1} possible ranks, which do not split into --bins ${o.bins} equal bins; choose --thin-to so that it plus 1 is a multiple of --bins (e.g. --thin-to ${Math.max(o.bins - 1, Math.round((o.thinTo + 1) / o.bins) * o.bins - 1)})`);
  }
  if (o.chains * o.draws < o.thinTo) {
    throw new WaxwaneError(`--chains ${o.chains} x --draws ${o.draws} keeps ${o.chains * o.draws} draws, fewer than --thin-to ${o.thinTo}; keep more draws or lower --thin-to`);
  }
  if (o.reps < o.bins) throw new WaxwaneError(`--reps ${o.reps} is fewer than --bins ${o.bins}: the histogram would be mostly empty; use at least ${5 * o.bins} replicates`);
  const path = resolvePriorSetPath(priors);
  const set = resolvePriorSet(priors);
  if (o.out !== undefined) prepareOutputDir(o.out, { force: o.force });
  const sampler: SamplerOptions = { ...DEFAULT_SAMPLER, chains: o.chains, warmup: o.warmup, draws: o.draws, thin: o.thin, seed: o.seed, threads: o.threads };
  reporter.info(
    `calibrating under prior set ${set.name}: ${o.reps} replicates of ${o.days} days in a population of ${formatNumber(o.population, 12)}; each fit ${o.chains} chains x (${o.warmup} + ${o.draws * o.thin}) iterations, ranks among ${o.thinTo} thinned draws`,
  );
  if (o.reps < 5 * o.bins) reporter.warn(`--reps ${o.reps} gives fewer than 5 replicates per bin on average: the chi-square tests are rough and only gross miscalibration shows`);
  let rep = 0;
  const result = await runCalibration(
    set,
    set,
    { days: o.days, population: o.population, reps: o.reps, thinTo: o.thinTo, bins: o.bins, alpha: o.alpha, sampler, seed: o.seed },
    {
      replicateStarting: (r, n) => {
        rep = r;
        reporter.progress(`replicate ${r + 1}/${n}`);
      },
      progress: () => reporter.progress(`replicate ${rep + 1}/${o.reps}`),
    },
  ).finally(() => reporter.done());

  if (o.out !== undefined) {
    const out = new OutputSet(o.out);
    out.add('ranks.csv', ranksCsv(result));
    out.add('histograms.csv', histogramsCsv(result, o.thinTo, o.bins));
    out.add('uniformity.csv', uniformityCsv(result));
    out.add(
      'calibrate.json',
      JSON.stringify(
        {
          tool: 'waxwane',
          version: VERSION,
          command: 'calibrate',
          priors: { file: basename(path), set },
          options: { population: o.population, days: o.days, reps: o.reps, thin_to: o.thinTo, bins: o.bins, alpha: o.alpha, chains: o.chains, warmup: o.warmup, draws: o.draws, thin: o.thin, seed: o.seed },
          threads: o.threads,
          test_level: result.testLevel,
          quantities: CALIBRATION_QUANTITIES,
          flagged: result.quantities.filter((q) => q.flagged).map((q) => q.quantity),
          failed_fits: result.replicates.filter((r) => r.failure !== null).length,
          discarded_simulations: result.replicates.reduce((a, r) => a + r.discarded, 0),
          warnings: result.warnings,
        },
        null,
        2,
      ) + '\n',
    );
    out.commit();
  }

  const lines = [
    `rank histograms (${o.bins} bins of ranks 0..${o.thinTo}; a calibrated engine gives flat bars at ${formatNumber(o.reps / o.bins, 3)} each) and chi-square tests (flagged below p = ${formatNumber(result.testLevel, 3)}, i.e. ${o.alpha} over ${CALIBRATION_QUANTITIES.length} quantities):`,
  ];
  const width = Math.max(...CALIBRATION_QUANTITIES.map((q) => q.length));
  for (const q of result.quantities) {
    lines.push(
      `  ${q.flagged ? 'FLAG' : 'ok  '} ${q.quantity.padEnd(width)}  ${q.histogram.map((c) => String(c).padStart(3)).join(' ')}   chi2 ${formatNumber(q.test.chiSquare, 3)}, p ${formatNumber(q.test.pValue, 2)}, mean rank ${formatNumber(q.meanRankShare, 2)} of L`,
    );
  }
  reporter.info(lines.join('\n'));
  const flagged = result.quantities.filter((q) => q.flagged);
  if (flagged.length > 0) {
    reporter.warn(
      `calibration fails for ${flagged.map((q) => q.quantity).join(', ')}: ranks far from uniform (many in the outer bins: posteriors too narrow; a hump: too wide; a slope: shifted); the engine's intervals for ${flagged.length === 1 ? 'it' : 'them'} cannot be taken at face value under this prior set`,
    );
  }
  for (const w of result.warnings) reporter.warn(w);
  if (o.out !== undefined) reporter.info(`outputs in ${o.out}/ (${CALIBRATE_FILES.join(', ')})`);
  return 0;
}

const f = (x: number, d = 6) => formatNumber(x, d);

function ranksCsv(r: CalibrationResult): string {
  const rows: string[][] = [];
  for (const rep of r.replicates) {
    CALIBRATION_QUANTITIES.forEach((q, i) => {
      rows.push([String(rep.rep + 1), q, f(rep.truth[i]!, 8), Number.isNaN(rep.ranks[i]!) ? '' : String(rep.ranks[i]), f(rep.check?.maxRhat ?? NaN, 5), f(rep.check?.minEssBulk ?? NaN, 5), String(rep.totalReports)]);
    });
  }
  return toCsv(['replicate', 'quantity', 'truth', 'rank', 'max_rhat', 'min_ess_bulk', 'total_reports'], rows);
}

function histogramsCsv(r: CalibrationResult, thinTo: number, bins: number): string {
  const width = (thinTo + 1) / bins;
  const rows: string[][] = [];
  for (const q of r.quantities) {
    const n = q.histogram.reduce((a, c) => a + c, 0);
    q.histogram.forEach((count, b) => rows.push([q.quantity, String(b + 1), String(b * width), String((b + 1) * width - 1), String(count), f(n / bins, 4)]));
  }
  return toCsv(['quantity', 'bin', 'first_rank', 'last_rank', 'count', 'expected'], rows);
}

function uniformityCsv(r: CalibrationResult): string {
  return toCsv(
    ['quantity', 'replicates', 'chi_square', 'df', 'p_value', 'test_level', 'mean_rank_share', 'outer_share', 'flagged'],
    r.quantities.map((q) => [q.quantity, String(q.histogram.reduce((a, c) => a + c, 0)), f(q.test.chiSquare), String(q.test.df), f(q.test.pValue), f(r.testLevel, 4), f(q.meanRankShare, 4), f(q.outerShare, 4), q.flagged ? 'yes' : 'no']),
  );
}
