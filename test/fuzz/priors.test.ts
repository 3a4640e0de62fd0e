/**
 * Fuzzing the prior-set reader (src/io/priors.ts): random bytes, text edits and structural
 * edits of the shipped prior sets never make parsePriorSet throw anything but a one-line
 * WaxwaneError, and a set it accepts can be used: its priors compile, its delay discretises,
 * and the model built from it has a log density that is finite or -Infinity (never NaN, never
 * a throw) at the prior medians and at random points.
 */
import { readFileSync } from 'node:fs';
import fc from 'fast-check';
import { describe, expect, it } from 'vitest';
import { parsePriorSet } from '../../src/io/priors.js';
import { createModel } from '../../src/model/posterior.js';
import type { PriorSet } from '../../src/model/prior-set.js';
import { editedJson, editedText, expectOnlyToolErrors, randomBytesAsText } from './mutations.js';

const PRIORS = new URL('../../priors/', import.meta.url);
const SHIPPED = ['default', 'flexible', 'long-latent', 'smooth'].map((name) => readFileSync(new URL(`${name}.json`, PRIORS), 'utf8'));
const DEFAULT = SHIPPED[0]!;
/** 12 days of counts with a missing day: enough for two knots and the delay to matter. */
const COUNTS = [0, 2, 1, 4, Number.NaN, 6, 9, 7, 12, 15, 11, 20];

/** An accepted set must give a model whose log density is finite or -Infinity. */
function usable(set: PriorSet, input: string): void {
  // WaxwaneError is allowed here too: a set can be refused when the model is built
  const model = expectOnlyToolErrors(() => createModel({ counts: COUNTS, population: 50_000, firstWeekday: 2 }, set), input) as
    | ReturnType<typeof createModel>
    | undefined;
  if (model === undefined) return;
  const theta = new Float64Array(model.layout.dim);
  const p = model.priors;
  theta[0] = p.start_reproduction.toUnconstrained(p.start_reproduction.quantile(0.5));
  theta[model.layout.walkScale] = p.walk_scale.toUnconstrained(p.walk_scale.quantile(0.5));
  theta[model.layout.ascertainment] = p.ascertainment.toUnconstrained(p.ascertainment.quantile(0.5));
  theta[model.layout.dispersion] = p.dispersion.toUnconstrained(p.dispersion.quantile(0.5));
  theta[model.layout.seedInfected] = p.seed_infected.toUnconstrained(p.seed_infected.quantile(0.5));
  theta[model.layout.latentDays] = p.latent_days.toUnconstrained(p.latent_days.quantile(0.5));
  theta[model.layout.infectiousDays] = p.infectious_days.toUnconstrained(p.infectious_days.quantile(0.5));
  const at = (th: Float64Array) => {
    let v = Number.NaN;
    expect(() => (v = model.logDensity(th)), input).not.toThrow();
    expect(Number.isNaN(v) || v === Infinity, `${v} at ${Array.from(th)} for ${input}`).toBe(false);
  };
  at(theta);
  for (let i = 0; i < theta.length; i++) theta[i] = (i % 3) - 1;
  at(theta);
}

function parsesOrRefuses(text: string): void {
  const set = expectOnlyToolErrors(() => parsePriorSet(text, 'priors.json'), text) as PriorSet | undefined;
  if (set !== undefined) usable(set, text);
}

describe('parsePriorSet under fuzzing', () => {
  it('random bytes and strings: a prior set or a one-line WaxwaneError', () => {
    const anyText = fc.oneof(randomBytesAsText, fc.string({ maxLength: 200 }), fc.string({ unit: 'binary', maxLength: 60 }), fc.json());
    fc.assert(fc.property(anyText, parsesOrRefuses), { seed: 0x9a1001, numRuns: 300 });
  });

  it('random text edits of the shipped sets', () => {
    fc.assert(fc.property(fc.constantFrom(...SHIPPED).chain((base) => editedText(base)), parsesOrRefuses), { seed: 0x9a1002, numRuns: 400 });
  });

  it('random structural edits of the shipped sets (odd values, missing and extra fields)', () => {
    fc.assert(fc.property(fc.constantFrom(...SHIPPED).chain((base) => editedJson(base)), parsesOrRefuses), { seed: 0x9a1003, numRuns: 600 });
  });

  it('extreme but schema-valid numbers in every numeric field', () => {
    // the schema bounds each number (> 0, a whole number within a range); values at and near
    // those bounds, and as large or small as a double holds, must still give a usable model
    const extreme = fc.constantFrom(5e-324, 1e-300, 1e-12, 1e-3, 0.999, 1, 1.5, 40, 1e6, 1e12, 1e300, 1.7976931348623157e308);
    const doc = JSON.parse(DEFAULT) as { model: Record<string, any>; priors: Record<string, any> };
    const numericPaths: Array<[string, string, string?]> = [];
    for (const [k, v] of Object.entries(doc.priors)) {
      if (typeof v === 'number') numericPaths.push(['priors', k]);
      else for (const [f, x] of Object.entries(v as object)) if (typeof x === 'number') numericPaths.push(['priors', k, f]);
    }
    for (const f of ['mean', 'sd']) numericPaths.push(['model', 'delay', f]);
    const edit = fc.array(fc.tuple(fc.constantFrom(...numericPaths), extreme), { minLength: 1, maxLength: 4 });
    fc.assert(
      fc.property(edit, (changes) => {
        const d = structuredClone(doc);
        for (const [[a, b, c], value] of changes) {
          if (c === undefined) d[a as 'priors'][b] = value;
          else d[a as 'priors'][b][c] = value;
        }
        parsesOrRefuses(JSON.stringify(d));
      }),
      { seed: 0x9a1004, numRuns: 300 },
    );
  });
});
