// The plain-C program beside the project (../shared/limit/logdensity.c) computes the default
// log density as fast as C allows on this machine. The suite compiles it into a temporary
// folder and times it on the same series as the fixtures in test/fixtures/limit/ (the program
// generates those series itself for a given number of days). It is a yardstick, not part of
// the project: without a C compiler or without the file, the ratio to C is skipped.
import { spawnSync } from 'node:child_process';
import { existsSync, mkdtempSync, rmSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { ROOT } from './lib.mjs';

export const C_SOURCE = join(ROOT, '..', 'shared', 'limit', 'logdensity.c');

/**
 * Compiles the C program with `cc -O2 -march=native`. Returns `{ exe, dispose() }`, or
 * `{ exe: null, reason }` when it cannot.
 */
export function compileReference() {
  if (!existsSync(C_SOURCE)) return { exe: null, reason: `${C_SOURCE} not found` };
  const dir = mkdtempSync(join(tmpdir(), 'waxwane-bench-c-'));
  const dispose = () => rmSync(dir, { recursive: true, force: true });
  const exe = join(dir, 'logdensity');
  const cc = spawnSync('cc', ['-O2', '-march=native', '-o', exe, C_SOURCE, '-lm'], { encoding: 'utf8' });
  if (cc.error || cc.status !== 0) {
    dispose();
    const why = cc.error ? `no C compiler (${cc.error.code ?? cc.error.message})` : `cc failed: ${(cc.stderr ?? '').trim().split('\n')[0]}`;
    return { exe: null, reason: why };
  }
  return { exe, dispose };
}

/**
 * Times the C program on `days` days (its own synthetic series, the one the fixtures were
 * dumped from): CPU time, best of its batches after a warm-up, `evals` evaluations in all.
 * Returns `{ evalsPerSecond, logDensity }` or null when its output has no result line.
 */
export function runReference(exe, days, evals) {
  const r = spawnSync(exe, [String(days), String(evals)], { encoding: 'utf8' });
  const line = (r.stdout ?? '').split('\n').find((l) => l.startsWith('RESULT C '));
  if (r.status !== 0 || line === undefined) return null;
  const parts = line.trim().split(/\s+/);
  return { evalsPerSecond: Number(parts[3]), logDensity: Number(parts[4]) };
}
