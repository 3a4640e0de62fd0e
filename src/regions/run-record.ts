/**
 * run.json of a multi-region run (`"layout": "regions"`): the case file and the other input
 * files by SHA-256, the prior set, every option that shapes the results, which regions were
 * selected (and the shard), each region's folder, seed, population and status, and the
 * warnings about the run as a whole. `waxwane merge` reads it back to check that shards belong
 * to one run, and the report reads it for the page of the run.
 */
import { createHash } from 'node:crypto';
import { isDeepStrictEqual } from 'node:util';
import { readFileSync } from 'node:fs';
import { join } from 'node:path';
import { WaxwaneError, inputError } from '../errors.js';
import { readJsonDocument } from '../io/json.js';
import type { Shard } from './selection.js';
import type { RegionStatus } from './region-task.js';

export const REGIONS_LAYOUT = 'regions';

export interface RegionRecord {
  name: string;
  folder: string;
  status: RegionStatus;
  /** why it failed; null otherwise */
  message: string | null;
  /** the seed of its fit (derived from the run seed and its name) */
  seed: number;
  population: number | null;
  population_source: 'file' | 'column' | null;
  /** wall time of its fit, seconds */
  seconds: number;
}

export interface InputFile {
  file: string;
  sha256: string;
}

/** The parts of run.json that must agree between shards of one run. */
export interface RunIdentity {
  version: string;
  files: {
    cases: InputFile & { region_column: string; regions_in_file: number };
    populations: InputFile | null;
    scenarios: InputFile | null;
  };
  priors: { file: string; set: Record<string, unknown> };
  options: Record<string, unknown>;
  selection: { regions: number; names_sha256: string; shard: Shard | null };
}

export interface RegionsRun extends RunIdentity {
  tool: 'waxwane';
  command: 'fit' | 'merge';
  layout: typeof REGIONS_LAYOUT;
  /** shard folders joined by `waxwane merge` (empty for a fit) */
  merged_from: Array<{ folder: string; shard: Shard | null; timings_seconds: Record<string, number> }>;
  threads: number | null;
  workers: number | null;
  threads_per_region: number | null;
  versions: Record<string, string>;
  timings_seconds: Record<string, number>;
  counts: { regions: number; ok: number; not_converged: number; failed: number };
  regions: RegionRecord[];
  warnings: string[];
  caution: string;
}

/** SHA-256 of the selected names (sorted, one per line), so shards can show they share one selection. */
export function namesDigest(sorted: readonly string[]): string {
  return createHash('sha256').update(sorted.map((n) => `${JSON.stringify(n)}\n`).join(''), 'utf8').digest('hex');
}

export function countStatuses(regions: readonly RegionRecord[]): RegionsRun['counts'] {
  const n = (s: RegionStatus) => regions.filter((r) => r.status === s).length;
  return { regions: regions.length, ok: n('ok'), not_converged: n('not_converged'), failed: n('failed') };
}

/** The text of run.json. */
export function regionsRunJson(run: RegionsRun): string {
  return `${JSON.stringify(run, null, 2)}\n`;
}

type Json = Record<string, unknown>;

function get(file: string, obj: Json, path: string, check: (v: unknown) => boolean, what: string): unknown {
  let v: unknown = obj;
  for (const key of path.split('.')) {
    v = Array.isArray(v) ? (/^\d+$/.test(key) ? v[Number(key)] : undefined) : v !== null && typeof v === 'object' ? (v as Json)[key] : undefined;
  }
  if (!check(v)) {
    throw inputError({ file, field: path }, `must be ${what}, got ${v === undefined ? 'nothing' : JSON.stringify(v)}`, 'write the run folder again with this version of waxwane');
  }
  return v;
}

const isString = (v: unknown) => typeof v === 'string';
const isNumber = (v: unknown) => typeof v === 'number' && Number.isFinite(v);
const isObject = (v: unknown) => v !== null && typeof v === 'object' && !Array.isArray(v);
const isArray = (v: unknown) => Array.isArray(v);
const isFileOrNull = (v: unknown) => v === null || (isObject(v) && isString((v as Json).file) && isString((v as Json).sha256));
const isShardOrNull = (v: unknown) => v === null || (isObject(v) && isNumber((v as Json).index) && isNumber((v as Json).count));
const STATUSES = new Set(['ok', 'not_converged', 'failed']);

