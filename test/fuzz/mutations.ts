/**
 * Arbitraries (fast-check generators) shared by the fuzz tests: random bytes and text, edits
 * of a valid document (text level: insert, delete, duplicate, truncate, swap lines), and edits
 * of a valid JSON document's structure (replace a value, delete or add a field), plus the check
 * every fuzz test makes of what a parser throws.
 *
 * Seeds are fixed in each test file (fc.assert's `seed`), so a failure replays exactly; the
 * counterexample fast-check prints can be pasted into a unit test.
 */
import fc from 'fast-check';
import { expect } from 'vitest';
import { WaxwaneError } from '../../src/errors.js';

/** Pieces of text that tend to break parsers of CSV and JSON, numbers and dates. */
export const TOKENS: readonly string[] = [
  ',', '"', '""', '\n', '\r\n', '\r', ' ', '\t', ';', ':', '\\', '{', '}', '[', ']',
  '\u0000', '\u0007', '\u007f', '\uFEFF', '\u2028', '\uD800', '\uDFFF', '\u00e9', '\u{1F600}',
  '-', '+', '.', 'e', 'E', '0', '-0', '00', '0.0', '12.', '.5', '1e3', '1e999', '-1e999', '1e-400',
  '1e308', '5e-324', '9007199254740991', '9007199254740993', '99999999999999999999', '-1',
  'NaN', '-NaN', 'Infinity', '-Infinity', 'NA', 'null', 'true', 'false', 'undefined',
  '__proto__', 'constructor', 'prototype', '"__proto__"', '"constructor"', 'toString', 'hasOwnProperty',
  '2031-02-30', '2031-13-01', '0000-01-01', '9999-12-31', '1970-01-01', '2031-2-3', '03/02/2031',
  'date', 'cases', 'region', 'population', '$(touch pwned)', '`id`', '; rm -rf x', '%s%n',
];

/** A short string: printable, any code point, or a token. */
export const fragment: fc.Arbitrary<string> = fc.oneof(
  { weight: 3, arbitrary: fc.constantFrom(...TOKENS) },
  { weight: 1, arbitrary: fc.string({ maxLength: 8 }) },
  { weight: 1, arbitrary: fc.string({ unit: 'binary', maxLength: 4 }) },
);

type TextEdit =
  | { op: 'insert'; at: number; text: string }
  | { op: 'delete'; at: number; length: number }
  | { op: 'replace'; at: number; length: number; text: string }
  | { op: 'duplicate'; at: number; length: number; to: number }
  | { op: 'truncate'; at: number }
  | { op: 'swapLines'; a: number; b: number };

const position = fc.nat({ max: 1_000_000 });

const textEdit: fc.Arbitrary<TextEdit> = fc.oneof(
  fc.record({ op: fc.constant('insert' as const), at: position, text: fragment }),
  fc.record({ op: fc.constant('delete' as const), at: position, length: fc.integer({ min: 1, max: 12 }) }),
  fc.record({ op: fc.constant('replace' as const), at: position, length: fc.integer({ min: 1, max: 6 }), text: fragment }),
  fc.record({ op: fc.constant('duplicate' as const), at: position, length: fc.integer({ min: 1, max: 40 }), to: position }),
  fc.record({ op: fc.constant('truncate' as const), at: position }),
  fc.record({ op: fc.constant('swapLines' as const), a: position, b: position }),
);

function applyEdit(text: string, e: TextEdit): string {
  const n = text.length;
  const at = (k: number) => (n === 0 ? 0 : k % (n + 1));
  switch (e.op) {
    case 'insert':
      return text.slice(0, at(e.at)) + e.text + text.slice(at(e.at));
    case 'delete':
      return text.slice(0, at(e.at)) + text.slice(at(e.at) + e.length);
    case 'replace':
      return text.slice(0, at(e.at)) + e.text + text.slice(at(e.at) + e.length);
    case 'duplicate': {
      const piece = text.slice(at(e.at), at(e.at) + e.length);
      return text.slice(0, at(e.to)) + piece + text.slice(at(e.to));
    }
    case 'truncate':
      return text.slice(0, at(e.at));
    case 'swapLines': {
      const lines = text.split('\n');
      const a = e.a % lines.length;
      const b = e.b % lines.length;
      [lines[a], lines[b]] = [lines[b]!, lines[a]!];
      return lines.join('\n');
    }
  }
}

/** `base` after one to `maxEdits` random text edits. */
export function editedText(base: string, maxEdits = 6): fc.Arbitrary<string> {
  return fc.array(textEdit, { minLength: 1, maxLength: maxEdits }).map((edits) => edits.reduce(applyEdit, base));
}

/** Random bytes, as a file would hold them, decoded leniently (bad sequences become U+FFFD). */
export const randomBytesAsText: fc.Arbitrary<string> = fc
  .uint8Array({ maxLength: 300 })
  .map((b) => Buffer.from(b).toString('utf8'));

// ---------------------------------------------------------------------------------------------
// Structural edits of a JSON document

type Json = null | boolean | number | string | Json[] | { [k: string]: Json };
type Path = Array<string | number>;

