// The demo fit end to end, as a user runs it: `node bin/waxwane.js fit data-demo/larkmere/...`
// with the settings of scripts/demo.js, into a temporary folder, in a fresh process whose own
// resource usage (peak resident memory, CPU time of all threads) a preloaded hook records
// (usage-hook.mjs). The same fit runs with --threads 2 and --threads 1, alternating, `rounds`
// times each; the fastest wall time of each counts. From the written outputs: minimum bulk and
// tail ESS and maximum R-hat (diagnostics.csv), converged (run.json), the phase timings, and
// whether the results are the same bytes whatever the thread count (summary.csv, draws.csv).
// Where `taskset` can pin a process, the --threads 1 fit also runs on one core only (lib.mjs
// oneCorePrefix): the per-core figure, 2 threads on 2 cores against 1 thread on 1 core.
import { spawnSync } from 'node:child_process';
import { createHash } from 'node:crypto';
import { existsSync, mkdtempSync, readFileSync, rmSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { pathToFileURL } from 'node:url';
import { BENCH_DIR, CLI, ROOT, fmt, loadAverage, oneCorePrefix, readCsvRows, table, wallSeconds } from './lib.mjs';

const HOOK = pathToFileURL(join(BENCH_DIR, 'usage-hook.mjs')).href;

/**
 * The `waxwane fit` arguments of scripts/demo.js (read from its source, so the bench follows
 * the demo), without --out; null when they cannot be read.
 */
export function demoFitArguments() {
  const text = readFileSync(join(ROOT, 'scripts', 'demo.js'), 'utf8');
  const call = /waxwane\(\[([^\]]*)\]\)/.exec(text);
  if (call === null) return null;
  const args = [...call[1].matchAll(/'([^']*)'|"([^"]*)"/g)].map((m) => m[1] ?? m[2]);
  if (args[0] !== 'fit') return null;
  const out = args.indexOf('--out');
  if (out >= 0) args.splice(out, 2);
  return args;
}

const FALLBACK_ARGS = ['fit', 'data-demo/larkmere/cases.csv', '--population', '320000', '--seed', '7', '--force'];

function sha256(file) {
  return createHash('sha256').update(readFileSync(file)).digest('hex');
}

/**
 * One timed fit, run under `pin` (a command prefix such as `taskset -c 0`, or null); returns its
 * figures (the output folder is removed afterwards).
 */
function timedFit(baseArgs, extra, threads, pin = null) {
  const tmp = mkdtempSync(join(tmpdir(), 'waxwane-bench-fit-'));
  try {
    const out = join(tmp, 'out');
    const usageFile = join(tmp, 'usage.json');
    const args = [...baseArgs, ...extra, '--out', out, '--quiet', '--force', '--threads', String(threads)];
    const load = loadAverage()[0];
    const t0 = wallSeconds();
    const node = [process.execPath, '--import', HOOK, CLI, ...args];
    const command = pin === null ? node : [...pin, ...node];
    const r = spawnSync(command[0], command.slice(1), {
      cwd: ROOT,
      encoding: 'utf8',
      env: { ...process.env, WAXWANE_BENCH_USAGE: usageFile },
    });
    const wall = wallSeconds() - t0;
    if (r.status !== 0) throw new Error(`waxwane ${args.join(' ')} failed (exit ${r.status}): ${(r.stderr ?? '').trim()}`);
    const usage = existsSync(usageFile) ? JSON.parse(readFileSync(usageFile, 'utf8')) : null;
    const diagnostics = readCsvRows(join(out, 'diagnostics.csv'));
    const run = JSON.parse(readFileSync(join(out, 'run.json'), 'utf8'));
    const col = (name) => diagnostics.map((d) => Number(d[name]));
    const cpu = usage === null ? null : usage.userCpuSeconds + usage.systemCpuSeconds;
    return {
      threads,
      oneCore: pin !== null,
      wallSeconds: wall,
      cpuSeconds: cpu,
      cpuPerWall: cpu === null ? null : cpu / wall,
      peakRssMB: usage === null ? null : usage.maxRssKB / 1024,
      loadAverageAtStart: load,
      phases: run.timings_seconds ?? null,
      minEssBulk: Math.min(...col('ess_bulk')),
      minEssTail: Math.min(...col('ess_tail')),
      maxRhat: Math.max(...col('rhat')),
      converged: run.converged === true,
      hashes: { summary: sha256(join(out, 'summary.csv')), draws: sha256(join(out, 'draws.csv')), diagnostics: sha256(join(out, 'diagnostics.csv')) },
    };
  } finally {
    rmSync(tmp, { recursive: true, force: true });
  }
}

