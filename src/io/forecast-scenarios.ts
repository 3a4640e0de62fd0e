/**
 * Forecast scenario files: the futures that `waxwane forecast` (and `waxwane fit --horizon`)
 * compare side by side. A JSON object:
 *
 *     {
 *       "description": "free text",                       optional
 *       "scenarios": [                                     1 to 12 scenarios; the first is the
 *         { "name": "carry_on", "transmission": "walk" },  reference the others are compared to
 *         { "name": "hold", "transmission": "hold" },
 *         {
 *           "name": "cut_contacts",
 *           "description": "free text",                    optional
 *           "transmission": "walk",                        "walk" (default) or "hold"
 *           "measures": [                                  optional, applied in turn
 *             { "factor": 0.6, "from": "2031-08-10", "until": "2031-08-31" }
 *           ]
 *         }
 *       ]
 *     }
 *
 * - `transmission`: how beta moves past the last observed day. `walk` carries the random walk
 *   on log beta on (fresh steps at each new knot, the same steps in every scenario of a run, so
 *   scenarios differ only by what they state); `hold` keeps beta at its value on the last
 *   observed day.
 * - `measures`: each multiplies beta by `factor` (a positive number up to 10; 0.6 cuts
 *   transmission by 40%) from `from` to `until`, both dates included; without `until` the
 *   measure lasts to the end of the forecast, with it beta returns to the path afterwards (a
 *   relaxation). `from` may be left out: the first forecast day. Overlapping measures multiply.
 *   Dates must fall within the forecast: after the last observed day, not after the last
 *   forecast day (the measure would change nothing).
 * - `name`: a letter, then letters, digits, `_`, `-` or `.` (at most 40); unique in the file.
 *   It is the `scenario` column of the outputs.
 *
 * The same choices are available without a file through the options `--hold` (adds a scenario
 * "hold") and `--scale F [--from DATE] [--until DATE]` (adds a scenario "scaled": beta held at
 * its last value and multiplied by F over the dates); the first scenario is then always
 * "carry_on", the walk carried on. `--scale 1` therefore equals `--hold`.
 */
import { readFileSync } from 'node:fs';
import { WaxwaneError, inputError } from '../errors.js';
import { MAX_DAY, addDays, isoFromDay, parseIsoDate } from './dates.js';
import { readJsonDocument, shown } from './json.js';
import type { BetaChange, BetaScenario, TransmissionPath } from '../model/forecast.js';

/** Where a value came from, for messages: a field of a scenario file, or a command-line option. */
export interface Origin {
  file: string | null;
  field: string;
}

export interface MeasureSpec {
  factor: number;
  /** first day (ISO) the factor applies; null = the first forecast day */
  from: string | null;
  /** last day (ISO) the factor applies; null = the last forecast day */
  until: string | null;
  at: { factor: Origin; from: Origin; until: Origin };
}

export interface ScenarioSpec {
  name: string;
  description: string;
  transmission: TransmissionPath;
  measures: MeasureSpec[];
}

export interface ScenarioSet {
  /** the scenario file, or null for scenarios built from the command-line options */
  file: string | null;
  description: string;
  scenarios: ScenarioSpec[];
}

export const MAX_SCENARIOS = 12;
export const MAX_FACTOR = 10;
const NAME = /^[A-Za-z][A-Za-z0-9_.-]{0,39}$/;

type Json = unknown;
const isObject = (v: Json): v is Record<string, Json> => typeof v === 'object' && v !== null && !Array.isArray(v);

function originError(at: Origin, what: string, fix: string): WaxwaneError {
  return at.file === null ? new WaxwaneError(`${at.field}: ${what}; ${fix}`) : inputError({ file: at.file, field: at.field }, what, fix);
}

/** Reads and checks a scenario file (see the module notes for the format). */
export function readScenarioFile(file: string): ScenarioSet {
  let text: string;
  try {
    text = readFileSync(file, 'utf8');
  } catch (e) {
    const code = (e as NodeJS.ErrnoException).code ?? 'error';
    const why = code === 'ENOENT' ? 'no such file' : code === 'EISDIR' ? 'is a folder, not a file' : `cannot be read (${code})`;
    throw new WaxwaneError(`${file}: ${why}; give the path of a scenario file (see data-demo/scenarios/larkmere-measures.json)`);
  }
  return parseScenarioFile(text, file);
}

