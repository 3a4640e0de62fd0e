/**
 * Reading prior-set files (priors/*.json): JSON syntax checked with line and column, keys that
 * could alter JavaScript prototypes refused, numbers that overflow to Infinity refused, and the
 * shape checked against priors/schema.json (the file editors use too). Every problem is one
 * WaxwaneError line naming the file, the field as a path like `priors.walk_scale.scale`, the
 * rule broken and what to do.
 */
import { readdirSync, readFileSync } from 'node:fs';
import { join } from 'node:path';
import { fileURLToPath } from 'node:url';
import { Ajv, type ErrorObject, type ValidateFunction } from 'ajv';
import { WaxwaneError, inputError } from '../errors.js';
import type { PriorSet } from '../model/prior-set.js';

/**
 * priors/ at the package root. This module is src/io/priors.ts under test and dist/io/priors.js
 * when installed: two levels below the root either way.
 */
const PRIORS_DIR = fileURLToPath(new URL('../../priors/', import.meta.url));
const SCHEMA_FILE = 'schema.json';
const HELP = 'priors/README.md describes every field';

/** Keys that reach Object.prototype (or a constructor) when an object is merged or assigned. */
const FORBIDDEN_KEYS = new Set(['__proto__', 'constructor', 'prototype']);

let validator: ValidateFunction | undefined;

function schemaValidator(): ValidateFunction {
  if (validator === undefined) {
    const schema = JSON.parse(readFileSync(join(PRIORS_DIR, SCHEMA_FILE), 'utf8')) as object;
    // strict: a mistake in the schema itself fails loudly; discriminator: errors of a prior come
    // from the branch its "family" names, not from every branch of the oneOf
    const ajv = new Ajv({ strict: true, strictRequired: false, discriminator: true, verbose: true });
    validator = ajv.compile(schema);
  }
  return validator;
}

// ---------------------------------------------------------------------------------------------
// Field paths and values in messages

type Segment = string | number;

/** `priors.walk_scale.scale`, `sources[2]`; odd keys in brackets: `model["a b"]`. */
function fieldPath(segments: readonly Segment[]): string {
  let out = '';
  for (const s of segments) {
    if (typeof s === 'number') out += `[${s}]`;
    else if (/^[A-Za-z_$][\w$-]*$/.test(s)) out += out === '' ? s : `.${s}`;
    else out += `[${JSON.stringify(s)}]`;
  }
  return out;
}

/** JSON-pointer instancePath of ajv (`/priors/walk_scale/scale`) to segments. */
function pointerSegments(pointer: string, root: unknown): Segment[] {
  if (pointer === '') return [];
  const segments: Segment[] = [];
  let node: unknown = root;
  for (const raw of pointer.slice(1).split('/')) {
    const key = raw.replace(/~1/g, '/').replace(/~0/g, '~');
    if (Array.isArray(node)) {
      segments.push(Number(key));
      node = node[Number(key)];
    } else {
      segments.push(key);
      node =
        node !== null && typeof node === 'object' ? (node as Record<string, unknown>)[key] : undefined;
    }
  }
  return segments;
}

/** A value as a user would recognise it in a message. */
function shown(value: unknown): string {
  if (value === null) return 'null';
  if (Array.isArray(value)) return 'a list [...]';
  if (typeof value === 'object') return 'an object {...}';
  if (typeof value === 'string') return `the text ${JSON.stringify(value)}`;
  return String(value);
}

