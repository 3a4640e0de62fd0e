/**
 * `waxwane report RUN_DIR [--out FILE]`: writes the self-contained HTML report of a run folder
 * (report.html in the folder by default). Commands that write a run folder call
 * {@link reportAfterRun} so that their report is written by default (`--no-report` skips it).
 */
import { WaxwaneError } from '../errors.js';
import { writeRunReport, REPORT_FILE } from '../outputs/report/index.js';
import type { Reporter } from './reporter.js';

export interface ReportCliOptions {
  out?: string;
  quiet: boolean;
}

export async function runReport(runDir: string, o: ReportCliOptions, reporter: Reporter): Promise<number> {
  if (o.out !== undefined && !o.out.toLowerCase().endsWith('.html')) {
    throw new WaxwaneError(`--out ${o.out}: the report is an HTML page; give a file name ending in .html`);
  }
  const path = await writeRunReport(runDir, o.out);
  reporter.info(`report written: ${path} (open it in a browser; it needs no network)`);
  return 0;
}

/**
 * Writes the report after a command's outputs are safely on disk. A problem the user can fix
 * (an unreadable file, no room to write) becomes a warning, since the run's own outputs are
 * complete; anything else is a bug and propagates as an internal error.
 */
export async function reportAfterRun(runDir: string, reporter: Reporter): Promise<void> {
  try {
    const path = await writeRunReport(runDir);
    reporter.info(`report: ${path}`);
  } catch (e) {
    if (!(e instanceof WaxwaneError)) throw e;
    reporter.warn(`${REPORT_FILE} not written (${e.message}); the other outputs are complete; try again with "waxwane report ${runDir}"`);
  }
}
