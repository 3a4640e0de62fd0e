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
import { readJsonDocument, fieldPath, shown, type Segment } from './json.js';
import { checkDelay } from './delay-check.js';

/**
 * priors/ at the package root. This module is src/io/priors.ts under test and dist/io/priors.js
 * when installed: two levels below the root either way.
 */
const PRIORS_DIR = fileURLToPath(new URL('../../priors/', import.meta.url));
const SCHEMA_FILE = 'schema.json';
const HELP = 'priors/README.md describes every field';


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

const TYPE_WORDS: Record<string, string> = {
  integer: 'a whole number',
  number: 'a number',
  string: 'a text string in double quotes',
  boolean: 'true or false',
  object: 'an object {...}',
  array: 'a list [...]',
};

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
  const value = readJsonDocument(text, file, {
    what: 'a prior set',
    emptyFix: 'write a prior set there (copy priors/default.json as a start)',
    layoutHint: 'see priors/default.json for the layout',
  });
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
  const priorSet = set as unknown as PriorSet;
  checkDelay(priorSet.model.delay, file, 'model.delay');
  return priorSet;
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
