/**
 * The HTML report of a run folder: read the folder, build the page, write report.html
 * atomically. Module map:
 *
 *   run-folder.ts, csv.ts   reading the run folder back (typed, checked)
 *   series.ts               summary rows to chart points (bands from the table's own levels)
 *   charts/                 declarative chart specifications (vega-lite), one idea per file
 *   render.ts               specification to SVG, headless (vega in Node)
 *   html.ts, escape.ts      escaping template tag and building blocks
 *   section.ts, sections/   one function per section
 *   page.ts, styles.ts      the page shell and its style sheet
 *   fit-page.ts             the report of one run: its masthead and list of sections
 *
 * A comparison report adds its own page module (its masthead and section functions) next to
 * fit-page.ts and reuses the rest.
 */
import { join } from 'node:path';
import { writeFileAtomic } from '../../io/atomic.js';
import { readRunFolder } from './run-folder.js';
import { buildFitReport } from './fit-page.js';

export const REPORT_FILE = 'report.html';

export { readRunFolder, buildFitReport };

/**
 * Writes the report of the run folder `dir` to `out` (default `dir/report.html`) and returns
 * the path written.
 *
 * @throws WaxwaneError when the folder is not a readable run folder (see readRunFolder) or the
 *   file cannot be written.
 */
export async function writeRunReport(dir: string, out: string = join(dir, REPORT_FILE)): Promise<string> {
  const folder = readRunFolder(dir);
  const report = await buildFitReport(folder);
  writeFileAtomic(out, report.html);
  return out;
}
