// Checkpoints and resume: a fit killed with SIGKILL while sampling continues with --resume
// and ends with the same outputs, byte for byte, as an uninterrupted run with the same seed
// (run.json differs only in its wall-clock timings). A resume with other data or options is
// refused.
import { describe, it, expect, beforeAll, afterAll } from 'vitest';
import { spawn } from 'node:child_process';
import { copyFileSync, existsSync, readFileSync, writeFileSync } from 'node:fs';
import { join } from 'node:path';
import { BIN, ROOT, runCli, makeTempDir, removeDir } from './helpers.js';

const tmp = makeTempDir('waxwane-resume-');
const cases = join(tmp, 'cases.csv');
// 70 days of the demo place; the default sampler settings, with extra draws so that the run
// lasts long enough to be killed while sampling
const args = (out: string) => ['fit', cases, '--population', '320000', '--out', out, '--seed', '5', '--draws', '2000', '--threads', '2', '--no-report', '--quiet'];
const OUTPUTS = ['summary.csv', 'diagnostics.csv', 'draws.csv', 'data.csv'];

function withoutTimings(file: string): unknown {
  const run = JSON.parse(readFileSync(file, 'utf8'));
  delete run.timings_seconds;
  return run;
}

/** Starts a fit and kills it with SIGKILL once its checkpoint shows a chain past warm-up (sampling). */
function fitAndKill(out: string, warmup: number): Promise<{ killedWhileSampling: boolean }> {
  return new Promise((resolve, reject) => {
    const child = spawn(process.execPath, [BIN, ...args(out)], { cwd: ROOT, stdio: 'ignore' });
    let killed = false;
    const timer = setInterval(() => {
      try {
        const cp = JSON.parse(readFileSync(join(out, 'checkpoint.json'), 'utf8'));
        const iterations = Object.values(cp.snapshots as Record<string, { iteration: number }>).map((s) => s.iteration);
        if (iterations.some((i) => i > warmup)) {
          killed = child.kill('SIGKILL');
          clearInterval(timer);
        }
      } catch {
        // no checkpoint yet, or caught mid-rename: look again
      }
    }, 100);
    child.on('error', reject);
    child.on('exit', () => {
      clearInterval(timer);
      resolve({ killedWhileSampling: killed });
    });
  });
}

describe('waxwane fit --resume', () => {
  const straight = join(tmp, 'straight');
  const resumed = join(tmp, 'resumed');

  beforeAll(async () => {
    const lines = readFileSync(join(ROOT, 'data-demo/larkmere/cases.csv'), 'utf8').split('\n');
    writeFileSync(cases, lines.slice(0, 71).join('\n') + '\n');
    const r = await runCli(args(straight), { timeoutMs: 300_000 });
    expect(r.code).toBe(0);
  }, 400_000);
  afterAll(() => removeDir(tmp));

  it('continues a run killed while sampling and gives identical outputs', async () => {
    const { killedWhileSampling } = await fitAndKill(resumed, 10_000);
    expect(killedWhileSampling).toBe(true);
    expect(existsSync(join(resumed, 'checkpoint.json'))).toBe(true);
    expect(existsSync(join(resumed, 'summary.csv'))).toBe(false);
    const r = await runCli([...args(resumed), '--resume'], { timeoutMs: 300_000 });
    expect(r.stderr).not.toMatch(/waxwane:/); // warnings only, no error
    expect(r.code).toBe(0);
    for (const f of OUTPUTS) {
      expect(readFileSync(join(resumed, f)).equals(readFileSync(join(straight, f))), f).toBe(true);
    }
    expect(withoutTimings(join(resumed, 'run.json'))).toEqual(withoutTimings(join(straight, 'run.json')));
    expect(existsSync(join(resumed, 'checkpoint.json'))).toBe(false);
  }, 400_000);

  it('refuses to resume with another seed, other data, or without a checkpoint', async () => {
    const dir = join(tmp, 'refuse');
    const { killedWhileSampling } = await fitAndKill(dir, 0);
    expect(killedWhileSampling).toBe(true);
    const seed = await runCli([...args(dir).map((a) => (a === '5' ? '6' : a)), '--resume']);
    expect(seed.code).toBe(2);
    expect(seed.stderr).toMatch(/cannot resume: seed differs from the interrupted run \(it had 5, now 6\).*--force/);
    const other = join(tmp, 'other.csv');
    copyFileSync(cases, other);
    writeFileSync(other, readFileSync(other, 'utf8').replace(/,(\d+)\n$/, (_m, n) => `,${Number(n) + 1}\n`));
    const data = await runCli([...args(dir).map((a) => (a === cases ? other : a)), '--resume']);
    expect(data.code).toBe(2);
    expect(data.stderr).toMatch(/cannot resume: input_sha256 differs/);
    const fresh = await runCli(args(dir));
    expect(fresh.code).toBe(2);
    expect(fresh.stderr).toMatch(/holds an interrupted run \(checkpoint\.json\); pass --resume to continue it, or --force/);
    const none = await runCli([...args(join(tmp, 'empty')), '--resume']);
    expect(none.code).toBe(2);
    expect(none.stderr).toMatch(/nothing to resume/);
  }, 400_000);
});
