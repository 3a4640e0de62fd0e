/**
 * Reading a fit's run folder back (what `waxwane fit` wrote): run.json for the prior set, the
 * population, the dates, the seed and the quantile levels; data.csv for the series as fitted;
 * draws.csv for the kept draws. The model is rebuilt exactly as the fit built it, and the draws
 * are turned back into the sampler's unconstrained vectors, so later commands (forecasts,
 * scenarios, nowcasts) need no refit.
 *
 * draws.csv holds natural-unit values to 12 significant digits; {@link roundTripDraws} gives
 * the fit itself the very same vectors, so a forecast made right after a fit and one made
 * later from its folder agree to the byte.
 */
import { readFileSync } from 'node:fs';
import { join } from 'node:path';
import { WaxwaneError, inputError } from '../errors.js';
import { createModel, type EpidemicModel } from '../model/posterior.js';
import { naturalValue, toUnconstrained, type NaturalParameters, type ParameterLayout } from '../model/layout.js';
import type { PriorSet } from '../model/prior-set.js';
import { formatNumber } from '../outputs/format.js';
import { readCases } from './cases.js';
import { dayOfWeek, parseIsoDate } from './dates.js';
import { parsePriorSet } from './priors.js';

/** Significant digits of draws.csv (src/outputs/summary.ts writes them so). */
export const DRAW_DIGITS = 12;

export interface RunFolder {
  dir: string;
  /** run.json as parsed */
  run: Record<string, unknown>;
  priorSet: PriorSet;
  population: number;
  region: string | null;
  dates: string[];
  counts: number[];
  firstWeekday: number;
  model: EpidemicModel;
  /** the draws as unconstrained vectors, row-major draws x dim, in the order of draws.csv */
  draws: Float64Array;
  drawCount: number;
  seed: number;
  quantiles: number[];
  converged: boolean | null;
}

type Json = unknown;
const isObject = (v: Json): v is Record<string, Json> => typeof v === 'object' && v !== null && !Array.isArray(v);

function readText(file: string, what: string): string {
  try {
    return readFileSync(file, 'utf8');
  } catch (e) {
    const code = (e as NodeJS.ErrnoException).code ?? 'error';
    const why = code === 'ENOENT' ? 'is missing' : `cannot be read (${code})`;
    throw new WaxwaneError(`${file} (${what}) ${why}; give the folder that "waxwane fit --out" wrote`);
  }
}

/**
 * Reads the run folder `dir`.
 *
 * @throws WaxwaneError when a file is missing or does not match what `waxwane fit` writes
 *   (naming the file, the line or field, and what to do).
 */
export function readRunFolder(dir: string): RunFolder {
  const runFile = join(dir, 'run.json');
  const runText = readText(runFile, 'the run record');
  let run: Json;
  try {
    run = JSON.parse(runText);
  } catch (e) {
    throw new WaxwaneError(`${runFile}: not valid JSON (${(e as Error).message}); run the fit again to rewrite it`);
  }
  const bad = (field: string, what: string) =>
    inputError({ file: runFile, field }, what, 'this run record was not written by "waxwane fit", or was edited; run the fit again');
  if (!isObject(run) || run.tool !== 'waxwane' || run.command !== 'fit') {
    throw new WaxwaneError(`${runFile}: not the record of a "waxwane fit" run; give the folder that "waxwane fit --out" wrote`);
  }
  const input = run.input;
  const priors = run.priors;
  const options = run.options;
  if (!isObject(input)) throw bad('input', 'missing');
  if (!isObject(priors) || !isObject(priors.set)) throw bad('priors.set', 'missing');
  if (!isObject(options)) throw bad('options', 'missing');
  const population = input.population;
  if (typeof population !== 'number' || !(population > 0) || !Number.isFinite(population)) throw bad('input.population', 'must be a positive number');
  const firstDate = input.first_date;
  if (typeof firstDate !== 'string' || parseIsoDate(firstDate) === null) throw bad('input.first_date', 'must be a date YYYY-MM-DD');
  const seed = options.seed;
  if (typeof seed !== 'number' || !Number.isSafeInteger(seed) || seed < 0) throw bad('options.seed', 'must be a whole number');
  const quantiles = options.quantiles;
  if (!Array.isArray(quantiles) || quantiles.length === 0 || quantiles.some((q) => typeof q !== 'number' || !(q > 0 && q < 1))) {
    throw bad('options.quantiles', 'must be a list of levels between 0 and 1');
  }
  const priorSet = parsePriorSet(JSON.stringify(priors.set), `${runFile} (priors.set)`);

  const dataFile = join(dir, 'data.csv');
  readText(dataFile, 'the fitted series');
  const data = readCases(dataFile);
  const series = data.series[0]!;
  if (series.firstDate !== firstDate || (typeof input.days === 'number' && input.days !== series.dates.length)) {
    throw new WaxwaneError(
      `${dataFile}: the series (${series.dates.length} days from ${series.firstDate}) is not the one run.json records (${String(input.days)} days from ${firstDate}); the folder mixes files of different runs, run the fit again`,
    );
  }
  const counts = Array.from(series.counts, (v) => (Number.isNaN(v) ? NaN : v));
  const firstWeekday = dayOfWeek(firstDate);
  const model = createModel({ counts, population, firstWeekday }, priorSet);

  const drawsFile = join(dir, 'draws.csv');
  const draws = parseDraws(readText(drawsFile, 'the posterior draws'), drawsFile, model.layout);
  return {
    dir,
    run,
    priorSet,
    population,
    region: typeof input.region === 'string' ? input.region : null,
    dates: series.dates,
    counts,
    firstWeekday,
    model,
    draws,
    drawCount: draws.length / model.layout.dim,
    seed,
    quantiles: [...(quantiles as number[])].sort((a, b) => a - b),
    converged: typeof run.converged === 'boolean' ? run.converged : null,
  };
}

