/**
 * `waxwane merge DIR... --out DIR`: joins the output folders of the shards of one multi-region
 * fit (`waxwane fit ... --shard K/N`, one job each) into the folder the same fit without
 * shards would have written: the regions' folders, and the combined tables built by the same
 * code from the same files, so summary.csv, diagnostics.csv, forecast.csv and regions.csv are
 * the same bytes. run.json lists the shards merged (timings and threads differ by nature).
 *
 * Refused, with a message naming the folders: a folder that is not a shard of a multi-region
 * fit, shards of different data (SHA-256 of the case, populations and scenario files), prior
 * sets, options, versions or selections of regions, a shard given twice or missing, and a
 * region present in two shards or in none.
 */
import { cpSync, existsSync, readFileSync } from 'node:fs';
import { join, resolve } from 'node:path';
import { performance } from 'node:perf_hooks';
import { isDeepStrictEqual } from 'node:util';
import { WaxwaneError } from '../errors.js';
import { OutputSet, prepareOutputDir } from '../io/atomic.js';
import { VERSION } from '../version.js';
import { COMBINED_FILES, combineTables, parseRegionsCsv, regionsCsv, tableHeaders, type RegionTable, type RegionsRow } from '../regions/combined.js';
import { countStatuses, differingOptions, namesDigest, readRegionsRun, regionsRunJson, type RegionRecord, type RegionsRun } from '../regions/run-record.js';
import { shardRegions } from '../regions/selection.js';
import { CAUTION } from './fit.js';
import { finishRegionsRun } from './fit-regions.js';
import type { Reporter } from './reporter.js';

export interface MergeCliOptions {
  out: string;
  force: boolean;
  quiet: boolean;
  /** write report.html (false with --no-report) */
  report: boolean;
}

interface Shard {
  dir: string;
  run: RegionsRun;
}

function shardName(s: Shard): string {
  const sh = s.run.selection.shard;
  return sh === null ? 'the whole run' : `shard ${sh.index}/${sh.count}`;
}

/** Refuses two folders that are not shards of one run. */
function checkSameRun(a: Shard, b: Shard): void {
  const refuse = (what: string) => {
    throw new WaxwaneError(`${b.dir} and ${a.dir} are not shards of one run: ${what}; merge only the shards of one "waxwane fit" command`);
  };
  if (a.run.version !== b.run.version) refuse(`written by waxwane ${b.run.version} and ${a.run.version}`);
  const fa = a.run.files;
  const fb = b.run.files;
  if (fa.cases.sha256 !== fb.cases.sha256) {
    refuse(`they fitted different case files (${fb.cases.file}, SHA-256 ${fb.cases.sha256.slice(0, 12)}...; ${fa.cases.file}, SHA-256 ${fa.cases.sha256.slice(0, 12)}...)`);
  }
  if (fa.cases.region_column !== fb.cases.region_column) refuse(`region columns "${fb.cases.region_column}" and "${fa.cases.region_column}"`);
  const same = (x: { sha256: string } | null, y: { sha256: string } | null) => (x === null ? y === null : y !== null && x.sha256 === y.sha256);
  if (!same(fa.populations, fb.populations)) refuse('different populations files (--populations)');
  if (!same(fa.scenarios, fb.scenarios)) refuse('different forecast scenario files (--scenarios)');
  if (!isDeepStrictEqual(a.run.priors.set, b.run.priors.set)) refuse(`different prior sets (${b.run.priors.file}, ${a.run.priors.file})`);
  const options = differingOptions(a.run.options, b.run.options);
  if (options.length > 0) {
    refuse(`different options: ${options.map((k) => `${k} ${JSON.stringify(b.run.options[k] ?? null)} and ${JSON.stringify(a.run.options[k] ?? null)}`).join(', ')}`);
  }
  if (a.run.selection.names_sha256 !== b.run.selection.names_sha256 || a.run.selection.regions !== b.run.selection.regions) {
    refuse(`different selections of regions (${b.run.selection.regions} and ${a.run.selection.regions} regions; --regions)`);
  }
}

