/**
 * What the command line does with an unexpected internal error (anything but a WaxwaneError):
 * the full trace goes to a log file, and the user gets one line naming the error and the log.
 * The log is written in the command's output folder when it has one (so that it travels with
 * the run it belongs to), else, or when that folder cannot be written, in the system's
 * temporary folder. The log in an output folder is appended to, one block per failed run,
 * and does not make the folder count as non-empty for the next run (io/atomic.ts).
 */
import { appendFileSync, mkdirSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { oneLineMessage } from '../errors.js';
import { ERROR_LOG } from '../io/atomic.js';
import { VERSION } from '../version.js';

/** Longest error message quoted on the terminal line (the log has all of it). */
const MAX_MESSAGE = 300;

export interface InternalErrorContext {
  /** the command's output folder, when it has one */
  outDir?: string;
  /** the command line, recorded in the log */
  argv: readonly string[];
  /** time of the failure (for tests; default now) */
  now?: Date;
}

/** The trace of `e` and of its causes, as text. */
function trace(e: unknown): string {
  const parts: string[] = [];
  for (let x: unknown = e, depth = 0; x !== undefined && depth < 5; depth++) {
    parts.push(x instanceof Error ? (x.stack ?? `${x.name}: ${x.message}`) : String(x));
    x = x instanceof Error ? x.cause : undefined;
    if (x !== undefined) parts.push('caused by:');
  }
  return parts.join('\n');
}

function tryAppend(dir: string, name: string, text: string): string | null {
  try {
    mkdirSync(dir, { recursive: true });
    const file = join(dir, name);
    appendFileSync(file, text);
    return file;
  } catch {
    return null;
  }
}

/**
 * Writes the log of an internal error and returns the path written, or null when neither the
 * output folder nor the temporary folder could take it.
 */
export function writeInternalErrorLog(e: unknown, context: InternalErrorContext): string | null {
  const now = context.now ?? new Date();
  const text =
    `--- waxwane ${VERSION}, node ${process.version}, ${process.platform}, ${now.toISOString()}\n` +
    `command: ${context.argv.map((a) => (/^[\w./:=,+-]+$/.test(a) ? a : JSON.stringify(a))).join(' ')}\n` +
    `${trace(e)}\n`;
  if (context.outDir !== undefined) {
    const file = tryAppend(context.outDir, ERROR_LOG, text);
    if (file !== null) return file;
  }
  const stamp = now.toISOString().replace(/[:.]/g, '-');
  return tryAppend(join(tmpdir(), 'waxwane-logs'), `error-${stamp}-${process.pid}.log`, text);
}

/**
 * Logs an internal error (see {@link writeInternalErrorLog}) and returns what to print on the
 * terminal: one line, or, if no log could be written, that line and the trace after it, so
 * that the trace is never lost.
 */
export function reportInternalError(e: unknown, context: InternalErrorContext): string {
  const raw = e instanceof Error ? `${e.name === 'Error' ? '' : `${e.name}: `}${e.message}` : String(e);
  const flat = oneLineMessage(raw);
  const message = flat.length > MAX_MESSAGE ? `${flat.slice(0, MAX_MESSAGE)}...` : flat;
  const log = writeInternalErrorLog(e, context);
  if (log === null) {
    return `waxwane: internal error: ${message} (no log file could be written; the trace follows; please report it)\n${trace(e)}\n`;
  }
  return `waxwane: internal error: ${message} (full trace in ${log}; please report it)\n`;
}
