/**
 * src/cli/internal-error.ts: where the trace of an unexpected error goes and what the terminal
 * line says. (edge-cases.test.ts checks the same through the real command line.)
 */
import { existsSync, readFileSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { afterAll, describe, expect, it } from 'vitest';
import { reportInternalError, writeInternalErrorLog } from '../../src/cli/internal-error.js';
import { ERROR_LOG, prepareOutputDir } from '../../src/io/atomic.js';
import { makeTempDir, removeDir } from './helpers.js';

const work = makeTempDir('waxwane-internal-');
afterAll(() => removeDir(work));
const NOW = new Date('2031-02-03T04:05:06.789Z');

function failure(): Error {
  const inner = new RangeError('index 7 out of range');
  return new Error('could not summarise the draws', { cause: inner });
}

describe('writeInternalErrorLog', () => {
  it('appends the version, command line and whole trace, causes included, to DIR/waxwane-error.log', () => {
    const out = join(work, 'run-a');
    const argv = ['node', 'waxwane', 'fit', 'my cases.csv', '--out', out];
    const file = writeInternalErrorLog(failure(), { outDir: out, argv, now: NOW });
    expect(file).toBe(join(out, ERROR_LOG));
    writeInternalErrorLog('a thrown string', { outDir: out, argv, now: NOW });
    const text = readFileSync(file!, 'utf8');
    expect(text.match(/^--- waxwane \d+\.\d+\.\d+, node v[\d.]+, \w+, 2031-02-03T04:05:06\.789Z$/gm)).toHaveLength(2);
    expect(text).toContain(`command: node waxwane fit "my cases.csv" --out ${out}\n`);
    expect(text).toMatch(/^Error: could not summarise the draws\n\s+at /m);
    expect(text).toMatch(/^caused by:\nRangeError: index 7 out of range\n\s+at /m);
    expect(text).toContain('\na thrown string\n');
  });

  it('without an output folder, or when it cannot be made, writes to the temporary folder', () => {
    const blocker = join(work, 'a-file');
    writeFileSync(blocker, 'x');
    for (const outDir of [undefined, join(blocker, 'out')]) {
      const file = writeInternalErrorLog(failure(), { outDir, argv: ['waxwane'], now: NOW });
      expect(file).not.toBeNull();
      expect(file!.startsWith(join(tmpdir(), 'waxwane-logs', 'error-2031-02-03T04-05-06-789Z-'))).toBe(true);
      expect(readFileSync(file!, 'utf8')).toContain('could not summarise the draws');
      rmSync(file!);
    }
  });
});

describe('reportInternalError', () => {
  it('one line: the error, the log, a request to report it', () => {
    const out = join(work, 'run-b');
    const line = reportInternalError(new TypeError('x.at is not a function'), { outDir: out, argv: [] });
    expect(line).toBe(`waxwane: internal error: TypeError: x.at is not a function (full trace in ${join(out, ERROR_LOG)}; please report it)\n`);
  });

  it('keeps a multi-line or very long message to one line of bounded length', () => {
    const out = join(work, 'run-c');
    const line = reportInternalError(new Error(`first\nsecond\u001b[31m ${'y'.repeat(1000)}`), { outDir: out, argv: [] });
    expect(line.endsWith('\n')).toBe(true);
    expect(line.slice(0, -1)).not.toMatch(/[\n\r\u001b]/);
    expect(line).toContain('internal error: first second\\u001B[31m yyy');
    expect(line.length).toBeLessThan(500);
    // the log keeps the whole message
    expect(readFileSync(join(out, ERROR_LOG), 'utf8')).toContain('y'.repeat(1000));
  });

  it('a folder holding only the log of a failed run takes the next run without --force', () => {
    const out = join(work, 'run-d');
    reportInternalError(new Error('boom'), { outDir: out, argv: [] });
    expect(existsSync(join(out, ERROR_LOG))).toBe(true);
    expect(() => prepareOutputDir(out, { force: false })).not.toThrow();
    writeFileSync(join(out, 'summary.csv'), 'old\n');
    expect(() => prepareOutputDir(out, { force: false })).toThrow(/not empty/);
  });
});
