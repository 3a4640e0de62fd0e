/**
 * Reading a JSON document that a user wrote (prior sets, scenario files): syntax checked with
 * line and column, duplicate keys refused, keys that could alter JavaScript prototypes refused,
 * numbers that overflow to Infinity refused. Every problem is one WaxwaneError line naming the
 * file, the place and what to do.
 */
import { inputError } from '../errors.js';

/** Keys that reach Object.prototype (or a constructor) when an object is merged or assigned. */
export const FORBIDDEN_KEYS = new Set(['__proto__', 'constructor', 'prototype']);

export type Segment = string | number;

/** `priors.walk_scale.scale`, `sources[2]`; odd keys in brackets: `model["a b"]`. */
export function fieldPath(segments: readonly Segment[]): string {
  let out = '';
  for (const s of segments) {
    if (typeof s === 'number') out += `[${s}]`;
    else if (/^[A-Za-z_$][\w$-]*$/.test(s)) out += out === '' ? s : `.${s}`;
    else out += `[${JSON.stringify(s)}]`;
  }
  return out;
}


/** A value as a user would recognise it in a message. */
export function shown(value: unknown): string {
  if (value === null) return 'null';
  if (Array.isArray(value)) return 'a list [...]';
  if (typeof value === 'object') return 'an object {...}';
  if (typeof value === 'string') return `the text ${JSON.stringify(value)}`;
  return String(value);
}


// ---------------------------------------------------------------------------------------------
// JSON syntax, with the place of the first mistake

class JsonFault {
  constructor(
    readonly pos: number,
    readonly what: string,
    /** false for a repeated key: legal JSON syntax, refused here */
    readonly syntax = true,
    readonly fix = 'fix the syntax there; an editor that knows JSON shows such mistakes as you type',
  ) {}
}

/**
 * Checks JSON syntax (RFC 8259) and duplicate keys; returns the first fault or undefined.
 * JSON.parse alone does neither well: its messages give no line (some no position at all)
 * and a repeated key silently keeps the last value.
 */
function scanJson(text: string): JsonFault | undefined {
  let i = 0;
  const n = text.length;
  const ws = (): void => {
    while (i < n && ' \t\n\r'.includes(text[i]!)) i++;
  };
  const unexpected = (where: string): JsonFault => {
    if (i >= n) return new JsonFault(i, `the file ends ${where}`);
    const rest = text.slice(i, i + 9);
    let hint = '';
    if (/^-?(NaN|Infinity)/.test(rest)) {
      hint = ' (JSON has no NaN or Infinity)';
    } else if (rest.startsWith('//') || rest.startsWith('/*')) {
      hint = ' (JSON allows no comments; put notes in "description" or "sources")';
    } else if (rest.startsWith("'")) {
      hint = ' (JSON strings use double quotes)';
    }
    return new JsonFault(i, `unexpected ${JSON.stringify(text[i])} ${where}${hint}`);
  };
  const string = (): string => {
    const start = i++;
    for (;;) {
      if (i >= n) throw new JsonFault(start, 'a text string is not closed (a " is missing)');
      const c = text.charCodeAt(i);
      if (c === 34) break;
      if (c === 92) {
        const e = text[i + 1];
        if (e === 'u' && /^[0-9a-fA-F]{4}$/.test(text.slice(i + 2, i + 6))) i += 6;
        else if (e !== undefined && '"\\/bfnrt'.includes(e)) i += 2;
        else throw new JsonFault(i, 'invalid escape sequence in a text string');
      } else if (c < 0x20) {
        throw new JsonFault(i, 'a line break or control character inside a text string (write \\n)');
      } else i++;
    }
    i++;
    return JSON.parse(text.slice(start, i)) as string;
  };
  const NUMBER = /-?(?:0|[1-9]\d*)(?:\.\d+)?(?:[eE][+-]?\d+)?/y;
  const value = (): void => {
    ws();
    const c = text[i];
    if (c === '{') return object();
    if (c === '[') return array();
    if (c === '"') {
      string();
      return;
    }
    if (c === '-' || (c !== undefined && c >= '0' && c <= '9')) {
      NUMBER.lastIndex = i;
      if (!NUMBER.test(text)) throw new JsonFault(i, 'malformed number');
      i = NUMBER.lastIndex;
      return;
    }
    for (const word of ['true', 'false', 'null']) {
      if (text.startsWith(word, i)) {
        i += word.length;
        return;
      }
    }
    throw unexpected('where a value should be');
  };
  const object = (): void => {
    i++;
    ws();
    if (text[i] === '}') {
      i++;
      return;
    }
    const seen = new Set<string>();
    for (;;) {
      ws();
      if (text[i] !== '"') {
        if (text[i] === '}') {
          throw new JsonFault(i, 'a comma before "}" (JSON allows no trailing comma)');
        }
        throw unexpected('where a field name in double quotes should be');
      }
      const at = i;
      const key = string();
      if (seen.has(key)) {
        const what = `field ${JSON.stringify(key)} appears twice in the same object`;
        throw new JsonFault(at, what, false, 'keep only one of them (JSON.parse would keep the last)');
      }
      seen.add(key);
      ws();
      if (text[i] !== ':') throw unexpected('where ":" should follow the field name');
      i++;
      value();
      ws();
      if (text[i] === ',') {
        i++;
        continue;
      }
      if (text[i] === '}') {
        i++;
        return;
      }
      throw unexpected('where "," or "}" should follow a value');
    }
  };
  const array = (): void => {
    i++;
    ws();
    if (text[i] === ']') {
      i++;
      return;
    }
    for (;;) {
      value();
      ws();
      if (text[i] === ',') {
        i++;
        ws();
        if (text[i] === ']') {
          throw new JsonFault(i, 'a comma before "]" (JSON allows no trailing comma)');
        }
        continue;
      }
      if (text[i] === ']') {
        i++;
        return;
      }
      throw unexpected('where "," or "]" should follow a value');
    }
  };
  try {
    value();
    ws();
    if (i < n) {
      throw new JsonFault(i, `unexpected ${JSON.stringify(text[i])} after the end of the JSON value`);
    }
    return undefined;
  } catch (err) {
    if (err instanceof JsonFault) return err;
    throw err;
  }
}

