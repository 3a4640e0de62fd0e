import { describe, it, expect } from 'vitest';
import { forecastScenario, forecastRows, FORECAST_QUANTITIES, FORECAST_KEYS } from '../../src/outputs/forecast.js';
import { longCsv } from '../../src/outputs/draw-summary.js';
import { quickScenarios, resolveScenarios } from '../../src/io/forecast-scenarios.js';
import { toNatural } from '../../src/model/layout.js';
import { addDays } from '../../src/io/dates.js';
import type { BetaScenario } from '../../src/model/forecast.js';
import { priorSetWith, syntheticDraws } from './synthetic.js';

const LEVELS = [0.05, 0.25, 0.5, 0.75, 0.95];
const WALK: BetaScenario = { transmission: 'walk', changes: [] };
const HOLD: BetaScenario = { transmission: 'hold', changes: [] };
const FIRST = '2031-03-03';

function datesAfter(lastDate: string, H: number): string[] {
  return Array.from({ length: H }, (_, h) => addDays(lastDate, h + 1));
}

describe('forecastScenario: the checks of the forecast', () => {
  const days = 50;
  const lastDate = addDays(FIRST, days - 1);
  const { model, draws } = syntheticDraws({ days, population: 2e5, draws: 60, seed: 8, walkScale: 0.3 });
  const n = 60;
  const H = 28;

  it('--scale 1 gives exactly the --hold scenario (every quantity, every date, every draw)', () => {
    const set = quickScenarios({ hold: true, scale: 1 });
    expect(set.scenarios.map((s) => s.name)).toEqual(['carry_on', 'hold', 'scaled']);
    const resolved = resolveScenarios(set, FIRST, lastDate, model.seedDays, H);
    const hold = forecastScenario(model, draws, 0, H, resolved[1]!.beta, 5);
    const scaled = forecastScenario(model, draws, 0, H, resolved[2]!.beta, 5);
    for (const q of FORECAST_QUANTITIES) expect(Array.from(scaled.daily[q]), q).toEqual(Array.from(hold.daily[q]));
    const dates = datesAfter(lastDate, H);
    const text = (name: string, f: typeof hold) => longCsv(FORECAST_KEYS, forecastRows(name, f, dates, LEVELS), LEVELS).replaceAll(`\n${name},`, '\nX,');
    expect(text('scaled', scaled)).toBe(text('hold', hold));
    // and the walk carried on is a different future
    const walk = forecastScenario(model, draws, 0, H, resolved[0]!.beta, 5);
    expect(Array.from(walk.daily.infections)).not.toEqual(Array.from(hold.daily.infections));
  });

  it('cumulative counts never decrease, draw by draw and in every summary column', () => {
    const f = forecastScenario(model, draws, 0, H, WALK, 6);
    for (const q of ['cumulative_infections', 'cumulative_reports'] as const) {
      for (let d = 0; d < n; d++) {
        for (let h = 1; h < H; h++) expect(f.daily[q][d * H + h]).toBeGreaterThanOrEqual(f.daily[q][d * H + h - 1]);
      }
      const rows = forecastRows('carry_on', f, datesAfter(lastDate, H), LEVELS).filter((r) => r.keys[1] === q);
      expect(rows).toHaveLength(H);
      for (let h = 1; h < H; h++) {
        expect(rows[h]!.summary.mean).toBeGreaterThanOrEqual(rows[h - 1]!.summary.mean);
        for (let i = 0; i < LEVELS.length; i++) expect(rows[h]!.summary.quantiles[i]).toBeGreaterThanOrEqual(rows[h - 1]!.summary.quantiles[i]!);
      }
    }
  });

  for (const base of ['walk', 'hold'] as const) {
    it(`a measure with factor 0.5 lowers the forecast infections in every draw (on a ${base} path)`, () => {
      // Early in an epidemic (S ~ N) beta S I / N drops with beta on every day of the measure.
      // Where susceptibles run out, a measure also postpones infections (more susceptibles remain
      // for later), so daily infections late in the horizon may exceed those without it; the
      // infections over the whole horizon are still lower in every draw.
      const early = syntheticDraws({ days, population: 1e9, draws: n, seed: 8, walkScale: 0.05 });
      for (const [set, daily] of [[early, true], [{ model, draws }, false]] as const) {
        const start = set.model.simDays + 3; // the fourth forecast day
        const plain = forecastScenario(set.model, set.draws, 0, H, { transmission: base, changes: [] }, 9);
        const cut = forecastScenario(set.model, set.draws, 0, H, { transmission: base, changes: [{ factor: 0.5, first: start, last: Infinity }] }, 9);
        for (let d = 0; d < n; d++) {
          for (let h = 0; h < H; h++) {
            const a = plain.daily.infections[d * H + h];
            const b = cut.daily.infections[d * H + h];
            if (set.model.simDays + h < start) expect(b).toBe(a);
            else if (daily) expect(b).toBeLessThan(a);
          }
          expect(cut.totals.cumulativeInfections[d]).toBeLessThan(plain.totals.cumulativeInfections[d]);
        }
      }
    });
  }

  it('is reproducible from the seed, and a shorter horizon gives the first days of a longer one', () => {
    const a = forecastScenario(model, draws, 0, H, WALK, 11);
    const b = forecastScenario(model, draws, 0, H, WALK, 11);
    const c = forecastScenario(model, draws, 0, H, WALK, 12);
    const short = forecastScenario(model, draws, 0, 10, WALK, 11);
    for (const q of FORECAST_QUANTITIES) {
      expect(Array.from(b.daily[q]), q).toEqual(Array.from(a.daily[q]));
      for (let d = 0; d < n; d++) {
        for (let h = 0; h < 10; h++) expect(short.daily[q][d * 10 + h], q).toBe(a.daily[q][d * H + h]);
      }
    }
    expect(Array.from(c.daily.predicted_reports)).not.toEqual(Array.from(a.daily.predicted_reports));
    expect(Array.from(c.daily.transmission_rate)).not.toEqual(Array.from(a.daily.transmission_rate));
  });

  it('keeps R_eff = beta D S / N and the doubling and halving times ln 2 / |r| on their side of 0', () => {
    const f = forecastScenario(model, draws, 0, H, WALK, 13);
    for (let d = 0; d < n; d++) {
      const p = toNatural(model.layout, draws.subarray(d * model.layout.dim, (d + 1) * model.layout.dim));
      for (let h = 0; h < H; h++) {
        const i = d * H + h;
        const reff = f.daily.effective_reproduction[i];
        expect(reff).toBeLessThanOrEqual(f.daily.transmission_rate[i] * p.infectious_days * (1 + 1e-15));
        const r = f.daily.growth_rate[i];
        expect(Math.sign(r)).toBe(Math.sign(reff - 1));
        if (r > 0) {
          expect(f.daily.doubling_time[i]).toBeCloseTo(Math.LN2 / r, 10);
          expect(f.daily.halving_time[i]).toBe(Infinity);
        } else {
          expect(f.daily.halving_time[i]).toBeCloseTo(Math.LN2 / -r, 10);
          expect(f.daily.doubling_time[i]).toBe(Infinity);
        }
      }
    }
  });

  it('finds the peak day and size of infections and of reports within the horizon', () => {
    const f = forecastScenario(model, draws, 0, H, WALK, 14);
    for (let d = 0; d < n; d++) {
      const inf = Array.from(f.daily.infections.subarray(d * H, (d + 1) * H));
      const peak = Math.max(...inf);
      expect(f.totals.peakInfections[d]).toBe(peak);
      expect(f.totals.peakInfectionsDay[d]).toBe(inf.indexOf(peak) + 1);
      // without weekday effects the smooth reports are the expected reports
      const mu = Array.from(f.daily.expected_reports.subarray(d * H, (d + 1) * H));
      expect(f.totals.peakReports[d]).toBeCloseTo(Math.max(...mu), 8);
      expect(f.totals.cumulativeReports[d]).toBe(f.daily.cumulative_reports[d * H + H - 1]);
    }
  });
});