export async function runMerge(dirs: string[], o: MergeCliOptions, reporter: Reporter): Promise<number> {
  const started = performance.now();
  // 1. check that the folders are the shards of one run, every region exactly once
  const seenDirs = new Map<string, string>();
  for (const d of dirs) {
    const key = resolve(d);
    if (seenDirs.has(key)) throw new WaxwaneError(`${d}: given twice (also as ${seenDirs.get(key)}); give each shard's folder once`);
    if (key === resolve(o.out)) throw new WaxwaneError(`--out ${o.out} is one of the folders to merge; write the merged run to a folder of its own`);
    seenDirs.set(key, d);
  }
  const shards: Shard[] = dirs.map((dir) => ({ dir, run: readRegionsRun(dir) }));
  const first = shards[0]!;
  for (const s of shards.slice(1)) checkSameRun(first, s);
  const count = first.run.selection.shard?.count ?? 1;
  const byIndex = new Map<number, Shard>();
  for (const s of shards) {
    const sh = s.run.selection.shard ?? { index: 1, count: 1 };
    if (sh.count !== count) {
      throw new WaxwaneError(`${s.dir} is ${shardName(s)} and ${first.dir} ${shardName(first)}: shards of one run share N in --shard K/N; give the folders of one job array`);
    }
    const other = byIndex.get(sh.index);
    if (other !== undefined) throw new WaxwaneError(`${shardName(s)} is given twice: ${other.dir} and ${s.dir}; give each shard once`);
    byIndex.set(sh.index, s);
  }
  const missing = Array.from({ length: count }, (_, i) => i + 1).filter((k) => !byIndex.has(k));
  if (missing.length > 0) {
    throw new WaxwaneError(
      `shard${missing.length > 1 ? 's' : ''} ${missing.slice(0, 10).map((k) => `${k}/${count}`).join(', ')}${missing.length > 10 ? ', ...' : ''} missing: ` +
        `no folder given for ${missing.length > 1 ? 'them' : 'it'}; run the missing job${missing.length > 1 ? 's' : ''} (waxwane fit ... --shard K/${count}) and give every shard's folder`,
    );
  }
  const owner = new Map<string, Shard>();
  for (const s of shards) {
    for (const r of s.run.regions) {
      const other = owner.get(r.name);
      if (other !== undefined) throw new WaxwaneError(`region ${JSON.stringify(r.name)} is in ${other.dir} and in ${s.dir}; every region must be in exactly one shard`);
      owner.set(r.name, s);
    }
  }
  const names = [...owner.keys()].sort((a, b) => (a < b ? -1 : a > b ? 1 : 0));
  if (names.length !== first.run.selection.regions || namesDigest(names) !== first.run.selection.names_sha256) {
    throw new WaxwaneError(
      `the shards hold ${names.length} regions, but the run selected ${first.run.selection.regions} others; a shard folder is incomplete or from another run: fit its shard again`,
    );
  }
  for (const s of shards) {
    const share = shardRegions(names, s.run.selection.shard);
    if (!isDeepStrictEqual(share, s.run.regions.map((r) => r.name))) {
      throw new WaxwaneError(`${s.dir}: its regions are not those of ${shardName(s)}; the folder was changed or comes from another run: fit its shard again`);
    }
  }
  const levels = first.run.options.quantiles as number[];
  const horizon = Number(first.run.options.horizon);

  // 2. the regions' rows and tables, each from the shard that fitted it
  const rows: RegionsRow[] = [];
  const tables: Record<'summary' | 'diagnostics' | 'forecast', RegionTable[]> = { summary: [], diagnostics: [], forecast: [] };
  for (const s of shards) {
    const file = join(s.dir, COMBINED_FILES.regions);
    let text: string;
    try {
      text = readFileSync(file, 'utf8');
    } catch {
      throw new WaxwaneError(`${file}: missing or unreadable; the shard did not finish: fit its shard again`);
    }
    const own = new Map(parseRegionsCsv(text, file, levels).map((r) => [r.region, r]));
    for (const rec of s.run.regions) {
      const row = own.get(rec.name);
      if (row === undefined || row.status !== rec.status || row.folder !== rec.folder) {
        throw new WaxwaneError(`${file}: the row of region ${JSON.stringify(rec.name)} is missing or disagrees with run.json; fit its shard again`);
      }
      rows.push(row);
      if (rec.status === 'failed') continue;
      const folder = join(s.dir, 'regions', rec.folder);
      const read = (name: string) => {
        const path = join(folder, name);
        try {
          return { name: rec.name, text: readFileSync(path, 'utf8'), file: path };
        } catch {
          throw new WaxwaneError(`${path}: missing or unreadable; the region's folder is incomplete: fit its shard again`);
        }
      };
      tables.summary.push(read('summary.csv'));
      tables.diagnostics.push(read('diagnostics.csv'));
      if (horizon > 0) tables.forecast.push(read('forecast.csv'));
    }
  }
  const headers = tableHeaders(levels);
  const files: Array<[string, string]> = [
    [COMBINED_FILES.summary, combineTables(headers.summary, tables.summary)],
    [COMBINED_FILES.diagnostics, combineTables(headers.diagnostics, tables.diagnostics)],
  ];
  if (horizon > 0) files.push([COMBINED_FILES.forecast, combineTables(headers.forecast, tables.forecast)]);
  files.push([COMBINED_FILES.regions, regionsCsv(levels, rows.map((r) => r.fields))]);

  // 3. write: the regions' folders, then the combined files and run.json at once
  prepareOutputDir(o.out, { force: o.force });
  for (const s of shards) {
    for (const rec of s.run.regions) {
      const from = join(s.dir, 'regions', rec.folder);
      if (existsSync(from)) cpSync(from, join(o.out, 'regions', rec.folder), { recursive: true, force: true });
    }
  }
  const records: RegionRecord[] = names.map((n) => owner.get(n)!.run.regions.find((r) => r.name === n)!);
  const warnings = [...new Set(shards.flatMap((s) => s.run.warnings))];
  const ordered = [...byIndex.keys()].sort((a, b) => a - b).map((k) => byIndex.get(k)!);
  const run: RegionsRun = {
    ...first.run,
    command: 'merge',
    selection: { ...first.run.selection, shard: null },
    merged_from: ordered.map((s) => ({ folder: s.dir, shard: s.run.selection.shard, timings_seconds: s.run.timings_seconds })),
    threads: null,
    workers: null,
    threads_per_region: null,
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
  reporter.info(`merged ${shards.length} shard${shards.length === 1 ? '' : 's'} (${names.length} regions) into ${o.out}/`);
  return finishRegionsRun(o.out, run, { report: o.report, requireConverged: run.options.require_converged === true }, reporter);
}
