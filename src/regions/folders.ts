/**
 * The folder of each region's outputs (DIR/regions/NAME/): a name made of lower-case ASCII
 * letters, digits and `-` only, so that it is the same on every file system (case-insensitive
 * ones included), needs no quoting in a shell, and can never be read as an option or a path
 * (no leading `-`, no `.`, no `/`). Names are given from the sorted list of every region of
 * the case file, so a region has the same folder whichever regions or shard a run fits.
 */

/** Longest folder name before a `-2`, `-3`... that keeps it unique. */
const MAX_LENGTH = 48;

/** Device names that Windows refuses as file names, whatever the extension. */
const RESERVED = /^(con|prn|aux|nul|com[0-9]|lpt[0-9])$/;

/**
 * The readable part of a folder name: accents dropped (Unicode compatibility decomposition,
 * then combining marks removed), lower case, every run of other characters one `-`.
 *
 * @example folderStem('Brindle Cross') // 'brindle-cross'
 */
export function folderStem(name: string): string {
  const stem = name
    .normalize('NFKD')
    .replace(/\p{M}+/gu, '')
    .toLowerCase()
    .replace(/[^a-z0-9]+/g, '-')
    .replace(/^-+/, '')
    .slice(0, MAX_LENGTH)
    .replace(/-+$/, '');
  if (stem === '') return 'region';
  return RESERVED.test(stem) ? `${stem}-region` : stem;
}

/**
 * A unique folder name for every name of `names` (any order; they are taken in JavaScript
 * string order, and a name whose stem is taken gets the first free `-2`, `-3`...).
 */
export function regionFolders(names: readonly string[]): Map<string, string> {
  const sorted = [...new Set(names)].sort((a, b) => (a < b ? -1 : a > b ? 1 : 0));
  const taken = new Set<string>();
  const folders = new Map<string, string>();
  for (const name of sorted) {
    const stem = folderStem(name);
    let folder = stem;
    for (let k = 2; taken.has(folder); k++) folder = `${stem}-${k}`;
    taken.add(folder);
    folders.set(name, folder);
  }
  return folders;
}
