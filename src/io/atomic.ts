/**
 * Output files that are either whole or absent. A file is written to a temporary name in its
 * own folder, flushed to disk, then renamed over the final name: a rename within one file
 * system is atomic (POSIX rename(2)), so a reader, or a crash, never sees half a file.
 * {@link OutputSet} extends this to a set of files: nothing reaches the output folder until
 * the whole set is staged.
 */
import {
  closeSync,
  fsyncSync,
  mkdirSync,
  openSync,
  readdirSync,
  renameSync,
  statSync,
  unlinkSync,
  writeSync,
  type Stats,
} from 'node:fs';
import { randomBytes } from 'node:crypto';
import { basename, dirname, join } from 'node:path';
import { WaxwaneError } from '../errors.js';

/** Temporary files made here start with this prefix, so that stray ones are recognisable. */
export const TEMP_PREFIX = '.waxwane-tmp-';

/**
 * The log an internal error leaves in the output folder (src/cli/internal-error.ts). A folder
 * holding nothing else counts as empty, so that the run can be tried again there.
 */
export const ERROR_LOG = 'waxwane-error.log';

/**
 * Writes `data` to `path` atomically: temporary file in the same folder, fsync, rename over
 * `path`, then fsync of the folder so the rename itself is durable (best effort: some
 * systems cannot fsync a folder).
 *
 * @throws WaxwaneError if the file cannot be written (missing folder, no permission, disk
 *   full, `path` is a folder); the temporary file is removed and an existing `path` is left
 *   as it was.
 */
export function writeFileAtomic(path: string, data: string | Uint8Array): void {
  targetCheck(path);
  const temp = writeTemp(dirname(path), basename(path), data, path);
  try {
    renameSync(temp, path);
  } catch (err) {
    removeQuietly(temp);
    throw writeError(path, err);
  }
  syncDirQuietly(dirname(path));
}

/**
 * Makes `dir` ready to receive output: creates it (with parents) if missing.
 *
 * An existing folder must be empty (or hold only the {@link ERROR_LOG} of a failed run)
 * unless `force` is set; with `force` its files are
 * overwritten one by one as outputs are written, and files that the run does not produce are
 * kept (nothing is deleted).
 *
 * @throws WaxwaneError if `dir` exists and is not a folder, if it is a non-empty folder and
 *   `force` is false, or if it cannot be created.
 */
export function prepareOutputDir(dir: string, options: { force: boolean }): void {
  const stats = statOrNull(dir);
  if (stats !== null && !stats.isDirectory()) {
    throw new WaxwaneError(
      `${dir}: exists and is not a folder; choose a folder name for the outputs`,
    );
  }
  if (stats !== null) {
    let entries: string[];
    try {
      entries = readdirSync(dir);
    } catch (err) {
      throw new WaxwaneError(`${dir}: cannot list this folder (${codeOf(err)}); check its permissions or choose another folder`);
    }
    if (entries.some((e) => e !== ERROR_LOG) && !options.force) {
      throw new WaxwaneError(
        `${dir}: the output folder is not empty (${entries.length} ${entries.length === 1 ? 'entry' : 'entries'}); pass --force to write over its files, or choose another folder`,
      );
    }
    // temporary files of a run killed while writing (only ours: they carry TEMP_PREFIX)
    for (const e of entries) {
      if (e.startsWith(TEMP_PREFIX)) {
        try {
          unlinkSync(join(dir, e));
        } catch {
          // gone already, or not ours to remove: harmless either way
        }
      }
    }
    return;
  }
  try {
    mkdirSync(dir, { recursive: true });
  } catch (err) {
    throw new WaxwaneError(
      `${dir}: cannot create the output folder (${codeOf(err)}); check the path and its permissions, or choose another folder`,
    );
  }
}

/**
 * A set of output files written together. `add` only stages a file in memory; `commit`
 * writes every staged file to a temporary name in `dir`, flushes each, and only when all of
 * them are safely on disk renames them to their final names. A run that fails before
 * `commit`, or whose `commit` fails while writing, leaves no new output file behind.
 *
 * @remarks Renames are atomic one by one, not as a group: only a crash during the final burst
 * of renames (no data is written then) could leave some files new and some old.
 */
export class OutputSet {
  readonly dir: string;
  private readonly staged = new Map<string, Uint8Array>();
  private committed = false;

  constructor(dir: string) {
    this.dir = dir;
  }

  /**
   * Stages `data` under the plain file name `name`. Bytes are copied, so later changes to
   * the caller's buffer do not change the output.
   *
   * @throws Error if `name` is not a plain file name, was already added, or the set is
   *   committed (programming errors, not user errors).
   */
  add(name: string, data: string | Uint8Array): void {
    if (this.committed) throw new Error(`OutputSet.add("${name}"): the set is already committed`);
    if (!isPlainFileName(name)) {
      throw new Error(`OutputSet.add: "${name}" is not a plain file name`);
    }
    if (this.staged.has(name)) throw new Error(`OutputSet.add: "${name}" was already added`);
    this.staged.set(name, typeof data === 'string' ? Buffer.from(data, 'utf8') : Uint8Array.from(data));
  }

