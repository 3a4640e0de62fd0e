/**
 * Simulation scenario files: what `waxwane simulate` reads. A JSON object:
 *
 *     {
 *       "description": "free text",
 *       "start_date": "2031-02-03",          first reported day (ISO)
 *       "days": 180,                          reported days
 *       "model": { ... },                     optional: overrides of the default model settings
 *                                             (latent_stages, infectious_stages, substeps,
 *                                             seed_days, delay {family, mean, sd, max_days})
 *       "places": [                           one or more places; several give a region column
 *         {
 *           "name": "Larkmere",
 *           "population": 250000,
 *           "seed_infected": 20,              infected at the start of the seeding period
 *           "latent_days": 3, "infectious_days": 5,
 *           "ascertainment": 0.3,             share of onsets ever reported
 *           "dispersion": 30,                 negative-binomial phi
 *           "weekday_multipliers": [1.1, 1.1, 1.05, 1, 1, 0.85, 0.9],   optional, Monday..Sunday
 *           "reproduction": [["2031-01-20", 1.9], ["2031-03-10", 1.9], ["2031-03-17", 0.8]],
 *           "interpolation": "linear"         or "step": how R0 moves between the dates
 *         }
 *       ]
 *     }
 *
 * `reproduction` is the basic reproduction number beta(t) * D over dates: before the first date
 * it holds the first value, after the last date the last value. Weekday multipliers are scaled
 * to a geometric mean of 1, as the model's weekday effects are; the largest may be at most
 * {@link MAX_WEEKDAY_RATIO} times the smallest. A population is at most
 * {@link MAX_SIM_POPULATION}, and the delay must keep at least half of its distribution within
 * 0..max_days (io/delay-check.ts), so that every simulated count is exact and readable by `fit`.
 */
import { readFileSync } from 'node:fs';
import { WaxwaneError, inputError } from '../errors.js';
import type { ModelSettings } from '../model/prior-set.js';
import { MAX_POPULATION } from './cases.js';
import { parseIsoDate } from './dates.js';
import { readJsonDocument } from './json.js';
import { checkDelay } from './delay-check.js';

export interface SimPlace {
  name: string;
  population: number;
  seed_infected: number;
  latent_days: number;
  infectious_days: number;
  ascertainment: number;
  dispersion: number;
  weekday_multipliers: number[] | null;
  reproduction: Array<[string, number]>;
  interpolation: 'linear' | 'step';
}

export interface SimScenario {
  description: string;
  start_date: string;
  days: number;
  model: ModelSettings;
  places: SimPlace[];
}

export const DEFAULT_SIM_MODEL: ModelSettings = {
  latent_stages: 2,
  infectious_stages: 2,
  substeps: 4,
  seed_days: 14,
  knot_days: 7,
  interpolation: 'step',
  delay: { family: 'gamma', mean: 5, sd: 3, max_days: 21 },
  weekday_effect: false,
};

/**
 * Largest population of a place, the one `waxwane fit` accepts: counts above 2^53 could not be
 * written exactly, nor read back; at this bound the expected daily counts (at most about 52
 * times the population) stay well below that.
 */
export const MAX_SIM_POPULATION = MAX_POPULATION;
/** Largest ratio between two weekday multipliers (after scaling they stay between 1/52 and 52). */
export const MAX_WEEKDAY_RATIO = 100;

type Json = unknown;
const isObject = (v: Json): v is Record<string, Json> => typeof v === 'object' && v !== null && !Array.isArray(v);

export function readSimScenario(file: string): SimScenario {
  let text: string;
  try {
    text = readFileSync(file, 'utf8');
  } catch (e) {
    throw new WaxwaneError(`${file}: cannot read the scenario file (${(e as NodeJS.ErrnoException).code ?? 'error'}); check the path`);
  }
  return parseSimScenario(text, file);
}

