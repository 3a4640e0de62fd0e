// Shared pieces of the benchmark suite (scripts/bench.js): paths, fresh-process measurements,
// timing, small CSV readers, the machine description, a least-squares line and text tables.
// Everything timed runs in a child process started here, so that one measurement's compiled
// code, garbage and heap never colour the next.
import { spawnSync } from 'node:child_process';
import { existsSync, readFileSync, readdirSync, realpathSync, statSync } from 'node:fs';
import os from 'node:os';
import { basename, join, relative } from 'node:path';
import { fileURLToPath, pathToFileURL } from 'node:url';

export const ROOT = fileURLToPath(new URL('../..', import.meta.url));
export const BENCH_DIR = fileURLToPath(new URL('.', import.meta.url));
export const CLI = join(ROOT, 'bin', 'waxwane.js');

/** Imports a compiled module of the project, e.g. `dist('model/posterior.js')`. */
export function dist(path) {
  return import(pathToFileURL(join(ROOT, 'dist', path)).href);
}

/** True when this module file was started as the main script (`node file.mjs`). */
export function isMain(moduleUrl) {
  if (process.argv[1] === undefined) return false;
  try {
    return realpathSync(fileURLToPath(moduleUrl)) === realpathSync(process.argv[1]);
  } catch {
    return false;
  }
}

/** CPU seconds (user + system) of this whole process, every thread included. */
export function cpuSeconds() {
  const u = process.cpuUsage();
  return (u.user + u.system) / 1e6;
}

export function wallSeconds() {
  return Number(process.hrtime.bigint()) / 1e9;
}

/** `--name value` from an argument list, or the fallback. */
export function option(argv, name, fallback) {
  const i = argv.indexOf(name);
  return i >= 0 && i + 1 < argv.length ? argv[i + 1] : fallback;
}

export function numberOption(argv, name, fallback) {
  const raw = option(argv, name, null);
  if (raw === null) return fallback;
  const v = Number(raw);
  if (!Number.isFinite(v)) throw new Error(`${name} must be a number, got "${raw}"`);
  return v;
}

/** Prints the one JSON line a measuring child hands back to its parent. */
export function emit(result) {
  process.stdout.write(`${JSON.stringify(result)}\n`);
}

function tail(text, lines = 8) {
  return (text ?? '').trim().split('\n').slice(-lines).join('\n');
}

/**
 * Runs `node script args` in a fresh process and returns the JSON object on the last line of
 * its standard output. A failed child throws with the end of its standard error.
 */
export function runChild(script, args, { timeoutSeconds = 900 } = {}) {
  const r = spawnSync(process.execPath, [script, ...args], {
    cwd: ROOT,
    encoding: 'utf8',
    maxBuffer: 64 * 1024 * 1024,
    timeout: timeoutSeconds * 1000,
  });
  const what = `${relative(ROOT, script)} ${args.join(' ')}`;
  if (r.error) throw new Error(`${what}: ${r.error.message}`);
  if (r.status !== 0) throw new Error(`${what} failed (exit ${r.status ?? r.signal}):\n${tail(r.stderr)}`);
  const last = r.stdout.trim().split('\n').pop() ?? '';
  try {
    return JSON.parse(last);
  } catch {
    throw new Error(`${what} printed no result line:\n${tail(r.stdout)}\n${tail(r.stderr)}`);
  }
}

/**
 * Times `batch(n)` (which must do n units of work and may return anything): one warm-up call,
 * then `batches` calls, each timed in CPU seconds of this process. Returns the best rate (units
 * per CPU second): other work on a shared machine only ever slows a batch down.
 */
export function bestRate(batch, units, batches, warmupUnits) {
  batch(warmupUnits);
  const per = Math.max(1, Math.floor(units / batches));
  let best = 0;
  for (let b = 0; b < batches; b++) {
    const t0 = cpuSeconds();
    batch(per);
    const dt = cpuSeconds() - t0;
    if (dt > 0) best = Math.max(best, per / dt);
  }
  return best;
}

/** Rows of a simple CSV file (no quoted commas), as objects keyed by the header. */
export function readCsvRows(file) {
  const lines = readFileSync(file, 'utf8').replace(/\r/g, '').trim().split('\n');
  const header = lines[0].split(',');
  return lines.slice(1).map((line) => {
    const cells = line.split(',');
    return Object.fromEntries(header.map((h, i) => [h, cells[i] ?? '']));
  });
}

/** The count column of a `date,cases` file; a blank count is NaN (missing). */
export function readCounts(file, column = 'cases') {
  return Float64Array.from(readCsvRows(file), (r) => (r[column].trim() === '' ? NaN : Number(r[column])));
}

/** Day of week of an ISO date, 0 = Monday. */
export function weekdayOf(iso) {
  return (new Date(`${iso}T00:00:00Z`).getUTCDay() + 6) % 7;
}

