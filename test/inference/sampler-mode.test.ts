// samplerMode must find the posterior mode of theta, not the spike of the sampler's marginal
// density at a flat walk: on weakly informative counts (a small district simulated by waxwane's
// own simulator, 150 days) the marginal keeps growing toward zero walk increments, while theta's
// density there is far lower than at the mode (log densities from the model itself).
import { describe, expect, it } from 'vitest';
import { fileURLToPath } from 'node:url';
import { createModel } from '../../src/model/posterior.js';
import { createSamplingSpace } from '../../src/model/sampling-space.js';
import { loadPriorSet } from '../../src/io/priors.js';
import { samplerMode } from '../../src/inference/sampler-mode.js';
import { maximizeLogDensity } from '../../src/inference/optimize.js';
import { createRng } from '../../src/util/rng.js';

const priorSet = loadPriorSet(fileURLToPath(new URL('../../priors/default.json', import.meta.url)));
const counts = Float64Array.from([0, 0, 0, 0, 1, 1, 0, 2, 0, 1, 0, 0, 1, 1, 1, 2, 0, 0, 0, 2, 1, 2, 2, 0, 3, 1, 0, 4, 2, 3, 3, 4, 5, 1, 1, 3, 3, 2, 4, 4, 3, 1, 6, 8, 4, 2, 6, 7, 7, 5, 5, 5, 12, 14, 15, 8, 11, 18, 12, 8, 10, 14, 27, 25, 36, 32, 21, 30, 26, 36, 34, 41, 37, 40, 29, 49, 25, 41, 44, 45, 36, 31, 50, 34, 23, 30, 32, 30, 20, 35, 24, 30, 19, 30, 31, 23, 22, 27, 12, 21, 14, 27, 21, 14, 13, 13, 12, 11, 16, 14, 19, 25, 17, 20, 8, 16, 4, 19, 15, 16, 12, 6, 8, 6, 7, 11, 7, 10, 6, 2, 8, 5, 7, 5, 8, 4, 5, 9, 9, 2, 5, 7, 3, 6, 5, 3, 4, 4, 4, 0]);
const model = createModel({ counts, population: 95_000, firstWeekday: 0 }, priorSet);
const L = model.layout;
const space = createSamplingSpace(model);

function start(): Float64Array {
  const th = new Float64Array(L.dim);
  th[L.startReproduction] = Math.log(1.5);
  th[L.walkScale] = Math.log(0.1);
  th[L.ascertainment] = Math.log(0.25 / 0.75);
  th[L.dispersion] = Math.log(10);
  th[L.seedInfected] = Math.log(10);
  th[L.latentDays] = Math.log(3);
  th[L.infectiousDays] = Math.log(5);
  return th;
}

/** theta at a sampler point, with the walk scale that is most likely given it, and its model log density */
function thetaDensityAt(y: Float64Array): { walkScale: number; logDensity: number } {
  const th = new Float64Array(L.dim);
  let best = { walkScale: NaN, logDensity: -Infinity };
  // the largest theta density over the walk scale, on a grid of draws from its conditional
  const rng = createRng(3);
  for (let i = 0; i < 200; i++) {
    space.toTheta(y, th, rng);
    const v = model.logDensity(th);
    if (v > best.logDensity) best = { walkScale: Math.exp(th[L.walkScale]!), logDensity: v };
  }
  return best;
}

describe('samplerMode', () => {
  it('centres the chains at the mode of theta, away from the flat-walk spike of the marginal', () => {
    const opts = { maxIterations: 2000, functionTolerance: 1e-9 };
    const mode = samplerMode(space, [start()], L.walkScale, opts, { maxIterations: 2000, functionTolerance: 1e-6 });
    const atMode = thetaDensityAt(mode.position);
    // polishing the marginal itself from the same point runs into the spike: a far larger
    // marginal density, a vanishing walk scale and a far lower density of theta
    const spike = maximizeLogDensity(space.logDensity, mode.position, opts);
    const atSpike = thetaDensityAt(spike.position);
    expect(spike.logDensity).toBeGreaterThan(mode.logDensity);
    expect(atSpike.walkScale).toBeLessThan(1e-3);
    expect(atMode.walkScale).toBeGreaterThan(0.02);
    expect(atMode.logDensity).toBeGreaterThan(atSpike.logDensity + 10);
    expect(mode.logDensity).toBe(space.logDensity(mode.position));
  });
});
