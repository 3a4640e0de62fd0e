/**
 * Which regions a run fits: `--regions A,B` picks some of the file's regions, and
 * `--shard K/N` keeps the K-th of N shares of those, so that N independent jobs (a job array of
 * a batch scheduler) fit every region exactly once. The share depends only on the sorted list
 * of selected names: region i (0-based, JavaScript string order) goes to shard (i mod N) + 1,
 * which spreads the regions evenly (shard sizes differ by at most one) and needs no
 * coordination between the jobs.
 */
import { WaxwaneError } from '../errors.js';
import { listNames } from './populations.js';

export interface Shard {
  /** 1-based */
  index: number;
  count: number;
}

/** Most shards a run may be split into. */
export const MAX_SHARDS = 100_000;

/**
 * Parses `K/N` (1 <= K <= N <= {@link MAX_SHARDS}).
 *
 * @throws WaxwaneError otherwise.
 * @example parseShard('2/8') // { index: 2, count: 8 }
 */
export function parseShard(text: string): Shard {
  const m = /^\s*(\d+)\s*\/\s*(\d+)\s*$/.exec(text);
  const index = m === null ? NaN : Number(m[1]);
  const count = m === null ? NaN : Number(m[2]);
  if (m === null || !(count >= 1 && count <= MAX_SHARDS) || !(index >= 1 && index <= count)) {
    throw new WaxwaneError(
      `--shard must be K/N with whole numbers 1 <= K <= N <= ${MAX_SHARDS} (the K-th of N jobs), got "${text}"; ` +
        'a job array numbered from 0 passes K = index + 1',
    );
  }
  return { index, count };
}

/** The regions of `sorted` that fall to `shard` (all of them for null). */
export function shardRegions(sorted: readonly string[], shard: Shard | null): string[] {
  if (shard === null) return sorted.slice();
  return sorted.filter((_, i) => i % shard.count === shard.index - 1);
}

/**
 * The names of a `--regions` list: separated by commas, spaces around a name ignored, and a
 * name that holds a comma written in double quotes as in CSV (`Tansy,"Marl, Upper"`, a quote
 * inside doubled).
 *
 * @throws WaxwaneError for an unclosed quote or text after a closing quote.
 * @example regionList(' Tansy , "Marl, Upper"') // ['Tansy', 'Marl, Upper']
 */
export function regionList(list: string): string[] {
  const names: string[] = [];
  const blank = (c: string | undefined) => c === ' ' || c === '\t';
  let i = 0;
  for (;;) {
    while (blank(list[i])) i += 1;
    if (list[i] === '"') {
      let name = '';
      for (i += 1; ; i += 1) {
        if (i >= list.length) throw new WaxwaneError(`--regions ${JSON.stringify(list)}: a quoted name is never closed; close it with a double quote`);
        if (list[i] === '"') {
          if (list[i + 1] !== '"') break;
          i += 1;
        }
        name += list[i];
      }
      i += 1;
      while (blank(list[i])) i += 1;
      if (i < list.length && list[i] !== ',') throw new WaxwaneError(`--regions ${JSON.stringify(list)}: text follows a quoted name; separate names with commas`);
      names.push(name);
    } else {
      const end = list.indexOf(',', i);
      names.push(list.slice(i, end === -1 ? list.length : end).trim());
      i = end === -1 ? list.length : end;
    }
    if (i >= list.length) return names;
    i += 1; // the comma
  }
}

/**
 * The regions named by `--regions` (see {@link regionList}), in the order of `names`; all of
 * `names` when `list` is undefined.
 *
 * @throws WaxwaneError for an empty name, a name given twice, or a name not in the file.
 */
export function selectRegions(names: readonly string[], list: string | undefined, file: string): string[] {
  if (list === undefined) return names.slice();
  const wanted = regionList(list);
  if (wanted.some((w) => w === '')) {
    throw new WaxwaneError(`--regions "${list}" holds an empty name; separate region names with single commas`);
  }
  const twice = wanted.filter((w, i) => wanted.indexOf(w) !== i);
  if (twice.length > 0) throw new WaxwaneError(`--regions names ${listNames([...new Set(twice)])} more than once; name each region once`);
  const known = new Set(names);
  const unknown = wanted.filter((w) => !known.has(w));
  if (unknown.length > 0) {
    throw new WaxwaneError(
      `${file}: no region ${listNames(unknown)} in the file (regions: ${listNames(names)}); check the names given to --regions (case counts; quote a name holding a comma: "Marl, Upper")`,
    );
  }
  const set = new Set(wanted);
  return names.filter((n) => set.has(n));
}
