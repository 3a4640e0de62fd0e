#!/usr/bin/env node
// Times the default model's log density (createModel().logDensity from dist/, so build first:
// `npx tsc -p tsconfig.json`) on the cross-check fixtures in test/fixtures/limit/ (90, 180 and
// 365 observed days). Each size runs in a fresh Node process; the parameter vector is the
// fixture's point plus small deterministic perturbations (so no two consecutive evaluations are
// equal), the rate is CPU time of the fastest of several batches after a warm-up (other work on
// the machine only slows a batch down). When a C compiler and ../shared/limit/logdensity.c are
// present, the same sizes are timed with that plain-C program and the time ratio JS / C reported.
// On a shared machine the whole measurement is repeated `--rounds` times, JS and C alternating,
// and the best rate of each side kept.
//
//   node scripts/bench-density.mjs [--days 90,180,365] [--evals 20000] [--batches 15] [--rounds 3]
import { spawnSync } from 'node:child_process';
import { existsSync, mkdtempSync, readFileSync, rmSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { fileURLToPath, pathToFileURL } from 'node:url';

const root = fileURLToPath(new URL('..', import.meta.url));
const script = fileURLToPath(import.meta.url);

function option(name, fallback) {
  const i = process.argv.indexOf(name);
  return i >= 0 && i + 1 < process.argv.length ? process.argv[i + 1] : fallback;
}

const evals = Number(option('--evals', '20000'));
const batches = Number(option('--batches', '15'));
const rounds = Number(option('--rounds', '3'));
if (!(evals >= batches && batches >= 1 && rounds >= 1)) {
  console.error('--evals must be at least --batches, and --batches and --rounds at least 1');
  process.exit(2);
}

function cpuSeconds() {
  const u = process.cpuUsage();
  return (u.user + u.system) / 1e6;
}

/** One fixture size, in this process: prints a JSON line. */
async function child(days) {
  const imp = (p) => import(pathToFileURL(join(root, p)).href);
  const { createModel } = await imp('dist/model/posterior.js');
  const { toUnconstrained } = await imp('dist/model/layout.js');
  const { loadPriorSet } = await imp('dist/io/priors.js');
  const dir = join(root, `test/fixtures/limit/point-T${days}`);
  const point = JSON.parse(readFileSync(join(dir, 'point.json'), 'utf8'));
  const lines = readFileSync(join(dir, 'cases.csv'), 'utf8').trim().split('\n').slice(1);
  const counts = Float64Array.from(lines, (l) => {
    const v = l.split(',')[1];
    return v === undefined || v.trim() === '' ? NaN : Number(v);
  });
  const firstWeekday = (new Date(`${point.first_date}T00:00:00Z`).getUTCDay() + 6) % 7;
  const priorSet = loadPriorSet(join(root, 'priors/default.json'));
  const model = createModel({ counts, population: point.population, firstWeekday }, priorSet);
  const theta0 = toUnconstrained(model.layout, {
    start_reproduction: point.R_start,
    walk_steps: point.walk_steps,
    walk_scale: point.walk_scale,
    ascertainment: point.ascertainment,
    dispersion: point.dispersion,
    seed_infected: point.seed_infected,
    latent_days: point.latent_days,
    infectious_days: point.infectious_days,
    weekday: [],
  });
  const P = theta0.length;
  const th = new Float64Array(P);
  const logDensity = model.logDensity;
  let sink = 0;
  function batch(n) {
    const t0 = cpuSeconds();
    for (let i = 0; i < n; i++) {
      for (let j = 0; j < P; j++) th[j] = theta0[j] + (1e-3 * (((i * 31 + j * 17) % 21) - 10)) / 10;
      sink += logDensity(th);
    }
    return cpuSeconds() - t0;
  }
  batch(Math.floor(evals / 10) + 1); // warm-up: let the optimising compiler settle
  const per = Math.floor(evals / batches);
  let best = 0;
  for (let b = 0; b < batches; b++) best = Math.max(best, per / batch(per));
  const lp = logDensity(theta0);
  const relErr = Math.abs(lp - point.log_density) / Math.abs(point.log_density);
  const line = { days, evalsPerSecond: best, logDensity: lp, relErr, sinkFinite: Number.isFinite(sink) };
  process.stdout.write(JSON.stringify(line) + '\n');
}

/** The plain-C reference, compiled to a temporary directory; null when unavailable. */
function compileC() {
  const source = join(root, '..', 'shared', 'limit', 'logdensity.c');
  if (!existsSync(source)) return null;
  const dir = mkdtempSync(join(tmpdir(), 'waxwane-bench-'));
  const exe = join(dir, 'logdensity');
  const cc = spawnSync('cc', ['-O2', '-march=native', '-o', exe, source, '-lm'], { encoding: 'utf8' });
  if (cc.error || cc.status !== 0) {
    rmSync(dir, { recursive: true, force: true });
    return null;
  }
  return { exe, dir };
}

function runC(exe, days) {
  const r = spawnSync(exe, [String(days), String(evals)], { encoding: 'utf8' });
  const line = (r.stdout ?? '').split('\n').find((l) => l.startsWith('RESULT C '));
  if (!line) return null;
  return Number(line.split(/\s+/)[3]);
}

async function main() {
  if (!existsSync(join(root, 'dist/model/posterior.js'))) {
    console.error('dist/ not found: build first with `npx tsc -p tsconfig.json`');
    process.exit(2);
  }
  const which = option('--child', null);
  if (which !== null) return child(Number(which));
  const sizes = option('--days', '90,180,365').split(',').map(Number);
  const c = compileC();
  if (c === null) console.log('(no C compiler or ../shared/limit/logdensity.c: ratio to C skipped)');
  console.log('days  JS evals/s  C evals/s  JS time / C time  |lp - fixture| / |fixture|');
  try {
    for (const days of sizes) {
      let js = null;
      let cRate = null;
      for (let r = 0; r < rounds; r++) {
        const run = spawnSync(
          process.execPath,
          [script, '--child', String(days), '--evals', String(evals), '--batches', String(batches)],
          { encoding: 'utf8' },
        );
        if (run.status !== 0) {
          console.error(run.stderr);
          process.exit(1);
        }
        const one = JSON.parse(run.stdout.trim().split('\n').pop());
        if (js === null || one.evalsPerSecond > js.evalsPerSecond) js = one;
        const c1 = c === null ? null : runC(c.exe, days);
        if (c1 !== null && (cRate === null || c1 > cRate)) cRate = c1;
      }
      const ratio = cRate === null ? '-' : (cRate / js.evalsPerSecond).toFixed(3);
      const cText = cRate === null ? '-' : cRate.toFixed(0);
      const cols = [String(days).padStart(4), js.evalsPerSecond.toFixed(0).padStart(10), cText.padStart(9), ratio.padStart(16)];
      console.log(`${cols.join('  ')}  ${js.relErr.toExponential(2)}`);
    }
  } finally {
    if (c !== null) rmSync(c.dir, { recursive: true, force: true });
  }
}

await main();
