#!/usr/bin/env node
// `npm run bench`: the benchmark suite. Times the compiled engine in dist/ (build first:
// `npm run build`), prints each figure and a table against the performance targets,
// and saves everything, with the machine it ran on, as JSON under bench-results/. A missed
// target is reported, never an error: the exit code is 1 only when a measurement itself failed.
//
//   npm run bench                      full run (a few minutes)
//   npm run bench -- --quick           smoke run in seconds: short runs, one round, timing
//                                      targets shown but not judged
//   npm run bench -- --only density,scaling,sampler,demo,regions   some parts only
//   npm run bench -- --out FILE        save the JSON there instead of bench-results/
//
// Parts (scripts/bench/): density.mjs (log density against the plain-C program), scaling.mjs
// (cost against days and knot spacing), sampler.mjs (iterations per second, ESS per second of
// a full fit), demo-fit.mjs (the demo fit end to end, 1 and 2 threads, peak memory),
// regions.mjs (four places in one run, 1 and 2 threads: throughput over many places). Every
// timed measurement runs in a fresh Node process; rates are best-of-N in CPU time where one
// thread does the work, wall time where the user waits (fits), because the machine is shared.
import { existsSync, mkdirSync, writeFileSync } from 'node:fs';
import { dirname, join, relative } from 'node:path';
import { compileReference } from './bench/c-reference.mjs';
import { measureDemoFit } from './bench/demo-fit.mjs';
import { measureDensity } from './bench/density.mjs';
import { ROOT, fmt, loadAverage, machineInfo, option, sourceInfo, staleDist, table } from './bench/lib.mjs';
import { measureRegions } from './bench/regions.mjs';
import { measureSampler } from './bench/sampler.mjs';
import { LINEAR_TOLERANCE, measureScaling } from './bench/scaling.mjs';

const PARTS = {
  density: measureDensity,
  scaling: measureScaling,
  sampler: measureSampler,
  demo: measureDemoFit,
  regions: measureRegions,
};

/** The targets of the performance issue (the demo fit, the density, linear cost, threads). */
const TARGETS = {
  demoWallSeconds: 10,
  maxRhat: 1.01,
  minEss: 400,
  densityTimeRatioToC: 1.2,
  linearMaxRelDeviation: LINEAR_TOLERANCE,
  twoThreadSpeedup: 1.8,
};

function usage() {
  return 'usage: node scripts/bench.js [--quick] [--only density,scaling,sampler,demo,regions] [--out FILE]';
}

function parseArgs(argv) {
  const known = new Set(['--quick', '--only', '--out', '--help', '-h']);
  for (let i = 0; i < argv.length; i++) {
    if (!known.has(argv[i])) throw new Error(`unknown option "${argv[i]}"; ${usage()}`);
    if (argv[i] === '--only' || argv[i] === '--out') i++;
  }
  const only = option(argv, '--only', Object.keys(PARTS).join(',')).split(',').map((s) => s.trim());
  for (const p of only) if (!(p in PARTS)) throw new Error(`unknown part "${p}" in --only; parts: ${Object.keys(PARTS).join(', ')}`);
  return { help: argv.includes('--help') || argv.includes('-h'), quick: argv.includes('--quick'), only, out: option(argv, '--out', null) };
}