export function parseScenarioFile(text: string, file: string): ScenarioSet {
  const raw = readJsonDocument(text, file, {
    what: 'a forecast scenario file',
    emptyFix: 'write the scenarios there (copy data-demo/scenarios/larkmere-measures.json as a start)',
    layoutHint: 'see data-demo/scenarios/larkmere-measures.json for the layout',
  });
  const err = (field: string, what: string, fix: string) => inputError({ file, field }, what, fix);
  const topFields = ['$schema', '$comment', 'description', 'scenarios'];
  for (const k of Object.keys(raw)) {
    if (!topFields.includes(k)) throw err(k, 'unknown field', `allowed fields: ${topFields.join(', ')}`);
  }
  if (raw.description !== undefined && typeof raw.description !== 'string') {
    throw err('description', `must be text, got ${shown(raw.description)}`, 'write it in double quotes');
  }
  const list = raw.scenarios;
  if (!Array.isArray(list) || list.length === 0) {
    throw err('scenarios', `must be a non-empty list of scenarios, got ${shown(list)}`, 'list at least one scenario, e.g. [{"name": "carry_on"}]');
  }
  if (list.length > MAX_SCENARIOS) {
    throw err('scenarios', `lists ${list.length} scenarios, at most ${MAX_SCENARIOS} are allowed`, 'split them over several runs');
  }
  const names = new Set<string>();
  const scenarios = list.map((s: Json, i: number): ScenarioSpec => {
    const at = `scenarios[${i}]`;
    if (!isObject(s)) throw err(at, `must be an object {...}, got ${shown(s)}`, 'see the layout in data-demo/scenarios/larkmere-measures.json');
    const fields = ['name', 'description', 'transmission', 'measures'];
    for (const k of Object.keys(s)) {
      if (!fields.includes(k)) throw err(`${at}.${k}`, 'unknown field', `allowed fields: ${fields.join(', ')}`);
    }
    if (typeof s.name !== 'string' || !NAME.test(s.name)) {
      throw err(
        `${at}.name`,
        `must be a name of a letter followed by letters, digits, "_", "-" or "." (at most 40), got ${shown(s.name)}`,
        'e.g. "cut_contacts"',
      );
    }
    if (names.has(s.name)) throw err(`${at}.name`, `the name "${s.name}" is used twice`, 'give each scenario its own name');
    names.add(s.name);
    if (s.description !== undefined && typeof s.description !== 'string') {
      throw err(`${at}.description`, `must be text, got ${shown(s.description)}`, 'write it in double quotes');
    }
    const transmission = s.transmission ?? 'walk';
    if (transmission !== 'walk' && transmission !== 'hold') {
      throw err(`${at}.transmission`, `must be "walk" or "hold", got ${shown(transmission)}`, 'choose one of them');
    }
    const measures: MeasureSpec[] = [];
    if (s.measures !== undefined) {
      if (!Array.isArray(s.measures)) throw err(`${at}.measures`, `must be a list of measures, got ${shown(s.measures)}`, 'e.g. [{"factor": 0.7, "from": "2031-08-10"}]');
      s.measures.forEach((m: Json, j: number) => {
        const mat = `${at}.measures[${j}]`;
        if (!isObject(m)) throw err(mat, `must be an object {...}, got ${shown(m)}`, 'e.g. {"factor": 0.7, "from": "2031-08-10"}');
        for (const k of Object.keys(m)) {
          if (!['factor', 'from', 'until'].includes(k)) throw err(`${mat}.${k}`, 'unknown field', 'allowed fields: factor, from, until');
        }
        if (typeof m.factor !== 'number' || !(m.factor > 0) || !(m.factor <= MAX_FACTOR)) {
          throw err(`${mat}.factor`, `must be a number above 0 and at most ${MAX_FACTOR}, got ${shown(m.factor)}`, 'e.g. 0.7 for a 30% cut in transmission');
        }
        const date = (v: Json, k: string): string | null => {
          if (v === undefined || v === null) return null;
          if (typeof v !== 'string' || parseIsoDate(v) === null) {
            throw err(`${mat}.${k}`, `must be a date YYYY-MM-DD, got ${shown(v)}`, 'write the date as e.g. 2031-08-10');
          }
          return v;
        };
        const origin = (k: string): Origin => ({ file, field: `${mat}.${k}` });
        measures.push({
          factor: m.factor,
          from: date(m.from, 'from'),
          until: date(m.until, 'until'),
          at: { factor: origin('factor'), from: origin('from'), until: origin('until') },
        });
      });
    }
    return { name: s.name, description: typeof s.description === 'string' ? s.description : '', transmission, measures };
  });
  return { file, description: typeof raw.description === 'string' ? raw.description : '', scenarios };
}

export interface QuickScenarioOptions {
  hold?: boolean;
  scale?: number;
  from?: string;
  until?: string;
}

