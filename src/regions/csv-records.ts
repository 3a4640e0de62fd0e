/**
 * The records of a CSV text with their fields, the line each starts on and where each lies in
 * the text. The multi-region path needs what a parsed table does not keep: which region each
 * line belongs to (so that one region's bad rows can be set aside without moving any other
 * line), and line numbers for the populations file's messages.
 *
 * The splitting rules are those of the case reader (src/io/cases.ts): a line break outside
 * quotes (LF, CRLF or a lone CR) ends a record; `"` opens a quoted field only at the start of a
 * field; `""` inside quotes is one quote; unquoted fields are kept exactly as written (no
 * trimming). A test checks the fields against arquero's own reading of the same text.
 */

export interface CsvRecord {
  /** 1-based line on which the record starts (the first line of the text is line 1) */
  line: number;
  /** offset of the record's first character */
  start: number;
  /** offset just past the record's line break (or the end of the text) */
  end: number;
  fields: string[];
  /** no text in any field (only commas, spaces, tabs or empty quotes) */
  empty: boolean;
}

/** Why a text could not be split: an unclosed quote, or text after a closing quote. */
export class CsvShapeError extends Error {
  constructor(
    readonly line: number,
    readonly what: string,
  ) {
    super(`line ${line}: ${what}`);
  }
}

const QUOTE = 34;
const COMMA = 44;
const LF = 10;
const CR = 13;

/**
 * Splits `text` into records. A byte-order mark must already be removed. The last record may
 * end without a line break.
 *
 * @throws CsvShapeError for an unclosed quote or text after a closing quote.
 * @example splitRecords('a,"b ""c"""\n1,2\n')[0].fields // ['a', 'b "c"']
 */
export function splitRecords(text: string): CsvRecord[] {
  return [...iterateRecords(text)];
}

/**
 * The records of `text` one at a time (see {@link splitRecords}), so that a large file can be
 * scanned without holding every record at once.
 */
export function* iterateRecords(text: string): Generator<CsvRecord> {
  const n = text.length;
  let line = 1;
  let i = 0;
  while (i < n) {
    const start = i;
    const startLine = line;
    const fields: string[] = [];
    let empty = true;
    for (;;) {
      // one field
      if (text.charCodeAt(i) === QUOTE) {
        const quoteLine = line;
        let value = '';
        let from = i + 1;
        i += 1;
        for (;;) {
          if (i >= n) throw new CsvShapeError(quoteLine, 'a quoted field is never closed');
          const c = text.charCodeAt(i);
          if (c === QUOTE) {
            if (text.charCodeAt(i + 1) === QUOTE) {
              value += text.slice(from, i + 1);
              i += 2;
              from = i;
              continue;
            }
            value += text.slice(from, i);
            i += 1;
            break;
          }
          // as the case reader counts it, any character inside quotes makes the record non-empty
          empty = false;
          if (c === LF || (c === CR && text.charCodeAt(i + 1) !== LF)) line += 1;
          i += 1;
        }
        const next = text.charCodeAt(i);
        if (i < n && next !== COMMA && next !== LF && next !== CR) {
          throw new CsvShapeError(line, 'text follows a closing quote inside a field');
        }
        fields.push(value);
      } else {
        const from = i;
        while (i < n) {
          const c = text.charCodeAt(i);
          if (c === COMMA || c === LF || c === CR) break;
          if (c !== 32 && c !== 9) empty = false;
          i += 1;
        }
        fields.push(text.slice(from, i));
      }
      if (i < n && text.charCodeAt(i) === COMMA) {
        i += 1;
        continue;
      }
      break;
    }
    // the record's line break
    if (i < n) {
      if (text.charCodeAt(i) === CR && text.charCodeAt(i + 1) === LF) i += 1;
      i += 1;
      line += 1;
    }
    yield { line: startLine, start, end: i, fields, empty };
  }
}

/** An empty line, or one holding only spaces: the case reader ignores it wherever it is. */
export function isBlankRecord(r: CsvRecord): boolean {
  return r.empty && r.fields.length === 1;
}

/**
 * `text` with the given records emptied: every character but the line breaks is removed, so
 * each becomes blank lines that a reader skips, and every other record keeps its line number.
 */
export function blankRecords(text: string, records: ReadonlyArray<Pick<CsvRecord, 'start' | 'end'>>): string {
  const sorted = [...records].sort((a, b) => a.start - b.start);
  const parts: string[] = [];
  let at = 0;
  for (const r of sorted) {
    parts.push(text.slice(at, r.start));
    parts.push(text.slice(r.start, r.end).replace(/[^\r\n]+/g, ''));
    at = r.end;
  }
  parts.push(text.slice(at));
  return parts.join('');
}
