// Log-density evaluations per second of the default model (createModel().logDensity from
// dist/), each measurement in a fresh Node process.
//
// As a child (`node scripts/bench/density.mjs ...`) it times one data set and prints one JSON
// line:
//   --fixture T                 a cross-check fixture of test/fixtures/limit/ (T = 90, 180, 365):
//                               its series and its parameter point, the same series the C
//                               program generates for T days
//   --series DIR --days T       the first T days of DIR/cases.csv (made by `waxwane simulate`
//     [--knot-days K]           from scripts/bench/long-series.json), at a point built from
//                               DIR/truth.csv, with the default prior set's knots every K days
//   --evals N --batches B       N evaluations in B timed batches after a warm-up
// The parameter vector moves by small deterministic steps between evaluations (every entry
// changes, so nothing can be reused from the previous call: each is a full evaluation, as in
// the C program); the rate is evaluations per CPU second of the fastest batch.
//
// As a part of the suite, `measureDensity(ctx)` times the fixtures at 90, 180 and 365 days and
// the C program on the same series, alternating JS and C for `rounds` rounds and keeping the
// best of each side.
import { readFileSync } from 'node:fs';
import { join } from 'node:path';
import { fileURLToPath } from 'node:url';
import { compileReference, runReference } from './c-reference.mjs';
import { BENCH_DIR, ROOT, bestRate, dist, emit, fmt, isMain, numberOption, option, readCounts, readCsvRows, runChild, table, weekdayOf } from './lib.mjs';

const SELF = fileURLToPath(import.meta.url);
export const LONG_SCENARIO = join(BENCH_DIR, 'long-series.json');

/** The default prior set, optionally with another knot spacing, through the project's own validation. */
async function priorSetWith(knotDays) {
  const { parsePriorSet } = await dist('io/priors.js');
  const file = join(ROOT, 'priors', 'default.json');
  const raw = JSON.parse(readFileSync(file, 'utf8'));
  if (knotDays !== null) raw.model.knot_days = knotDays;
  return parsePriorSet(JSON.stringify(raw), knotDays === null ? file : `${file} (knot_days ${knotDays})`);
}

/** Series, model and parameter point of a fixture of test/fixtures/limit/. */
async function fixtureCase(days) {
  const { createModel } = await dist('model/posterior.js');
  const { toUnconstrained } = await dist('model/layout.js');
  const dir = join(ROOT, 'test', 'fixtures', 'limit', `point-T${days}`);
  const point = JSON.parse(readFileSync(join(dir, 'point.json'), 'utf8'));
  const counts = readCounts(join(dir, 'cases.csv'));
  const model = createModel({ counts, population: point.population, firstWeekday: weekdayOf(point.first_date) }, await priorSetWith(null));
  const theta = toUnconstrained(model.layout, {
    start_reproduction: point.R_start,
    walk_steps: point.walk_steps,
    walk_scale: point.walk_scale,
    ascertainment: point.ascertainment,
    dispersion: point.dispersion,
    seed_infected: point.seed_infected,
    latent_days: point.latent_days,
    infectious_days: point.infectious_days,
    weekday: [],
  });
  return { model, theta, expected: point.log_density };
}

/**
 * The first `days` days of a simulated series, and a parameter point near the truth that made
 * it: log beta at each knot's first day read from truth.csv (the seeding days before the first
 * report take the first reported day's value), the walk scale the root mean square of the
 * knot-to-knot changes, the other parameters as in the scenario.
 */
async function seriesCase(dir, days, knotDays) {
  const { createModel } = await dist('model/posterior.js');
  const { toUnconstrained } = await dist('model/layout.js');
  const scenario = JSON.parse(readFileSync(LONG_SCENARIO, 'utf8'));
  const place = scenario.places[0];
  const all = readCounts(join(dir, 'cases.csv'));
  if (days > all.length) throw new Error(`${dir}/cases.csv has ${all.length} days, ${days} asked for`);
  const priorSet = await priorSetWith(knotDays);
  const model = createModel(
    { counts: all.subarray(0, days), population: place.population, firstWeekday: weekdayOf(scenario.start_date) },
    priorSet,
  );
  const truth = readCsvRows(join(dir, 'truth.csv'));
  const K = model.layout.knots;
  const { seed_days: seedDays, knot_days: spacing } = priorSet.model;
  const logBeta = [];
  for (let k = 0; k < K; k++) {
    const day = Math.min(Math.max(0, k * spacing - seedDays), truth.length - 1);
    logBeta.push(Math.log(Number(truth[day].transmission_rate)));
  }
  const changes = logBeta.slice(1).map((b, k) => b - logBeta[k]);
  const sigma = Math.max(0.02, Math.sqrt(changes.reduce((s, d) => s + d * d, 0) / Math.max(1, changes.length)));
  const theta = toUnconstrained(model.layout, {
    start_reproduction: Math.exp(logBeta[0]) * place.infectious_days,
    walk_steps: changes.map((d) => d / sigma),
    walk_scale: sigma,
    ascertainment: place.ascertainment,
    dispersion: place.dispersion,
    seed_infected: place.seed_infected,
    latent_days: place.latent_days,
    infectious_days: place.infectious_days,
    weekday: [],
  });
  return { model, theta, expected: null };
}