/**
 * Scenarios from the command-line options: "carry_on" (the walk carried on), then "hold" with
 * `--hold`, then "scaled" with `--scale F` (beta held and multiplied by F from `--from`, or the
 * first forecast day, to `--until`, or the last forecast day).
 *
 * @throws WaxwaneError for a date that is not YYYY-MM-DD, a factor out of range, or `--from` /
 *   `--until` without `--scale`.
 */
export function quickScenarios(o: QuickScenarioOptions): ScenarioSet {
  if (o.scale === undefined && (o.from !== undefined || o.until !== undefined)) {
    throw new WaxwaneError(`${o.from !== undefined ? '--from' : '--until'} is given without --scale; add --scale F (e.g. --scale 0.7), or drop it`);
  }
  const scenarios: ScenarioSpec[] = [{ name: 'carry_on', description: 'the random walk on log beta carried on', transmission: 'walk', measures: [] }];
  if (o.hold === true) scenarios.push({ name: 'hold', description: 'beta held at its last value', transmission: 'hold', measures: [] });
  if (o.scale !== undefined) {
    if (!(o.scale > 0) || !(o.scale <= MAX_FACTOR)) {
      throw new WaxwaneError(`--scale must be a number above 0 and at most ${MAX_FACTOR}, got ${o.scale}; e.g. --scale 0.7 for a 30% cut in transmission`);
    }
    for (const [opt, v] of [['--from', o.from], ['--until', o.until]] as const) {
      if (v !== undefined && parseIsoDate(v) === null) throw new WaxwaneError(`${opt} must be a date YYYY-MM-DD, got "${v}"; write it as e.g. 2031-08-10`);
    }
    const origin = (field: string): Origin => ({ file: null, field });
    scenarios.push({
      name: 'scaled',
      description: `beta held at its last value and multiplied by ${o.scale}${o.from !== undefined ? ` from ${o.from}` : ''}${o.until !== undefined ? ` until ${o.until}` : ''}`,
      transmission: 'hold',
      measures: [
        {
          factor: o.scale,
          from: o.from ?? null,
          until: o.until ?? null,
          at: { factor: origin(`--scale ${o.scale}`), from: origin(`--from ${o.from ?? ''}`), until: origin(`--until ${o.until ?? ''}`) },
        },
      ],
    });
  }
  return { file: null, description: '', scenarios };
}

export interface ResolvedScenario {
  name: string;
  description: string;
  beta: BetaScenario;
  /** the measures with their dates filled in, for the record */
  measures: Array<{ factor: number; from: string; until: string }>;
}

/**
 * Turns dates into simulated-day indices for a run whose first observed day is `firstDate`,
 * whose last observed day is `lastDate`, with `seedDays` seeding days and `horizon` forecast
 * days; checks that every measure falls within the forecast.
 */
export function resolveScenarios(
  set: ScenarioSet,
  firstDate: string,
  lastDate: string,
  seedDays: number,
  horizon: number,
): ResolvedScenario[] {
  const first = parseIsoDate(firstDate) as number;
  const last = parseIsoDate(lastDate) as number;
  if (last + horizon > MAX_DAY) {
    throw new WaxwaneError(
      `a ${horizon}-day forecast from ${lastDate} runs past ${isoFromDay(MAX_DAY)}, the last date waxwane handles; use a shorter --horizon`,
    );
  }
  const firstForecast = addDays(lastDate, 1);
  const lastForecast = addDays(lastDate, horizon);
  const toSim = (day: number) => seedDays + (day - first);
  return set.scenarios.map((s) => {
    const changes: BetaChange[] = [];
    const measures: ResolvedScenario['measures'] = [];
    for (const m of s.measures) {
      const from = m.from ?? firstForecast;
      const until = m.until ?? lastForecast;
      const fromDay = parseIsoDate(from) as number;
      const untilDay = parseIsoDate(until) as number;
      if (fromDay <= last) {
        throw originError(
          m.at.from,
          `the measure starts on ${from}, within the observed days (the last is ${lastDate}); what happened then is already in the data`,
          `start it on ${firstForecast} or later`,
        );
      }
      if (fromDay > last + horizon) {
        throw originError(
          m.at.from,
          `the measure starts on ${from}, after the last forecast day ${lastForecast} (horizon ${horizon} days), so it would change nothing`,
          'start it earlier or lengthen the horizon (--horizon)',
        );
      }
      if (untilDay < fromDay) {
        throw originError(m.at.until, `the measure ends on ${until}, before it starts (${from})`, 'give an end date on or after the start date');
      }
      changes.push({ factor: m.factor, first: toSim(fromDay), last: toSim(Math.min(untilDay, last + horizon)) });
      measures.push({ factor: m.factor, from, until });
    }
    return { name: s.name, description: s.description, beta: { transmission: s.transmission, changes }, measures };
  });
}
