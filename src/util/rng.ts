/**
 * Seedable randomness for every stochastic part of waxwane. One Mersenne Twister from @stdlib
 * per stream; normals, gammas and Poissons are drawn from it through @stdlib's samplers, so the
 * whole stream is a function of the generator state, which can be captured and restored
 * (checkpoints) and which is derived from a single run seed (reproducibility).
 */
import { mersenneTwister, stdlib } from './stdlib.js';

type Sampler1 = (a: number) => number;
// @stdlib's Poisson sampler draws nothing from the stream when it is built, so a restored
// state replays it exactly. (Its normal and gamma samplers take one draw at construction,
// which would shift a restored stream; those two are written out below.)
const poissonFactory = stdlib<{ factory(options: { prng: () => number }): Sampler1 }>('@stdlib/random/base/poisson');

export interface Rng {
  /** Uniform on [0, 1). */
  uniform(): number;
  /** Standard normal. */
  normal(): number;
  /** Gamma with shape and rate. */
  gamma(shape: number, rate: number): number;
  /** Poisson with the given mean. */
  poisson(mean: number): number;
  /** A copy of the generator state; `restoreRng(state)` continues the same stream. */
  state(): Uint32Array;
}

/** Marsaglia's polar method; the second variate is discarded so the stream holds no cache. */
function polarNormal(uniform: () => number): number {
  for (;;) {
    const u = 2 * uniform() - 1;
    const v = 2 * uniform() - 1;
    const s = u * u + v * v;
    if (s > 0 && s < 1) return u * Math.sqrt((-2 * Math.log(s)) / s);
  }
}

/**
 * Gamma(shape, rate) by Marsaglia and Tsang (2000), "A simple method for generating gamma
 * variables", ACM TOMS 26(3); shape < 1 through the boost X * U^(1/shape).
 */
function marsagliaTsangGamma(uniform: () => number, shape: number, rate: number): number {
  if (!(shape > 0) || !(rate > 0)) return NaN;
  if (shape < 1) {
    const x = marsagliaTsangGamma(uniform, shape + 1, rate);
    return x * Math.pow(uniform(), 1 / shape);
  }
  const d = shape - 1 / 3;
  const c = 1 / Math.sqrt(9 * d);
  for (;;) {
    let x: number;
    let v: number;
    do {
      x = polarNormal(uniform);
      v = 1 + c * x;
    } while (v <= 0);
    v = v * v * v;
    const u = uniform();
    if (u < 1 - 0.0331 * x * x * x * x) return (d * v) / rate;
    if (Math.log(u) < 0.5 * x * x + d * (1 - v + Math.log(v))) return (d * v) / rate;
  }
}

function wrap(gen: ReturnType<typeof mersenneTwister>): Rng {
  const uniform = gen.normalized;
  const poisson = poissonFactory.factory({ prng: () => uniform() });
  return {
    uniform,
    normal: () => polarNormal(uniform),
    gamma: (shape, rate) => marsagliaTsangGamma(uniform, shape, rate),
    poisson,
    state: () => new Uint32Array(uniform.state),
  };
}

/** A generator seeded with a 32-bit unsigned integer (or an array of them). */
export function createRng(seed: number | Uint32Array): Rng {
  return wrap(mersenneTwister(seed));
}

/** A generator continuing from a captured state. */
export function restoreRng(state: Uint32Array): Rng {
  return wrap(mersenneTwister(0, state));
}

/**
 * Seed of stream `index` derived from a run seed: a splitmix32-style hash of (seed, index),
 * so chains, regions and replicates get unrelated streams from one user seed.
 */
export function deriveSeed(seed: number, ...index: number[]): number {
  let h = (seed >>> 0) ^ 0x9e3779b9;
  for (const i of index) {
    h = Math.imul(h ^ (i >>> 0), 0x85ebca6b) >>> 0;
    h ^= h >>> 13;
    h = Math.imul(h, 0xc2b2ae35) >>> 0;
    h ^= h >>> 16;
    h = (h + 0x9e3779b9) >>> 0;
  }
  return (h >>> 0) || 1;
}
