// Whole-engine check on data with known truth: an epidemic simulated by waxwane's own
// simulator (seed 9001, not a demo seed) is fitted with the default prior set; the fit must
// converge by the rule of MODEL.md section 7, and the 90% credible intervals of the
// transmission rate must contain the true value on at least 80% of days (a nominal 90%
// interval; the 80% floor allows for the autocorrelation of misses across days - common
// practice for coverage checks on one simulated series).
import { describe, it, expect, beforeAll } from 'vitest';
import { fileURLToPath } from 'node:url';
import { readSimScenario } from '../../src/io/sim-scenario.js';
import { simulatePlace } from '../../src/model/simulate.js';
import { loadPriorSet } from '../../src/io/priors.js';
import { fitPosterior, DEFAULT_SAMPLER, type FitResult } from '../../src/inference/fit.js';
import { dailyDraws, sortedColumns } from '../../src/model/derived.js';
import { diagnosticRows, isConverged, summaryRows, CONVERGENCE, type SummaryRow } from '../../src/outputs/summary.js';
import { identification, type Identification } from '../../src/outputs/identification.js';
import { createRng, deriveSeed } from '../../src/util/rng.js';
import { dayOfWeek } from '../../src/io/dates.js';

const here = (p: string) => fileURLToPath(new URL(p, import.meta.url));

describe('fitPosterior on a simulated epidemic with known truth', () => {
  const scenario = readSimScenario(here('../fixtures/scenarios/engine-check.json'));
  const place = scenario.places[0];
  const sim = simulatePlace(scenario, place, createRng(9001));
  let fit: FitResult;
  let rows: SummaryRow[];
  let ident: Identification[];

  beforeAll(async () => {
    const priorSet = loadPriorSet(here('../../priors/default.json'));
    const input = { counts: sim.cases, population: place.population, firstWeekday: dayOfWeek(sim.dates[0]), priorSet };
    fit = await fitPosterior(input, { ...DEFAULT_SAMPLER, seed: 11, threads: 2 });
    const chains = fit.chains.map((c) => c.draws);
    const all = new Float64Array(chains.reduce((a, c) => a + c.length, 0));
    let off = 0;
    for (const c of chains) {
      all.set(c, off);
      off += c.length;
    }
    const daily = sortedColumns(dailyDraws(fit.model, all, input.firstWeekday, createRng(deriveSeed(11, 1))), sim.dates.length);
    rows = summaryRows(fit.model.layout, chains, daily, sim.dates, [0.05, 0.5, 0.95]);
    ident = identification(fit.model, chains);
  }, 600_000);

  it('converges: every R-hat <= 1.01, bulk and tail ESS >= 400', () => {
    const diag = diagnosticRows(fit.model.layout, fit.chains.map((c) => c.draws));
    const worst = diag.reduce((w, d) => (d.rhat > w.rhat ? d : w));
    const fewest = diag.reduce((w, d) => (Math.min(d.ess_bulk, d.ess_tail) < Math.min(w.ess_bulk, w.ess_tail) ? d : w));
    expect(worst.rhat, `worst R-hat: ${worst.parameter}`).toBeLessThanOrEqual(CONVERGENCE.maxRhat);
    expect(Math.min(fewest.ess_bulk, fewest.ess_tail), `fewest ESS: ${fewest.parameter}`).toBeGreaterThanOrEqual(CONVERGENCE.minEss);
    expect(isConverged(diag)).toBe(true);
  });

  it('90% intervals of transmission_rate contain the truth on at least 80% of days', () => {
    const beta = rows.filter((r) => r.quantity === 'transmission_rate');
    expect(beta.length).toBe(sim.dates.length);
    let inside = 0;
    beta.forEach((r, t) => {
      const truth = sim.truth.transmission_rate[t];
      if (r.quantiles[0] <= truth && truth <= r.quantiles[2]) inside++;
    });
    expect(inside / beta.length).toBeGreaterThanOrEqual(0.8);
  });

  it('flags ascertainment and seed size as weakly identified exactly when their posterior sd exceeds half the prior sd', () => {
    for (const name of ['ascertainment', 'seed_infected']) {
      const id = ident.find((x) => x.parameter === name)!;
      expect(id.weak).toBe(id.posteriorSd > 0.5 * id.priorSd);
      expect(Number.isFinite(id.contraction)).toBe(true);
    }
  });
});
