/**
 * Bad input through the real command line: every row runs `waxwane fit` or `waxwane simulate`
 * as a child process and checks the contract of src/errors.ts and rule 5 of the project: exit
 * code 2, ONE message line starting with "waxwane:" that names the file (and the line and
 * column, or the field, where that applies) and says what to do, no stack trace, and no output
 * written (the output folder is not created; a folder that existed keeps exactly its content).
 *
 * About 65 short runs of the tool, about half a second of CPU each (nearly all of it start-up),
 * a few at a time.
 */
import { readdirSync, readFileSync, mkdirSync, writeFileSync } from 'node:fs';
import { join } from 'node:path';
import { describe, it, type ExpectStatic } from 'vitest';
import { listDir, makeTempDir, removeDir, runCli, toolLines, ROOT } from './helpers.js';

/** A small valid case file: 3 days, 12 cases in all. */
const GOOD_CASES = 'date,cases\n2031-02-03,3\n2031-02-04,5\n2031-02-05,4\n';
const TWO_REGIONS = 'date,cases,region\n2031-02-03,3,A\n2031-02-03,2,B\n2031-02-04,5,A\n2031-02-04,1,B\n';
const DEFAULT_PRIORS = readFileSync(join(ROOT, 'priors', 'default.json'), 'utf8');

/** The line commander prints after its own usage errors (main.ts: showHelpAfterError). */
const USAGE_HINT = '(run with --help for usage)';

/** What the output folder holds before the run. */
type OutBefore = 'absent' | 'empty' | 'nonempty';

interface Row {
  name: string;
  /** files written into the temporary working folder before the run */
  files: Record<string, string | Buffer>;
  /** arguments after `waxwane`; paths are relative to the working folder */
  args: string[];
  /** the one "waxwane:" line must match this */
  message: RegExp;
  /** commander's usage errors add the hint line */
  usage?: boolean;
  out?: OutBefore;
}

/** `waxwane fit FILE --population N --out out` plus `extra`. */
const fit = (file: string, population: string | null, ...extra: string[]): string[] => [
  'fit',
  file,
  ...(population === null ? [] : ['--population', population]),
  '--out',
  'out',
  ...extra,
];