/** One row per target: what was measured and whether it meets the target. */
function targetRows(results, quick, failedParts) {
  const rows = [];
  const add = (name, target, value, pass) => rows.push({ name, target, value, status: pass === null ? 'n/a' : pass ? 'pass' : 'FAIL' });
  const broken = (name, target) => rows.push({ name, target, value: 'measurement failed', status: 'error' });
  if (failedParts.has('demo')) {
    broken('demo fit converged', `R-hat <= ${TARGETS.maxRhat}, bulk and tail ESS >= ${TARGETS.minEss}`);
    broken('demo fit wall time (2 threads)', `<= ${TARGETS.demoWallSeconds} s, converged`);
    broken('2 threads vs 1 (demo fit)', `>= ${TARGETS.twoThreadSpeedup}x throughput`);
    broken('2 threads vs 1 (demo fit, sampling phase)', `>= ${TARGETS.twoThreadSpeedup}x throughput`);
  }
  if (failedParts.has('regions')) broken('2 threads vs 1 (four places in one run)', `>= ${TARGETS.twoThreadSpeedup}x throughput`);
  if (failedParts.has('density')) broken('log density, 90 to 365 days', `<= ${TARGETS.densityTimeRatioToC}x C time`);
  if (failedParts.has('scaling')) broken('cost linear in days (90..720)', `<= ${100 * TARGETS.linearMaxRelDeviation}% off a fitted line`);
  // --quick runs are short and single: timing targets are shown, not judged
  const judge = (pass) => (quick ? null : pass);
  const demo = results.demo;
  if (demo !== undefined) {
    const f = demo.threads2;
    const conv = f !== null && f.maxRhat <= TARGETS.maxRhat && f.minEssBulk >= TARGETS.minEss && f.minEssTail >= TARGETS.minEss;
    const failed = 'run failed';
    add(
      'demo fit converged',
      `R-hat <= ${TARGETS.maxRhat}, bulk and tail ESS >= ${TARGETS.minEss}`,
      f === null ? failed : `R-hat ${fmt(f.maxRhat, 4)}, bulk ${fmt(f.minEssBulk)}, tail ${fmt(f.minEssTail)}`,
      f === null ? false : judge(conv),
    );
    add(
      'demo fit wall time (2 threads)',
      `<= ${TARGETS.demoWallSeconds} s, converged`,
      f === null ? failed : `${fmt(f.wallSeconds)} s${conv ? '' : ', not converged'}`,
      f === null ? false : judge(conv && f.wallSeconds <= TARGETS.demoWallSeconds),
    );
    const s = demo.speedup;
    add(
      '2 threads vs 1 (demo fit)',
      `>= ${TARGETS.twoThreadSpeedup}x throughput`,
      s === null ? failed : `${fmt(s.wall)}x end to end (2-thread run used ${fmt(f?.cpuPerWall, 2)} CPU s per wall s)`,
      s === null ? false : judge(s.wall >= TARGETS.twoThreadSpeedup),
    );
    add(
      '2 threads vs 1 (demo fit, sampling phase)',
      `>= ${TARGETS.twoThreadSpeedup}x throughput`,
      s === null || s.sampling === null ? failed : `${fmt(s.sampling)}x iterations per second`,
      s === null || s.sampling === null ? false : judge(s.sampling >= TARGETS.twoThreadSpeedup),
    );
    const c = demo.perCoreSpeedup ?? null;
    if (c !== null) {
      add(
        '2 threads on 2 cores vs 1 on one core (demo fit)',
        `>= ${TARGETS.twoThreadSpeedup}x throughput (per core)`,
        `${fmt(c.wall)}x end to end, ${fmt(c.sampling)}x sampling phase`,
        judge(c.wall >= TARGETS.twoThreadSpeedup),
      );
    }
    add(
      'same results, 1 or 2 threads',
      'identical outputs',
      demo.identicalAcrossThreads === null ? failed : demo.identicalAcrossThreads ? 'identical' : 'different',
      demo.identicalAcrossThreads === true,
    );
  }
  const regions = results.regions;
  if (regions !== undefined) {
    add(
      '2 threads vs 1 (four places in one run)',
      `>= ${TARGETS.twoThreadSpeedup}x throughput`,
      `${fmt(regions.speedup)}x regions per minute (${fmt(regions.threads2.regionsPerMinute)} vs ${fmt(regions.threads1.regionsPerMinute)})`,
      judge(regions.speedup >= TARGETS.twoThreadSpeedup),
    );
    if (regions.perCoreSpeedup !== null && regions.perCoreSpeedup !== undefined) {
      add(
        '2 threads on 2 cores vs 1 on one core (four places)',
        `>= ${TARGETS.twoThreadSpeedup}x throughput (per core)`,
        `${fmt(regions.perCoreSpeedup)}x regions per minute (${fmt(regions.threads2.regionsPerMinute)} vs ${fmt(regions.threads1OneCore.regionsPerMinute)})`,
        judge(regions.perCoreSpeedup >= TARGETS.twoThreadSpeedup),
      );
    }
    add('same results, 1 or 2 threads (four places)', 'identical regions.csv', regions.identicalAcrossThreads ? 'identical' : 'different', regions.identicalAcrossThreads);
  }
  const density = results.density;
  if (density !== undefined) {
    for (const s of density.sizes) {
      add(
        `log density, ${s.days} days`,
        `<= ${TARGETS.densityTimeRatioToC}x C time`,
        s.timeRatioToC === null ? 'no C reference' : `${fmt(s.timeRatioToC)}x`,
        s.timeRatioToC === null ? null : judge(s.timeRatioToC <= TARGETS.densityTimeRatioToC),
      );
    }
  }
  const scaling = results.scaling;
  if (scaling !== undefined) {
    add(
      'cost linear in days (90..720)',
      `<= ${100 * TARGETS.linearMaxRelDeviation}% off a fitted line (bench's bound)`,
      `${(100 * scaling.line.maxRelDeviation).toFixed(1)}% off (C program: ${scaling.cLineMaxRelDeviation === null ? '-' : `${(100 * scaling.cLineMaxRelDeviation).toFixed(1)}%`})`,
      judge(scaling.line.maxRelDeviation <= TARGETS.linearMaxRelDeviation),
    );
  }
  return rows;
}