const TYPE_WORDS: Record<string, string> = {
  integer: 'a whole number',
  number: 'a number',
  string: 'a text string in double quotes',
  boolean: 'true or false',
  object: 'an object {...}',
  array: 'a list [...]',
};

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
function parseGuarded(text: string): {
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

// ---------------------------------------------------------------------------------------------
// Schema errors in plain words

const quoted = (v: unknown): string => JSON.stringify(v);

/** A field of the object an ajv error is about, if that is an object. */
function dataField(err: ErrorObject, key: string): unknown {
  const d: unknown = err.data;
  return d !== null && typeof d === 'object' ? (d as Record<string, unknown>)[key] : undefined;
}

function rangeWords(schema: Record<string, unknown>): string | undefined {
  const lo = schema['minimum'];
  const hi = schema['maximum'];
  if (typeof lo === 'number' && typeof hi === 'number') return `from ${lo} to ${hi}`;
  return undefined;
}

function describeSchemaError(
  err: ErrorObject,
  data: unknown,
): { path: Segment[]; rule: string; fix: string } {
  const path = pointerSegments(err.instancePath, data);
  const params = err.params as Record<string, unknown>;
  const parentSchema = (err.parentSchema ?? {}) as Record<string, unknown>;
  const got = shown(err.data);
  const change = `change the value; ${HELP}`;
  switch (err.keyword) {
    case 'required': {
      const missing = String(params['missingProperty']);
      const needed = Array.isArray(parentSchema['required']) ? (parentSchema['required'] as string[]) : [];
      const family = dataField(err, 'family');
      const owner =
        typeof family === 'string' ? `a ${family} prior` : path.length === 0 ? 'a prior set' : 'this object';
      const props = parentSchema['properties'] as Record<string, Record<string, unknown>> | undefined;
      const own = props?.[missing];
      const choices = own?.['enum'] ?? (own !== undefined && 'const' in own ? [own['const']] : undefined);
      const choice = Array.isArray(choices)
        ? `; it must be ${choices.length > 1 ? 'one of ' : ''}${choices.map(quoted).join(', ')}`
        : '';
      return {
        path: [...path, missing],
        rule: `is missing (${owner} needs ${needed.join(', ')}${choice})`,
        fix: `add it; ${HELP}, and priors/default.json is a complete example`,
      };
    }
    case 'additionalProperties': {
      const extra = String(params['additionalProperty']);
      const props = parentSchema['properties'];
      const allowed = props !== null && typeof props === 'object' ? Object.keys(props) : [];
      return {
        path: [...path, extra],
        rule: `is not a known field; the fields allowed here are ${allowed.join(', ')}`,
        fix: 'remove it or correct its spelling',
      };
    }
    case 'type': {
      const want = TYPE_WORDS[String(params['type'])] ?? String(params['type']);
      return { path, rule: `must be ${want}, got ${got}`, fix: change };
    }
    case 'minimum':
    case 'maximum':
    case 'exclusiveMinimum':
    case 'exclusiveMaximum': {
      const range = rangeWords(parentSchema);
      const rule = range
        ? `must be ${range}, got ${got}`
        : `must be ${String(params['comparison'])} ${String(params['limit'])}, got ${got}`;
      return { path, rule, fix: change };
    }
    case 'enum': {
      const allowed = (params['allowedValues'] as unknown[]).map(quoted).join(', ');
      return { path, rule: `must be one of ${allowed}, got ${got}`, fix: change };
    }
    case 'const':
      return { path, rule: `must be ${quoted(params['allowedValue'])}, got ${got}`, fix: change };
    case 'minLength':
      return { path, rule: 'must not be empty', fix: 'write some text there' };
    case 'minItems':
      return { path, rule: `must list at least ${String(params['limit'])} entry`, fix: 'add an entry' };
    case 'discriminator':
      return {
        path: [...path, 'family'],
        rule: `must name the distribution family as text, got ${shown(dataField(err, 'family'))}`,
        fix: change,
      };
    default:
      return { path, rule: err.message ?? `breaks the schema rule "${err.keyword}"`, fix: HELP };
  }
}

// ---------------------------------------------------------------------------------------------
// Public API

/**
 * Parses and validates the text of a prior-set file. `file` is used in messages only.
 * A leading byte-order mark is skipped and the editor key `"$schema"` is accepted and dropped.
 *
 * @throws WaxwaneError (exit code 2) naming the file, the field path, the rule and the fix.
 */
export function parsePriorSet(text: string, file: string): PriorSet {
  const body = text.charCodeAt(0) === 0xfeff ? text.slice(1) : text;
  if (body.trim() === '') {
    const fix = 'write a prior set there (copy priors/default.json as a start)';
    throw inputError({ file }, 'the file is empty', fix);
  }
  const fault = scanJson(body);
  if (fault !== undefined) {
    const { line, column } = lineColumn(body, fault.pos);
    const what = fault.syntax
      ? `invalid JSON at column ${column}: ${fault.what}`
      : `at column ${column}, ${fault.what}`;
    throw inputError({ file, line }, what, fault.fix);
  }
  const { value, offence } = parseGuarded(body);
  if (value === null || typeof value !== 'object' || Array.isArray(value)) {
    throw inputError(
      { file },
      `a prior set must be one JSON object {...}, got ${shown(value)}`,
      'see priors/default.json for the layout',
    );
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
  const validate = schemaValidator();
  if (!validate(value)) {
    const err = (validate.errors ?? [])[0];
    if (err === undefined) {
      throw new WaxwaneError(`${file}: the prior set does not match priors/schema.json`);
    }
    const { path, rule, fix } = describeSchemaError(err, value);
    const field = path.length === 0 ? undefined : fieldPath(path);
    throw inputError(field === undefined ? { file } : { file, field }, rule, fix);
  }
  const { $schema: _editorOnly, ...set } = value as Record<string, unknown>;
  return set as unknown as PriorSet;
}

/** Reads and validates a prior-set file (see parsePriorSet). */
export function loadPriorSet(file: string): PriorSet {
  let text: string;
  try {
    text = readFileSync(file, 'utf8');
  } catch (err) {
    const code = (err as NodeJS.ErrnoException).code;
    const what =
      code === 'ENOENT'
        ? 'no such file'
        : code === 'EISDIR'
          ? 'is a folder, not a file'
          : code === 'EACCES' || code === 'EPERM'
            ? 'cannot be read (permission denied)'
            : `cannot be read (${code ?? String(err)})`;
    throw inputError(
      { file },
      what,
      `check the path, or name a shipped prior set: ${listShippedPriorSets().join(', ')}`,
    );
  }
  return parsePriorSet(text, file);
}

/** Names of the prior sets shipped in priors/ (file names without .json), sorted. */
export function listShippedPriorSets(): string[] {
  return readdirSync(PRIORS_DIR)
    .filter((f) => f.endsWith('.json') && f !== SCHEMA_FILE)
    .map((f) => f.slice(0, -'.json'.length))
    .sort();
}

/** A bare name: letters, digits, "-" and "_", no dot or slash. */
const BARE_NAME = /^[A-Za-z0-9][A-Za-z0-9_-]*$/;

/**
 * The file a prior-set argument names: a bare name such as `default` or `smooth` is the shipped
 * priors/NAME.json; anything else (with a dot or a slash) is a path, returned as given.
 *
 * @throws WaxwaneError when a bare name is not a shipped set.
 */
export function resolvePriorSetPath(nameOrPath: string): string {
  if (!BARE_NAME.test(nameOrPath)) return nameOrPath;
  const shipped = listShippedPriorSets();
  if (!shipped.includes(nameOrPath)) {
    throw new WaxwaneError(
      `prior set "${nameOrPath}": no shipped set has that name (shipped: ${shipped.join(', ')}); ` +
        `give one of those names, or a file path such as ./${nameOrPath}.json`,
    );
  }
  return join(PRIORS_DIR, `${nameOrPath}.json`);
}

/** Loads a prior set given by shipped name or by path (see resolvePriorSetPath). */
export function resolvePriorSet(nameOrPath: string): PriorSet {
  return loadPriorSet(resolvePriorSetPath(nameOrPath));
}
