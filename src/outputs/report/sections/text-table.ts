/**
 * A CSV table of the run folder shown as it is (every field escaped), numbers shortened for
 * reading: for tables whose layout belongs to another command (scenarios.csv, a nowcast not
 * in long form).
 */
import type { TextTable } from '../csv.js';
import { table, num, type Column, type Html } from '../html.js';

const NUMERIC = /^[+-]?(\d+\.?\d*|\.\d+)(e[+-]?\d+)?$/i;

/** A field for reading: numbers to 4 significant digits, anything else as written. */
function readable(field: string): string {
  return NUMERIC.test(field.trim()) ? num(Number(field), 4) : field;
}

export function textTable(t: TextTable, caption: string, maxRows = 200): Html {
  const rows = Array.from({ length: Math.min(t.rows, maxRows) }, (_, i) => i);
  const columns: Column<number>[] = t.columns.map((c) => {
    const values = t.column(c);
    const numeric = values.length > 0 && values.every((v) => v.trim() === '' || NUMERIC.test(v.trim()));
    return { head: c, numeric, cell: (i: number) => readable(values[i]) };
  });
  const more = t.rows > maxRows ? ` (first ${maxRows} of ${t.rows} rows)` : '';
  return table(`${caption}${more}`, columns, rows);
}
