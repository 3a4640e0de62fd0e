import { mkdirSync, mkdtempSync, readFileSync, readdirSync, rmSync, statSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { afterAll, afterEach, beforeEach, describe, expect, it, vi } from 'vitest';
import { WaxwaneError } from '../../src/errors.js';
import { OutputSet, TEMP_PREFIX, prepareOutputDir, writeFileAtomic } from '../../src/io/atomic.js';

// A disk that fills up: when `failAtWrite` is n, the n-th write from now fails with ENOSPC.
const disk = vi.hoisted(() => ({ failAtWrite: 0, writes: 0 }));
vi.mock('node:fs', async (importOriginal) => {
  const fs = await importOriginal<typeof import('node:fs')>();
  const writeSync = ((...args: Parameters<typeof fs.writeSync>) => {
    disk.writes += 1;
    if (disk.failAtWrite > 0 && disk.writes === disk.failAtWrite) {
      throw Object.assign(new Error('ENOSPC: no space left on device, write'), { code: 'ENOSPC' });
    }
    return (fs.writeSync as (...a: unknown[]) => number)(...args);
  }) as typeof fs.writeSync;
  return { ...fs, default: { ...fs, writeSync }, writeSync };
});

const root = mkdtempSync(join(tmpdir(), 'waxwane-atomic-'));
afterAll(() => rmSync(root, { recursive: true, force: true }));
let n = 0;
function freshDir(): string {
  n += 1;
  const dir = join(root, `case-${n}`);
  mkdirSync(dir);
  return dir;
}
function fillDiskAfter(writes: number): void {
  disk.writes = 0;
  disk.failAtWrite = writes;
}
beforeEach(() => fillDiskAfter(0));
afterEach(() => fillDiskAfter(0));

function thrown(fn: () => unknown): WaxwaneError {
  try {
    fn();
  } catch (err) {
    expect(err).toBeInstanceOf(WaxwaneError);
    return err as WaxwaneError;
  }
  throw new Error('expected a WaxwaneError, nothing was thrown');
}

const listing = (dir: string) => readdirSync(dir).sort();
const temps = (dir: string) => readdirSync(dir).filter((f) => f.startsWith(TEMP_PREFIX));

describe('writeFileAtomic', () => {
  it('writes text and bytes, replaces an existing file, leaves no temporary file', () => {
    const dir = freshDir();
    const path = join(dir, 'out.csv');
    writeFileAtomic(path, 'a,b\n1,2\n');
    expect(readFileSync(path, 'utf8')).toBe('a,b\n1,2\n');
    writeFileAtomic(path, new Uint8Array([0xe2, 0x82, 0xac, 10]));
    expect(readFileSync(path, 'utf8')).toBe('€\n');
    writeFileAtomic(join(dir, 'empty.txt'), '');
    expect(readFileSync(join(dir, 'empty.txt'), 'utf8')).toBe('');
    expect(listing(dir)).toEqual(['empty.txt', 'out.csv']);
  });

  it('refuses a missing folder, naming the path', () => {
    const path = join(root, 'no-such-folder', 'out.csv');
    const err = thrown(() => writeFileAtomic(path, 'x'));
    expect(err.exitCode).toBe(2);
    expect(err.message).toBe(`${path}: cannot write the file (its folder does not exist); choose an output folder you can write to`);
  });

  it('refuses a target that is a folder and leaves it alone', () => {
    const dir = freshDir();
    mkdirSync(join(dir, 'taken'));
    const err = thrown(() => writeFileAtomic(join(dir, 'taken'), 'x'));
    expect(err.message).toMatch(/taken: is a folder.*; move it away or choose another output folder/);
    expect(statSync(join(dir, 'taken')).isDirectory()).toBe(true);
    expect(listing(dir)).toEqual(['taken']);
  });

  it('keeps the old file whole when the disk fills up, and removes the temporary file', () => {
    const dir = freshDir();
    const path = join(dir, 'out.csv');
    writeFileAtomic(path, 'old content\n');
    fillDiskAfter(1);
    const err = thrown(() => writeFileAtomic(path, 'new content that never arrives\n'));
    expect(err.message).toMatch(/out\.csv: cannot write the file \(the disk is full\)/);
    expect(readFileSync(path, 'utf8')).toBe('old content\n');
    expect(listing(dir)).toEqual(['out.csv']);
  });
});

describe('prepareOutputDir', () => {
  it('creates a missing folder with its parents', () => {
    const dir = join(freshDir(), 'a', 'b');
    prepareOutputDir(dir, { force: false });
    expect(statSync(dir).isDirectory()).toBe(true);
  });

  it('accepts an existing empty folder', () => {
    const dir = freshDir();
    expect(() => prepareOutputDir(dir, { force: false })).not.toThrow();
  });

  it('refuses a non-empty folder without force, and keeps its files with force', () => {
    const dir = freshDir();
    writeFileSync(join(dir, 'earlier.csv'), 'keep me');
    const err = thrown(() => prepareOutputDir(dir, { force: false }));
    expect(err.exitCode).toBe(2);
    expect(err.message).toBe(`${dir}: the output folder is not empty (1 entry); pass --force to write over its files, or choose another folder`);
    prepareOutputDir(dir, { force: true });
    expect(readFileSync(join(dir, 'earlier.csv'), 'utf8')).toBe('keep me');
  });

  it('refuses a path that is a file, even with force', () => {
    const file = join(freshDir(), 'plain.txt');
    writeFileSync(file, 'x');
    for (const force of [false, true]) {
      const err = thrown(() => prepareOutputDir(file, { force }));
      expect(err.message).toBe(`${file}: exists and is not a folder; choose a folder name for the outputs`);
    }
    expect(readFileSync(file, 'utf8')).toBe('x');
  });

  it('refuses a folder that cannot be created below a file', () => {
    const file = join(freshDir(), 'plain.txt');
    writeFileSync(file, 'x');
    const err = thrown(() => prepareOutputDir(join(file, 'sub'), { force: false }));
    expect(err.message).toMatch(/sub: cannot create the output folder \(ENOTDIR\); .*choose another folder/);
  });
});

describe('OutputSet', () => {
  it('writes nothing before commit, everything at commit', () => {
    const dir = freshDir();
    const set = new OutputSet(dir);
    set.add('summary.json', '{"ok":true}\n');
    set.add('draws.bin', new Uint8Array([1, 2, 3]));
    expect(listing(dir)).toEqual([]);
    expect(set.names()).toEqual(['summary.json', 'draws.bin']);
    set.commit();
    expect(listing(dir)).toEqual(['draws.bin', 'summary.json']);
    expect(readFileSync(join(dir, 'summary.json'), 'utf8')).toBe('{"ok":true}\n');
    expect([...readFileSync(join(dir, 'draws.bin'))]).toEqual([1, 2, 3]);
  });

  it('creates its folder at commit, not before', () => {
    const dir = join(freshDir(), 'later');
    const set = new OutputSet(dir);
    set.add('a.txt', 'a');
    expect(() => statSync(dir)).toThrow();
    set.commit();
    expect(readFileSync(join(dir, 'a.txt'), 'utf8')).toBe('a');
  });

  it('copies bytes when they are added', () => {
    const dir = freshDir();
    const bytes = new Uint8Array([7, 7]);
    const set = new OutputSet(dir);
    set.add('b.bin', bytes);
    bytes[0] = 9;
    set.commit();
    expect([...readFileSync(join(dir, 'b.bin'))]).toEqual([7, 7]);
  });

  it('replaces files of an earlier run and keeps the others', () => {
    const dir = freshDir();
    writeFileSync(join(dir, 'a.txt'), 'old');
    writeFileSync(join(dir, 'other.txt'), 'untouched');
    const set = new OutputSet(dir);
    set.add('a.txt', 'new');
    set.commit();
    expect(readFileSync(join(dir, 'a.txt'), 'utf8')).toBe('new');
    expect(readFileSync(join(dir, 'other.txt'), 'utf8')).toBe('untouched');
  });

  it('leaves no new file when the disk fills up during commit', () => {
    const dir = freshDir();
    writeFileSync(join(dir, 'b.txt'), 'previous run');
    const set = new OutputSet(dir);
    set.add('a.txt', 'first');
    set.add('b.txt', 'second');
    set.add('c.txt', 'third');
    fillDiskAfter(3); // the third file fails after two are staged on disk
    const err = thrown(() => set.commit());
    expect(err.exitCode).toBe(2);
    expect(err.message).toMatch(/c\.txt: cannot write the file \(the disk is full\)/);
    expect(listing(dir)).toEqual(['b.txt']);
    expect(readFileSync(join(dir, 'b.txt'), 'utf8')).toBe('previous run');
    expect(temps(dir)).toEqual([]);
  });

  it('refuses before writing anything when an output name is taken by a folder', () => {
    const dir = freshDir();
    mkdirSync(join(dir, 'b.txt'));
    const set = new OutputSet(dir);
    set.add('a.txt', 'first');
    set.add('b.txt', 'second');
    const err = thrown(() => set.commit());
    expect(err.message).toMatch(/b\.txt: is a folder/);
    expect(listing(dir)).toEqual(['b.txt']);
  });

  it.each(['', '.', '..', 'sub/a.txt', '../a.txt', 'a\\b', `${TEMP_PREFIX}x`])('refuses the name %j', (name) => {
    expect(() => new OutputSet(freshDir()).add(name, 'x')).toThrow(/not a plain file name/);
  });

  it('refuses a name added twice, and use after commit', () => {
    const set = new OutputSet(freshDir());
    set.add('a.txt', 'x');
    expect(() => set.add('a.txt', 'y')).toThrow(/already added/);
    set.commit();
    expect(() => set.add('b.txt', 'y')).toThrow(/already committed/);
    expect(() => set.commit()).toThrow(/already committed/);
  });
});