export async function measureDemoFit(ctx) {
  let baseArgs = demoFitArguments();
  const notes = [];
  if (baseArgs === null) {
    baseArgs = FALLBACK_ARGS;
    notes.push('could not read the fit arguments of scripts/demo.js; used the ones built into scripts/bench/demo-fit.mjs');
  }
  // --quick: the same command with a short run (a smoke test of the path, not of the targets)
  const extra = ctx.quick ? ['--warmup', '500', '--draws', '100', '--thin', '2'] : [];
  const rounds = ctx.quick ? 1 : 3;
  // the per-core comparison: the same --threads 1 fit pinned to one core, where it can be
  const pin = oneCorePrefix();
  if (pin.prefix === null) notes.push(`no one-core runs: ${pin.reason}`);
  const configs = [
    { key: '2', threads: 2, pin: null, label: '2' },
    { key: '1', threads: 1, pin: null, label: '1' },
    ...(pin.prefix === null ? [] : [{ key: '1c', threads: 1, pin: pin.prefix, label: '1, one core' }]),
  ];
  const runs = Object.fromEntries(configs.map((c) => [c.key, []]));
  const failures = [];
  for (let r = 0; r < rounds; r++) {
    for (const c of configs) {
      ctx.progress(`demo fit: --threads ${c.threads}${c.pin === null ? '' : ` on one core (${c.pin.join(' ')})`}, round ${r + 1} of ${rounds}`);
      try {
        runs[c.key].push(timedFit(baseArgs, extra, c.threads, c.pin));
      } catch (e) {
        failures.push({ threads: c.label, round: r + 1, message: String(e?.message ?? e) });
      }
    }
  }
  if (configs.every((c) => runs[c.key].length === 0)) throw new Error(failures.map((f) => f.message).join('\n'));
  const fastest = (list) => (list === undefined || list.length === 0 ? null : list.reduce((a, b) => (b.wallSeconds < a.wallSeconds ? b : a)));
  const two = fastest(runs['2']);
  const one = fastest(runs['1']);
  const oneCore = fastest(runs['1c']);
  const all = configs.flatMap((c) => runs[c.key]);
  const same = (key) => all.every((x) => x.hashes[key] === all[0].hashes[key]);
  // only a comparison when both thread counts produced outputs
  const identical = two === null || one === null ? null : same('summary') && same('draws') && same('diagnostics');
  const ratio = (base) =>
    two === null || base === null
      ? null
      : {
          wall: base.wallSeconds / two.wallSeconds,
          sampling: base.phases?.sampling && two.phases?.sampling ? base.phases.sampling / two.phases.sampling : null,
        };
  const speedup = ratio(one);
  const perCore = ratio(oneCore);
  const command = ['waxwane', ...baseArgs, ...extra, '--out', 'TMP', '--quiet', '--threads', 'N'].join(' ');
  ctx.print(`Demo fit end to end (${command}; fastest of ${rounds} per thread count)`);
  ctx.print(
    table(
      ['threads', 'wall s', 'prepare s', 'sampling s', 'CPU s', 'CPU/wall', 'peak RSS MB', 'min bulk ESS', 'min tail ESS', 'max R-hat', 'converged'],
      [two, one, oneCore]
        .filter((f) => f !== null)
        .map((f) => [
          f.oneCore ? `${f.threads}, one core` : f.threads,
          fmt(f.wallSeconds),
          fmt(f.phases?.prepare),
          fmt(f.phases?.sampling),
          fmt(f.cpuSeconds),
          fmt(f.cpuPerWall),
          fmt(f.peakRssMB),
          fmt(f.minEssBulk),
          fmt(f.minEssTail),
          fmt(f.maxRhat, 4),
          f.converged ? 'yes' : 'no',
        ]),
    ),
  );
  if (speedup !== null) {
    ctx.print(
      `2 threads vs 1: ${fmt(speedup.wall)}x throughput end to end, ${fmt(speedup.sampling)}x in the sampling phase; ` +
        `outputs identical across thread counts: ${identical ? 'yes' : 'NO'}`,
    );
  }
  if (perCore !== null) {
    ctx.print(`2 threads on 2 cores vs 1 thread on one core: ${fmt(perCore.wall)}x end to end, ${fmt(perCore.sampling)}x in the sampling phase`);
  }
  for (const f of failures) ctx.print(`FAILED (--threads ${f.threads}, round ${f.round}): ${f.message}`);
  for (const n of notes) ctx.print(`(${n})`);
  return { command, rounds, quickSettings: ctx.quick ? extra : null, threads2: two, threads1: one, threads1OneCore: oneCore, runs: all, failures, speedup, perCoreSpeedup: perCore, identicalAcrossThreads: identical, notes };
}