/** Every path in `doc`, the root (empty path) included. */
function paths(doc: Json, at: Path = [], out: Path[] = []): Path[] {
  out.push(at);
  if (Array.isArray(doc)) doc.forEach((v, i) => paths(v, [...at, i], out));
  else if (doc !== null && typeof doc === 'object') for (const [k, v] of Object.entries(doc)) paths(v, [...at, k], out);
  return out;
}

/** Values a user might put where a number, text or object belongs, extremes included. */
export const oddJsonValue: fc.Arbitrary<Json> = fc.oneof(
  fc.constantFrom<Json>(
    0, -0, 1, -1, 0.5, 2, 7, 21, 60, 61, 1e-320, 5e-324, 1e-300, 1e-10, 1e6, 1e9, 1e15, 1e300, 1.7976931348623157e308,
    -1e308, 9007199254740993, 2.5, 120, 121, '', 'x', 'gamma', 'lognormal', 'half_normal', 'beta', 'step', 'linear',
    '2031-02-03', '2031-02-30', null, true, false, [], {}, [1], ['2031-02-01', 1.5], { family: 'gamma' },
  ),
  fc.double({ noNaN: true, noDefaultInfinity: true }),
  fc.integer({ min: -1000, max: 1_000_000 }),
  fc.jsonValue({ maxDepth: 2 }) as fc.Arbitrary<Json>,
);

type JsonEdit =
  | { op: 'set'; path: number; value: Json }
  | { op: 'delete'; path: number }
  | { op: 'add'; path: number; key: string; value: Json };

const jsonEdit: fc.Arbitrary<JsonEdit> = fc.oneof(
  { weight: 4, arbitrary: fc.record({ op: fc.constant('set' as const), path: fc.nat(), value: oddJsonValue }) },
  { weight: 2, arbitrary: fc.record({ op: fc.constant('delete' as const), path: fc.nat() }) },
  {
    weight: 1,
    arbitrary: fc.record({
      op: fc.constant('add' as const),
      path: fc.nat(),
      key: fc.oneof(fc.constantFrom('__proto__', 'constructor', 'prototype', 'extra', '$schema', 'family'), fc.string({ maxLength: 6 })),
      value: oddJsonValue,
    }),
  },
);

/** Sets own property `key` (even "__proto__") without touching any prototype. */
function defineOwn(holder: object, key: string, value: Json): void {
  Object.defineProperty(holder, key, { value, enumerable: true, writable: true, configurable: true });
}

function applyJsonEdit(doc: Json, e: JsonEdit): Json {
  const all = paths(doc);
  const path = all[e.path % all.length]!;
  if (path.length === 0) {
    if (e.op === 'set') return e.value;
    if (e.op === 'add' && doc !== null && typeof doc === 'object' && !Array.isArray(doc)) defineOwn(doc, e.key, e.value);
    return doc;
  }
  let holder: any = doc;
  for (const s of path.slice(0, -1)) holder = holder[s];
  const last = path[path.length - 1]!;
  if (e.op === 'set') {
    if (Array.isArray(holder)) holder[last as number] = e.value;
    else defineOwn(holder, last as string, e.value);
  } else if (e.op === 'delete') {
    if (Array.isArray(holder)) holder.splice(last as number, 1);
    else delete holder[last];
  } else {
    const target: unknown = holder[last];
    if (target !== null && typeof target === 'object' && !Array.isArray(target)) defineOwn(target, e.key, e.value);
    else if (Array.isArray(target)) target.push(e.value);
  }
  return doc;
}

/** The JSON text `base` after one to `maxEdits` structural edits, indented 0 to 4 spaces. */
export function editedJson(base: string, maxEdits = 4): fc.Arbitrary<string> {
  return fc
    .tuple(fc.array(jsonEdit, { minLength: 1, maxLength: maxEdits }), fc.integer({ min: 0, max: 4 }))
    .map(([edits, indent]) => JSON.stringify(edits.reduce(applyJsonEdit, JSON.parse(base) as Json), null, indent));
}

// ---------------------------------------------------------------------------------------------
// The contract

/**
 * Runs `parse` on `input`: it may return, or throw a WaxwaneError whose message is one line;
 * anything else fails the property (with the input in the message, to replay it).
 */
export function expectOnlyToolErrors(parse: () => unknown, input: string): unknown {
  try {
    return parse();
  } catch (err) {
    if (!(err instanceof WaxwaneError)) {
      // the input is fast-check's counterexample, printed with the failure
      throw new Error(`not a WaxwaneError for input ${JSON.stringify(input.slice(0, 200))}...: ${err instanceof Error ? err.stack : String(err)}`);
    }
    // one terminal line: no line break of any kind, no control character (src/errors.ts)
    expect(err.message, JSON.stringify(input)).not.toMatch(/[\r\n\u0085\u2028\u2029]/);
    expect(err.message, JSON.stringify(input)).not.toMatch(/[\u0000-\u0008\u000b-\u001f\u007f-\u009f]/);
    expect(err.message.length).toBeGreaterThan(0);
    expect(err.exitCode).toBe(2);
    return undefined;
  }
}