/** What the figures were measured on. */
export function machineInfo() {
  let cpu = os.cpus()[0]?.model ?? 'unknown';
  let processors = os.cpus().length;
  try {
    const info = readFileSync('/proc/cpuinfo', 'utf8');
    const model = /^model name\s*:\s*(.+)$/m.exec(info);
    if (model) cpu = model[1].trim();
    processors = (info.match(/^processor\s*:/gm) ?? []).length || processors;
  } catch {
    // not Linux: keep what os.cpus() says
  }
  return {
    cpu,
    cores: processors,
    availableParallelism: os.availableParallelism(),
    memoryGB: Number((os.totalmem() / 2 ** 30).toFixed(1)),
    node: process.version,
    v8: process.versions.v8,
    platform: `${process.platform} ${os.release()} ${process.arch}`,
    loadAverage: loadAverage(),
  };
}

/** 1-, 5- and 15-minute load averages, rounded. */
export function loadAverage() {
  return os.loadavg().map((x) => Number(x.toFixed(2)));
}

/** The source state: commit and whether the tree has changes (read-only git calls). */
export function sourceInfo() {
  const git = (args) => {
    const r = spawnSync('git', ['--no-optional-locks', ...args], { cwd: ROOT, encoding: 'utf8' });
    return r.status === 0 ? r.stdout.trim() : null;
  };
  const commit = git(['rev-parse', '--short', 'HEAD']);
  const status = git(['status', '--porcelain', '--untracked-files=no']);
  return { commit, changedFiles: status === null ? null : status.split('\n').filter((l) => l !== '').length };
}

/** Source files newer than their compiled counterparts in dist/ (dist/ is what the bench runs). */
export function staleDist() {
  const stale = [];
  const walk = (dir) => {
    for (const name of readdirSync(dir)) {
      const path = join(dir, name);
      if (statSync(path).isDirectory()) walk(path);
      else if (name.endsWith('.ts') && !name.endsWith('.d.ts')) {
        const built = join(ROOT, 'dist', relative(join(ROOT, 'src'), path)).replace(/\.ts$/, '.js');
        if (!existsSync(built) || statSync(built).mtimeMs < statSync(path).mtimeMs) stale.push(relative(ROOT, path));
      }
    }
  };
  walk(join(ROOT, 'src'));
  return stale;
}

/**
 * Ordinary least-squares line y = a + b x, and the largest deviation of a point from it
 * relative to the point: max |y_i - (a + b x_i)| / y_i.
 */
export function linearFit(xs, ys) {
  const n = xs.length;
  const mx = xs.reduce((s, x) => s + x, 0) / n;
  const my = ys.reduce((s, y) => s + y, 0) / n;
  let sxy = 0;
  let sxx = 0;
  for (let i = 0; i < n; i++) {
    sxy += (xs[i] - mx) * (ys[i] - my);
    sxx += (xs[i] - mx) ** 2;
  }
  const slope = sxy / sxx;
  const intercept = my - slope * mx;
  const deviations = xs.map((x, i) => (ys[i] - (intercept + slope * x)) / ys[i]);
  return { intercept, slope, deviations, maxRelDeviation: Math.max(...deviations.map(Math.abs)) };
}

/**
 * A text table. `align` has one letter per column, 'l' or 'r'; by default the first column is
 * left-aligned and the others right-aligned.
 */
export function table(header, rows, align = 'l' + 'r'.repeat(header.length - 1)) {
  const cells = [header, ...rows].map((r) => r.map((c) => String(c)));
  const widths = header.map((_, j) => Math.max(...cells.map((r) => (r[j] ?? '').length)));
  const line = (r) => r.map((c, j) => (align[j] === 'l' ? c.padEnd(widths[j]) : c.padStart(widths[j]))).join('  ').trimEnd();
  return [line(cells[0]), widths.map((w) => '-'.repeat(w)).join('  '), ...cells.slice(1).map(line)].join('\n');
}

/** A number with `digits` significant digits, or '-' when absent. */
export function fmt(x, digits = 3) {
  if (x === null || x === undefined || Number.isNaN(x)) return '-';
  if (!Number.isFinite(x)) return String(x);
  const a = Math.abs(x);
  if (a >= 10 ** digits) return x.toFixed(0);
  return Number(x.toPrecision(digits)).toString();
}

export function scriptName(moduleUrl) {
  return basename(fileURLToPath(moduleUrl));
}

/**
 * How to run a command on one core only, for the per-core throughput figures: a fit with
 * --threads 1 on an otherwise idle second core still gets help from it (the JavaScript
 * engine compiles and collects garbage on background threads, and the fit loads its report
 * code while the chains run), so "1 thread" on the whole machine is more than one core's
 * worth of work. Returns the prefix `['taskset', '-c', CPU]` (the first CPU this process may
 * run on), or null with the reason when `taskset` (util-linux) is missing or refuses.
 */
export function oneCorePrefix() {
  const probe = spawnSync('taskset', ['-pc', String(process.pid)], { encoding: 'utf8' });
  if (probe.error || probe.status !== 0) return { prefix: null, reason: 'taskset not available' };
  // "pid 123's current affinity list: 0,1" or "0-3"
  const list = /:\s*([0-9][0-9,-]*)\s*$/.exec(probe.stdout.trim());
  if (list === null) return { prefix: null, reason: `could not read the CPU affinity ("${probe.stdout.trim()}")` };
  const cpu = list[1].split(/[,-]/)[0];
  const check = spawnSync('taskset', ['-c', cpu, 'true']);
  if (check.error || check.status !== 0) return { prefix: null, reason: `taskset -c ${cpu} refused` };
  return { prefix: ['taskset', '-c', cpu], reason: null };
}