/**
 * Parses draws.csv (`chain,draw,log_density,` then one column per parameter in natural units)
 * into unconstrained vectors for `layout`.
 */
export function parseDraws(text: string, file: string, layout: ParameterLayout): Float64Array {
  const lines = text.split(/\r?\n/);
  if (lines[lines.length - 1] === '') lines.pop();
  const header = (lines[0] ?? '').split(',');
  const expected = ['chain', 'draw', 'log_density', ...layout.names];
  if (header.join(',') !== expected.join(',')) {
    const firstDiff = expected.findIndex((name, i) => header[i] !== name);
    throw inputError(
      { file, line: 1 },
      `the columns do not match the model in run.json (column ${firstDiff + 1} should be "${expected[firstDiff] ?? ''}", found "${header[firstDiff] ?? ''}")`,
      'the folder mixes files of different runs; run the fit again',
    );
  }
  const rows = lines.length - 1;
  if (rows < 1) throw inputError({ file }, 'holds no draws', 'run the fit again');
  const dim = layout.dim;
  const out = new Float64Array(rows * dim);
  const values = new Array<number>(dim);
  for (let r = 0; r < rows; r++) {
    const cells = lines[r + 1]!.split(',');
    if (cells.length !== expected.length) {
      throw inputError({ file, line: r + 2 }, `has ${cells.length} fields, the header ${expected.length}`, 'the file is damaged; run the fit again');
    }
    for (let i = 0; i < dim; i++) {
      const cell = cells[i + 3]!;
      const v = Number(cell);
      if (cell.trim() === '' || !Number.isFinite(v)) {
        throw inputError({ file, line: r + 2, column: layout.names[i] }, `"${cell}" is not a finite number`, 'the file is damaged; run the fit again');
      }
      values[i] = v;
    }
    const theta = thetaFromNatural(layout, values);
    for (let i = 0; i < dim; i++) {
      if (!Number.isFinite(theta[i])) {
        throw inputError(
          { file, line: r + 2, column: layout.names[i] },
          `${values[i]} is outside the range of this parameter`,
          'the file is damaged; run the fit again',
        );
      }
    }
    out.set(theta, r * dim);
  }
  return out;
}

/** One row of natural-unit values (in layout order) as an unconstrained vector. */
export function thetaFromNatural(layout: ParameterLayout, values: ArrayLike<number>): Float64Array {
  const steps: number[] = [];
  for (let k = 0; k < layout.knots - 1; k++) steps.push(values[layout.firstStep + k]);
  const weekday: number[] = [];
  if (layout.weekday) for (let j = 0; j < 6; j++) weekday.push(values[layout.firstWeekday + j]);
  const p: NaturalParameters = {
    start_reproduction: values[layout.startReproduction],
    walk_steps: steps,
    walk_scale: values[layout.walkScale],
    ascertainment: values[layout.ascertainment],
    dispersion: values[layout.dispersion],
    seed_infected: values[layout.seedInfected],
    latent_days: values[layout.latentDays],
    infectious_days: values[layout.infectiousDays],
    weekday,
  };
  return toUnconstrained(layout, p);
}

/**
 * The draws as they come back from draws.csv: each value written in natural units with
 * {@link DRAW_DIGITS} significant digits, read and transformed back.
 */
export function roundTripDraws(layout: ParameterLayout, draws: Float64Array): Float64Array {
  const dim = layout.dim;
  const out = new Float64Array(draws.length);
  const values = new Array<number>(dim);
  for (let r = 0; r < draws.length / dim; r++) {
    for (let i = 0; i < dim; i++) values[i] = Number(formatNumber(naturalValue(layout, i, draws[r * dim + i]), DRAW_DIGITS));
    out.set(thetaFromNatural(layout, values), r * dim);
  }
  return out;
}
