/**
 * `waxwane fit CASES.csv --out DIR` on a file of several regions: every region (or those of
 * `--regions`, or the share of `--shard K/N`) gets its own independent fit, on a pool of worker
 * threads, into DIR/regions/FOLDER/ (the files of a single fit); DIR gets the combined tables
 * (regions/combined.ts), run.json with each region's status, and the report page of the run.
 * A region whose data are refused or whose fit fails is reported and never stops the others.
 *
 * Cores: with R regions and T threads, min(T, R) regions are fitted at once, each with
 * floor(T / min(T, R)) threads for its chains (its own thread when that is 1). Many regions
 * thus run one per core, which keeps every core busy through the parts of a fit that run on
 * one thread (the mode, the summaries, the report), and a few regions share the cores among
 * their chains. Each region's seed comes from the run seed and its name, and a fit does not
 * depend on its thread count, so the results are the same bytes whatever --threads, the
 * order in which fits finish, or the shard.
 */
import { basename, join } from 'node:path';
import { performance } from 'node:perf_hooks';
import { WaxwaneError, oneLineMessage } from '../errors.js';
import { prepareOutputDir, OutputSet } from '../io/atomic.js';
import { resolvePriorSet, resolvePriorSetPath } from '../io/priors.js';
import { readScenarioFile } from '../io/forecast-scenarios.js';
import { formatNumber } from '../outputs/format.js';
import { VERSION } from '../version.js';
import { countRegions, readRegionCases } from '../regions/read-cases.js';
import { regionFolders } from '../regions/folders.js';
import { readPopulations, resolvePopulations } from '../regions/populations.js';
import { parseShard, selectRegions, shardRegions } from '../regions/selection.js';
import { regionSeed } from '../regions/seeds.js';
import { failedOutcome, type RegionOutcome, type RegionTask } from '../regions/region-task.js';
import { COMBINED_FILES, LAST_DAY_QUANTITY, combineTables, regionRow, regionsCsv, summaryFields, tableHeaders } from '../regions/combined.js';
import { countStatuses, namesDigest, regionsRunJson, REGIONS_LAYOUT, type RegionRecord, type RegionsRun } from '../regions/run-record.js';
import { checkForecastOptionsNeedHorizon } from './forecast.js';
import { CAUTION, samplingOptionsRecord, type FitCliOptions } from './fit.js';
import type { Reporter } from './reporter.js';
import { createHash } from 'node:crypto';
import { readFileSync } from 'node:fs';

/**
 * Whether `waxwane fit` (without --region) takes the multi-region path: an option of that path
 * was given, or the file's region column names several regions.
 */
export function wantsManyRegions(casesFile: string, o: FitCliOptions): boolean {
  if (o.regions !== undefined || o.shard !== undefined || o.populations !== undefined) return true;
  const n = countRegions(casesFile, o.regionColumn, 2);
  return n !== null && n > 1;
}

/** How the threads are shared: regions fitted at once, and chain threads per region (0: its own thread). */
export function shareThreads(threads: number, regions: number): { workers: number; chainThreads: number } {
  const workers = Math.min(threads, regions);
  const each = workers === 0 ? 0 : Math.floor(threads / workers);
  return { workers, chainThreads: each >= 2 ? each : 0 };
}

function sha256File(file: string): string {
  return createHash('sha256').update(readFileSync(file)).digest('hex');
}

/** A name for the terminal: one line, no escape sequences. */
function shown(name: string): string {
  return oneLineMessage(name);
}

/** "0.93 [0.85, 1.02]" from the written fields of a summary row (mean, sd, quantiles). */
function rowInterval(fields: string[] | null, levels: readonly number[]): string {
  if (fields === null) return 'n/a';
  const q = fields.slice(2).map(Number);
  const mid = levels.findIndex((p) => Math.abs(p - 0.5) < 1e-12);
  const centre = mid >= 0 ? q[mid]! : Number(fields[0]);
  return `${formatNumber(centre, 3)} [${formatNumber(q[0]!, 3)}, ${formatNumber(q[q.length - 1]!, 3)}]`;
}