const fitRows: Row[] = [
  {
    name: 'unparsable date',
    files: { 'cases.csv': 'date,cases\n2031-02-03,3\n03/02/2031,5\n' },
    args: fit('cases.csv', '1000'),
    message: /cases\.csv, line 3, column "date": "03\/02\/2031" is not an ISO date; write dates as YYYY-MM-DD/,
  },
  {
    name: 'date that is not in the calendar',
    files: { 'cases.csv': 'date,cases\n2031-02-03,3\n2031-02-30,5\n' },
    args: fit('cases.csv', '1000'),
    message: /cases\.csv, line 3, column "date": "2031-02-30" is not a real calendar date; correct the date/,
    out: 'empty',
  },
  {
    name: 'duplicated date (one place)',
    files: { 'cases.csv': 'date,cases\n2031-02-03,3\n2031-02-04,5\n2031-02-03,4\n' },
    args: fit('cases.csv', '1000'),
    message: /cases\.csv, line 4, column "date": date 2031-02-03 appears twice \(also on line 2\); keep one row per day/,
  },
  {
    name: 'duplicated date within a region (the same date in two regions is fine)',
    files: { 'cases.csv': `${TWO_REGIONS}2031-02-03,7,A\n` },
    args: fit('cases.csv', '1000', '--region', 'A'),
    message: /cases\.csv, line 6, column "date": date 2031-02-03 appears twice in region "A" \(also on line 2\); keep one row per day/,
  },
  {
    name: 'negative count',
    files: { 'cases.csv': 'date,cases\n2031-02-03,3\n2031-02-04,-2\n' },
    args: fit('cases.csv', '1000'),
    message: /cases\.csv, line 3, column "cases": the count "-2" is negative; correct it/,
    out: 'empty',
  },
  {
    name: 'fractional count',
    files: { 'cases.csv': 'date,cases\n2031-02-03,2.5\n' },
    args: fit('cases.csv', '1000'),
    message: /cases\.csv, line 2, column "cases": the count "2\.5" is not a whole number; write a whole number/,
  },
  {
    name: 'non-numeric count',
    files: { 'cases.csv': 'date,cases\n2031-02-03,3\n2031-02-04,NA\n' },
    args: fit('cases.csv', '1000'),
    message: /cases\.csv, line 3, column "cases": the count "NA" is not a number; write a whole number .*leave the cell blank/,
  },
  {
    name: 'empty file (0 bytes)',
    files: { 'cases.csv': '' },
    args: fit('cases.csv', '1000'),
    message: /cases\.csv: the file is empty; give a CSV file with a header line/,
  },
  {
    name: 'header only',
    files: { 'cases.csv': 'date,cases\n' },
    args: fit('cases.csv', '1000'),
    message: /cases\.csv: the file has a header but no data rows; add one row per day/,
  },
  {
    name: 'missing date column',
    files: { 'cases.csv': 'day,cases\n2031-02-03,3\n' },
    args: fit('cases.csv', '1000'),
    message: /cases\.csv, line 1, column "date": no date column named "date" \(columns found: "day", "cases"\); .*--date-column/,
  },
  {
    name: 'missing count column',
    files: { 'cases.csv': 'date,count\n2031-02-03,3\n' },
    args: fit('cases.csv', '1000'),
    message: /cases\.csv, line 1, column "cases": no count column named "cases" \(columns found: "date", "count"\); .*--count-column/,
  },
  {
    name: 'not CSV: binary bytes',
    // the first bytes of a PNG image
    files: { 'cases.csv': Buffer.from([0x89, 0x50, 0x4e, 0x47, 0x0d, 0x0a, 0x1a, 0x0a, 0, 0, 0, 0x0d, 0x49, 0x48, 0x44, 0x52]) },
    args: fit('cases.csv', '1000'),
    message: /cases\.csv: the file holds binary data, so it is not a CSV text file; give a plain-text CSV file/,
  },
  {
    name: 'not CSV: a JSON file',
    files: { 'cases.json': '[{"date": "2031-02-03", "cases": 3}]\n' },
    args: fit('cases.json', '1000'),
    message: /cases\.json, line 1: the file is JSON, not CSV; give a comma-separated file/,
  },
  {
    name: 'population smaller than the total cases',
    files: { 'cases.csv': GOOD_CASES },
    args: fit('cases.csv', '10'),
    message: /cases\.csv: the population \(10\) is smaller than the total reported cases \(12\); check the population/,
  },
  {
    name: 'population column smaller than the total cases of its region',
    files: { 'cases.csv': 'date,cases,population\n2031-02-03,3,4\n2031-02-04,5,4\n' },
    args: fit('cases.csv', null),
    message: /cases\.csv: the population \(4\) is smaller than the total reported cases \(8\); check the population/,
  },
  {
    name: 'population not a number',
    files: { 'cases.csv': GOOD_CASES },
    args: fit('cases.csv', 'many'),
    message: /--population must be a positive number, got "many"/,
    usage: true,
  },
  {
    name: 'population 0',
    files: { 'cases.csv': GOOD_CASES },
    args: fit('cases.csv', '0'),
    message: /--population must be a positive number, got "0"/,
    usage: true,
  },
  {
    name: 'population too small for the model to start (the fit itself refuses)',
    // passes the total-cases check; the prior seeds about 10 infections into 3 people
    files: { 'cases.csv': 'date,cases\n2031-02-03,1\n2031-02-04,2\n' },
    // (a short run, should the fit ever start)
    args: fit('cases.csv', '3', '--chains', '2', '--warmup', '100', '--draws', '10', '--threads', '1', '--quiet'),
    // the reason comes from the fit; the CLI adds the file and the population, and the fix
    // must point at the population
    message: /cases\.csv, population 3: [^;]+; .*population/,
  },
  {
    name: 'missing --population and no population column',
    files: { 'cases.csv': GOOD_CASES },
    args: fit('cases.csv', null),
    message: /cases\.csv: no population given; pass --population N or add a "population" column/,
  },
  {
    name: 'unknown option',
    files: { 'cases.csv': GOOD_CASES },
    args: fit('cases.csv', '1000', '--colour', 'red'),
    message: /unknown option '--colour'/,
    usage: true,
  },
  {
    name: '--chains 0',
    files: { 'cases.csv': GOOD_CASES },
    args: fit('cases.csv', '1000', '--chains', '0'),
    message: /--chains must be a whole number from 2 to 64, got "0"/,
    usage: true,
  },
  {
    name: '--draws abc',
    files: { 'cases.csv': GOOD_CASES },
    args: fit('cases.csv', '1000', '--draws', 'abc'),
    message: /--draws must be a whole number from 10 to \d+, got "abc"/,
    usage: true,
  },
  {
    name: '--quantiles 1.5',
    files: { 'cases.csv': GOOD_CASES },
    args: fit('cases.csv', '1000', '--quantiles', '1.5'),
    message: /--quantiles must be comma-separated levels between 0 and 1, e\.g\. 0\.05,0\.5,0\.95; got "1\.5"/,
    usage: true,
  },
  {
    name: 'missing --out',
    files: { 'cases.csv': GOOD_CASES },
    args: ['fit', 'cases.csv', '--population', '1000'],
    message: /required option '--out <dir>' not specified/,
    usage: true,
  },
  {
    name: 'unknown --region',
    files: { 'cases.csv': TWO_REGIONS },
    args: fit('cases.csv', '1000', '--region', 'Zed'),
    message: /cases\.csv: no region "Zed" in the file \(regions: A, B\); choose one of them with --region/,
  },
  {
    name: '--region for a file without a region column',
    files: { 'cases.csv': GOOD_CASES },
    args: fit('cases.csv', '1000', '--region', 'A'),
    message: /cases\.csv: --region "A" was given but the file has no region column; drop --region/,
  },
  {
    name: 'several regions without --region',
    files: { 'cases.csv': TWO_REGIONS },
    args: fit('cases.csv', '1000'),
    message: /cases\.csv: the file holds 2 regions \(A, B\); choose one with --region/,
  },
  {
    name: 'prior file with a negative scale',
    files: {
      'cases.csv': GOOD_CASES,
      'priors.json': DEFAULT_PRIORS.replace('"walk_scale": { "family": "half_normal", "scale": 0.15 }', '"walk_scale": { "family": "half_normal", "scale": -0.15 }'),
    },
    args: fit('cases.csv', '1000', '--priors', './priors.json'),
    message: /priors\.json, field "priors\.walk_scale\.scale": must be > 0, got -0\.15; change the value/,
  },
  {
    name: 'prior file that is not JSON',
    files: { 'cases.csv': GOOD_CASES, 'priors.json': '{\n  "name": "mine",\n  walk_scale: 0.1\n}\n' },
    args: fit('cases.csv', '1000', '--priors', './priors.json'),
    message: /priors\.json, line 3: invalid JSON at column 3: .*; fix the syntax there/,
  },
  {
    name: 'nonexistent prior name',
    files: { 'cases.csv': GOOD_CASES },
    args: fit('cases.csv', '1000', '--priors', 'nosuch'),
    message: /prior set "nosuch": no shipped set has that name \(shipped: .*default.*\); give one of those names/,
  },
  {
    name: 'nonexistent prior file',
    files: { 'cases.csv': GOOD_CASES },
    args: fit('cases.csv', '1000', '--priors', './nosuch.json'),
    message: /nosuch\.json: no such file; check the path, or name a shipped prior set/,
  },
  {
    name: 'nonexistent cases file',
    files: {},
    args: fit('missing.csv', '1000'),
    message: /missing\.csv: no such file; check the path of the case file/,
  },
  {
    name: 'non-empty output folder without --force',
    files: { 'cases.csv': GOOD_CASES },
    args: fit('cases.csv', '1000'),
    message: /out: the output folder is not empty .*; pass --force to write over its files, or choose another folder/,
    out: 'nonempty',
  },
  // prior files through the command line (each rule is checked in detail in test/io/priors.test.ts)
  {
    name: 'prior file with a NaN (JSON has none)',
    files: { 'cases.csv': GOOD_CASES, 'priors.json': DEFAULT_PRIORS.replace('"scale": 0.15', '"scale": NaN') },
    args: fit('cases.csv', '1000', '--priors', 'priors.json'),
    message: /priors\.json, line \d+: invalid JSON at column \d+: unexpected "N" where a value should be \(JSON has no NaN or Infinity\); fix the syntax there/,
  },
  {
    name: 'prior file with a negative median',
    files: { 'cases.csv': GOOD_CASES, 'priors.json': DEFAULT_PRIORS.replace('"median": 1.5', '"median": -1.5') },
    args: fit('cases.csv', '1000', '--priors', 'priors.json'),
    message: /priors\.json, field "priors\.start_reproduction\.median": must be > 0, got -1\.5; change the value/,
  },
  {
    name: 'prior file with a walk scale of 0',
    files: { 'cases.csv': GOOD_CASES, 'priors.json': DEFAULT_PRIORS.replace('"scale": 0.15', '"scale": 0') },
    args: fit('cases.csv', '1000', '--priors', 'priors.json'),
    message: /priors\.json, field "priors\.walk_scale\.scale": must be > 0, got 0; change the value/,
  },
  {
    name: 'prior file whose delay lies almost wholly beyond max_days',
    files: { 'cases.csv': GOOD_CASES, 'priors.json': DEFAULT_PRIORS.replace('"mean": 5, "sd": 3, "max_days": 21', '"mean": 97, "sd": 3, "max_days": 21') },
    args: fit('cases.csv', '1000', '--priors', 'priors.json'),
    message: /priors\.json, field "model\.delay\.max_days": the gamma delay with mean 97 and sd 3 keeps almost none of its probability within 0 to 21 days .*; raise max_days/,
  },
  // case files
  {
    name: 'UTF-16 case file',
    files: { 'cases.csv': Buffer.from('\ufeffdate,cases\n2031-02-03,3\n', 'utf16le') },
    args: fit('cases.csv', '1000'),
    message: /cases\.csv: the file is UTF-16 text; save it as CSV with UTF-8 encoding/,
  },
  {
    name: 'a spreadsheet workbook (zip) instead of CSV',
    files: { 'cases.xlsx': Buffer.from([0x50, 0x4b, 3, 4, 20, 0, 6, 0, 8, 0]) },
    args: fit('cases.xlsx', '1000'),
    message: /cases\.xlsx: the file is a zip archive .*, not CSV text; save the sheet as CSV/,
  },
  {
    name: 'count in exponent notation',
    files: { 'cases.csv': 'date,cases\n2031-02-03,1e3\n' },
    args: fit('cases.csv', '10000'),
    message: /cases\.csv, line 2, column "cases": the count "1e3" is in exponent notation; write it in plain digits/,
  },
  {
    name: 'every count blank',
    files: { 'cases.csv': 'date,cases\n2031-02-03,\n2031-02-04,\n' },
    args: fit('cases.csv', '1000'),
    message: /cases\.csv, column "cases": every count is blank; at least one day needs a reported count/,
  },
  // command-line options
  {
    name: '--population 1e999 (infinite)',
    files: { 'cases.csv': GOOD_CASES },
    args: fit('cases.csv', '1e999'),
    message: /--population must be a positive number, got "1e999"/,
    usage: true,
  },
  {
    name: '--population 1e300 (its outputs would overflow)',
    files: { 'cases.csv': GOOD_CASES },
    args: fit('cases.csv', '1e300'),
    message: /cases\.csv: the population \(1e\+300\) is above 1000000000000, more than a hundred times the world's; check the population/,
  },
  {
    name: '--date-column naming the count column',
    files: { 'cases.csv': GOOD_CASES },
    args: fit('cases.csv', '1000', '--date-column', 'cases'),
    message: /cases\.csv: the date column and the count column are both "cases"; choose different columns with --date-column and --count-column/,
  },
  {
    name: 'forecast --horizon 0',
    files: {},
    args: ['forecast', 'run', '--horizon', '0', '--out', 'out'],
    message: /--horizon must be a whole number from 1 to \d+, got "0"/,
    usage: true,
  },
];

