import { describe, it, expect } from 'vitest';
import { createRequire } from 'node:module';
import { nowcastDraws, nowcastRows, NOWCAST_QUANTITIES } from '../../src/outputs/nowcast.js';
import { dailyDraws, weekdayMultipliers } from '../../src/model/derived.js';
import { toNatural } from '../../src/model/layout.js';
import { chainLadderCdf, delayEvidence, type TriangleCounts } from '../../src/model/observed-delay.js';
import { createRng } from '../../src/util/rng.js';
import { addDays } from '../../src/io/dates.js';
import { priorSetWith, syntheticDraws } from './synthetic.js';

const require = createRequire(import.meta.url);
// reference library: the gamma CDF of @stdlib
const gammaCdf: (x: number, k: number, rate: number) => number = require('@stdlib/stats/base/dists/gamma/cdf');

const LEVELS = [0.05, 0.5, 0.95];
const DAYS = 50;

/** `copies` identical draws of the first synthetic draw, and the onsets of the observed days. */
function copiesOfOneDraw(copies: number, weekday = false, seedInfected = 10) {
  const priorSet = priorSetWith({ weekday_effect: weekday });
  const { model, draws: one } = syntheticDraws({ days: DAYS, population: 3e6, draws: 1, seed: 17, priorSet, reproduction: [1.4, 1.4], seedInfected });
  const dim = model.layout.dim;
  const draws = new Float64Array(copies * dim);
  for (let d = 0; d < copies; d++) draws.set(one, d * dim);
  const daily = dailyDraws(model, draws, 2, createRng(1));
  return { model, draws, onsets: daily.onsets, p: toNatural(model.layout, one) };
}

describe('nowcastDraws (the model delay)', () => {
  it('covers the last Dmax onset days; the share seen is the delay CDF F(u + 1) / F(Dmax + 1)', () => {
    const { model, draws, onsets } = copiesOfOneDraw(3);
    const nc = nowcastDraws(model, draws, onsets, 2, 1, null);
    const Dmax = 21; // the default prior set: gamma delay, mean 5, sd 3, cut at 21 days
    expect(nc.days).toBe(Dmax);
    expect(nc.first).toBe(DAYS - Dmax);
    const shape = (5 / 3) ** 2;
    const rate = 5 / 9;
    for (let j = 0; j < Dmax; j++) {
      const u = DAYS - 1 - (nc.first + j); // delays up to u are seen
      // discretised as p_d = F(d + 1) - F(d) on 0..Dmax, renormalised (MODEL.md section 3)
      const expected = gammaCdf(u + 1, shape, rate) / gammaCdf(Dmax + 1, shape, rate);
      expect(nc.values.reported_share[j]).toBeCloseTo(expected, 12);
      expect(nc.values.onsets[j]).toBe(onsets[nc.first + j]);
    }
  });

  it('applies the weekday multipliers of the report days to the share seen', () => {
    const { model, draws, onsets, p } = copiesOfOneDraw(2, true);
    const nc = nowcastDraws(model, draws, onsets, 2, 1, null);
    const wd = weekdayMultipliers(p.weekday)!;
    for (let j = 0; j < nc.days; j++) {
      const t = nc.first + j;
      let seen = 0;
      let all = 0;
      for (let d = 0; d <= 21; d++) {
        const term = model.delay[d]! * wd[(2 + t + d) % 7]!;
        all += term;
        if (t + d <= DAYS - 1) seen += term;
      }
      expect(nc.values.reported_share[j]).toBeCloseTo(seen / all, 12);
      expect(nc.values.reports_seen[j]).toBeCloseTo(p.ascertainment * onsets[t]! * seen, 8);
    }
  });

  it('draws the reports still to come around the expected later reports of these onsets', () => {
    // The expected reports after the last day from onsets in the window, summed day by day
    // (mu_t = rho sum_d p_d onsets_{t-d}, MODEL.md section 3, restricted to those onsets);
    // the mean over 4000 draws is within 4 standard errors of it, the sd of a negative binomial
    // with dispersion phi being sqrt(mu + mu^2 / phi) per onset day (MODEL.md section 3)
    const copies = 4000;
    const { model, draws, onsets, p } = copiesOfOneDraw(copies);
    const nc = nowcastDraws(model, draws, onsets, 2, 5, null);
    const first = nc.first;
    let expectedTotal = 0;
    let variance = 0;
    for (let t = first; t < DAYS; t++) {
      let mu = 0;
      for (let day = DAYS; day <= t + 21; day++) mu += p.ascertainment * model.delay[day - t]! * onsets[t]!;
      expectedTotal += mu;
      variance += mu + (mu * mu) / p.dispersion;
    }
    const mean = nc.totals.reports_to_come.reduce((a, b) => a + b, 0) / copies;
    expect(Math.abs(mean - expectedTotal)).toBeLessThan(4 * Math.sqrt(variance / copies));
    for (let d = 0; d < copies; d++) {
      expect(Number.isInteger(nc.totals.reports_to_come[d])).toBe(true);
      expect(nc.totals.eventual_reports[d]).toBeCloseTo(nc.totals.reports_seen[d]! + nc.totals.reports_to_come[d]!, 8);
    }
  });
});

