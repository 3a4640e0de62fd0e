/**
 * Edge cases through the real command line (`node bin/waxwane.js`, built into dist/): inputs
 * that are legal but extreme must either work (exit 0, every output written, no NaN in
 * summary.csv or draws.csv) or fail clearly (exit 2, one "waxwane:" line); never a stack trace,
 * never an internal error. The edge cases that must fail clearly (a NaN or a negative value in
 * a prior file, a walk scale of 0, `forecast --horizon 0`) are rows of bad-inputs.test.ts. Also
 * here: shell metacharacters in file and region names, prototype keys, and what an unexpected
 * internal error prints and logs.
 *
 * The fits are SHORT (2 chains, 100 warm-up, 30 draws, 1 thread): only whether the tool copes
 * is checked here, not the estimates.
 */
import { spawn } from 'node:child_process';
import { mkdirSync, readFileSync, readdirSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join, relative, resolve } from 'node:path';
import { pathToFileURL } from 'node:url';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { TEMP_PREFIX } from '../../src/io/atomic.js';
import { BIN, makeTempDir, removeDir, ROOT, runCli, toolLines, type RunResult } from './helpers.js';

const SHORT = ['--chains', '2', '--warmup', '100', '--draws', '30', '--thin', '1', '--threads', '1', '--seed', '11', '--quiet'];
const OUTPUTS = ['data.csv', 'diagnostics.csv', 'draws.csv', 'run.json', 'summary.csv'];

let work: string;
beforeAll(() => {
  work = makeTempDir('waxwane-edge-');
});
afterAll(() => removeDir(work));

/** A case file of consecutive days from 2031-02-03 with the given counts. */
function casesCsv(counts: readonly number[]): string {
  const day0 = Date.UTC(2031, 1, 3);
  const rows = counts.map((c, i) => `${new Date(day0 + i * 86_400_000).toISOString().slice(0, 10)},${c}`);
  return `date,cases\n${rows.join('\n')}\n`;
}

/** Writes `files` into a fresh folder under `work`; returns the folder. */
function folder(name: string, files: Record<string, string>): string {
  const dir = join(work, name);
  mkdirSync(dir, { recursive: true });
  for (const [f, text] of Object.entries(files)) writeFileSync(join(dir, f), text);
  return dir;
}

/** The one-line contract of every run: no stack trace, no internal error. */
function expectNoCrash(r: RunResult): void {
  expect(r.stderr, r.stderr).not.toMatch(/^\s+at /m);
  expect(r.stderr, r.stderr).not.toMatch(/internal error/i);
  expect(r.stdout).toBe('');
}

/** Numbers of a CSV file's body (header dropped) that are not finite, with their row. */
function nonFinite(file: string, skipColumns: number): string[] {
  const lines = readFileSync(file, 'utf8').trimEnd().split('\n').slice(1);
  const bad: string[] = [];
  for (const line of lines) {
    const cells = line.split(',').slice(skipColumns);
    if (cells.some((c) => !Number.isFinite(Number(c)))) bad.push(line);
  }
  return bad;
}

interface Works {
  name: string;
  counts: number[];
  population: string;
  extra?: string[];
}

/** Inputs that must give a complete fit. */
const WORKS: Works[] = [
  { name: 'all-zero counts (40 days)', counts: new Array(40).fill(0), population: '10000' },
  { name: 'a single day of data', counts: [12], population: '50000' },
  // 10 kept draws a chain: some diagnostics can be undefined (NaN), which must then be said
  { name: 'a single day of data, 10 draws per chain', counts: [12], population: '50000', extra: ['--draws', '10', '--seed', '1'] },
  {
    name: 'counts of 10 million a day (population 1e9)',
    counts: Array.from({ length: 30 }, (_, i) => Math.round(1e7 * Math.exp(0.01 * (i - 15)))),
    population: '1000000000',
  },
  // 1e9 is the population of the row above; 1e12 is the largest accepted (src/io/cases.ts)
  { name: 'a population of 1e12 and small counts', counts: [3, 5, 4, 8, 6, 9, 12, 10, 15, 14, 20, 18, 25, 24], population: '1e12' },
  // the default delay runs to 21 days and 14 seeding days precede the data; --horizon 0 is the
  // default (no forecast) written out
  { name: 'data shorter than the delay window (10 days), --horizon 0', counts: [2, 4, 3, 6, 5, 8, 9, 7, 12, 11], population: '100000', extra: ['--horizon', '0'] },
];

