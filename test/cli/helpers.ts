/**
 * Helpers for the end-to-end tests of the command-line tool: the tool runs as a real child
 * process (`node bin/waxwane.js ...`, built into dist/ by `npm test`'s pretest step), in
 * temporary folders that each test removes again.
 */
import { spawn } from 'node:child_process';
import { existsSync, mkdtempSync, readdirSync, rmSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { fileURLToPath } from 'node:url';

/** bin/waxwane.js at the repository root. */
export const BIN = fileURLToPath(new URL('../../bin/waxwane.js', import.meta.url));
/** The repository root (data-demo/, scripts/ live there). */
export const ROOT = fileURLToPath(new URL('../../', import.meta.url));

export interface RunResult {
  /** exit code; null only if the process was killed by a signal */
  code: number | null;
  stdout: string;
  stderr: string;
}

/**
 * Runs `node bin/waxwane.js ...args` and collects its exit code and output. Asynchronous so
 * that vitest's timeouts still work while the child runs; `NO_COLOR` keeps output plain.
 */
export function runCli(args: readonly string[], options: { cwd?: string; timeoutMs?: number } = {}): Promise<RunResult> {
  return new Promise((resolve, reject) => {
    const child = spawn(process.execPath, [BIN, ...args], {
      cwd: options.cwd ?? ROOT,
      env: { ...process.env, NO_COLOR: '1', FORCE_COLOR: '0' },
      stdio: ['ignore', 'pipe', 'pipe'],
    });
    const out: Buffer[] = [];
    const err: Buffer[] = [];
    child.stdout.on('data', (b: Buffer) => out.push(b));
    child.stderr.on('data', (b: Buffer) => err.push(b));
    const timer = setTimeout(() => child.kill('SIGKILL'), options.timeoutMs ?? 60_000);
    child.on('error', (e) => {
      clearTimeout(timer);
      reject(e);
    });
    child.on('close', (code) => {
      clearTimeout(timer);
      resolve({ code, stdout: Buffer.concat(out).toString('utf8'), stderr: Buffer.concat(err).toString('utf8') });
    });
  });
}

/** A fresh temporary folder under os.tmpdir(); remove it with {@link removeDir}. */
export function makeTempDir(prefix = 'waxwane-cli-'): string {
  return mkdtempSync(join(tmpdir(), prefix));
}

export function removeDir(dir: string): void {
  rmSync(dir, { recursive: true, force: true });
}

/** Sorted entries of `dir`, or null if it does not exist. */
export function listDir(dir: string): string[] | null {
  return existsSync(dir) ? readdirSync(dir).sort() : null;
}

/** The lines of `stderr` that start with "waxwane:" (the tool's own message lines). */
export function toolLines(stderr: string): string[] {
  return stderr.split(/\r?\n/).filter((l) => l.startsWith('waxwane:'));
}
