/**
 * Reading the CSV tables of a run folder back for the report: every field as text (arquero
 * with type inference off, as the case reader does), then numbers parsed strictly in the
 * spelling the writers use (outputs/format.ts: `NaN`, `Inf`, `-Inf`, shortest decimal form).
 * A table that does not have the expected columns or a value that is not a number is a
 * WaxwaneError naming the file, the line and the column.
 */
import { readFileSync } from 'node:fs';
import { fromCSV } from '../../util/arquero.js';
import { WaxwaneError, inputError } from '../../errors.js';

/** A CSV table as text: the header and one array of fields per column. */
export interface TextTable {
  /** file name used in messages */
  file: string;
  columns: string[];
  rows: number;
  /** the fields of a column, by name */
  column(name: string): string[];
}

/** Reads a CSV file into a text table; `null` when the file does not exist. */
export function readTextTable(path: string, file: string): TextTable | null {
  let text: string;
  try {
    text = readFileSync(path, 'utf8');
  } catch (err) {
    const code = (err as NodeJS.ErrnoException).code;
    if (code === 'ENOENT') return null;
    throw new WaxwaneError(`${file}: cannot be read (${code ?? String(err)}); check the run folder and its permissions`);
  }
  return parseTextTable(text, file);
}

/** Parses CSV text (RFC 4180 quoting, LF or CRLF) into a text table. */
export function parseTextTable(text: string, file: string): TextTable {
  const body = text.charCodeAt(0) === 0xfeff ? text.slice(1) : text;
  if (body.trim() === '') throw inputError({ file }, 'the file is empty', 'write the run folder again (waxwane fit)');
  // arquero keeps a quoted last field verbatim when the text does not end with a line break
  const csv = /[\r\n]$/.test(body) ? body : `${body}\n`;
  const table = fromCSV(csv, { autoType: false });
  const columns = table.columnNames();
  const cache = new Map<string, string[]>();
  return {
    file,
    columns,
    rows: table.numRows(),
    column(name: string): string[] {
      let values = cache.get(name);
      if (values === undefined) {
        const col = table.column(name);
        if (col === undefined) {
          throw inputError({ file }, `no column "${name}" (columns: ${columns.join(', ')})`, 'write the run folder again with this version of waxwane');
        }
        values = Array.from({ length: table.numRows() }, (_, i) => {
          const v: unknown = col.at(i);
          return typeof v === 'string' ? v : '';
        });
        cache.set(name, values);
      }
      return values;
    },
  };
}

/** Checks that a table has every one of `names` as a column. */
export function requireColumns(table: TextTable, names: readonly string[]): void {
  const missing = names.filter((n) => !table.columns.includes(n));
  if (missing.length > 0) {
    throw inputError(
      { file: table.file },
      `missing column${missing.length > 1 ? 's' : ''} ${missing.map((m) => `"${m}"`).join(', ')} (columns: ${table.columns.join(', ')})`,
      'write the run folder again with this version of waxwane',
    );
  }
}

const NUMBER = /^[+-]?(\d+\.?\d*|\.\d+)(e[+-]?\d+)?$/i;

/**
 * A number as the output writers spell it: decimal or exponent form, `NaN`, `Inf`, `-Inf`.
 * An empty field is NaN only when `blank` allows it; anything else is refused.
 */
export function parseNumberField(raw: string, where: { file: string; line: number; column: string }, blank = false): number {
  const s = raw.trim();
  if (s === 'NaN') return NaN;
  if (s === 'Inf') return Infinity;
  if (s === '-Inf') return -Infinity;
  if (s === '' && blank) return NaN;
  if (!NUMBER.test(s)) {
    throw inputError(where, `"${raw}" is not a number`, 'write the run folder again (waxwane fit); output files are not meant to be edited');
  }
  return Number(s);
}

/** A whole numeric column; line numbers count the header as line 1. */
export function numberColumn(table: TextTable, name: string, blank = false): Float64Array {
  const fields = table.column(name);
  const out = new Float64Array(fields.length);
  for (let i = 0; i < fields.length; i++) {
    out[i] = parseNumberField(fields[i], { file: table.file, line: i + 2, column: name }, blank);
  }
  return out;
}

/** Quantile level of a column name written by quantileColumn: q05 -> 0.05, q2.5 -> 0.025; else null. */
export function levelOfColumn(name: string): number | null {
  const m = /^q(\d+(?:\.\d+)?)$/.exec(name);
  if (m === null) return null;
  const p = Number(m[1]) / 100;
  return p > 0 && p < 1 ? p : null;
}