  /** Names staged so far, in the order they were added. */
  names(): string[] {
    return [...this.staged.keys()];
  }

  /**
   * Writes all staged files (see the class notes). Creates `dir` if it is missing.
   *
   * @throws WaxwaneError if any file cannot be written; temporary files are then removed
   *   and no staged file appears under its final name.
   */
  commit(): void {
    if (this.committed) throw new Error('OutputSet.commit: the set is already committed');
    this.committed = true;
    try {
      mkdirSync(this.dir, { recursive: true });
    } catch (err) {
      throw new WaxwaneError(
        `${this.dir}: cannot create the output folder (${codeOf(err)}); check the path and its permissions, or choose another folder`,
      );
    }
    for (const name of this.staged.keys()) targetCheck(join(this.dir, name));

    const temps: Array<{ temp: string; path: string }> = [];
    try {
      for (const [name, data] of this.staged) {
        const path = join(this.dir, name);
        temps.push({ temp: writeTemp(this.dir, name, data, path), path });
      }
    } catch (err) {
      for (const { temp } of temps) removeQuietly(temp);
      throw err;
    }

    let renamed = 0;
    try {
      for (const { temp, path } of temps) {
        renameSync(temp, path);
        renamed += 1;
      }
    } catch (err) {
      for (const { temp } of temps.slice(renamed)) removeQuietly(temp);
      throw writeError(temps[renamed]!.path, err);
    }
    syncDirQuietly(this.dir);
    this.staged.clear();
  }
}

function isPlainFileName(name: string): boolean {
  return (
    name.length > 0 &&
    name !== '.' &&
    name !== '..' &&
    !name.includes('/') &&
    !name.includes('\\') &&
    !name.includes('\0') &&
    !name.startsWith(TEMP_PREFIX)
  );
}

/** Refuses a target that is a folder (a rename over it would fail after data is written). */
function targetCheck(path: string): void {
  if (statOrNull(path)?.isDirectory() === true) {
    throw new WaxwaneError(`${path}: is a folder, so an output file cannot be written there; move it away or choose another output folder`);
  }
}

/** Writes a flushed temporary file next to `finalPath`; returns its path. */
function writeTemp(dir: string, name: string, data: string | Uint8Array, finalPath: string): string {
  // the final name is kept (shortened) for anyone who finds a stray temporary file
  const temp = join(dir, `${TEMP_PREFIX}${randomBytes(6).toString('hex')}-${name.slice(0, 100)}`);
  const bytes = typeof data === 'string' ? Buffer.from(data, 'utf8') : data;
  let fd: number | null = null;
  try {
    fd = openSync(temp, 'wx', 0o666);
    let offset = 0;
    while (offset < bytes.length) offset += writeSync(fd, bytes, offset, bytes.length - offset);
    fsyncSync(fd);
    closeSync(fd);
    fd = null;
    return temp;
  } catch (err) {
    if (fd !== null) {
      try {
        closeSync(fd);
      } catch {
        // already failing; the original error is the one to report
      }
    }
    removeQuietly(temp);
    throw writeError(finalPath, err);
  }
}

function writeError(path: string, err: unknown): WaxwaneError {
  const code = codeOf(err);
  const why =
    code === 'ENOENT'
      ? 'its folder does not exist'
      : code === 'EACCES' || code === 'EPERM'
        ? 'permission denied'
        : code === 'ENOSPC'
          ? 'the disk is full'
          : code === 'EISDIR'
            ? 'a folder has that name'
            : code === 'EROFS'
              ? 'the file system is read-only'
              : code;
  return new WaxwaneError(`${path}: cannot write the file (${why}); choose an output folder you can write to`);
}

function syncDirQuietly(dir: string): void {
  let fd: number | null = null;
  try {
    fd = openSync(dir, 'r');
    fsyncSync(fd);
  } catch {
    // best effort: not every platform can fsync a folder
  } finally {
    if (fd !== null) {
      try {
        closeSync(fd);
      } catch {
        // nothing to do
      }
    }
  }
}

function removeQuietly(path: string): void {
  try {
    unlinkSync(path);
  } catch {
    // the file may never have been created
  }
}

function statOrNull(path: string): Stats | null {
  try {
    return statSync(path);
  } catch (err) {
    if (codeOf(err) === 'ENOENT' || codeOf(err) === 'ENOTDIR') return null;
    throw new WaxwaneError(`${path}: cannot be inspected (${codeOf(err)}); check the path and its permissions`);
  }
}

function codeOf(err: unknown): string {
  if (typeof err === 'object' && err !== null && 'code' in err && typeof err.code === 'string') {
    return err.code;
  }
  return err instanceof Error ? err.message : String(err);
}