function lineColumn(text: string, pos: number): { line: number; column: number } {
  let line = 1;
  let lineStart = 0;
  for (let k = 0; k < pos && k < text.length; k++) {
    if (text.charCodeAt(k) === 10) {
      line++;
      lineStart = k + 1;
    }
  }
  return { line, column: pos - lineStart + 1 };
}

// ---------------------------------------------------------------------------------------------
// Parsing without prototype keys or overflowing numbers

interface Offence {
  holder: object;
  key: string;
  value: unknown;
}

/**
 * JSON.parse with a reviver that drops `__proto__`, `constructor` and `prototype` keys and
 * notes the first such key or non-finite number (1e999 parses to Infinity), with its path
 * (a forbidden key holding an earlier offence replaces it, so the outermost is reported).
 * The reviver runs depth first, so the parent links it records lead from the offending holder
 * back to the root once parsing ends.
 */
export function parseGuarded(text: string): {
  value: unknown;
  offence?: { path: Segment[]; key: string; value: unknown };
} {
  const parent = new WeakMap<object, { holder: object; key: string }>();
  let offence: Offence | undefined;
  const within = (node: object, ancestor: unknown): boolean => {
    for (let at: object | undefined = node; at !== undefined; at = parent.get(at)?.holder) {
      if (at === ancestor) return true;
    }
    return false;
  };
  const value: unknown = JSON.parse(text, function reviver(this: object, key: string, v: unknown) {
    const forbidden = FORBIDDEN_KEYS.has(key);
    // report the outermost forbidden key: {"constructor": {"prototype": ...}} names "constructor"
    const bad = forbidden || (typeof v === 'number' && !Number.isFinite(v));
    if (offence === undefined ? bad : forbidden && within(offence.holder, v)) {
      offence = { holder: this, key, value: v };
    }
    if (forbidden) return undefined;
    if (v !== null && typeof v === 'object') parent.set(v, { holder: this, key });
    return v;
  });
  if (offence === undefined) return { value };
  const path: Segment[] = [];
  let holder: object = offence.holder;
  let key = offence.key;
  for (;;) {
    path.unshift(Array.isArray(holder) ? Number(key) : key);
    const up = parent.get(holder);
    if (up === undefined) break;
    holder = up.holder;
    key = up.key;
  }
  path.shift(); // the reviver's root holder is { "": value }
  return { value, offence: { path, key: offence.key, value: offence.value } };
}


export interface JsonDocumentOptions {
  /** what the document is, for messages: "a prior set", "a scenario file" */
  what: string;
  /** what to do about an empty file */
  emptyFix: string;
  /** where to see the expected layout */
  layoutHint: string;
}

/**
 * Parses a user's JSON document that must be one object: a byte-order mark is accepted; an
 * empty file, a syntax mistake (with line and column), a forbidden key or a non-finite number
 * is a WaxwaneError naming the file and the place.
 */
export function readJsonDocument(text: string, file: string, options: JsonDocumentOptions): Record<string, unknown> {
  const body = text.charCodeAt(0) === 0xfeff ? text.slice(1) : text;
  if (body.trim() === '') throw inputError({ file }, 'the file is empty', options.emptyFix);
  const fault = scanJson(body);
  if (fault !== undefined) {
    const { line, column } = lineColumn(body, fault.pos);
    const what = fault.syntax ? `invalid JSON at column ${column}: ${fault.what}` : `at column ${column}, ${fault.what}`;
    throw inputError({ file, line }, what, fault.fix);
  }
  const { value, offence } = parseGuarded(body);
  if (value === null || typeof value !== 'object' || Array.isArray(value)) {
    throw inputError({ file }, `${options.what} must be one JSON object {...}, got ${shown(value)}`, options.layoutHint);
  }
  if (offence !== undefined) {
    const field = fieldPath(offence.path);
    if (FORBIDDEN_KEYS.has(offence.key)) {
      throw inputError(
        { file, field },
        `the key "${offence.key}" is not allowed (it could change how JavaScript objects behave)`,
        'remove it',
      );
    }
    throw inputError(
      { file, field },
      `must be a finite number, got ${String(offence.value)} (the number written is too large to hold)`,
      'write an ordinary number',
    );
  }
  return value as Record<string, unknown>;
}
