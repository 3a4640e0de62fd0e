// The sampler on the real posterior of the demo place (data-demo/larkmere, default prior set),
// each measurement in a fresh Node process.
//
// As a child (`node scripts/bench/sampler.mjs --measure chain|fit ...`) it prints one JSON line:
//   chain  one chain, in this thread, exactly as a fit runs it (prepareFit's start and Laplace
//          proposal, runChainJob: the ChainRunner with the fit's coordinate moves); after the
//          warm-up, sampling iterations per CPU second of the fastest slice. Also the sampler
//          coordinates' log density per CPU second at the same place, so that one iteration's
//          cost can be read in log-density evaluations.
//   fit    fitPosterior with DEFAULT_SAMPLER (4 chains on 2 worker threads, 4000 warm-up,
//          1000 draws thinned by 10, seed 1), or shorter with --warmup/--draws/--thin: wall and
//          CPU time, then R-hat and bulk and tail ESS of every sampled parameter as the fit
//          command reports them, and the minimum bulk ESS per second.
import { join } from 'node:path';
import { fileURLToPath } from 'node:url';
import { ROOT, bestRate, cpuSeconds, dist, emit, fmt, isMain, numberOption, option, runChild, table, wallSeconds } from './lib.mjs';

const SELF = fileURLToPath(import.meta.url);
export const DEMO_CASES = join(ROOT, 'data-demo', 'larkmere', 'cases.csv');
export const DEMO_POPULATION = 320000;

/** The demo place as the fit command hands it to the engine. */
async function demoInput() {
  const { readCases } = await dist('io/cases.js');
  const { dayOfWeek } = await dist('io/dates.js');
  const { resolvePriorSet } = await dist('io/priors.js');
  const series = readCases(DEMO_CASES).series[0];
  return {
    counts: Array.from(series.counts, (v) => (Number.isNaN(v) ? null : v)),
    population: DEMO_POPULATION,
    firstWeekday: dayOfWeek(series.firstDate),
    priorSet: resolvePriorSet('default'),
  };
}

async function chainChild(argv) {
  const warmup = numberOption(argv, '--warmup', 4000);
  const iterations = numberOption(argv, '--iterations', 6000);
  const slice = numberOption(argv, '--slice', 1000);
  const { prepareFit, DEFAULT_SAMPLER } = await dist('inference/fit.js');
  const { runChainJob } = await dist('inference/chain-job.js');
  const input = await demoInput();
  const prepared = prepareFit(input, { ...DEFAULT_SAMPLER, chains: 1, warmup, draws: iterations, thin: 1, slice, threads: 0 });
  const job = prepared.jobs[0];

  // the sampler coordinates' log density around the chain's start
  let densityEvalsPerSecond = null;
  try {
    const { createSamplingSpace } = await dist('model/sampling-space.js');
    const space = createSamplingSpace(prepared.model);
    const y0 = Float64Array.from(job.start);
    const y = new Float64Array(y0.length);
    let i = 0;
    let sink = 0;
    densityEvalsPerSecond = bestRate(
      (n) => {
        for (let r = 0; r < n; r++, i++) {
          for (let j = 0; j < y.length; j++) y[j] = y0[j] + (1e-3 * (((i * 31 + j * 17) % 21) - 10)) / 10;
          sink += space.logDensity(y);
        }
      },
      10000,
      10,
      1000,
    );
    if (!Number.isFinite(sink)) densityEvalsPerSecond = null;
  } catch {
    densityEvalsPerSecond = null; // the sampler's coordinates moved elsewhere: iteration rate only
  }

  let last = 0;
  let lastCpu = cpuSeconds();
  const t0 = wallSeconds();
  let warmupSeconds = null;
  const rates = [];
  runChainJob(job, {
    progress(_chain, iteration) {
      const now = cpuSeconds();
      if (last >= warmup && iteration > last) rates.push((iteration - last) / (now - lastCpu));
      if (last < warmup && iteration >= warmup) warmupSeconds = wallSeconds() - t0;
      last = iteration;
      lastCpu = cpuSeconds();
    },
  });
  if (rates.length === 0) throw new Error('no sampling slice was timed; give more --iterations than --slice');
  const best = Math.max(...rates);
  emit({
    days: input.counts.length,
    dim: prepared.model.layout.dim,
    warmup,
    sampledIterations: iterations,
    slice,
    iterationsPerSecond: best,
    medianSliceIterationsPerSecond: rates.sort((a, b) => a - b)[Math.floor(rates.length / 2)],
    warmupWallSeconds: warmupSeconds,
    densityEvalsPerSecond,
    iterationCostInEvals: densityEvalsPerSecond === null ? null : densityEvalsPerSecond / best,
  });
}

