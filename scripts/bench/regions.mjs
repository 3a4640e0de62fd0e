// Throughput over many places, the daily job of a surveillance team: the four districts of
// data-demo/districts fitted in one run (`waxwane fit data-demo/districts/cases.csv
// --populations ...`, the default sampler), with --threads 2 and --threads 1. With two threads
// and several regions, two regions are fitted at once, each with its chains in its own thread
// (cli/fit-regions.ts), so everything a fit does, its summaries and report included, runs in
// parallel. Figures: wall time, regions per minute, the ratio of the two, and whether the
// combined table (regions.csv) is the same bytes for both thread counts. Where `taskset` can pin
// a process, the --threads 1 run is repeated on one core only (lib.mjs oneCorePrefix): the
// per-core figure.
import { spawnSync } from 'node:child_process';
import { createHash } from 'node:crypto';
import { mkdtempSync, readFileSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { CLI, ROOT, fmt, loadAverage, oneCorePrefix, readCsvRows, table, wallSeconds } from './lib.mjs';

const CASES = 'data-demo/districts/cases.csv';

/** region,population of the districts, from the scenario that made them. */
function populationsCsv() {
  const scenario = JSON.parse(readFileSync(join(ROOT, 'data-demo', 'scenarios', 'districts.json'), 'utf8'));
  const field = (s) => (/[",\r\n]/.test(s) ? `"${s.replace(/"/g, '""')}"` : s);
  return `region,population\n${scenario.places.map((p) => `${field(p.name)},${p.population}`).join('\n')}\n`;
}

function timedRun(extra, threads, pin = null) {
  const tmp = mkdtempSync(join(tmpdir(), 'waxwane-bench-regions-'));
  try {
    const populations = join(tmp, 'populations.csv');
    writeFileSync(populations, populationsCsv());
    const out = join(tmp, 'out');
    const args = ['fit', CASES, '--populations', populations, '--seed', '7', ...extra, '--out', out, '--quiet', '--force', '--threads', String(threads)];
    const load = loadAverage()[0];
    const t0 = wallSeconds();
    const command = [...(pin ?? []), process.execPath, CLI, ...args];
    const r = spawnSync(command[0], command.slice(1), { cwd: ROOT, encoding: 'utf8' });
    const wall = wallSeconds() - t0;
    if (r.status !== 0) throw new Error(`waxwane ${args.join(' ')} failed (exit ${r.status}): ${(r.stderr ?? '').trim()}`);
    const regions = readCsvRows(join(out, 'regions.csv'));
    return {
      threads,
      oneCore: pin !== null,
      wallSeconds: wall,
      regions: regions.length,
      regionsPerMinute: (60 * regions.length) / wall,
      loadAverageAtStart: load,
      hash: createHash('sha256').update(readFileSync(join(out, 'regions.csv'))).digest('hex'),
    };
  } finally {
    rmSync(tmp, { recursive: true, force: true });
  }
}

export async function measureRegions(ctx) {
  // --quick: a short run, a smoke test of the path
  const extra = ctx.quick ? ['--warmup', '500', '--draws', '100', '--thin', '2'] : [];
  const pin = oneCorePrefix();
  // best of two rounds, alternating the thread counts, as the demo part does (one run of each
  // was too much at the mercy of this shared machine)
  const rounds = ctx.quick ? 1 : 2;
  const configs = [
    { key: 2, threads: 2, pin: null },
    { key: 1, threads: 1, pin: null },
    ...(pin.prefix === null ? [] : [{ key: 'oneCore', threads: 1, pin: pin.prefix }]),
  ];
  const runs = {};
  const hashes = new Set();
  for (let r = 0; r < rounds; r++) {
    for (const c of configs) {
      ctx.progress(`four districts: --threads ${c.threads}${c.pin === null ? '' : ` on one core (${c.pin.join(' ')})`}, round ${r + 1} of ${rounds}`);
      const run = timedRun(extra, c.threads, c.pin);
      hashes.add(run.hash);
      if (runs[c.key] === undefined || run.wallSeconds < runs[c.key].wallSeconds) runs[c.key] = run;
    }
  }
  const two = runs[2];
  const one = runs[1];
  const oneCore = runs.oneCore ?? null;
  const speedup = one.wallSeconds / two.wallSeconds;
  const perCoreSpeedup = oneCore === null ? null : oneCore.wallSeconds / two.wallSeconds;
  // every run, not only the fastest of each
  const identical = hashes.size === 1;
  const command = ['waxwane', 'fit', CASES, '--populations', 'P.csv', '--seed', '7', ...extra, '--out', 'TMP', '--quiet', '--threads', 'N'].join(' ');
  ctx.print(`Many places at once (${command}; fastest of ${rounds} per thread count)`);
  ctx.print(
    table(
      ['threads', 'regions', 'wall s', 'regions per minute'],
      [two, one, oneCore].filter((f) => f !== null).map((f) => [f.oneCore ? `${f.threads}, one core` : f.threads, f.regions, fmt(f.wallSeconds), fmt(f.regionsPerMinute)]),
    ),
  );
  ctx.print(`2 threads vs 1: ${fmt(speedup)}x regions per minute; regions.csv identical across thread counts: ${identical ? 'yes' : 'NO'}`);
  if (oneCore !== null) ctx.print(`2 threads on 2 cores vs 1 thread on one core: ${fmt(perCoreSpeedup)}x regions per minute`);
  else ctx.print(`(no one-core run: ${pin.reason})`);
  return { command, rounds, threads2: two, threads1: one, threads1OneCore: oneCore, speedup, perCoreSpeedup, identicalAcrossThreads: identical };
}