export function parseSimScenario(text: string, file: string): SimScenario {
  const raw: Record<string, Json> = readJsonDocument(text, file, {
    what: 'a simulation scenario',
    emptyFix: 'write a scenario there (copy data-demo/scenarios/larkmere.json as a start)',
    layoutHint: 'see data-demo/scenarios/larkmere.json for the layout',
  });
  const err = (field: string, what: string, fix: string) => inputError({ file, field }, what, fix);
  const allowed = ['$schema', '$comment', 'description', 'start_date', 'days', 'model', 'places'];
  for (const k of Object.keys(raw)) {
    if (!allowed.includes(k)) throw err(k, 'unknown field', `allowed fields: ${allowed.join(', ')}`);
  }
  const num = (v: Json, field: string, rule: (x: number) => boolean, ruleText: string): number => {
    if (typeof v !== 'number' || !Number.isFinite(v) || !rule(v)) {
      throw err(field, `must be ${ruleText}, got ${JSON.stringify(v)}`, 'correct the value');
    }
    return v;
  };
  const date = (v: Json, field: string): string => {
    if (typeof v !== 'string' || parseIsoDate(v) === null) {
      throw err(field, `must be an ISO date YYYY-MM-DD, got ${JSON.stringify(v)}`, 'write the date as e.g. 2031-02-03');
    }
    return v;
  };
  const description = typeof raw.description === 'string' ? raw.description : '';
  const start_date = date(raw.start_date, 'start_date');
  const days = num(raw.days, 'days', (x) => Number.isInteger(x) && x >= 1 && x <= 20000, 'a whole number of days from 1 to 20000');

  const model: ModelSettings = { ...DEFAULT_SIM_MODEL, delay: { ...DEFAULT_SIM_MODEL.delay } };
  if (raw.model !== undefined) {
    if (!isObject(raw.model)) throw err('model', 'must be an object', 'see the format in the README');
    const m = raw.model;
    const intIn = (k: string, lo: number, hi: number) =>
      num(m[k], `model.${k}`, (x) => Number.isInteger(x) && x >= lo && x <= hi, `a whole number from ${lo} to ${hi}`);
    for (const k of Object.keys(m)) {
      if (!['latent_stages', 'infectious_stages', 'substeps', 'seed_days', 'delay'].includes(k)) {
        throw err(`model.${k}`, 'unknown field', 'allowed: latent_stages, infectious_stages, substeps, seed_days, delay');
      }
    }
    if (m.latent_stages !== undefined) model.latent_stages = intIn('latent_stages', 1, 8);
    if (m.infectious_stages !== undefined) model.infectious_stages = intIn('infectious_stages', 1, 8);
    if (m.substeps !== undefined) model.substeps = intIn('substeps', 1, 64);
    if (m.seed_days !== undefined) model.seed_days = intIn('seed_days', 0, 120);
    if (m.delay !== undefined) {
      const d = m.delay;
      if (!isObject(d)) throw err('model.delay', 'must be an object', 'give family, mean, sd, max_days');
      if (d.family !== 'gamma' && d.family !== 'lognormal') {
        throw err('model.delay.family', `must be "gamma" or "lognormal", got ${JSON.stringify(d.family)}`, 'choose one of them');
      }
      model.delay = {
        family: d.family,
        mean: num(d.mean, 'model.delay.mean', (x) => x > 0, 'a positive number of days'),
        sd: num(d.sd, 'model.delay.sd', (x) => x > 0, 'a positive number of days'),
        max_days: num(d.max_days, 'model.delay.max_days', (x) => Number.isInteger(x) && x >= 1 && x <= 60, 'a whole number from 1 to 60'),
      };
      checkDelay(model.delay, file, 'model.delay');
    }
  }

  if (!Array.isArray(raw.places) || raw.places.length === 0) {
    throw err('places', 'must be a non-empty array of places', 'add at least one place');
  }
  const names = new Set<string>();
  const places = raw.places.map((p: Json, i: number): SimPlace => {
    const at = `places[${i}]`;
    if (!isObject(p)) throw err(at, 'must be an object', 'see the format in the README');
    const placeFields = [
      'name', 'population', 'seed_infected', 'latent_days', 'infectious_days', 'ascertainment',
      'dispersion', 'weekday_multipliers', 'reproduction', 'interpolation',
    ];
    for (const k of Object.keys(p)) {
      if (!placeFields.includes(k)) throw err(`${at}.${k}`, 'unknown field', `allowed fields: ${placeFields.join(', ')}`);
    }
    if (typeof p.name !== 'string' || p.name.trim() === '') throw err(`${at}.name`, 'must be a non-empty text', 'name the place');
    if (names.has(p.name)) throw err(`${at}.name`, `duplicate place name "${p.name}"`, 'give each place its own name');
    names.add(p.name);
    const pos = (k: string) => num(p[k], `${at}.${k}`, (x) => x > 0, 'a positive number');
    const population = pos('population');
    if (population > MAX_SIM_POPULATION) {
      throw err(`${at}.population`, `must be at most ${MAX_SIM_POPULATION}, got ${population} (larger counts could not be written exactly)`, 'lower it');
    }
    const seed_infected = pos('seed_infected');
    if (seed_infected >= population) throw err(`${at}.seed_infected`, 'must be smaller than the population', 'lower it');
    const ascertainment = num(p.ascertainment, `${at}.ascertainment`, (x) => x > 0 && x <= 1, 'a share in (0, 1]');
    let weekday_multipliers: number[] | null = null;
    if (p.weekday_multipliers !== undefined && p.weekday_multipliers !== null) {
      const w = p.weekday_multipliers;
      if (!Array.isArray(w) || w.length !== 7) {
        throw err(`${at}.weekday_multipliers`, 'must be 7 positive numbers, Monday to Sunday', 'give one per weekday');
      }
      const vals = w.map((x: Json, j: number) => num(x, `${at}.weekday_multipliers[${j}]`, (v) => v > 0, 'a positive number'));
      if (Math.max(...vals) > MAX_WEEKDAY_RATIO * Math.min(...vals)) {
        throw err(
          `${at}.weekday_multipliers`,
          `the largest multiplier is more than ${MAX_WEEKDAY_RATIO} times the smallest`,
          'give multipliers of similar size (they are relative: 1.2 and 0.8, not 1e6 and 1e-6)',
        );
      }
      const gm = Math.exp(vals.reduce((a: number, v: number) => a + Math.log(v), 0) / 7);
      weekday_multipliers = vals.map((v: number) => v / gm);
    }
    if (!Array.isArray(p.reproduction) || p.reproduction.length === 0) {
      throw err(`${at}.reproduction`, 'must be a non-empty array of [date, R0] pairs', 'e.g. [["2031-02-01", 1.8]]');
    }
    let prevDay = -Infinity;
    const reproduction = p.reproduction.map((pair: Json, j: number): [string, number] => {
      const f = `${at}.reproduction[${j}]`;
      if (!Array.isArray(pair) || pair.length !== 2) throw err(f, 'must be a [date, R0] pair', 'e.g. ["2031-02-01", 1.8]');
      const d = date(pair[0], `${f}[0]`);
      const day = parseIsoDate(d) as number;
      if (day <= prevDay) throw err(`${f}[0]`, 'dates must increase', 'list the dates in order, each once');
      prevDay = day;
      return [d, num(pair[1], `${f}[1]`, (x) => x > 0 && x < 100, 'a reproduction number in (0, 100)')];
    });
    const interpolation = p.interpolation ?? 'linear';
    if (interpolation !== 'linear' && interpolation !== 'step') {
      throw err(`${at}.interpolation`, `must be "linear" or "step", got ${JSON.stringify(interpolation)}`, 'choose one');
    }
    return {
      name: p.name,
      population,
      seed_infected,
      latent_days: pos('latent_days'),
      infectious_days: pos('infectious_days'),
      ascertainment,
      dispersion: pos('dispersion'),
      weekday_multipliers,
      reproduction,
      interpolation,
    };
  });
  return { description, start_date, days, model, places };
}