describe('waxwane fit on extreme but legal data: works', () => {
  it.concurrent.for(WORKS)('$name', async (row, { expect }) => {
    const dir = folder(row.name.replace(/\W+/g, '-'), { 'cases.csv': casesCsv(row.counts) });
    const r = await runCli(['fit', 'cases.csv', '--population', row.population, '--out', 'out', ...SHORT, ...(row.extra ?? [])], { cwd: dir });
    expectNoCrash(r);
    expect(r.code, r.stderr).toBe(0);
    const out = join(dir, 'out');
    // the outputs of every fit (other commands' files, e.g. a report, may join them), and no
    // temporary file left over
    const files = readdirSync(out);
    expect(files).toEqual(expect.arrayContaining(OUTPUTS));
    expect(files.filter((f) => f.startsWith(TEMP_PREFIX))).toEqual([]);
    // every mean, sd and quantile of summary.csv, and every draw, is a finite number
    expect(nonFinite(join(out, 'summary.csv'), 2)).toEqual([]);
    expect(nonFinite(join(out, 'draws.csv'), 0)).toEqual([]);
    const run = JSON.parse(readFileSync(join(out, 'run.json'), 'utf8')) as {
      input: { days: number };
      warnings: string[];
      max_rhat: number | null;
      min_ess_bulk: number | null;
      min_ess_tail: number | null;
    };
    expect(run.input.days).toBe(row.counts.length);
    // diagnostics may be undefined (too few draws, a chain that barely moved): then
    // diagnostics.csv says "NaN", and run.json (where JSON writes null) and the terminal say why
    const diagnostics = readFileSync(join(out, 'diagnostics.csv'), 'utf8').trimEnd().split('\n').slice(1);
    for (const line of diagnostics) for (const cell of line.split(',').slice(1)) expect(cell === 'NaN' || Number.isFinite(Number(cell)), line).toBe(true);
    const said = /convergence diagnostics undefined \(NaN in diagnostics\.csv, null in run\.json\) for [^:]+: /;
    if (diagnostics.some((l) => l.includes('NaN'))) {
      expect(run.warnings.join('\n')).toMatch(said);
      expect(r.stderr).toMatch(new RegExp(`warning: ${said.source}`));
    } else {
      for (const v of [run.max_rhat, run.min_ess_bulk, run.min_ess_tail]) expect(Number.isFinite(v)).toBe(true);
      expect(r.stderr).not.toMatch(said);
    }
  });
});