async function fitChild(argv) {
  const { fitPosterior, DEFAULT_SAMPLER } = await dist('inference/fit.js');
  const { diagnosticRows } = await dist('outputs/summary.js');
  const sampler = {
    ...DEFAULT_SAMPLER,
    warmup: numberOption(argv, '--warmup', DEFAULT_SAMPLER.warmup),
    draws: numberOption(argv, '--draws', DEFAULT_SAMPLER.draws),
    thin: numberOption(argv, '--thin', DEFAULT_SAMPLER.thin),
  };
  const input = await demoInput();
  const c0 = cpuSeconds();
  const w0 = wallSeconds();
  const fit = await fitPosterior(input, sampler);
  const wall = wallSeconds() - w0;
  const cpu = cpuSeconds() - c0;
  const rows = diagnosticRows(fit.model.layout, fit.chains.map((c) => c.draws));
  const minBulk = Math.min(...rows.map((r) => r.ess_bulk));
  const minTail = Math.min(...rows.map((r) => r.ess_tail));
  const maxRhat = Math.max(...rows.map((r) => r.rhat));
  const worst = rows.reduce((a, r) => (r.ess_bulk < a.ess_bulk ? r : a), rows[0]);
  emit({
    sampler: { chains: sampler.chains, warmup: sampler.warmup, draws: sampler.draws, thin: sampler.thin, threads: sampler.threads, seed: sampler.seed },
    wallSeconds: wall,
    cpuSeconds: cpu,
    prepareSeconds: fit.timings.prepareSeconds,
    samplingSeconds: fit.timings.samplingSeconds,
    minEssBulk: minBulk,
    minEssTail: minTail,
    maxRhat,
    slowestParameter: worst.parameter,
    essBulkPerSecond: minBulk / wall,
    essBulkPerCpuSecond: minBulk / cpu,
  });
}

export async function measureSampler(ctx) {
  const chainArgs = ctx.quick ? ['--warmup', '1000', '--iterations', '2000', '--slice', '500'] : ['--warmup', '4000', '--iterations', '6000', '--slice', '1000'];
  const rounds = ctx.quick ? 1 : 2;
  let chain = null;
  for (let r = 0; r < rounds; r++) {
    ctx.progress(`sampler: one chain, round ${r + 1} of ${rounds}`);
    const one = runChild(SELF, ['--measure', 'chain', ...chainArgs]);
    if (chain === null || one.iterationsPerSecond > chain.iterationsPerSecond) chain = one;
  }
  const fitArgs = ctx.quick ? ['--warmup', '500', '--draws', '100', '--thin', '2'] : [];
  let fit = null;
  for (let r = 0; r < rounds; r++) {
    ctx.progress(`sampler: full fit, round ${r + 1} of ${rounds}`);
    const one = runChild(SELF, ['--measure', 'fit', ...fitArgs]);
    if (fit === null || one.wallSeconds < fit.wallSeconds) fit = one;
  }
  ctx.print(`Sampler (demo place, ${chain.days} days, ${chain.dim} parameters; one chain in one thread after ${chain.warmup} warm-up iterations)`);
  ctx.print(
    table(
      ['iterations/s (best slice)', 'median slice', 'sampler-space evals/s', 'iteration cost in evals'],
      [[fmt(chain.iterationsPerSecond, 4), fmt(chain.medianSliceIterationsPerSecond, 4), fmt(chain.densityEvalsPerSecond, 4), fmt(chain.iterationCostInEvals)]],
    ),
  );
  const s = fit.sampler;
  ctx.print(
    `Full fit (fitPosterior, ${s.chains} chains x (${s.warmup} warm-up + ${s.draws} x ${s.thin}), ${s.threads} threads, seed ${s.seed}${ctx.quick ? '; --quick: shortened' : ', the defaults'})`,
  );
  ctx.print(
    table(
      ['wall s', 'CPU s', 'prepare s', 'sampling s', 'min bulk ESS', 'min tail ESS', 'max R-hat', 'bulk ESS / wall s', 'bulk ESS / CPU s'],
      [[fmt(fit.wallSeconds), fmt(fit.cpuSeconds), fmt(fit.prepareSeconds), fmt(fit.samplingSeconds), fmt(fit.minEssBulk), fmt(fit.minEssTail), fmt(fit.maxRhat, 4), fmt(fit.essBulkPerSecond), fmt(fit.essBulkPerCpuSecond)]],
    ),
  );
  // what the sampling phase would take at the one-chain rate with the threads fully busy;
  // the rest is worker start-up, model rebuilding, warm-up adaptation, result transfer, load
  const perThread = Math.ceil(s.chains / Math.min(s.threads, s.chains)) * (s.warmup + s.draws * s.thin);
  const chainSeconds = perThread / chain.iterationsPerSecond;
  ctx.print(
    `(lowest bulk ESS: ${fit.slowestParameter}; of the ${fmt(fit.samplingSeconds)} s sampling phase, the iterations themselves ` +
      `at the one-chain rate account for about ${fmt(chainSeconds)} s)`,
  );
  return { rounds, chain, fit, samplingIterationSeconds: chainSeconds };
}

if (isMain(import.meta.url)) {
  const argv = process.argv.slice(2);
  const which = option(argv, '--measure', null);
  if (which === 'chain') await chainChild(argv);
  else if (which === 'fit') await fitChild(argv);
  else {
    console.error('usage: node scripts/bench/sampler.mjs --measure chain|fit [options]');
    process.exit(2);
  }
}