/** A valid scenario: one place, 20 days; each row spoils one thing in a copy. */
const SCENARIO = {
  start_date: '2031-02-03',
  days: 20,
  places: [
    {
      name: 'Fenwick',
      population: 1000,
      seed_infected: 5,
      latent_days: 3,
      infectious_days: 5,
      ascertainment: 0.3,
      dispersion: 30,
      reproduction: [['2031-01-20', 1.5], ['2031-02-10', 1.1]],
    },
  ],
};
type Scenario = typeof SCENARIO & Record<string, unknown>;
type Place = Scenario['places'][number] & Record<string, unknown>;

function scenario(change: (s: Scenario, p: Place) => void): string {
  const s = structuredClone(SCENARIO) as Scenario;
  change(s, s.places[0] as Place);
  return JSON.stringify(s, null, 2);
}

const simulate = (file = 'scenario.json'): string[] => ['simulate', file, '--out', 'out', '--seed', '5'];

const simulateRows: Row[] = [
  {
    name: 'not JSON (a CSV file)',
    files: { 'scenario.json': 'date,cases\n2031-02-03,3\n' },
    args: simulate(),
    message: /scenario\.json, line 1: invalid JSON at column \d+: .*; fix the syntax there/,
  },
  {
    name: 'empty file',
    files: { 'scenario.json': '' },
    args: simulate(),
    message: /scenario\.json: the file is empty; write a scenario there/,
  },
  {
    name: 'unknown field',
    files: { 'scenario.json': scenario((s) => (s.duration = 20)) },
    args: simulate(),
    message: /scenario\.json, field "duration": unknown field; allowed fields: .*start_date/,
  },
  {
    name: 'unknown field in a place',
    files: { 'scenario.json': scenario((_, p) => (p.colour = 'red')) },
    args: simulate(),
    message: /scenario\.json, field "places\[0\]\.colour": unknown field; allowed fields: .*seed_infected/,
    out: 'empty',
  },
  {
    name: 'bad date',
    files: { 'scenario.json': scenario((s) => (s.start_date = '2031-02-30')) },
    args: simulate(),
    message: /scenario\.json, field "start_date": must be an ISO date YYYY-MM-DD, got "2031-02-30"; write the date/,
  },
  {
    name: 'reproduction dates not increasing',
    files: { 'scenario.json': scenario((_, p) => (p.reproduction = [['2031-02-10', 1.5], ['2031-02-10', 1.1]])) },
    args: simulate(),
    message: /scenario\.json, field "places\[0\]\.reproduction\[1\]\[0\]": dates must increase; list the dates in order/,
  },
  {
    name: 'population negative',
    files: { 'scenario.json': scenario((_, p) => (p.population = -1000)) },
    args: simulate(),
    message: /scenario\.json, field "places\[0\]\.population": must be a positive number, got -1000; correct the value/,
  },
  {
    name: 'seed_infected >= population',
    files: { 'scenario.json': scenario((_, p) => (p.seed_infected = 1000)) },
    args: simulate(),
    message: /scenario\.json, field "places\[0\]\.seed_infected": must be smaller than the population; lower it/,
  },
  {
    name: 'weekday_multipliers of the wrong length',
    files: { 'scenario.json': scenario((_, p) => (p.weekday_multipliers = [1, 1, 1, 1, 1, 0.8])) },
    args: simulate(),
    message: /scenario\.json, field "places\[0\]\.weekday_multipliers": must be 7 positive numbers, Monday to Sunday; give one per weekday/,
  },
  {
    name: '__proto__ key',
    files: { 'scenario.json': scenario(() => {}).replace('"places": [\n    {', '"places": [\n    {\n      "__proto__": { "population": 5 },') },
    args: simulate(),
    message: /scenario\.json, field "places\[0\]\.__proto__": the key "__proto__" is not allowed .*; remove it/,
  },
  {
    name: 'dates running past 9999-12-31',
    files: { 'scenario.json': scenario((s) => ((s.start_date = '9999-12-01'), (s.days = 60))) },
    args: simulate(),
    message: /scenario\.json, field "days": 60 days from start_date 9999-12-01 run past 9999-12-31; choose an earlier start_date or fewer days/,
  },
  {
    name: 'an epidemic too fast for the time step (the simulator itself refuses)',
    files: {
      'scenario.json': scenario((s, p) => {
        (s as Record<string, unknown>).model = { substeps: 1 };
        Object.assign(p, { seed_infected: 500, latent_days: 0.01, infectious_days: 0.05, reproduction: [['2031-01-20', 99]] });
      }),
    },
    // the folders the run made before it failed are removed again (checked: the working
    // folder holds nothing but the scenario afterwards)
    args: ['simulate', 'scenario.json', '--out', 'made/by/this/run'],
    message: /scenario\.json, field "places\[0\]": the epidemic of "Fenwick" cannot be simulated .*; raise model\.substeps, or lengthen latent_days and infectious_days/,
  },
  {
    name: 'a NaN (JSON has none)',
    files: { 'scenario.json': scenario(() => {}).replace('"dispersion": 30', '"dispersion": NaN') },
    args: simulate(),
    message: /scenario\.json, line \d+: invalid JSON at column \d+: unexpected "N" where a value should be \(JSON has no NaN or Infinity\)/,
  },
  {
    name: 'weekday multipliers a million times apart',
    files: { 'scenario.json': scenario((_, p) => (p.weekday_multipliers = [1e6, 1, 1, 1, 1, 1, 1e-6])) },
    args: simulate(),
    message: /scenario\.json, field "places\[0\]\.weekday_multipliers": the largest multiplier is more than 100 times the smallest; give multipliers of similar size/,
  },
  {
    name: 'a population too large for exact counts',
    files: { 'scenario.json': scenario((_, p) => ((p.population = 1e15), (p.seed_infected = 5))) },
    args: simulate(),
    message: /scenario\.json, field "places\[0\]\.population": must be at most 1000000000000, got 1000000000000000 \(larger counts could not be written exactly\); lower it/,
  },
  {
    name: 'a delay lying beyond max_days',
    files: { 'scenario.json': scenario((s) => ((s as Record<string, unknown>).model = { delay: { family: 'gamma', mean: 40, sd: 2, max_days: 10 } })) },
    args: simulate(),
    message: /scenario\.json, field "model\.delay\.max_days": the gamma delay with mean 40 and sd 2 keeps almost none of its probability within 0 to 10 days/,
  },
  {
    name: 'nonexistent scenario file',
    files: {},
    args: simulate('nosuch.json'),
    message: /nosuch\.json: cannot read the scenario file \(ENOENT\); check the path/,
  },
  {
    name: 'non-empty output folder without --force',
    files: { 'scenario.json': scenario(() => {}) },
    args: simulate(),
    message: /out: the output folder is not empty .*; pass --force/,
    out: 'nonempty',
  },
];

