// How the cost of one log-density evaluation grows with the length of the series (90, 180,
// 365 and 720 days) and with the knot spacing (3, 7 and 14 days, on 180 days). The series is
// simulated once by `waxwane simulate` from scripts/bench/long-series.json (an invented city
// followed through several waves, so every prefix is a live epidemic); each size is timed in a
// fresh process by density.mjs. A least-squares line through (days, time per evaluation) and
// the largest relative deviation from it say how close the cost is to linear in days. The C
// program's time on its own series of the same length is shown beside, as what linear growth
// looks like on this machine.
import { spawnSync } from 'node:child_process';
import { mkdtempSync, rmSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { runReference } from './c-reference.mjs';
import { LONG_SCENARIO, densityRate, densitySettings } from './density.mjs';
import { CLI, ROOT, fmt, linearFit, table } from './lib.mjs';

export const SCALING_DAYS = [90, 180, 365, 720];
export const KNOT_SPACINGS = [3, 7, 14];
const SERIES_SEED = 20330307;
/** The bench's own bound for "linear": no point further than this from the fitted line. */
export const LINEAR_TOLERANCE = 0.1;

function simulateSeries(dir) {
  const r = spawnSync(process.execPath, [CLI, 'simulate', LONG_SCENARIO, '--out', dir, '--seed', String(SERIES_SEED), '--quiet'], {
    cwd: ROOT,
    encoding: 'utf8',
  });
  if (r.status !== 0) throw new Error(`waxwane simulate failed (exit ${r.status}): ${(r.stderr ?? '').trim()}`);
}

export async function measureScaling(ctx) {
  const base = densitySettings(ctx.quick);
  const settings = { ...base, rounds: ctx.quick ? 1 : 3 };
  const tmp = mkdtempSync(join(tmpdir(), 'waxwane-bench-series-'));
  try {
    const series = join(tmp, 'series');
    ctx.progress('scaling: simulating the 720-day series');
    simulateSeries(series);
    const days = [];
    for (const T of SCALING_DAYS) {
      ctx.progress(`scaling: ${T} days`);
      const js = densityRate(['--series', series, '--days', String(T)], settings);
      let cBest = null;
      if (ctx.reference.exe !== null) {
        for (let r = 0; r < settings.rounds; r++) {
          const one = runReference(ctx.reference.exe, T, settings.evals);
          if (one !== null && (cBest === null || one.evalsPerSecond > cBest.evalsPerSecond)) cBest = one;
        }
      }
      days.push({
        days: T,
        dim: js.dim,
        microsecondsPerEval: 1e6 / js.evalsPerSecond,
        cMicrosecondsPerEval: cBest === null ? null : 1e6 / cBest.evalsPerSecond,
      });
    }
    const line = linearFit(
      days.map((d) => d.days),
      days.map((d) => d.microsecondsPerEval),
    );
    days.forEach((d, i) => (d.relDeviationFromLine = line.deviations[i]));
    const cLine = days.every((d) => d.cMicrosecondsPerEval !== null)
      ? linearFit(
          days.map((d) => d.days),
          days.map((d) => d.cMicrosecondsPerEval),
        )
      : null;
    const knots = [];
    for (const k of KNOT_SPACINGS) {
      ctx.progress(`scaling: knots every ${k} days`);
      const js = densityRate(['--series', series, '--days', '180', '--knot-days', String(k)], settings);
      knots.push({ knotDays: k, knots: js.knots, dim: js.dim, microsecondsPerEval: 1e6 / js.evalsPerSecond });
    }
    const weekly = knots.find((k) => k.knotDays === 7)?.microsecondsPerEval;
    knots.forEach((k) => (k.relativeToWeekly = weekly === undefined ? null : k.microsecondsPerEval / weekly));

    ctx.print('Cost against days (simulated series, default model; C on its own series of the same length)');
    ctx.print(
      table(
        ['days', 'parameters', 'us/eval', 'ns/eval/day', 'off line', 'C us/eval'],
        days.map((d) => [
          d.days,
          d.dim,
          fmt(d.microsecondsPerEval),
          fmt((1e3 * d.microsecondsPerEval) / d.days),
          `${(100 * d.relDeviationFromLine).toFixed(1)}%`,
          fmt(d.cMicrosecondsPerEval),
        ]),
      ),
    );
    ctx.print(
      `line: ${fmt(line.intercept)} us + ${fmt(1e3 * line.slope)} ns x days; largest deviation ${(100 * line.maxRelDeviation).toFixed(1)}%` +
        (cLine === null ? '' : ` (C: ${(100 * cLine.maxRelDeviation).toFixed(1)}%)`),
    );
    ctx.print('Cost against knot spacing (180 days)');
    ctx.print(
      table(
        ['knot days', 'knots', 'parameters', 'us/eval', 'vs weekly'],
        knots.map((k) => [k.knotDays, k.knots, k.dim, fmt(k.microsecondsPerEval), fmt(k.relativeToWeekly)]),
      ),
    );
    return {
      settings,
      series: { scenario: 'scripts/bench/long-series.json', seed: SERIES_SEED },
      days,
      line: { interceptMicroseconds: line.intercept, slopeNanosecondsPerDay: 1e3 * line.slope, maxRelDeviation: line.maxRelDeviation },
      cLineMaxRelDeviation: cLine?.maxRelDeviation ?? null,
      knots,
    };
  } finally {
    rmSync(tmp, { recursive: true, force: true });
  }
}
