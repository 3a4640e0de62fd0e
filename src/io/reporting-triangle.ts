/**
 * Reporting triangles: reported cases counted by onset date and delay, for data sets that have
 * them. A CSV file with a header and one row per onset date and delay:
 *
 *     onset_date,delay,count
 *     2031-07-13,0,4
 *     2031-07-13,1,11
 *     2031-07-14,0,6
 *
 * - `onset_date`: ISO date YYYY-MM-DD; `delay`: whole days from onset to report (0 = reported on
 *   the day of onset), at most the model's longest delay (the prior set's delay.max_days);
 *   `count`: reports, a whole number.
 * - A pair (onset date, delay) appears at most once; pairs without a row count as zero.
 * - Nothing can be reported after the last observed day of the run: onset_date + delay must be
 *   on or before it. Onset dates may reach back before the first observed day.
 * - The triangle should hold the same reports as the case series, split by onset date; the
 *   nowcast then takes the share already reported from these delays instead of the model's
 *   delay distribution.
 */
import { createHash } from 'node:crypto';
import { readFileSync } from 'node:fs';
import { WaxwaneError, inputError } from '../errors.js';
import { addDays, parseIsoDate } from './dates.js';
import { readWholeNumber } from './cases.js';
import type { TriangleCounts } from '../model/observed-delay.js';

export interface TriangleRow {
  line: number;
  onsetDay: number;
  delay: number;
  count: number;
}

export interface ReportingTriangle {
  file: string;
  sha256: string;
  rows: TriangleRow[];
}

const COLUMNS = ['onset_date', 'delay', 'count'] as const;

export function readReportingTriangle(file: string): ReportingTriangle {
  let bytes: Buffer;
  try {
    bytes = readFileSync(file);
  } catch (e) {
    const code = (e as NodeJS.ErrnoException).code ?? 'error';
    const why = code === 'ENOENT' ? 'no such file' : code === 'EISDIR' ? 'is a folder, not a file' : `cannot be read (${code})`;
    throw new WaxwaneError(`${file}: ${why}; give the path of the reporting-triangle CSV (onset_date,delay,count)`);
  }
  let text: string;
  try {
    text = new TextDecoder('utf-8', { fatal: true }).decode(bytes);
  } catch {
    throw inputError({ file }, 'the file is not UTF-8 text', 'save it as CSV with UTF-8 encoding');
  }
  return { ...parseReportingTriangle(text, file), sha256: createHash('sha256').update(bytes).digest('hex') };
}

/** Parses the text of a reporting-triangle file (see the module notes). */
export function parseReportingTriangle(text: string, file: string): ReportingTriangle {
  const body = text.charCodeAt(0) === 0xfeff ? text.slice(1) : text;
  const lines = body.split(/\r\n|\n|\r/);
  const unquote = (s: string) => {
    const t = s.trim();
    return t.length >= 2 && t.startsWith('"') && t.endsWith('"') ? t.slice(1, -1).trim() : t;
  };
  const header = (lines[0] ?? '').split(',').map(unquote);
  if (header.join(',').trim() === '') {
    throw inputError({ file, line: 1 }, 'the first line is empty', 'start with the header "onset_date,delay,count"');
  }
  const index = COLUMNS.map((c) => header.indexOf(c));
  const missing = COLUMNS.filter((_, i) => index[i] === -1);
  if (missing.length > 0) {
    throw inputError(
      { file, line: 1 },
      `no column ${missing.map((m) => `"${m}"`).join(', ')} in the header (found ${header.map((h) => `"${h}"`).join(', ')})`,
      'name the columns onset_date, delay and count',
    );
  }
  const seen = new Map<string, number>();
  const rows: TriangleRow[] = [];
  for (let i = 1; i < lines.length; i++) {
    const raw = lines[i]!;
    if (raw.trim() === '') continue;
    const line = i + 1;
    const cells = raw.split(',').map(unquote);
    if (cells.length !== header.length) {
      throw inputError({ file, line }, `has ${cells.length} fields, the header ${header.length}`, 'give every row the same columns as the header');
    }
    const date = cells[index[0]!]!;
    const onsetDay = parseIsoDate(date);
    if (onsetDay === null) {
      throw inputError({ file, line, column: 'onset_date' }, `"${date}" is not a date YYYY-MM-DD`, 'write the onset date as e.g. 2031-07-13');
    }
    const whole = (col: number, name: string): number => {
      const reading = readWholeNumber(cells[index[col]!]!);
      if (reading.kind !== 'value') {
        throw inputError(
          { file, line, column: name },
          `"${cells[index[col]!]}" is not a whole number of at least 0`,
          name === 'count' ? 'write the number of reports (0 if none)' : 'write the delay in whole days (0 = reported on the day of onset)',
        );
      }
      return reading.value;
    };
    const delay = whole(1, 'delay');
    const count = whole(2, 'count');
    const key = `${onsetDay}:${delay}`;
    const earlier = seen.get(key);
    if (earlier !== undefined) {
      throw inputError({ file, line }, `onset date ${date} with delay ${delay} was already given on line ${earlier}`, 'keep one row per onset date and delay');
    }
    seen.set(key, line);
    rows.push({ line, onsetDay, delay, count });
  }
  if (rows.length === 0) throw inputError({ file }, 'holds no rows', 'add one row per onset date and delay');
  return { file, sha256: '', rows };
}

/**
 * Aligns a triangle on a run's observed days and checks it against them: delays up to
 * `maxDelay`, no report after `lastDate`, onset rows from the earliest onset in the file on.
 */
export function alignTriangle(tri: ReportingTriangle, firstDate: string, lastDate: string, maxDelay: number): TriangleCounts {
  const first = parseIsoDate(firstDate) as number;
  const last = parseIsoDate(lastDate) as number;
  let earliest = Infinity;
  for (const r of tri.rows) {
    if (r.delay > maxDelay) {
      throw inputError(
        { file: tri.file, line: r.line, column: 'delay' },
        `the delay ${r.delay} is longer than the model's longest delay (${maxDelay} days, delay.max_days of the prior set)`,
        'leave such late reports out, or fit with a prior set whose delay.max_days covers them',
      );
    }
    if (r.onsetDay + r.delay > last) {
      throw inputError(
        { file: tri.file, line: r.line },
        `onset ${addDays(lastDate, r.onsetDay - last)} plus delay ${r.delay} is after the last observed day ${lastDate}`,
        'the triangle must stop at the same day as the case series; leave later reports out',
      );
    }
    earliest = Math.min(earliest, r.onsetDay);
  }
  const firstOnset = earliest - first;
  const lastDay = last - first;
  const width = maxDelay + 1;
  const counts = new Float64Array((lastDay - firstOnset + 1) * width);
  for (const r of tri.rows) counts[(r.onsetDay - first - firstOnset) * width + r.delay] = r.count;
  return { maxDelay, firstOnset, lastDay, counts };
}