/** Content of the output folder when the row says it exists before the run. */
const OLD_CONTENT = { 'summary.csv': 'an earlier result, to be kept\n', 'notes.txt': 'mine\n' };

/** Runs one row in its own temporary folder; the rows run a few at a time (it.concurrent). */
async function check(row: Row, expect: ExpectStatic): Promise<void> {
  const work = makeTempDir('waxwane-bad-');
  try {
    await checkIn(work, row, expect);
  } finally {
    removeDir(work);
  }
}

async function checkIn(work: string, row: Row, expect: ExpectStatic): Promise<void> {
  for (const [name, content] of Object.entries(row.files)) writeFileSync(join(work, name), content);
  const out = join(work, 'out');
  const before = row.out ?? 'absent';
  if (before !== 'absent') mkdirSync(out);
  if (before === 'nonempty') for (const [name, content] of Object.entries(OLD_CONTENT)) writeFileSync(join(out, name), content);

  const r = await runCli(row.args, { cwd: work });

  expect(r.code, r.stderr).toBe(2);
  expect(r.stdout).toBe('');
  // one line, no stack trace
  expect(r.stderr).not.toMatch(/^\s+at /m);
  const lines = toolLines(r.stderr);
  expect(lines, r.stderr).toHaveLength(1);
  expect(lines[0]).toMatch(row.message);
  const others = r.stderr.split('\n').filter((l) => l !== '' && !l.startsWith('waxwane:'));
  expect(others, r.stderr).toEqual(row.usage === true ? [USAGE_HINT] : []);
  // no output written
  if (before === 'absent') expect(listDir(out)).toBeNull();
  if (before === 'empty') expect(listDir(out)).toEqual([]);
  if (before === 'nonempty') {
    expect(listDir(out)).toEqual(Object.keys(OLD_CONTENT).sort());
    for (const [name, content] of Object.entries(OLD_CONTENT)) expect(readFileSync(join(out, name), 'utf8')).toBe(content);
  }
  // nothing else appeared in the working folder either (no stray temporary files)
  expect(readdirSync(work).sort()).toEqual([...Object.keys(row.files), ...(before === 'absent' ? [] : ['out'])].sort());
}

describe('waxwane fit with bad input', () => {
  it.concurrent.for(fitRows)('$name: exit 2, one line, no output', (row, { expect }) => check(row, expect));
});

describe('waxwane simulate with a bad scenario', () => {
  it.concurrent.for(simulateRows)('$name: exit 2, one line, no output', (row, { expect }) => check(row, expect));
});