describe('safety', () => {
  /** Source files under `dir` (relative to the root) whose text matches `pattern`. */
  function sourcesMatching(dir: string, pattern: RegExp): string[] {
    const found: string[] = [];
    const walk = (at: string): void => {
      for (const entry of readdirSync(at, { withFileTypes: true })) {
        const path = join(at, entry.name);
        if (entry.isDirectory()) walk(path);
        else if (/\.[cm]?[jt]s$/.test(entry.name) && pattern.test(readFileSync(path, 'utf8'))) found.push(relative(ROOT, path));
      }
    };
    walk(join(ROOT, dir));
    return found;
  }

  it('no name can reach a shell: src/ starts no child process, scripts/ and bin/ none through a shell', () => {
    expect(sourcesMatching('src', /child_process/)).toEqual([]);
    // exec and execSync always run a shell (a regular expression's .exec(...) is no process);
    // spawn and execFile only with the shell option
    for (const dir of ['scripts', 'bin']) expect(sourcesMatching(dir, /\bexecSync\(|(?<![\w$.])exec\(|shell:\s*(true|['"`])/)).toEqual([]);
  });

  it.concurrent('file, folder and region names with shell metacharacters are only names', async ({ expect }) => {
    const odd = `a $(touch PWNED1) \`touch PWNED2\`; touch PWNED3 & 'q' "d" |x`;
    const dir = folder('shell-names', {});
    const file = `${odd}.csv`;
    writeFileSync(join(dir, file), `date,cases,region\n${[1, 2, 3, 4, 5, 6, 7, 8].map((c, i) => `2031-02-${String(3 + i).padStart(2, '0')},${c},"${odd.replace(/"/g, '""')}"`).join('\n')}\n`);
    const r = await runCli(['fit', file, '--region', odd, '--population', '5000', '--out', `out ${odd}`, ...SHORT], { cwd: dir });
    expectNoCrash(r);
    expect(r.code, r.stderr).toBe(0);
    const entries = readdirSync(dir).sort();
    expect(entries).toEqual([file, `out ${odd}`].sort());
    expect(entries.some((e) => e.startsWith('PWNED'))).toBe(false);
    const run = JSON.parse(readFileSync(join(dir, `out ${odd}`, 'run.json'), 'utf8')) as { input: { file: string; region: string } };
    expect(run.input).toMatchObject({ file, region: odd });
  });

  it.concurrent('a region and a region column named after prototype keys fit like any other', async ({ expect }) => {
    const dir = folder('proto-names', {
      'cases.csv': `date,cases,__proto__\n${[3, 1, 4, 1, 5, 9, 2, 6].map((c, i) => `2031-02-${String(3 + i).padStart(2, '0')},${c},constructor\n2031-02-${String(3 + i).padStart(2, '0')},${c + 1},__proto__`).join('\n')}\n`,
    });
    const r = await runCli(['fit', 'cases.csv', '--region-column', '__proto__', '--region', '__proto__', '--population', '5000', '--out', 'out', ...SHORT], { cwd: dir });
    expectNoCrash(r);
    expect(r.code, r.stderr).toBe(0);
    const data = readFileSync(join(dir, 'out', 'data.csv'), 'utf8').trimEnd().split('\n');
    // the "__proto__" rows: one more case each than the "constructor" rows
    expect(data.slice(1).map((l) => Number(l.split(',')[1]))).toEqual([4, 2, 5, 2, 6, 10, 3, 7]);
  });

  it.concurrent('a prior file with a "__proto__" key is refused by the command line', async ({ expect }) => {
    const priors = readFileSync(join(ROOT, 'priors', 'default.json'), 'utf8').replace('"priors": {', '"priors": {\n    "__proto__": { "walk_scale": { "family": "half_normal", "scale": 9 } },');
    const dir = folder('proto-priors', { 'cases.csv': casesCsv([1, 2, 3]), 'p.json': priors });
    const r = await runCli(['fit', 'cases.csv', '--population', '1000', '--out', 'out', '--priors', 'p.json', ...SHORT], { cwd: dir });
    expectNoCrash(r);
    expect(r.code).toBe(2);
    expect(toolLines(r.stderr)).toEqual([
      'waxwane: p.json, field "priors.__proto__": the key "__proto__" is not allowed (it could change how JavaScript objects behave); remove it',
    ]);
  });

  it.concurrent('a scenario place named "__proto__" with a "constructor" field is refused, not merged', async ({ expect }) => {
    const scenario = JSON.parse(readFileSync(join(ROOT, 'data-demo', 'scenarios', 'larkmere.json'), 'utf8')) as { days: number; places: Array<Record<string, unknown>> };
    scenario.days = 10;
    scenario.places[0]!['name'] = '__proto__';
    const dir = folder('proto-scenario', {
      'ok.json': JSON.stringify(scenario),
      'bad.json': JSON.stringify(scenario).replace('"name":"__proto__"', '"name":"__proto__","constructor":{"prototype":{"polluted":1}}'),
    });
    const ok = await runCli(['simulate', 'ok.json', '--out', 'ok', '--quiet'], { cwd: dir });
    expectNoCrash(ok);
    expect(ok.code, ok.stderr).toBe(0);
    expect(readFileSync(join(dir, 'ok', 'cases.csv'), 'utf8').split('\n')[0]).toBe('date,cases');
    const bad = await runCli(['simulate', 'bad.json', '--out', 'bad', '--quiet'], { cwd: dir });
    expect(bad.code).toBe(2);
    expect(toolLines(bad.stderr)).toEqual([
      'waxwane: bad.json, field "places[0].constructor": the key "constructor" is not allowed (it could change how JavaScript objects behave); remove it',
    ]);
  });
});

/** The preload's replacement of createHash: throw at once, or let a stray callback throw later. */
const FAULTS = {
  thrown: "crypto.createHash = () => { throw new TypeError('injected fault for a test'); };",
  stray: "const real = crypto.createHash; crypto.createHash = (...a) => { setImmediate(() => { throw new RangeError('stray fault for a test'); }); return real(...a); };",
};

/**
 * `node --import PRELOAD bin/waxwane.js ...`: the preload module replaces node:crypto's
 * createHash (which reading the case file calls) by one that fails, a stand-in for any bug:
 * nothing in the tool itself is changed or needs a test switch.
 */
function runWithFault(args: string[], cwd: string, fault: keyof typeof FAULTS = 'thrown'): Promise<RunResult> {
  const preload = join(cwd, `fault-${fault}.mjs`);
  writeFileSync(
    preload,
    ["import crypto from 'node:crypto';", "import { syncBuiltinESMExports } from 'node:module';", FAULTS[fault], 'syncBuiltinESMExports();'].join('\n'),
  );
  return new Promise((done, fail) => {
    const child = spawn(process.execPath, ['--import', pathToFileURL(preload).href, BIN, ...args], { cwd, stdio: ['ignore', 'pipe', 'pipe'] });
    const out: Buffer[] = [];
    const err: Buffer[] = [];
    child.stdout.on('data', (b: Buffer) => out.push(b));
    child.stderr.on('data', (b: Buffer) => err.push(b));
    child.on('error', fail);
    child.on('close', (code) => done({ code, stdout: Buffer.concat(out).toString(), stderr: Buffer.concat(err).toString() }));
  });
}

describe('an unexpected internal error', () => {
  it.concurrent('one line naming the log in the output folder, the trace in that log, exit 1', async ({ expect }) => {
    const dir = folder('internal-error', { 'cases.csv': casesCsv([1, 2, 3]) });
    const r = await runWithFault(['fit', 'cases.csv', '--population', '1000', '--out', 'out', ...SHORT], dir);
    expect(r.code, r.stderr).toBe(1);
    expect(r.stderr).not.toMatch(/^\s+at /m);
    const lines = r.stderr.split('\n').filter((l) => l !== '');
    expect(lines).toHaveLength(1);
    const log = join(dir, 'out', 'waxwane-error.log');
    expect(lines[0]).toBe(`waxwane: internal error: TypeError: injected fault for a test (full trace in out/waxwane-error.log; please report it)`);
    const text = readFileSync(log, 'utf8');
    expect(text).toMatch(/^--- waxwane \d+\.\d+\.\d+, node v\d+/);
    expect(text).toContain('TypeError: injected fault for a test');
    expect(text).toMatch(/^\s+at .*cases\.js/m); // the trace reaches into the tool's own code
    // the folder holds only the log, and a second try there needs no --force
    expect(readdirSync(join(dir, 'out'))).toEqual(['waxwane-error.log']);
    const again = await runWithFault(['fit', 'cases.csv', '--population', '1000', '--out', 'out', ...SHORT], dir);
    expect(again.code).toBe(1);
    expect(readFileSync(log, 'utf8').match(/^--- waxwane/gm)).toHaveLength(2);
  });

  it.concurrent('an error thrown outside the awaited command (a stray callback): the same one line and log', async ({ expect }) => {
    const dir = folder('internal-error-stray', { 'cases.csv': casesCsv([1, 2, 3]) });
    const r = await runWithFault(['fit', 'cases.csv', '--population', '1000', '--out', 'out', ...SHORT], dir, 'stray');
    expect(r.code, r.stderr).toBe(1);
    expect(r.stderr).toBe('waxwane: internal error: RangeError: stray fault for a test (full trace in out/waxwane-error.log; please report it)\n');
    expect(readFileSync(join(dir, 'out', 'waxwane-error.log'), 'utf8')).toMatch(/^RangeError: stray fault for a test\n\s+at /m);
  });

  it.concurrent('when the output folder cannot be made, the log goes to the temporary folder', async ({ expect }) => {
    const dir = folder('internal-error-tmp', { 'cases.csv': casesCsv([1, 2, 3]), 'a-file': 'not a folder\n' });
    const r = await runWithFault(['fit', 'cases.csv', '--population', '1000', '--out', 'a-file/out', ...SHORT], dir);
    expect(r.code, r.stderr).toBe(1);
    const m = /^waxwane: internal error: TypeError: injected fault for a test \(full trace in (.+); please report it\)\n$/.exec(r.stderr);
    expect(m, r.stderr).not.toBeNull();
    const log = m![1]!;
    expect(resolve(log).startsWith(join(tmpdir(), 'waxwane-logs'))).toBe(true);
    expect(readFileSync(log, 'utf8')).toContain('TypeError: injected fault for a test');
    rmSync(log);
  });
});