function outcomeLine(o: RegionOutcome, folder: string, levels: readonly number[]): string {
  const run = o.run!;
  const rt = rowInterval(summaryFields(o.files!.summary, LAST_DAY_QUANTITY, run.lastDate), levels);
  const verdict = o.status === 'ok' ? 'converged' : `NOT converged (max R-hat ${formatNumber(run.maxRhat, 4)})`;
  const p = o.probAbove1 === null ? '' : `, P(R_t > 1) ${formatNumber(o.probAbove1, 3)}`;
  return `${shown(o.name)}: ${verdict}; R_t on ${run.lastDate} ${rt}${p} (regions/${folder}/)`;
}

export async function runFitRegions(casesFile: string, o: FitCliOptions, reporter: Reporter): Promise<number> {
  const started = performance.now();
  // 1. every input checked before anything is written
  const shard = o.shard === undefined ? null : parseShard(o.shard);
  if (o.triangle !== undefined) {
    throw new WaxwaneError('--triangle holds the reports of one place; fit that region alone with --region to use it, or leave out --triangle');
  }
  if (o.resume === true) {
    throw new WaxwaneError('--resume continues the fit of one place; a run over several regions (or a shard) is started again as a whole, with --force');
  }
  const cases = readRegionCases(casesFile, { dateColumn: o.dateColumn, countColumn: o.countColumn, regionColumn: o.regionColumn });
  if (o.population !== undefined) {
    const names = cases.names;
    throw new WaxwaneError(
      `${casesFile}: the file holds ${names.length} region${names.length === 1 ? '' : 's'} (${names.slice(0, 10).join(', ')}${names.length > 10 ? ', ...' : ''}); choose one with --region, ` +
        'or fit them all with each region\'s population from --populations FILE (CSV region,population) or a "population" column instead of --population',
    );
  }
  const selected = selectRegions(cases.names, o.regions, casesFile);
  const mine = shardRegions(selected, shard);
  const table = o.populations === undefined ? null : readPopulations(o.populations, o.regionColumn);
  const populations = resolvePopulations(
    selected.filter((n) => !cases.failed.has(n)),
    cases.names,
    cases.series,
    table,
    casesFile,
  );
  // the series of other shards' regions are not needed past this point
  const kept = new Set(mine);
  for (const name of [...cases.series.keys()]) if (!kept.has(name)) cases.series.delete(name);
  const priorPath = resolvePriorSetPath(o.priors);
  const priorSet = resolvePriorSet(o.priors);
  checkForecastOptionsNeedHorizon(o);
  if (o.scenarios !== undefined) readScenarioFile(o.scenarios);
  prepareOutputDir(o.out, { force: o.force });
  const warnings = [...cases.fileWarnings, ...populations.warnings];
  for (const w of warnings) reporter.warn(w);

  // 2. fit the regions
  const folders = regionFolders(cases.names);
  const todo = mine.filter((n) => !cases.failed.has(n));
  const { workers, chainThreads } = shareThreads(o.threads, todo.length);
  const options: FitCliOptions = { ...o };
  const tasks: RegionTask[] = todo.map((name) => ({
    name,
    folder: join(o.out, 'regions', folders.get(name)!),
    casesFile,
    sha256: cases.sha256,
    warnings: cases.regionWarnings.get(name) ?? [],
    series: cases.series.get(name)!,
    population: populations.values.get(name)!,
    seed: regionSeed(o.seed, name),
    threads: chainThreads,
    options,
    argv: process.argv.slice(2),
  }));
  const shardText = shard === null ? '' : `, shard ${shard.index}/${shard.count} of ${selected.length}`;
  reporter.info(
    `fitting ${todo.length} region${todo.length === 1 ? '' : 's'} of ${casesFile} (${cases.names.length} in the file${shardText}) ` +
      `on ${workers} worker thread${workers === 1 ? '' : 's'}${chainThreads > 0 ? `, ${chainThreads} chain threads each` : ''}: ` +
      `${o.chains} chains x (${o.warmup} warm-up + ${o.draws * o.thin}) iterations per region`,
  );
  for (const name of mine.filter((n) => cases.failed.has(n))) reporter.warn(`region ${JSON.stringify(name)} failed: ${cases.failed.get(name)!}`);

  const active = new Map<string, string>();
  let finishedCount = 0;
  const showProgress = () => {
    const now = [...active].map(([name, m]) => `${shown(name).slice(0, 24)} ${m}`).join(', ');
    reporter.progress(`regions ${finishedCount}/${todo.length} done${now === '' ? '' : `; ${now}`}`);
  };
  const { runRegionTasks } = await import('../regions/pool.js');
  const outcomes = await runRegionTasks(tasks, workers, {
    start: (name) => {
      active.set(name, 'preparing');
      showProgress();
    },
    progress: (name, message) => {
      active.set(name, /(\d+%)\s*$/.exec(message)?.[1] ?? message);
      showProgress();
    },
    done: (outcome, finished, total) => {
      active.delete(outcome.name);
      finishedCount = finished;
      const folder = folders.get(outcome.name)!;
      if (outcome.status === 'failed') reporter.warn(`region ${JSON.stringify(outcome.name)} failed: ${outcome.message ?? ''}`);
      else reporter.info(`[${finished}/${total}] ${outcomeLine(outcome, folder, o.quantiles)}`);
      for (const n of outcome.notes) reporter.warn(`region ${JSON.stringify(outcome.name)}: ${n}`);
      showProgress();
    },
  });
  reporter.done();

  // 3. the combined outputs, written at once
  const byName = new Map(outcomes.map((x) => [x.name, x]));
  const entries = mine.map((name) => ({
    name,
    folder: folders.get(name)!,
    population: populations.values.get(name) ?? null,
    outcome: byName.get(name) ?? failedOutcome(name, cases.failed.get(name) ?? 'not fitted'),
  }));
  const records: RegionRecord[] = entries.map((e) => ({
    name: e.name,
    folder: e.folder,
    status: e.outcome.status,
    message: e.outcome.message,
    seed: regionSeed(o.seed, e.name),
    population: e.population,
    population_source: populations.source.get(e.name) ?? null,
    seconds: e.outcome.seconds,
  }));
  const files = combinedFiles(entries, o.quantiles, o.horizon > 0, o.out);
  const run: RegionsRun = {
    tool: 'waxwane',
    version: VERSION,
    command: 'fit',
    layout: REGIONS_LAYOUT,
    files: {
      cases: { file: basename(casesFile), sha256: cases.sha256, region_column: o.regionColumn, regions_in_file: cases.names.length },
      populations: table === null ? null : { file: basename(table.file), sha256: table.sha256 },
      scenarios: o.scenarios === undefined ? null : { file: basename(o.scenarios), sha256: sha256File(o.scenarios) },
    },
    priors: { file: basename(priorPath), set: priorSet as unknown as Record<string, unknown> },
    options: runOptions(o),
    selection: { regions: selected.length, names_sha256: namesDigest(selected), shard },
    merged_from: [],
    threads: o.threads,
    workers,
    threads_per_region: Math.max(1, chainThreads),
    versions: { node: process.versions.node, waxwane: VERSION },
    timings_seconds: { total: Number(((performance.now() - started) / 1000).toPrecision(4)) },
    counts: countStatuses(records),
    regions: records,
    warnings,
    caution: CAUTION,
  };
  const out = new OutputSet(o.out);
  for (const [name, text] of files) out.add(name, text);
  out.add('run.json', regionsRunJson(run));
  out.commit();

  // 4. tell the user
  return finishRegionsRun(o.out, run, { report: o.report, requireConverged: o.requireConverged }, reporter);
}