function stamp(date) {
  return date.toISOString().replace(/\.\d+Z$/, '').replace(/[-:]/g, '').replace('T', '-');
}

async function main() {
  let opts;
  try {
    opts = parseArgs(process.argv.slice(2));
  } catch (e) {
    console.error(`bench: ${e.message}`);
    process.exit(2);
  }
  if (opts.help) {
    console.log(usage());
    return;
  }
  if (!existsSync(join(ROOT, 'dist', 'cli', 'main.js'))) {
    console.error('bench: dist/ not found; build first with `npm run build`');
    process.exit(2);
  }
  const started = new Date();
  const machine = machineInfo();
  const source = { ...sourceInfo(), staleDist: staleDist() };
  const print = (s = '') => console.log(s);
  const progress = (s) => process.stderr.write(process.stderr.isTTY ? `\r\x1b[K${s}` : `${s}\n`);
  const endProgress = () => process.stderr.isTTY && process.stderr.write('\r\x1b[K');

  print(`waxwane benchmarks (${opts.quick ? 'quick: short runs, figures only indicative' : 'full'}), ${started.toISOString()}`);
  print(
    `machine: ${machine.cpu}, ${machine.cores} cores, ${machine.memoryGB} GB, Node ${machine.node}, ` +
      `load average ${machine.loadAverage.join(' ')} at start${machine.loadAverage[0] > 0.5 ? ' (other work running: figures are lower bounds)' : ''}`,
  );
  print(`source: commit ${source.commit ?? 'unknown'}${source.changedFiles ? `, ${source.changedFiles} changed files` : ''}`);
  if (source.staleDist.length > 0) {
    print(`warning: dist/ is older than ${source.staleDist.length} source files (e.g. ${source.staleDist[0]}); rebuild with \`npm run build\``);
  }

  const reference = opts.only.some((p) => p === 'density' || p === 'scaling') ? compileReference() : { exe: null, reason: 'not needed' };
  const ctx = { quick: opts.quick, reference, print, progress };
  const results = {};
  const errors = [];
  try {
    for (const part of opts.only) {
      print('');
      const t0 = Date.now();
      try {
        results[part] = await PARTS[part](ctx);
        results[part].seconds = (Date.now() - t0) / 1000;
        // single runs that failed inside a part that still measured something
        for (const f of results[part].failures ?? []) errors.push({ part: `${part} (--threads ${f.threads}, round ${f.round})`, message: f.message });
      } catch (e) {
        endProgress();
        errors.push({ part, message: String(e?.message ?? e) });
        print(`${part}: FAILED: ${e?.message ?? e}`);
      }
      endProgress();
    }
  } finally {
    reference.dispose?.();
  }

  const targets = targetRows(results, opts.quick, new Set(errors.filter((e) => !(e.part in results)).map((e) => e.part)));
  print('');
  print(`Targets (performance issue; ${machine.cores} cores, load average ${machine.loadAverage[0]} at start)`);
  print(
    table(
      ['figure', 'target', 'measured', 'result'],
      targets.map((t) => [t.name, t.target, t.value, t.status]),
      'llll',
    ),
  );
  if (opts.quick) print('(--quick: short single runs, timing targets not judged; run without --quick for the real figures)');

  const finished = new Date();
  const report = {
    format: 'waxwane-bench/1',
    mode: opts.quick ? 'quick' : 'full',
    started: started.toISOString(),
    finished: finished.toISOString(),
    seconds: (finished - started) / 1000,
    machine: { ...machine, loadAverageAtEnd: loadAverage() },
    source,
    parts: opts.only,
    targets: { bounds: TARGETS, rows: targets },
    results,
    errors,
  };
  const file = opts.out ?? join(ROOT, 'bench-results', `bench-${stamp(started)}${opts.quick ? '-quick' : ''}.json`);
  mkdirSync(dirname(file), { recursive: true });
  writeFileSync(file, `${JSON.stringify(report, null, 2)}\n`);
  print('');
  const shown = relative(process.cwd(), file);
  print(`saved ${shown.startsWith('..') ? file : shown} (${report.seconds.toFixed(0)} s)`);
  if (errors.length > 0) process.exitCode = 1;
}

await main();