/** Whether `dir/run.json` is the record of a multi-region run (false when unreadable). */
export function isRegionsRunFolder(dir: string): boolean {
  try {
    const raw = JSON.parse(readFileSync(join(dir, 'run.json'), 'utf8')) as unknown;
    return isObject(raw) && (raw as Json).layout === REGIONS_LAYOUT;
  } catch {
    return false;
  }
}

/**
 * Reads and checks `dir/run.json` of a multi-region run.
 *
 * @throws WaxwaneError when the folder has no run.json, when it is the record of a
 *   single-region fit, or when a field is missing or of the wrong kind.
 */
export function readRegionsRun(dir: string): RegionsRun {
  const file = join(dir, 'run.json');
  let text: string;
  try {
    text = readFileSync(file, 'utf8');
  } catch (e) {
    const code = (e as NodeJS.ErrnoException).code ?? 'error';
    throw new WaxwaneError(
      code === 'ENOENT'
        ? `${dir}: no run.json in this folder; give the --out folder of a finished "waxwane fit" over several regions (a shard that stopped early has none: run it again)`
        : `${file}: cannot be read (${code}); check the folder and its permissions`,
    );
  }
  const raw = readJsonDocument(text, file, {
    what: 'a run record',
    emptyFix: 'write the run folder again (waxwane fit)',
    layoutHint: 'give the output folder of a waxwane run',
  });
  if (raw.tool !== 'waxwane') throw inputError({ file, field: 'tool' }, 'this is not a run record written by waxwane', 'give the output folder of a waxwane run');
  if (raw.layout !== REGIONS_LAYOUT) {
    throw new WaxwaneError(`${dir}: the run of a single place, not of several regions; give the --out folders of "waxwane fit" runs over a file with a region column`);
  }
  get(file, raw, 'version', isString, 'a version');
  get(file, raw, 'command', (v) => v === 'fit' || v === 'merge', '"fit" or "merge"');
  get(file, raw, 'files.cases.file', isString, 'a file name');
  get(file, raw, 'files.cases.sha256', isString, 'a hash');
  get(file, raw, 'files.cases.region_column', isString, 'a column name');
  get(file, raw, 'files.populations', isFileOrNull, 'a file and its hash, or null');
  get(file, raw, 'files.scenarios', isFileOrNull, 'a file and its hash, or null');
  get(file, raw, 'priors.file', isString, 'a file name');
  get(file, raw, 'priors.set', isObject, 'an object');
  get(file, raw, 'options', isObject, 'an object');
  get(file, raw, 'options.quantiles', (v) => isArray(v) && (v as unknown[]).every(isNumber), 'a list of levels');
  get(file, raw, 'selection.regions', isNumber, 'a number');
  get(file, raw, 'selection.names_sha256', isString, 'a hash');
  get(file, raw, 'selection.shard', isShardOrNull, 'a shard {index, count} or null');
  get(file, raw, 'warnings', (v) => isArray(v) && (v as unknown[]).every(isString), 'a list of sentences');
  get(file, raw, 'caution', isString, 'a sentence');
  const regions = get(file, raw, 'regions', isArray, 'a list') as unknown[];
  regions.forEach((_, i) => {
    const at = `regions.${i}`;
    get(file, raw, `${at}.name`, isString, 'a region name');
    get(file, raw, `${at}.folder`, (v) => isString(v) && /^[a-z0-9][a-z0-9-]*$/.test(v as string), 'a folder name (a-z, 0-9, -)');
    get(file, raw, `${at}.status`, (v) => STATUSES.has(v as string), '"ok", "not_converged" or "failed"');
    get(file, raw, `${at}.seed`, isNumber, 'a seed');
  });
  return raw as unknown as RegionsRun;
}

/** The options that differ between two runs (names of run.json fields), for messages. */
export function differingOptions(a: Json, b: Json): string[] {
  const keys = [...new Set([...Object.keys(a), ...Object.keys(b)])];
  return keys.filter((k) => !isDeepStrictEqual(a[k], b[k]));
}