/** The options of run.json: those that shape the results (not threads, not the output folder). */
export function runOptions(o: FitCliOptions): Record<string, unknown> {
  return {
    ...samplingOptionsRecord(o),
    regions: o.regions ?? null,
    require_converged: o.requireConverged,
    horizon: o.horizon,
    hold: o.hold,
    scale: o.scale ?? null,
    from: o.from ?? null,
    until: o.until ?? null,
  };
}

/** The combined tables from the regions' outcomes (regions/combined.ts). */
export function combinedFiles(
  entries: ReadonlyArray<{ name: string; folder: string; population: number | null; outcome: RegionOutcome }>,
  levels: readonly number[],
  forecast: boolean,
  dir: string,
): Array<[string, string]> {
  const headers = tableHeaders(levels);
  const fitted = entries.filter((e) => e.outcome.files !== null);
  const tables = (pick: (f: NonNullable<RegionOutcome['files']>) => string | null, file: string) =>
    fitted.flatMap((e) => {
      const text = pick(e.outcome.files!);
      return text === null ? [] : [{ name: e.name, text, file: join(dir, 'regions', e.folder, file) }];
    });
  const files: Array<[string, string]> = [
    [COMBINED_FILES.summary, combineTables(headers.summary, tables((f) => f.summary, 'summary.csv'))],
    [COMBINED_FILES.diagnostics, combineTables(headers.diagnostics, tables((f) => f.diagnostics, 'diagnostics.csv'))],
  ];
  if (forecast) files.push([COMBINED_FILES.forecast, combineTables(headers.forecast, tables((f) => f.forecast, 'forecast.csv'))]);
  files.push([COMBINED_FILES.regions, regionsCsv(levels, entries.map((e) => regionRow(e, levels)))]);
  return files;
}

