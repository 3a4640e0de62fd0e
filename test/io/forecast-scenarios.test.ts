import { describe, it, expect } from 'vitest';
import { fileURLToPath } from 'node:url';
import { WaxwaneError } from '../../src/errors.js';
import { parseScenarioFile, quickScenarios, readScenarioFile, resolveScenarios } from '../../src/io/forecast-scenarios.js';

const FILE = 'measures.json';
const FIRST = '2031-02-03';
const LAST = '2031-08-03'; // 182 observed days
const SEED_DAYS = 14;
/** simulated-day index of an ISO date */
const sim = (offsetFromFirst: number) => SEED_DAYS + offsetFromFirst;

function refused(text: string, pattern: RegExp): void {
  let error: unknown;
  try {
    parseScenarioFile(text, FILE);
  } catch (e) {
    error = e;
  }
  expect(error).toBeInstanceOf(WaxwaneError);
  expect((error as WaxwaneError).message).toMatch(/^measures\.json/);
  expect((error as WaxwaneError).message).toMatch(pattern);
}

describe('parseScenarioFile', () => {
  it('reads names, paths and measures; transmission defaults to the walk', () => {
    const set = parseScenarioFile(
      JSON.stringify({
        description: 'two futures',
        scenarios: [
          { name: 'carry_on' },
          { name: 'cut.2', transmission: 'hold', measures: [{ factor: 0.6, from: '2031-08-10', until: '2031-08-20' }, { factor: 0.9 }] },
        ],
      }),
      FILE,
    );
    expect(set.description).toBe('two futures');
    expect(set.scenarios.map((s) => [s.name, s.transmission, s.measures.length])).toEqual([
      ['carry_on', 'walk', 0],
      ['cut.2', 'hold', 2],
    ]);
    expect(set.scenarios[1]!.measures[1]).toMatchObject({ factor: 0.9, from: null, until: null });
  });

  it('refuses what it cannot use, naming the field', () => {
    refused('{"scenarios": []}', /field "scenarios".*non-empty/);
    refused('{"scenarios": [{"name": "a"}], "horizon": 3}', /field "horizon": unknown field/);
    refused('{"scenarios": [{"name": "1a"}]}', /scenarios\[0\]\.name/);
    refused('{"scenarios": [{"name": "a"}, {"name": "a"}]}', /scenarios\[1\]\.name.*used twice/);
    refused('{"scenarios": [{"name": "a", "transmission": "flat"}]}', /scenarios\[0\]\.transmission.*"walk" or "hold"/);
    refused('{"scenarios": [{"name": "a", "measures": [{"factor": 0}]}]}', /measures\[0\]\.factor.*above 0/);
    refused('{"scenarios": [{"name": "a", "measures": [{"factor": 11}]}]}', /measures\[0\]\.factor.*at most 10/);
    refused('{"scenarios": [{"name": "a", "measures": [{"factor": 0.5, "from": "10/08/2031"}]}]}', /measures\[0\]\.from.*YYYY-MM-DD/);
    refused('{"scenarios": [{"name": "a", "measures": [{"factor": 0.5, "start": "2031-08-10"}]}]}', /measures\[0\]\.start": unknown field/);
    refused(`{"scenarios": [${Array.from({ length: 13 }, (_, i) => `{"name": "s${i}"}`).join(',')}]}`, /at most 12/);
    refused('{"scenarios": [{"name": "a"}],}', /line 1.*trailing comma/);
  });

  it('reads the demo scenario file', () => {
    const set = readScenarioFile(fileURLToPath(new URL('../../data-demo/scenarios/larkmere-measures.json', import.meta.url)));
    expect(set.scenarios.length).toBe(2);
    const resolved = resolveScenarios(set, FIRST, LAST, SEED_DAYS, 28);
    expect(resolved).toHaveLength(2);
  });
});

describe('quickScenarios', () => {
  it('always starts with the walk carried on, then hold, then the scaled one', () => {
    expect(quickScenarios({}).scenarios.map((s) => s.name)).toEqual(['carry_on']);
    const set = quickScenarios({ hold: true, scale: 0.5, from: '2031-08-10' });
    expect(set.scenarios.map((s) => [s.name, s.transmission])).toEqual([
      ['carry_on', 'walk'],
      ['hold', 'hold'],
      ['scaled', 'hold'],
    ]);
    expect(set.scenarios[2]!.measures[0]).toMatchObject({ factor: 0.5, from: '2031-08-10', until: null });
  });

  it('refuses --from or --until without --scale, bad dates and factors', () => {
    expect(() => quickScenarios({ from: '2031-08-10' })).toThrow(/--from is given without --scale/);
    expect(() => quickScenarios({ until: '2031-08-10' })).toThrow(/--until is given without --scale/);
    expect(() => quickScenarios({ scale: 0.5, from: '2031-8-10' })).toThrow(/--from must be a date/);
    expect(() => quickScenarios({ scale: 20 })).toThrow(/--scale must be a number above 0 and at most 10/);
  });
});

describe('resolveScenarios', () => {
  it('maps dates to simulated days, both ends included; open ends are the forecast ends', () => {
    const set = quickScenarios({ scale: 0.5, from: '2031-08-10', until: '2031-08-12' });
    const [walk, scaled] = resolveScenarios(set, FIRST, LAST, SEED_DAYS, 28);
    expect(walk!.beta).toEqual({ transmission: 'walk', changes: [] });
    // 2031-08-10 is 188 days after 2031-02-03
    expect(scaled!.beta.changes).toEqual([{ factor: 0.5, first: sim(188), last: sim(190) }]);
    const open = resolveScenarios(quickScenarios({ scale: 0.8 }), FIRST, LAST, SEED_DAYS, 28)[1]!;
    expect(open.beta.changes).toEqual([{ factor: 0.8, first: sim(182), last: sim(182 + 27) }]);
    expect(open.measures).toEqual([{ factor: 0.8, from: '2031-08-04', until: '2031-08-31' }]);
    // an end past the horizon is cut at the last forecast day
    const long = resolveScenarios(quickScenarios({ scale: 0.8, until: '2031-12-01' }), FIRST, LAST, SEED_DAYS, 28)[1]!;
    expect(long.beta.changes[0]!.last).toBe(sim(182 + 27));
  });

  it('refuses measures outside the forecast or ending before they start', () => {
    const at = (o: Parameters<typeof quickScenarios>[0]) => () => resolveScenarios(quickScenarios(o), FIRST, LAST, SEED_DAYS, 28);
    expect(at({ scale: 0.5, from: '2031-08-03' })).toThrow(/--from 2031-08-03: the measure starts on 2031-08-03, within the observed days.*start it on 2031-08-04/);
    expect(at({ scale: 0.5, from: '2031-09-01' })).toThrow(/after the last forecast day 2031-08-31/);
    expect(at({ scale: 0.5, from: '2031-08-10', until: '2031-08-09' })).toThrow(/--until 2031-08-09: the measure ends on 2031-08-09, before it starts/);
    const file = parseScenarioFile('{"scenarios": [{"name": "a", "measures": [{"factor": 0.5, "from": "2031-07-01"}]}]}', FILE);
    expect(() => resolveScenarios(file, FIRST, LAST, SEED_DAYS, 28)).toThrow(/^measures\.json, field "scenarios\[0\]\.measures\[0\]\.from": the measure starts/);
  });
});