describe('forecastScenario: growth rate per date', () => {
  it('m = n = 1: matches the closed form r = (-(a+g) + sqrt((a-g)^2 + 4 a g R_eff)) / 2', () => {
    // dominant eigenvalue of the SEIR system linearised with beta S/N = g R_eff, a = 1/L, g = 1/D
    // (MODEL.md section 6; standard SEIR linearisation, e.g. Keeling and Rohani 2008, ch. 2)
    const priorSet = priorSetWith({ latent_stages: 1, infectious_stages: 1 });
    const { model, draws } = syntheticDraws({ days: 40, population: 5e5, draws: 30, seed: 21, priorSet, walkScale: 0.25 });
    const H = 21;
    const f = forecastScenario(model, draws, 0, H, WALK, 3);
    for (let d = 0; d < 30; d++) {
      const p = toNatural(model.layout, draws.subarray(d * model.layout.dim, (d + 1) * model.layout.dim));
      const a = 1 / p.latent_days;
      const g = 1 / p.infectious_days;
      for (let h = 0; h < H; h++) {
        const R = f.daily.effective_reproduction[d * H + h];
        const closed = (-(a + g) + Math.sqrt((a - g) ** 2 + 4 * a * g * R)) / 2;
        expect(Math.abs(f.daily.growth_rate[d * H + h] - closed)).toBeLessThan(1e-12 + 1e-9 * Math.abs(closed));
      }
    }
  });

  it("m = n = 2: matches the ODE's own simulated growth of daily infections in the early phase", () => {
    // With beta held and S ~ N, the SEIR system is linear and its daily infections grow by the
    // factor e^r per day once the initial transient has died out (the dominant eigenvalue;
    // MODEL.md section 6). Measured on the simulation itself: log(infections_{t+1} / infections_t).
    const { model, draws } = syntheticDraws({
      days: 40,
      population: 1e12, // no depletion to speak of over the 190 days
      draws: 12,
      seed: 31,
      reproduction: [0.75, 1.4],
      walkScale: 0.05,
      seedInfected: 20,
    });
    const H = 150;
    const f = forecastScenario(model, draws, 0, H, HOLD, 3);
    let checked = 0;
    for (let d = 0; d < 12; d++) {
      for (let h = H - 20; h < H - 1; h++) {
        const i = d * H + h;
        const simulated = Math.log(f.daily.infections[i + 1] / f.daily.infections[i]);
        // RK4 at 4 sub-steps a day leaves errors of order (h rate)^4 / 120 per day, about 1e-6 here
        expect(Math.abs(simulated - f.daily.growth_rate[i]), `draw ${d}, day ${h}`).toBeLessThan(2e-5);
        checked++;
      }
      // the growth rates span both signs over these draws
    }
    expect(checked).toBe(12 * 19);
    const signs = new Set(Array.from({ length: 12 }, (_, d) => Math.sign(f.daily.growth_rate[d * H + H - 1])));
    expect(signs).toEqual(new Set([-1, 1]));
  });
});
