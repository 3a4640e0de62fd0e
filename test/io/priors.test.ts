import { mkdirSync, mkdtempSync, readFileSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { fileURLToPath } from 'node:url';
import { Ajv } from 'ajv';
import { afterAll, describe, expect, it } from 'vitest';
import { WaxwaneError } from '../../src/errors.js';
import {
  listShippedPriorSets,
  loadPriorSet,
  parsePriorSet,
  resolvePriorSet,
  resolvePriorSetPath,
} from '../../src/io/priors.js';
import type { PriorSet } from '../../src/model/prior-set.js';

const PRIORS = fileURLToPath(new URL('../../priors/', import.meta.url));
const defaultText = readFileSync(join(PRIORS, 'default.json'), 'utf8');
const schema = JSON.parse(readFileSync(join(PRIORS, 'schema.json'), 'utf8')) as Record<string, unknown>;

const tmp = mkdtempSync(join(tmpdir(), 'waxwane-priors-'));
afterAll(() => rmSync(tmp, { recursive: true, force: true }));

/** The default set as plain JSON, to be broken one way per test. */
function defaultJson(): Record<string, any> {
  return JSON.parse(defaultText) as Record<string, any>;
}
function edited(edit: (d: Record<string, any>) => void): string {
  const d = defaultJson();
  edit(d);
  return JSON.stringify(d, null, 2);
}

/** 1-based line of the first occurrence of `needle` at or after `from` in `text`. */
function lineOf(text: string, needle: string, from = 0): number {
  return text.slice(0, text.indexOf(needle, from)).split('\n').length;
}

/** The error a call throws (fails the test if it throws none). */
function caught(f: () => unknown): WaxwaneError {
  try {
    f();
  } catch (err) {
    expect(err).toBeInstanceOf(WaxwaneError);
    return err as WaxwaneError;
  }
  throw new Error('expected a WaxwaneError, nothing was thrown');
}

// The reference model's defaults, copied from MODEL.md sections 1-4 (project default).
const modelDefaults: Omit<PriorSet, 'name' | 'description' | 'sources'> = {
  model: {
    latent_stages: 2,
    infectious_stages: 2,
    substeps: 4,
    seed_days: 14,
    knot_days: 7,
    interpolation: 'step',
    delay: { family: 'gamma', mean: 5, sd: 3, max_days: 21 },
    weekday_effect: false,
  },
  priors: {
    start_reproduction: { family: 'lognormal', median: 1.5, sdlog: 0.5 },
    walk_scale: { family: 'half_normal', scale: 0.15 },
    ascertainment: { family: 'beta', a: 2, b: 6 },
    dispersion: { family: 'inverse_sqrt_half_normal', scale: 1 },
    seed_infected: { family: 'lognormal', median: 10, sdlog: 1 },
    latent_days: { family: 'lognormal', median: 3, sdlog: 0.1 },
    infectious_days: { family: 'lognormal', median: 5, sdlog: 0.1 },
    weekday_sd: 0.2,
  },
};

describe('shipped prior sets', () => {
  it('listShippedPriorSets lists the four shipped files, not the schema', () => {
    expect(listShippedPriorSets()).toEqual(['default', 'flexible', 'long-latent', 'smooth']);
  });

  it.each(['default', 'flexible', 'long-latent', 'smooth'])('%s loads, starts with "$schema" and says where its values come from', (name) => {
    const file = join(PRIORS, `${name}.json`);
    const raw = JSON.parse(readFileSync(file, 'utf8')) as Record<string, unknown>;
    expect(Object.keys(raw)[0]).toBe('$schema');
    expect(raw['$schema']).toBe('./schema.json');
    const set = loadPriorSet(file);
    expect(set).not.toHaveProperty('$schema');
    expect(set.name).toBe(name);
    expect(set.description.length).toBeGreaterThan(40);
    expect(set.sources.length).toBeGreaterThan(0);
    // every source statement says what kind of source it is (rules: published, common practice
    // or from memory)
    for (const s of set.sources) expect(s).toMatch(/common practice|from memory|judgement|no published source/);
    expect(resolvePriorSet(name)).toEqual(set);
  });

  it('default.json is exactly the MODEL.md defaults', () => {
    const set = loadPriorSet(join(PRIORS, 'default.json'));
    expect({ model: set.model, priors: set.priors }).toEqual(modelDefaults);
  });

  it.each([
    ['smooth', 0.05],
    ['flexible', 0.4],
  ])('%s.json is the default set with walk_scale half_normal(%s)', (name, scale) => {
    const set = resolvePriorSet(name);
    expect(set.model).toEqual(modelDefaults.model);
    expect(set.priors).toEqual({ ...modelDefaults.priors, walk_scale: { family: 'half_normal', scale } });
  });

  it('long-latent.json has a latent period of roughly 8-12 days, marked from memory', () => {
    const set = resolvePriorSet('long-latent');
    const latent = set.priors.latent_days;
    expect(latent.family).toBe('lognormal');
    if (latent.family !== 'lognormal') return;
    expect(latent.median).toBeGreaterThanOrEqual(8);
    expect(latent.median).toBeLessThanOrEqual(12);
    expect(set.sources.some((s) => s.includes('latent_days') && s.includes('from memory'))).toBe(true);
    expect(set.sources.some((s) => s.includes('infectious_days') && s.includes('from memory'))).toBe(true);
  });
});

describe('priors/schema.json', () => {
  it('is a valid draft-07 schema (checked by ajv against the draft-07 meta-schema)', () => {
    const ajv = new Ajv({ discriminator: true });
    expect(ajv.validateSchema(schema)).toBe(true);
  });

  it('gives every field a description, for editors', () => {
    const missing: string[] = [];
    const walk = (node: unknown, at: string): void => {
      if (node === null || typeof node !== 'object') return;
      const o = node as Record<string, unknown>;
      if ('type' in o || 'const' in o || '$ref' in o) {
        if (typeof o['description'] !== 'string') missing.push(at);
      }
      for (const [k, v] of Object.entries(o)) {
        if (Array.isArray(v)) v.forEach((x, i) => walk(x, `${at}/${k}/${i}`));
        else walk(v, `${at}/${k}`);
      }
    };
    walk(schema, '#');
    expect(missing).toEqual([]);
  });

  it('has the same fields as the PriorSet type (the type is the source of the shape)', () => {
    // a fully typed PriorSet: tsc checks it against src/model/prior-set.ts, this test checks the
    // schema's properties against it at every level
    const typed: PriorSet = { name: 'n', description: 'd', sources: ['s'], ...modelDefaults };
    const defs = schema['definitions'] as Record<string, any>;
    const props = (s: any): string[] => Object.keys(s.properties ?? {}).filter((k) => k !== '$schema').sort();
    const keys = (o: object): string[] => Object.keys(o).sort();
    const top = schema as any;
    expect(props(top)).toEqual(keys(typed));
    expect(props(top.properties.model)).toEqual(keys(typed.model));
    expect(props(top.properties.model.properties.delay)).toEqual(keys(typed.model.delay));
    expect(props(top.properties.priors)).toEqual(keys(typed.priors));
    const branches = defs['positivePrior'].oneOf as any[];
    const families = branches.map((b) => b.properties.family.const);
    expect(families).toEqual(['lognormal', 'half_normal', 'gamma']);
    expect(defs['positivePrior'].properties.family.enum).toEqual(families);
    const examples: Record<string, object> = {
      lognormal: typed.priors.start_reproduction,
      half_normal: typed.priors.walk_scale,
      gamma: { family: 'gamma', shape: 2, rate: 1 } satisfies PriorSet['priors']['walk_scale'],
    };
    for (const b of branches) expect(props(b)).toEqual(keys(examples[b.properties.family.const]!));
    expect(props(defs['unitPrior'])).toEqual(keys(typed.priors.ascertainment));
    expect(props(defs['dispersionPrior'])).toEqual(keys(typed.priors.dispersion));
  });
});

interface BadCase {
  label: string;
  text: string;
  /** `field "..."` or `line N` expected in the message */
  where: string;
  /** the rule, in the message's words */
  rule: string | RegExp;
}

const badCases: BadCase[] = [
  {
    label: 'invalid JSON (trailing comma)',
    text: '{\n  "name": "x",\n  "sources": ["a"],\n}\n',
    where: 'line 4',
    rule: 'invalid JSON at column 1: a comma before "}" (JSON allows no trailing comma)',
  },
  {
    label: 'invalid JSON (missing comma)',
    text: '{\n  "name": "x"\n  "description": "y"\n}',
    where: 'line 3',
    rule: 'invalid JSON at column 3: unexpected "\\"" where "," or "}" should follow a value',
  },
  {
    label: 'invalid JSON (cut short)',
    text: '{\n  "name": "x",\n  "model": {',
    where: 'line 3',
    rule: 'the file ends where a field name in double quotes should be',
  },
  {
    label: 'invalid JSON (NaN)',
    text: defaultText.replace('"scale": 0.15', '"scale": NaN'),
    where: `line ${lineOf(defaultText, '"scale": 0.15')}`,
    rule: 'JSON has no NaN or Infinity',
  },
  {
    label: 'invalid JSON (comment)',
    text: '{\n  // my prior set\n  "name": "x"\n}',
    where: 'line 2',
    rule: 'JSON allows no comments',
  },
  {
    label: 'duplicate key',
    text: defaultText.replace('"substeps": 4,', '"substeps": 4,\n    "substeps": 8,'),
    where: `line ${lineOf(defaultText, '"substeps"') + 1}`,
    rule: 'at column 5, field "substeps" appears twice in the same object; keep only one',
  },
  { label: 'empty file', text: '  \n', where: 'empty', rule: 'the file is empty' },
  {
    label: 'not an object',
    text: '[1, 2, 3]',
    where: '.json:',
    rule: 'a prior set must be one JSON object {...}, got a list [...]',
  },
  {
    label: 'unknown field',
    text: edited((d) => {
      d.priors.walk_scale.sclae = 0.1;
    }),
    where: 'field "priors.walk_scale.sclae"',
    rule: 'is not a known field; the fields allowed here are family, scale',
  },
  {
    label: 'unknown top-level field',
    text: edited((d) => {
      d.notes = 'x';
    }),
    where: 'field "notes"',
    rule: 'the fields allowed here are $schema, name, description, sources, model, priors',
  },
  {
    label: 'missing field',
    text: edited((d) => {
      delete d.model.substeps;
    }),
    where: 'field "model.substeps"',
    rule: 'is missing',
  },
  {
    label: 'missing prior parameter',
    text: edited((d) => {
      delete d.priors.latent_days.sdlog;
    }),
    where: 'field "priors.latent_days.sdlog"',
    rule: 'is missing (a lognormal prior needs family, median, sdlog)',
  },
  {
    label: 'negative scale',
    text: edited((d) => {
      d.priors.walk_scale.scale = -0.1;
    }),
    where: 'field "priors.walk_scale.scale"',
    rule: 'must be > 0, got -0.1',
  },
  {
    label: 'zero sdlog',
    text: edited((d) => {
      d.priors.start_reproduction.sdlog = 0;
    }),
    where: 'field "priors.start_reproduction.sdlog"',
    rule: 'must be > 0, got 0',
  },
  {
    label: 'zero beta shape',
    text: edited((d) => {
      d.priors.ascertainment.b = 0;
    }),
    where: 'field "priors.ascertainment.b"',
    rule: 'must be > 0, got 0',
  },
  {
    label: 'wrong family name',
    text: edited((d) => {
      d.priors.walk_scale.family = 'weibull';
    }),
    where: 'field "priors.walk_scale.family"',
    rule: 'must be one of "lognormal", "half_normal", "gamma", got the text "weibull"',
  },
  {
    label: 'missing family',
    text: edited((d) => {
      delete d.priors.seed_infected.family;
    }),
    where: 'field "priors.seed_infected.family"',
    rule: 'is missing (this object needs family; it must be one of "lognormal", "half_normal", "gamma")',
  },
  {
    label: 'family of another kind of prior',
    text: edited((d) => {
      d.priors.ascertainment.family = 'gamma';
    }),
    where: 'field "priors.ascertainment.family"',
    rule: 'must be "beta", got the text "gamma"',
  },
  {
    label: 'stages 0',
    text: edited((d) => {
      d.model.latent_stages = 0;
    }),
    where: 'field "model.latent_stages"',
    rule: 'must be from 1 to 8, got 0',
  },
  {
    label: 'stages 9',
    text: edited((d) => {
      d.model.infectious_stages = 9;
    }),
    where: 'field "model.infectious_stages"',
    rule: 'must be from 1 to 8, got 9',
  },
  {
    label: 'fractional stages',
    text: edited((d) => {
      d.model.infectious_stages = 2.5;
    }),
    where: 'field "model.infectious_stages"',
    rule: 'must be a whole number, got 2.5',
  },
  {
    label: 'substeps 65',
    text: edited((d) => {
      d.model.substeps = 65;
    }),
    where: 'field "model.substeps"',
    rule: 'must be from 1 to 64, got 65',
  },
  {
    label: 'seed_days -1',
    text: edited((d) => {
      d.model.seed_days = -1;
    }),
    where: 'field "model.seed_days"',
    rule: 'must be from 0 to 120, got -1',
  },
  {
    label: 'knot_days 0',
    text: edited((d) => {
      d.model.knot_days = 0;
    }),
    where: 'field "model.knot_days"',
    rule: 'must be from 1 to 60, got 0',
  },
  {
    label: 'max_days 0',
    text: edited((d) => {
      d.model.delay.max_days = 0;
    }),
    where: 'field "model.delay.max_days"',
    rule: 'must be from 1 to 60, got 0',
  },
  {
    label: 'unknown interpolation',
    text: edited((d) => {
      d.model.interpolation = 'cubic';
    }),
    where: 'field "model.interpolation"',
    rule: 'must be one of "step", "linear", got the text "cubic"',
  },
  {
    label: 'Infinity via 1e999',
    text: defaultText.replace('"scale": 0.15', '"scale": 1e999'),
    where: 'field "priors.walk_scale.scale"',
    rule: 'must be a finite number, got Infinity',
  },
  {
    label: '-Infinity via -1e999',
    text: defaultText.replace('"mean": 5', '"mean": -1e999'),
    where: 'field "model.delay.mean"',
    rule: 'must be a finite number, got -Infinity',
  },
  {
    label: '__proto__ key',
    text: defaultText.replace('"priors": {', '"priors": {\n    "__proto__": { "polluted": "yes" },'),
    where: 'field "priors.__proto__"',
    rule: 'the key "__proto__" is not allowed',
  },
  {
    label: 'top-level __proto__ key',
    text: defaultText.replace('{', '{\n  "__proto__": { "polluted": "yes" },'),
    where: 'field "__proto__"',
    rule: 'the key "__proto__" is not allowed',
  },
  {
    label: 'constructor key',
    text: defaultText.replace('"model": {', '"model": {\n    "constructor": { "prototype": { "polluted": "yes" } },'),
    where: 'field "model.constructor"',
    rule: 'the key "constructor" is not allowed',
  },
  {
    label: 'prototype key in a list',
    text: defaultText.replace('"sources": [', '"sources": [\n    { "prototype": 1 },'),
    where: 'field "sources[0].prototype"',
    rule: 'the key "prototype" is not allowed',
  },
  {
    label: 'wrong type (string for number)',
    text: edited((d) => {
      d.model.substeps = '4';
    }),
    where: 'field "model.substeps"',
    rule: 'must be a whole number, got the text "4"',
  },
  {
    label: 'wrong type (string for boolean)',
    text: edited((d) => {
      d.model.weekday_effect = 'no';
    }),
    where: 'field "model.weekday_effect"',
    rule: 'must be true or false, got the text "no"',
  },
  {
    label: 'wrong type (number for prior object)',
    text: edited((d) => {
      d.priors.dispersion = 1;
    }),
    where: 'field "priors.dispersion"',
    rule: 'must be an object {...}, got 1',
  },
  {
    label: 'no sources',
    text: edited((d) => {
      d.sources = [];
    }),
    where: 'field "sources"',
    rule: 'must list at least 1 entry',
  },
  {
    label: 'empty name',
    text: edited((d) => {
      d.name = '';
    }),
    where: 'field "name"',
    rule: 'must not be empty',
  },
];

describe('loadPriorSet on bad files', () => {
  const dir = join(tmp, 'bad');
  mkdirSync(dir);
  it.each(badCases.map((c, i) => ({ ...c, i })))('$label', ({ text, where, rule, i }) => {
    const file = join(dir, `bad-${i}.json`);
    writeFileSync(file, text);
    const err = caught(() => loadPriorSet(file));
    expect(err.exitCode).toBe(2);
    expect(err.message.startsWith(file)).toBe(true);
    expect(err.message).toContain(where);
    if (typeof rule === 'string') expect(err.message).toContain(rule);
    else expect(err.message).toMatch(rule);
    expect(err.message).not.toContain('\n');
    // a fix follows the rule, after "; "
    expect(err.message).toMatch(/; \S.{5,}$/);
  });

  it('no file tried above has touched Object.prototype', () => {
    expect(({} as Record<string, unknown>)['polluted']).toBeUndefined();
    expect(Object.prototype).not.toHaveProperty('polluted');
  });
});

describe('parsePriorSet', () => {
  it('rejects a __proto__ key without polluting prototypes, whatever its place', () => {
    for (const text of [
      '{"__proto__": {"polluted": 1}}',
      edited(() => {}).replace('"walk_scale": {', '"walk_scale": {"__proto__": {"polluted": 1}, '),
      '{"constructor": {"prototype": {"polluted": 1}}}',
    ]) {
      const err = caught(() => parsePriorSet(text, 'p.json'));
      expect(err.message).toMatch(/is not allowed/);
      expect(({} as Record<string, unknown>)['polluted']).toBeUndefined();
    }
  });

  it('accepts and drops "$schema", and accepts a byte-order mark', () => {
    const set = parsePriorSet('\ufeff' + defaultText, 'bom.json');
    expect(set).not.toHaveProperty('$schema');
    expect(set.priors.walk_scale).toEqual({ family: 'half_normal', scale: 0.15 });
  });

  it('accepts a set with no "$schema" and other families', () => {
    const text = edited((d) => {
      delete d.$schema;
      d.priors.walk_scale = { family: 'gamma', shape: 2, rate: 10 };
      d.model.delay.family = 'lognormal';
      d.model.interpolation = 'linear';
    });
    const set = parsePriorSet(text, 'mine.json');
    expect(set.priors.walk_scale).toEqual({ family: 'gamma', shape: 2, rate: 10 });
    expect(set.model.interpolation).toBe('linear');
  });

  it('names the file as given', () => {
    const err = caught(() => parsePriorSet('{}', 'some/where/x.json'));
    expect(err.message).toMatch(/^some\/where\/x\.json, field "name": is missing \(a prior set needs name, description, sources, model, priors\); add it/);
  });
});

describe('loadPriorSet', () => {
  it('loads a user file', () => {
    const file = join(tmp, 'my-illness.json');
    writeFileSync(file, edited((d) => (d.name = 'my-illness')));
    expect(loadPriorSet(file).name).toBe('my-illness');
  });

  it('a missing file: says so and lists the shipped sets', () => {
    const file = join(tmp, 'nope.json');
    const err = caught(() => loadPriorSet(file));
    expect(err.exitCode).toBe(2);
    expect(err.message).toBe(
      `${file}: no such file; check the path, or name a shipped prior set: default, flexible, long-latent, smooth`,
    );
  });

  it('a folder: says so', () => {
    expect(caught(() => loadPriorSet(tmp)).message).toContain(`${tmp}: is a folder, not a file`);
  });
});

describe('resolvePriorSetPath', () => {
  it('a bare name is the shipped file', () => {
    expect(resolvePriorSetPath('smooth')).toBe(join(PRIORS, 'smooth.json'));
    expect(resolvePriorSetPath('long-latent')).toBe(join(PRIORS, 'long-latent.json'));
  });

  it('anything with a dot or a slash is a path, returned as given', () => {
    expect(resolvePriorSetPath('./default')).toBe('./default');
    expect(resolvePriorSetPath('my.json')).toBe('my.json');
    expect(resolvePriorSetPath('/abs/x')).toBe('/abs/x');
  });

  it('an unknown bare name is an error listing the shipped names', () => {
    for (const name of ['measly', 'schema']) {
      const err = caught(() => resolvePriorSetPath(name));
      expect(err.exitCode).toBe(2);
      expect(err.message).toBe(
        `prior set "${name}": no shipped set has that name (shipped: default, flexible, long-latent, smooth); ` +
          `give one of those names, or a file path such as ./${name}.json`,
      );
    }
  });
});
