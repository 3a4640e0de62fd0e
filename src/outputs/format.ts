/**
 * Number and CSV formatting shared by every output file. Deterministic (same input, same
 * bytes), short, and readable by R, Python and spreadsheets.
 */

/** A number with `digits` significant digits, shortest form; NaN and infinities spelled out. */
export function formatNumber(x: number, digits = 8): string {
  if (Number.isNaN(x)) return 'NaN';
  if (x === Infinity) return 'Inf';
  if (x === -Infinity) return '-Inf';
  if (x === 0) return '0';
  return String(Number(x.toPrecision(digits)));
}

/** Quotes a CSV field when it holds a comma, quote, CR or LF (RFC 4180). */
export function csvField(s: string): string {
  return /[",\r\n]/.test(s) ? `"${s.replace(/"/g, '""')}"` : s;
}

/** A CSV document from a header and rows of already formatted fields; LF line ends. */
export function toCsv(header: readonly string[], rows: ReadonlyArray<readonly string[]>): string {
  const out = [header.map(csvField).join(',')];
  for (const r of rows) out.push(r.map(csvField).join(','));
  return out.join('\n') + '\n';
}