describe('nowcastDraws (a reporting triangle)', () => {
  it('takes the seen counts from the triangle and draws the rest from the gamma-Poisson posterior', () => {
    const copies = 4000;
    const { model, draws, onsets, p } = copiesOfOneDraw(copies, false, 200);
    const D = 21;
    // a large triangle so that the observed delays are pinned down: 10000 reports per onset day
    // split by a known delay, for onset days 40 days before the first observed day onwards
    const rows = DAYS + 40;
    const counts = new Float64Array(rows * (D + 1));
    const rng = createRng(9);
    const seenByRow = new Float64Array(rows);
    for (let r = 0; r < rows; r++) {
      const onsetDay = r - 40;
      for (let d = 0; d <= D && onsetDay + d <= DAYS - 1; d++) {
        const c = rng.poisson(10000 * model.delay[d]!);
        counts[r * (D + 1) + d] = c;
        seenByRow[r] += c;
      }
    }
    // in the window, the triangle holds 1.6 times what this draw's onsets give on average, so
    // that the posterior of the eventual reports sits between the model and the data
    for (let j = 0; j < D; j++) {
      const r = DAYS - D + j + 40;
      seenByRow[r] = 0;
      for (let d = 0; d <= D && DAYS - D + j + d <= DAYS - 1; d++) {
        const c = Math.round(1.6 * p.ascertainment * onsets[DAYS - D + j]! * model.delay[d]!);
        counts[r * (D + 1) + d] = c;
        seenByRow[r] += c;
      }
    }
    const tri: TriangleCounts = { maxDelay: D, firstOnset: -40, lastDay: DAYS - 1, counts };
    const F = chainLadderCdf(delayEvidence(tri));
    const nc = nowcastDraws(model, draws, onsets, 2, 7, tri);
    expect(nc.observedDelays).toBe(true);
    let discriminating = 0;
    for (let j = 0; j < D; j++) {
      const t = DAYS - D + j;
      const n = seenByRow[t + 40]!;
      expect(nc.values.reports_seen[j]).toBe(n);
      const u = DAYS - 1 - t;
      let share = 0;
      let meanRest = 0;
      let meanRest2 = 0;
      for (let d = 0; d < copies; d++) {
        share += nc.values.reported_share[d * D + j]!;
        const rest = nc.values.reports_to_come[d * D + j]!;
        meanRest += rest;
        meanRest2 += rest * rest;
      }
      share /= copies;
      meanRest /= copies;
      const sdRest = Math.sqrt(meanRest2 / copies - meanRest * meanRest);
      // the share drawn from the delay posterior centres on the chain-ladder estimate
      expect(Math.abs(share - F[u]!)).toBeLessThan(0.01);
      // E[rest] = E[Lambda] (1 - F) with Lambda ~ Gamma(phi + n, rate phi / lambda + F)
      // (the gamma-Poisson model, Gelman et al., Bayesian Data Analysis, 3rd ed., section 2.6;
      // from memory), lambda the model's eventual reports of the day
      const lambda = p.ascertainment * onsets[t]!;
      const expected = ((p.dispersion + n) / (p.dispersion / lambda + F[u]!)) * (1 - F[u]!);
      const tolerance = 4 * (sdRest / Math.sqrt(copies)) + 0.02 * expected + 0.05;
      expect(Math.abs(meanRest - expected), `onset day ${t}`).toBeLessThan(tolerance);
      // the check can tell the data's pull: the model alone would give lambda (1 - F)
      if (Math.abs(expected - lambda * (1 - F[u]!)) > 3 * tolerance) discriminating++;
    }
    expect(discriminating).toBeGreaterThan(10);
  });
});

describe('nowcastRows', () => {
  it('lists every quantity on every nowcast date, then the whole window with an empty date', () => {
    const { model, draws, onsets } = copiesOfOneDraw(5);
    const nc = nowcastDraws(model, draws, onsets, 2, 1, null);
    const dates = Array.from({ length: DAYS }, (_, t) => addDays('2031-01-01', t));
    const rows = nowcastRows(nc, dates, LEVELS);
    expect(rows).toHaveLength(NOWCAST_QUANTITIES.length * (21 + 1));
    expect(rows.slice(0, 22).map((r) => r.keys[1])).toEqual([...dates.slice(DAYS - 21), '']);
    const total = rows.find((r) => r.keys[0] === 'reports_seen' && r.keys[1] === '')!;
    const days = rows.filter((r) => r.keys[0] === 'reports_seen' && r.keys[1] !== '');
    // identical draws: the total is the sum of the days
    expect(total.summary.mean).toBeCloseTo(days.reduce((a, r) => a + r.summary.mean, 0), 8);
  });
});