async function child(argv) {
  const evals = numberOption(argv, '--evals', 20000);
  const batches = numberOption(argv, '--batches', 15);
  const fixture = option(argv, '--fixture', null);
  const c =
    fixture !== null
      ? await fixtureCase(Number(fixture))
      : await seriesCase(option(argv, '--series', ''), numberOption(argv, '--days', 180), numberOption(argv, '--knot-days', 7));
  const { model, theta, expected } = c;
  const logDensity = model.logDensity;
  const lp = logDensity(theta);
  if (!Number.isFinite(lp)) throw new Error(`log density at the benchmark point is ${lp}; the point is outside the support`);
  const P = theta.length;
  const th = new Float64Array(P);
  let sink = 0;
  let i = 0;
  const batch = (n) => {
    for (let r = 0; r < n; r++, i++) {
      for (let j = 0; j < P; j++) th[j] = theta[j] + (1e-3 * (((i * 31 + j * 17) % 21) - 10)) / 10;
      sink += logDensity(th);
    }
  };
  const rate = bestRate(batch, evals, batches, Math.floor(evals / 10) + 1);
  emit({
    days: model.days,
    knots: model.layout.knots,
    dim: model.layout.dim,
    evalsPerSecond: rate,
    logDensity: lp,
    relErrVsFixture: expected === null ? null : Math.abs(lp - expected) / Math.abs(expected),
    sinkFinite: Number.isFinite(sink),
  });
}

/** Best of `rounds` fresh-process measurements with these child arguments. */
export function densityRate(args, settings, rounds = settings.rounds) {
  let best = null;
  for (let r = 0; r < rounds; r++) {
    const one = runChild(SELF, [...args, '--evals', String(settings.evals), '--batches', String(settings.batches)]);
    if (best === null || one.evalsPerSecond > best.evalsPerSecond) best = one;
  }
  return best;
}

/** Density settings of a run: evaluations, batches and rounds. */
export function densitySettings(quick) {
  return quick ? { evals: 3000, batches: 5, rounds: 1 } : { evals: 20000, batches: 15, rounds: 3 };
}

export async function measureDensity(ctx) {
  const settings = densitySettings(ctx.quick);
  const c = ctx.reference;
  const rows = [];
  for (const days of [90, 180, 365]) {
    ctx.progress(`density: ${days} days`);
    let js = null;
    let cBest = null;
    for (let r = 0; r < settings.rounds; r++) {
      const one = densityRate(['--fixture', String(days)], settings, 1);
      if (js === null || one.evalsPerSecond > js.evalsPerSecond) js = one;
      const cOne = c.exe === null ? null : runReference(c.exe, days, settings.evals);
      if (cOne !== null && (cBest === null || cOne.evalsPerSecond > cBest.evalsPerSecond)) cBest = cOne;
    }
    rows.push({
      days,
      dim: js.dim,
      evalsPerSecond: js.evalsPerSecond,
      microsecondsPerEval: 1e6 / js.evalsPerSecond,
      relErrVsFixture: js.relErrVsFixture,
      cEvalsPerSecond: cBest?.evalsPerSecond ?? null,
      // same series and point as the fixture: the C program's own value must match it
      cSameData: cBest === null ? null : Math.abs(cBest.logDensity - js.logDensity) <= 1e-9 * Math.abs(js.logDensity),
      timeRatioToC: cBest === null ? null : cBest.evalsPerSecond / js.evalsPerSecond,
    });
  }
  const result = { settings, reference: c.exe === null ? { available: false, reason: c.reason } : { available: true }, sizes: rows };
  ctx.print('Log density (default model, cross-check fixtures; CPU time, best batch of the best round)');
  ctx.print(
    table(
      ['days', 'parameters', 'evals/s', 'us/eval', 'C evals/s', 'time / C time', '|lp - fixture| rel'],
      rows.map((r) => [r.days, r.dim, fmt(r.evalsPerSecond, 4), fmt(r.microsecondsPerEval), fmt(r.cEvalsPerSecond, 4), fmt(r.timeRatioToC), r.relErrVsFixture.toExponential(1)]),
    ),
  );
  if (c.exe === null) ctx.print(`(ratio to C skipped: ${c.reason})`);
  else if (rows.some((r) => r.cSameData === false)) ctx.print('(warning: the C program\'s log density differs from the fixture: not the same series)');
  return result;
}

if (isMain(import.meta.url)) {
  await child(process.argv.slice(2));
}
