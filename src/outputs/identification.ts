/**
 * How much the data taught us about each scalar parameter: the posterior spread against the
 * prior spread on the sampler's (unconstrained) scale. A parameter whose posterior sd is still
 * more than half its prior sd is reported as weakly identified: its interval mostly restates
 * the prior. Early in an outbreak ascertainment and the seed size are often in that state
 * (MODEL.md section 3); the report says so rather than hiding it.
 */
import type { EpidemicModel } from '../model/posterior.js';
import type { CompiledPrior } from '../model/priors.js';

export interface Identification {
  parameter: string;
  priorSd: number;
  posteriorSd: number;
  /** 1 - posterior variance / prior variance (near 1: the data decide; near 0 or below: the prior does) */
  contraction: number;
  /** (posterior mean - prior mean) / prior sd, on the unconstrained scale */
  shift: number;
  weak: boolean;
}

export const WEAK_RATIO = 0.5;

/** Prior mean and sd on the unconstrained scale, by quadrature over prior quantiles. */
export function priorMoments(prior: CompiledPrior): { mean: number; sd: number } {
  const n = 2000;
  let s = 0;
  let ss = 0;
  for (let i = 0; i < n; i++) {
    const u = prior.toUnconstrained(prior.quantile((i + 0.5) / n));
    s += u;
    ss += u * u;
  }
  const mean = s / n;
  return { mean, sd: Math.sqrt(Math.max(0, ss / n - mean * mean)) };
}

export function identification(model: EpidemicModel, chains: Float64Array[]): Identification[] {
  const L = model.layout;
  const p = model.priors;
  const entries: Array<[string, number, CompiledPrior]> = [
    ['start_reproduction', L.startReproduction, p.start_reproduction],
    ['walk_scale', L.walkScale, p.walk_scale],
    ['ascertainment', L.ascertainment, p.ascertainment],
    ['dispersion', L.dispersion, p.dispersion],
    ['seed_infected', L.seedInfected, p.seed_infected],
    ['latent_days', L.latentDays, p.latent_days],
    ['infectious_days', L.infectiousDays, p.infectious_days],
  ];
  return entries.map(([parameter, i, prior]) => {
    let n = 0;
    let s = 0;
    let ss = 0;
    for (const draws of chains) {
      for (let k = i; k < draws.length; k += L.dim) {
        s += draws[k];
        ss += draws[k] * draws[k];
        n++;
      }
    }
    const mean = s / n;
    const posteriorSd = Math.sqrt(Math.max(0, ss / n - mean * mean));
    const pm = priorMoments(prior);
    return {
      parameter,
      priorSd: pm.sd,
      posteriorSd,
      contraction: 1 - (posteriorSd * posteriorSd) / (pm.sd * pm.sd),
      shift: (mean - pm.mean) / pm.sd,
      weak: posteriorSd > WEAK_RATIO * pm.sd,
    };
  });
}
