/**
 * The posterior mode in the sampler's coordinates (model/sampling-space.ts), the chains'
 * centre and the point where the Laplace covariance is taken.
 */
import { WaxwaneError } from '../errors.js';
import type { SamplingSpace } from '../model/sampling-space.js';
import { findMode, maximizeLogDensity, type OptimizeOptions, type OptimizeRun } from './optimize.js';

/**
 * The chains' centre in the sampler's coordinates, from starts given in the model's coordinates
 * (theta): the posterior mode of theta itself, found through the sampler's coordinates.
 *
 * Not the mode of the sampler's own density: when the walk scale is integrated out, that density
 * has a spike where every walk increment is zero (the marginal of a scale mixture of normals
 * whose prior does not vanish at scale zero is unbounded there, though integrable), and on data
 * that pin the walk only loosely an optimiser slides into it, to a point of negligible posterior
 * mass (the spike's volume vanishes faster than its density grows). theta's own density is
 * bounded. So each start is first taken to the mode with the walk scale held at the start's
 * value, and the best of those by theta's density is then polished over the sampler's
 * coordinates and u = log sigma together, on log p_theta(theta(y, u)) = log p(y, u) + (K - 1) u
 * (the joint density of the sampler's coordinates less the log-Jacobian, model/sampling-space.ts).
 * The first stage needs no precision (`firstStageOptions`, e.g. a looser tolerance).
 *
 * Without an integrated-out walk scale (`jointLogDensity` null) this is the plain mode of
 * `space.logDensity`. The returned log density is always `space.logDensity` at the position.
 *
 * @throws WaxwaneError when no start gives a finite log density.
 */
export function samplerMode(
  space: SamplingSpace,
  thetaStarts: Float64Array[],
  walkScaleIndex: number,
  options: OptimizeOptions = {},
  firstStageOptions: OptimizeOptions = options,
): OptimizeRun {
  const starts: Array<{ y: Float64Array; u: number }> = [];
  for (const theta of thetaStarts) {
    const y = space.fromTheta(theta);
    if (y !== null) starts.push({ y, u: theta[walkScaleIndex]! });
  }
  if (starts.length === 0) {
    throw new WaxwaneError('the epidemic cannot be simulated from any starting point; check the data and the population');
  }
  const joint = space.jointLogDensity;
  if (joint === null) return findMode(space.logDensity, starts.map((s) => s.y), options);
  const steps = space.walkSteps;
  const dim = space.dim;
  // x = (y, u): the density of theta(y, u)
  const thetaDensity = (x: Float64Array) => joint(x.subarray(0, dim), x[dim]!) + steps * x[dim]!;
  let best: Float64Array | null = null;
  let bestValue = -Infinity;
  for (const { y, u } of starts) {
    const run = maximizeLogDensity((v) => joint(v, u), y, firstStageOptions);
    const x = new Float64Array(dim + 1);
    x.set(run.position);
    x[dim] = u;
    const value = thetaDensity(x);
    if (value > bestValue) {
      best = x;
      bestValue = value;
    }
  }
  if (best === null) {
    throw new WaxwaneError('every start point has log density -Infinity; check the data and the population');
  }
  const polished = maximizeLogDensity(thetaDensity, best, options);
  const position = polished.position.slice(0, dim);
  return { ...polished, position, logDensity: space.logDensity(position) };
}
