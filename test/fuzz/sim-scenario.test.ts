/**
 * Fuzzing the simulation-scenario reader (src/io/sim-scenario.ts): random bytes, text edits and
 * structural edits of the demo scenarios never make parseSimScenario throw anything but a
 * one-line WaxwaneError; what it accepts holds finite numbers within the documented ranges, and
 * the simulator either simulates it (whole, non-negative, safe counts and finite truth) or
 * refuses it with the RangeError that `waxwane simulate` turns into a message.
 */
import { readFileSync } from 'node:fs';
import fc from 'fast-check';
import { describe, expect, it } from 'vitest';
import { parseSimScenario, type SimScenario } from '../../src/io/sim-scenario.js';
import { simulatePlace } from '../../src/model/simulate.js';
import { createRng } from '../../src/util/rng.js';
import { editedJson, editedText, expectOnlyToolErrors, randomBytesAsText } from './mutations.js';

const SCENARIOS = new URL('../../data-demo/scenarios/', import.meta.url);
/** The demo scenarios, shortened to 30 days so that each simulation takes a fraction of a millisecond. */
const BASES = ['larkmere', 'districts'].map((name) => {
  const s = JSON.parse(readFileSync(new URL(`${name}.json`, SCENARIOS), 'utf8')) as { days: number };
  s.days = 30;
  return JSON.stringify(s, null, 2);
});

function checkAccepted(s: SimScenario, input: string): void {
  expect(s.days >= 1 && s.days <= 20000 && Number.isInteger(s.days), input).toBe(true);
  expect(s.places.length).toBeGreaterThan(0);
  for (const p of s.places) {
    for (const v of [p.population, p.seed_infected, p.latent_days, p.infectious_days, p.ascertainment, p.dispersion]) {
      expect(Number.isFinite(v) && v > 0, `${v} in ${input}`).toBe(true);
    }
    for (const [, r] of p.reproduction) expect(r > 0 && r < 100).toBe(true);
    if (p.weekday_multipliers !== null) for (const w of p.weekday_multipliers) expect(Number.isFinite(w) && w > 0).toBe(true);
    // keep the simulations below quick: a fuzzed scenario may ask for up to 20000 days
    if (s.days > 400) continue;
    let sim: ReturnType<typeof simulatePlace> | undefined;
    try {
      sim = simulatePlace(s, p, createRng(7));
    } catch (err) {
      if (!(err instanceof RangeError)) throw err;
      continue;
    }
    expect(sim.cases).toHaveLength(s.days);
    for (const c of sim.cases) expect(Number.isSafeInteger(c) && c >= 0, `${c} in ${input}`).toBe(true);
    for (const series of Object.values(sim.truth)) for (const v of series) expect(Number.isFinite(v), input).toBe(true);
  }
}

function parsesOrRefuses(text: string): void {
  const s = expectOnlyToolErrors(() => parseSimScenario(text, 'scenario.json'), text) as SimScenario | undefined;
  if (s !== undefined) checkAccepted(s, text);
}

describe('parseSimScenario under fuzzing', () => {
  it('random bytes and strings: a scenario or a one-line WaxwaneError', () => {
    const anyText = fc.oneof(randomBytesAsText, fc.string({ maxLength: 200 }), fc.string({ unit: 'binary', maxLength: 60 }), fc.json());
    fc.assert(fc.property(anyText, parsesOrRefuses), { seed: 0x51a001, numRuns: 300 });
  });

  it('random text edits of the demo scenarios', () => {
    for (const base of BASES) checkAccepted(parseSimScenario(base, 'scenario.json'), base);
    fc.assert(fc.property(fc.constantFrom(...BASES).chain((base) => editedText(base)), parsesOrRefuses), { seed: 0x51a002, numRuns: 400 });
  });

  it('random structural edits of the demo scenarios (odd values, missing and extra fields)', () => {
    fc.assert(fc.property(fc.constantFrom(...BASES).chain((base) => editedJson(base)), parsesOrRefuses), { seed: 0x51a003, numRuns: 800 });
  });
});