/**
 * The end of a multi-region run or merge: counts and verdict on the terminal, the report page,
 * and the exit code: 4 when a region failed, else 3 when one did not converge under
 * --require-converged, else 0.
 */
export async function finishRegionsRun(
  dir: string,
  run: RegionsRun,
  o: { report: boolean; requireConverged: boolean },
  reporter: Reporter,
): Promise<number> {
  const c = run.counts;
  reporter.info(`${c.regions} region${c.regions === 1 ? '' : 's'}: ${c.ok} converged, ${c.not_converged} not converged, ${c.failed} failed`);
  if (c.not_converged > 0) reporter.warn(`${c.not_converged} region${c.not_converged === 1 ? '' : 's'} did NOT converge (status not_converged in regions.csv): run longer (--warmup, --draws, --thin) before using their results`);
  if (c.failed > 0) reporter.warn(`${c.failed} region${c.failed === 1 ? '' : 's'} failed (status failed in regions.csv, with the reason); the other regions' outputs are complete`);
  reporter.info(`outputs in ${dir}/ (${Object.values(COMBINED_FILES).filter((f) => f !== 'forecast.csv' || run.options.horizon !== 0).join(', ')}, run.json; each region's own outputs in ${dir}/regions/)`);
  if (o.report) {
    const { writeRegionsReport } = await import('../outputs/report/regions-page.js');
    try {
      reporter.info(`report: ${await writeRegionsReport(dir)}`);
    } catch (e) {
      if (!(e instanceof WaxwaneError)) throw e;
      reporter.warn(`report.html not written (${e.message}); the other outputs are complete; try again with "waxwane report ${dir}"`);
    }
  }
  reporter.info(`caution: ${CAUTION}`);
  if (c.failed > 0) return 4;
  return c.not_converged > 0 && o.requireConverged ? 3 : 0;
}

/** `waxwane report DIR` on the folder of a multi-region run: its page (outputs/report/regions-page.ts). */
export async function runRegionsReport(dir: string, o: { out?: string; quiet: boolean }, reporter: Reporter): Promise<number> {
  if (o.out !== undefined && !o.out.toLowerCase().endsWith('.html')) {
    throw new WaxwaneError(`--out ${o.out}: the report is an HTML page; give a file name ending in .html`);
  }
  const { writeRegionsReport } = await import('../outputs/report/regions-page.js');
  const path = await writeRegionsReport(dir, o.out);
  reporter.info(`report written: ${path} (open it in a browser; it needs no network)`);
  return 0;
}
