/**
 * `waxwane report` and `fit --no-report` as a user runs them: the real program in a child
 * process (built into dist/ by `npm test`), on a run folder from report-fixture.ts.
 */
import { describe, it, expect, beforeAll, afterAll } from 'vitest';
import { existsSync, mkdtempSync, readdirSync, readFileSync, rmSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { runCli, ROOT } from '../cli/helpers.js';
import { writeFixtureRun } from './report-fixture.js';

let work: string;
beforeAll(() => {
  work = mkdtempSync(join(tmpdir(), 'waxwane-report-cli-'));
});
afterAll(() => {
  rmSync(work, { recursive: true, force: true });
});

/** The tool's own lines on stderr. */
const toolLines = (stderr: string) => stderr.split('\n').filter((l) => l.startsWith('waxwane:'));

describe('waxwane report', () => {
  it('writes RUN/report.html, or the file named by --out', async () => {
    const dir = writeFixtureRun(join(work, 'run'));
    const r = await runCli(['report', dir]);
    expect(r.code, r.stderr).toBe(0);
    expect(r.stderr).toContain(`report written: ${join(dir, 'report.html')}`);
    expect(readFileSync(join(dir, 'report.html'), 'utf8')).toMatch(/^<!DOCTYPE html>/);
    const other = join(work, 'elsewhere.html');
    const q = await runCli(['report', dir, '--out', other, '--quiet']);
    expect(q.code, q.stderr).toBe(0);
    expect(q.stderr).toBe('');
    expect(existsSync(other)).toBe(true);
  });

  it('refuses what is not a run folder, and an --out that is not .html, with one line and exit 2', async () => {
    const missing = await runCli(['report', join(work, 'missing')]);
    expect(missing.code).toBe(2);
    expect(toolLines(missing.stderr)).toEqual([`waxwane: ${join(work, 'missing')}: no such folder; give the output folder of a run (the --out of waxwane fit)`]);
    const dir = writeFixtureRun(join(work, 'run2'));
    const txt = await runCli(['report', dir, '--out', join(work, 'r.txt')]);
    expect(txt.code).toBe(2);
    expect(toolLines(txt.stderr)).toHaveLength(1);
    expect(txt.stderr).toMatch(/give a file name ending in \.html/);
    expect(existsSync(join(work, 'r.txt'))).toBe(false);
  });
});

describe('waxwane fit writes the report unless --no-report', () => {
  it('--no-report leaves no report.html', async () => {
    const out = join(work, 'fit-no-report');
    const r = await runCli(['fit', join(ROOT, 'data-demo', 'larkmere', 'cases.csv'), '--population', '320000', '--out', out, '--chains', '2', '--warmup', '200', '--draws', '20', '--thin', '1', '--threads', '1', '--quiet', '--no-report']);
    expect(r.code, r.stderr).toBe(0);
    expect(readdirSync(out)).not.toContain('report.html');
    expect(readdirSync(out)).toContain('run.json');
  });
});
