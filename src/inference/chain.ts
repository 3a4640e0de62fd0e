/**
 * One resumable chain: adaptive warm-up, then a frozen random-walk kernel whose thinned draws
 * are kept. The caller advances it in slices (`run(steps)`), reporting progress and saving a
 * JSON snapshot between slices; `ChainRunner.restore` continues bit for bit.
 */
import { WaxwaneError } from '../errors.js';
import { restoreRng, type Rng } from '../util/rng.js';
import {
  adaptationFromJSON,
  adaptationToJSON,
  adaptiveMetropolis,
  installShape,
  type AdaptationJSON,
  type AdaptationMachine,
  type AdaptationSettings,
  type AdaptationState,
  type FrozenProposal,
} from './adaptation.js';
import { buildMetropolisKernel, buildRwmKernel, initState } from './kernel.js';
import { randomWalkInto } from './proposal.js';
import type { ChainState, Kernel, LogDensity } from './types.js';
import type { AuxiliaryStep } from './walk-scale-move.js';

/**
 * A move made after every `every`-th iteration of the random walk (e.g. walk-scale-move.ts),
 * with a one-dimensional proposal scale tuned during warm-up only.
 */
export interface AuxiliaryMove {
  step: AuxiliaryStep;
  /** iterations between moves (>= 1) */
  every: number;
}

/** The auxiliary move's tuning and counts, as JSON. */
export interface AuxiliarySnapshot {
  logScale: number;
  /** moves made during warm-up (the Robbins-Monro counter) */
  tuned: number;
  acceptedWarmup: number;
  acceptedSampling: number;
  movesSampling: number;
  /**
   * over the second half of warm-up: moves counted, running mean and sum of squared deviations
   * of the moved coordinate, and the sum of acceptance probabilities (absent in older snapshots)
   */
  statCount?: number;
  statMean?: number;
  statM2?: number;
  statAccept?: number;
  /** true once warm-up found the move too short-sighted to be worth its cost (see {@link AUX_MIN_JUMP}) */
  off?: boolean;
}

/** The auxiliary move's starting proposal sd (of the log walk scale) and acceptance target. */
const AUX_START_LOG_SCALE = Math.log(0.5);
const AUX_TARGET = 0.44;

/**
 * The smallest expected squared jump per move, as a share of the moved coordinate's variance,
 * for which the auxiliary move is kept after warm-up: acceptance rate x proposal sd^2 /
 * variance (for small steps, the mean squared jump of a random-walk move). Below it the move
 * needs more than 100 moves to carry the coordinate one standard deviation (a diffusion's
 * squared distance grows linearly), i.e. 800 iterations with a move every 8 at the cost of 200
 * random-walk steps (a move costs about two), while the random walk alone gives about one
 * effective draw per 200 iterations for the slowest parameter (the demo fit: 240,000 sampling
 * iterations for a bulk ESS near 1,100). Measured (inference/walk-scale-move.ts): about 0.002
 * on 182 days, 0.006-0.02 on 70 days and 0.03-0.17 on 35 days of the demo series, where the
 * move matters.
 */
export const AUX_MIN_JUMP = 0.01;

export interface ChainOptions {
  logDensity: LogDensity;
  /** starting position; its log density must be finite */
  start: Float64Array;
  /** initial proposal shape (row-major dim x dim, positive definite), e.g. the Laplace covariance */
  initialCov: Float64Array;
  /** adaptive warm-up iterations (discarded) */
  warmup: number;
  /** kept draws */
  draws: number;
  /** keep every `thin`-th sampling iteration (default 1); sampling runs draws * thin iterations */
  thin?: number;
  rng: Rng;
  /** adaptation tuning; `resetAt` defaults to a quarter of warm-up */
  adaptation?: Partial<AdaptationSettings>;
  /** starting global scale (default 2.38 / sqrt(dim)) */
  initialScale?: number;
  /** a move between the random-walk steps that leaves the same target invariant */
  auxiliary?: AuxiliaryMove;
}

/** Everything needed to continue a chain, as plain JSON. */
export interface ChainSnapshot {
  version: 1;
  dim: number;
  warmup: number;
  draws: number;
  thin: number;
  /** iterations done (warm-up and sampling) */
  iteration: number;
  position: number[];
  logDensity: number;
  adaptation: AdaptationJSON;
  /** the frozen proposal once warm-up has ended, else null */
  frozen: { cholesky: number[]; scale: number } | null;
  /** Mersenne Twister state */
  rng: number[];
  acceptedWarmup: number;
  acceptedSampling: number;
  /** kept draws so far, row-major (kept x dim) */
  keptDraws: number[];
  keptLogDensity: number[];
  /** the auxiliary move's state, when the chain has one (absent in older snapshots) */
  auxiliary?: AuxiliarySnapshot;
}

export interface ChainResult {
  /** kept draws, row-major (draws x dim) */
  draws: Float64Array;
  /** log density of each kept draw */
  logDensity: Float64Array;
  /** fraction of warm-up proposals accepted (NaN with no warm-up) */
  acceptRateWarmup: number;
  /** fraction of sampling proposals accepted, over all draws * thin iterations */
  acceptRateSampling: number;
  /** global scale of the frozen proposal */
  finalScale: number;
  /** fraction of the auxiliary move's sampling proposals accepted (absent without one) */
  auxiliaryAcceptRate?: number;
  /** the auxiliary move's frozen proposal sd (absent without one) */
  auxiliaryScale?: number;
  /** true when warm-up turned the auxiliary move off for the sampling phase ({@link AUX_MIN_JUMP}) */
  auxiliaryOff?: boolean;
}

/** The runner's working parts; one object, so `restore` can rebuild it without the constructor. */
interface Core {
  dim: number;
  warmup: number;
  draws: number;
  thin: number;
  logDensity: LogDensity;
  rng: Rng;
  machine: AdaptationMachine;
  adapt: AdaptationState;
  state: ChainState;
  warmKernel: Kernel;
  frozen: FrozenProposal | null;
  sampleKernel: Kernel | null;
  keptDraws: Float64Array;
  keptLogDensity: Float64Array;
  iteration: number;
  acceptedWarmup: number;
  acceptedSampling: number;
  kept: number;
  auxMove: AuxiliaryMove | null;
  aux: AuxiliarySnapshot;
}

function freshAux(): AuxiliarySnapshot {
  return { logScale: AUX_START_LOG_SCALE, tuned: 0, acceptedWarmup: 0, acceptedSampling: 0, movesSampling: 0 };
}

/**
 * A single chain advanced in slices.
 *
 * @example
 *   const runner = new ChainRunner({ logDensity, start, initialCov, warmup: 1000, draws: 1000, rng });
 *   while (!runner.done) { runner.run(500); save(JSON.stringify(runner.snapshot())); }
 *   const { draws } = runner.result();
 */
export class ChainRunner {
  private core: Core;

  constructor(options: ChainOptions) {
    const { logDensity, start, initialCov, rng } = options;
    const thin = options.thin ?? 1;
    checkCount('warmup', options.warmup, 0);
    checkCount('draws', options.draws, 0);
    checkCount('thin', thin, 1);
    const dim = start.length;
    if (dim < 1) throw new WaxwaneError('start point is empty; it needs one value per parameter');
    const state = initState(logDensity, start);
    if (!Number.isFinite(state.logDensity)) {
      throw new WaxwaneError(`start point has log density ${state.logDensity}; start inside the support (for example at the posterior mode)`);
    }
    const auxMove = options.auxiliary ?? null;
    if (auxMove !== null) checkCount('auxiliary move interval', auxMove.every, 1);
    const machine = adaptiveMetropolis({ resetAt: Math.floor(options.warmup / 4), ...options.adaptation });
    const adapt = machine.init(dim, initialCov, options.initialScale);
    this.core = assemble({
      dim,
      warmup: options.warmup,
      draws: options.draws,
      thin,
      logDensity,
      rng,
      machine,
      adapt,
      state,
      frozen: null,
      keptDraws: new Float64Array(options.draws * dim),
      keptLogDensity: new Float64Array(options.draws),
      iteration: 0,
      acceptedWarmup: 0,
      acceptedSampling: 0,
      kept: 0,
      auxMove,
      aux: freshAux(),
    });
    if (options.warmup === 0) freeze(this.core);
  }

  get dim(): number {
    return this.core.dim;
  }

  /** Iterations in all: warm-up plus draws * thin. */
  get totalIterations(): number {
    return this.core.warmup + this.core.draws * this.core.thin;
  }

  /** Iterations done so far. */
  get iteration(): number {
    return this.core.iteration;
  }

  get done(): boolean {
    return this.core.iteration >= this.totalIterations;
  }

  /** True while adapting. */
  get warmingUp(): boolean {
    return this.core.iteration < this.core.warmup;
  }

  /** Proposal shapes installed from outside so far ({@link ChainRunner.installShape}). */
  get installedShapes(): number {
    return this.core.adapt.installed;
  }

  /** The current position and log density (a copy). */
  get current(): ChainState {
    const { state } = this.core;
    return { position: new Float64Array(state.position), logDensity: state.logDensity };
  }

  /**
   * Advances up to `steps` iterations (fewer at the end), crossing from warm-up to sampling
   * when due. Returns the number of iterations done.
   */
  run(steps: number): number {
    if (!Number.isInteger(steps) || steps < 0) throw new RangeError(`steps must be a non-negative integer, got ${steps}`);
    const c = this.core;
    const todo = Math.min(steps, this.totalIterations - c.iteration);
    let left = todo;
    while (left > 0) {
      const warming = c.iteration < c.warmup;
      const kernel = warming ? c.warmKernel : c.sampleKernel!;
      const { state, info } = kernel(c.rng, c.state);
      c.state = state;
      if (warming) {
        c.adapt = c.machine.update(c.adapt, state, info);
        if (info.accepted) c.acceptedWarmup += 1;
      } else if (info.accepted) {
        c.acceptedSampling += 1;
      }
      c.iteration += 1;
      left -= 1;
      if (c.auxMove !== null && c.iteration % c.auxMove.every === 0) auxiliaryStep(c, warming);
      if (warming && c.iteration === c.warmup) freeze(c);
      if (!warming && (c.iteration - c.warmup) % c.thin === 0) {
        c.keptDraws.set(c.state.position, c.kept * c.dim);
        c.keptLogDensity[c.kept] = c.state.logDensity;
        c.kept += 1;
      }
    }
    return todo;
  }

  /**
   * Replaces the warm-up proposal's shape and log scale, e.g. with ones pooled over parallel
   * chains between warm-up rounds (adaptation.ts `installShape`; the running moments restart).
   * Only while warming up: the kept draws must come from one fixed kernel.
   */
  installShape(cov: Float64Array, logScale: number): void {
    if (!this.warmingUp) throw new WaxwaneError('a proposal shape can be installed only during warm-up');
    installShape(this.core.adapt, cov, logScale);
  }

  /** The result; only once the chain is done. */
  result(): ChainResult {
    if (!this.done) throw new Error(`chain not finished: ${this.iteration} of ${this.totalIterations} iterations done`);
    const c = this.core;
    return {
      draws: new Float64Array(c.keptDraws),
      logDensity: new Float64Array(c.keptLogDensity),
      acceptRateWarmup: c.warmup > 0 ? c.acceptedWarmup / c.warmup : NaN,
      acceptRateSampling: c.draws > 0 ? c.acceptedSampling / (c.draws * c.thin) : NaN,
      finalScale: c.frozen!.scale,
      ...(c.auxMove !== null
        ? {
            auxiliaryAcceptRate: c.aux.movesSampling > 0 ? c.aux.acceptedSampling / c.aux.movesSampling : NaN,
            auxiliaryScale: Math.exp(c.aux.logScale),
            auxiliaryOff: c.aux.off === true,
          }
        : {}),
    };
  }

  /** Everything needed to continue, as plain JSON-safe values (copies). */
  snapshot(): ChainSnapshot {
    const c = this.core;
    return {
      version: 1,
      dim: c.dim,
      warmup: c.warmup,
      draws: c.draws,
      thin: c.thin,
      iteration: c.iteration,
      position: Array.from(c.state.position),
      logDensity: c.state.logDensity,
      adaptation: adaptationToJSON(c.adapt),
      frozen: c.frozen === null ? null : { cholesky: Array.from(c.frozen.cholesky), scale: c.frozen.scale },
      rng: Array.from(c.rng.state()),
      acceptedWarmup: c.acceptedWarmup,
      acceptedSampling: c.acceptedSampling,
      keptDraws: Array.from(c.keptDraws.subarray(0, c.kept * c.dim)),
      keptLogDensity: Array.from(c.keptLogDensity.subarray(0, c.kept)),
      ...(c.auxMove !== null ? { auxiliary: { ...c.aux } } : {}),
    };
  }

  /**
   * Continues a chain from a snapshot with the same log density. The log density at the saved
   * position is re-evaluated and must equal the saved value exactly (a different model or data
   * would otherwise continue silently); a malformed snapshot is a `WaxwaneError`. `auxiliary`
   * must be the move the chain was made with; a snapshot without its state starts it afresh.
   */
  static restore(snapshot: ChainSnapshot, logDensity: LogDensity, auxiliary?: AuxiliaryMove): ChainRunner {
    const s = validateSnapshot(snapshot);
    const state = initState(logDensity, Float64Array.from(s.position));
    if (!Object.is(state.logDensity, s.logDensity)) {
      throw new WaxwaneError(
        `checkpoint does not match the model: log density at the saved position is ${state.logDensity}, the checkpoint says ${s.logDensity}`,
      );
    }
    const adapt = adaptationFromJSON(s.adaptation);
    const keptDraws = new Float64Array(s.draws * s.dim);
    const keptLogDensity = new Float64Array(s.draws);
    keptDraws.set(s.keptDraws);
    keptLogDensity.set(s.keptLogDensity);
    const core = assemble({
      dim: s.dim,
      warmup: s.warmup,
      draws: s.draws,
      thin: s.thin,
      logDensity,
      rng: restoreRng(Uint32Array.from(s.rng)),
      machine: adaptiveMetropolis(adapt.settings),
      adapt,
      state,
      frozen: null,
      keptDraws,
      keptLogDensity,
      iteration: s.iteration,
      acceptedWarmup: s.acceptedWarmup,
      acceptedSampling: s.acceptedSampling,
      kept: s.keptLogDensity.length,
      auxMove: auxiliary ?? null,
      aux: s.auxiliary !== undefined ? { ...s.auxiliary } : freshAux(),
    });
    if (s.frozen !== null) install(core, { cholesky: Float64Array.from(s.frozen.cholesky), scale: s.frozen.scale });
    const runner = Object.create(ChainRunner.prototype) as ChainRunner;
    runner.core = core;
    return runner;
  }
}

/** Adds the warm-up kernel: a random walk reading the adaptation's current factor and scale. */
function assemble(parts: Omit<Core, 'warmKernel' | 'sampleKernel'>): Core {
  const core = parts as Core;
  const z = new Float64Array(core.dim);
  core.sampleKernel = null;
  core.warmKernel = buildMetropolisKernel(
    core.logDensity,
    (rng, x, out) => randomWalkInto(rng, x, out, core.adapt.cholesky, Math.exp(core.adapt.logScale), core.dim, z),
    core.dim,
  );
  return core;
}

/**
 * The auxiliary move after an iteration; during warm-up its log proposal sd takes a
 * Robbins-Monro step (Robbins and Monro 1951; Andrieu and Thoms 2008, "A tutorial on adaptive
 * MCMC", Statistics and Computing 18, section 5) toward acceptance 0.44, the optimum for a
 * one-dimensional random walk (Roberts and Rosenthal 2001, "Optimal scaling for various
 * Metropolis-Hastings algorithms", Statistical Science 16(4)); frozen afterwards.
 */
function auxiliaryStep(c: Core, warming: boolean): void {
  if (!warming && c.aux.off === true) return;
  const { state, acceptProb, before } = c.auxMove!.step(c.rng, c.state, c.aux.logScale);
  const accepted = state !== c.state;
  c.state = state;
  if (warming) {
    c.aux.tuned += 1;
    c.aux.logScale += (acceptProb - AUX_TARGET) / Math.pow(c.aux.tuned, 0.6);
    if (accepted) c.aux.acceptedWarmup += 1;
    // the second half of warm-up: how far the move carries its coordinate, for the decision
    // at the end of warm-up (auxiliaryJump)
    if (2 * c.iteration > c.warmup && before === before) {
      const a = c.aux;
      const n = (a.statCount ?? 0) + 1;
      const mean = a.statMean ?? 0;
      const delta = before - mean;
      a.statCount = n;
      a.statMean = mean + delta / n;
      a.statM2 = (a.statM2 ?? 0) + delta * (before - a.statMean);
      a.statAccept = (a.statAccept ?? 0) + acceptProb;
    }
  } else {
    c.aux.movesSampling += 1;
    if (accepted) c.aux.acceptedSampling += 1;
  }
}

function freeze(core: Core): void {
  install(core, core.machine.final(core.adapt));
  if (core.auxMove !== null && auxiliaryJump(core.aux) < AUX_MIN_JUMP) core.aux.off = true;
}

/**
 * The auxiliary move's expected squared jump per move as a share of its coordinate's variance,
 * from the second half of warm-up ({@link AUX_MIN_JUMP}); Infinity (keep the move) with fewer
 * than 20 moves seen or no spread to compare with.
 */
export function auxiliaryJump(a: AuxiliarySnapshot): number {
  const n = a.statCount ?? 0;
  if (n < 20) return Infinity;
  const variance = (a.statM2 ?? 0) / (n - 1);
  if (!(variance > 0)) return Infinity;
  return ((a.statAccept ?? 0) / n) * Math.exp(2 * a.logScale) / variance;
}

function install(core: Core, frozen: FrozenProposal): void {
  core.frozen = frozen;
  core.sampleKernel = buildRwmKernel(core.logDensity, { cholesky: frozen.cholesky, scale: frozen.scale, dim: core.dim });
}

function checkCount(name: string, value: number, min: number): void {
  if (!Number.isInteger(value) || value < min) {
    throw new WaxwaneError(`${name} must be an integer >= ${min}, got ${value}`);
  }
}

function validateSnapshot(s: ChainSnapshot): ChainSnapshot {
  const bad = (what: string) => new WaxwaneError(`checkpoint: ${what}; the file is damaged or from another version, start the run afresh`);
  if (s === null || typeof s !== 'object') throw bad('not an object');
  if (s.version !== 1) throw bad(`unknown version ${String(s.version)}`);
  const isCount = (v: unknown, min = 0) => Number.isInteger(v) && (v as number) >= min;
  if (!isCount(s.dim, 1) || !isCount(s.warmup) || !isCount(s.draws) || !isCount(s.thin, 1)) throw bad('bad dim, warmup, draws or thin');
  const total = s.warmup + s.draws * s.thin;
  if (!isCount(s.iteration) || s.iteration > total) throw bad('iteration out of range');
  const finiteArray = (v: unknown, len: number) =>
    Array.isArray(v) && v.length === len && v.every((x) => typeof x === 'number' && Number.isFinite(x));
  if (!finiteArray(s.position, s.dim)) throw bad(`position must hold ${s.dim} finite numbers`);
  if (typeof s.logDensity !== 'number' || !Number.isFinite(s.logDensity)) throw bad('log density is not finite');
  const kept = s.iteration > s.warmup ? Math.floor((s.iteration - s.warmup) / s.thin) : 0;
  if (!finiteArray(s.keptLogDensity, kept) || !finiteArray(s.keptDraws, kept * s.dim)) throw bad(`expected ${kept} kept draws`);
  if (!isCount(s.acceptedWarmup) || !isCount(s.acceptedSampling)) throw bad('bad acceptance counts');
  if (!Array.isArray(s.rng) || !s.rng.every((x) => Number.isInteger(x) && x >= 0 && x <= 0xffffffff)) throw bad('bad generator state');
  const frozenDue = s.iteration >= s.warmup;
  if (frozenDue !== (s.frozen !== null)) throw bad(frozenDue ? 'frozen proposal missing' : 'frozen proposal present during warm-up');
  if (s.frozen !== null) {
    if (!finiteArray(s.frozen.cholesky, s.dim * s.dim) || !(s.frozen.scale > 0)) throw bad('bad frozen proposal');
  }
  if (s.adaptation?.dim !== s.dim) throw bad('adaptation state has the wrong dimension');
  if (s.adaptation.t !== Math.min(s.iteration, s.warmup)) throw bad('adaptation state does not match the iteration');
  if (s.auxiliary !== undefined) {
    const a = s.auxiliary;
    if (a === null || typeof a !== 'object' || !Number.isFinite(a.logScale)) throw bad('bad auxiliary move state');
    if (![a.tuned, a.acceptedWarmup, a.acceptedSampling, a.movesSampling].every((v) => isCount(v))) throw bad('bad auxiliary move counts');
    if (a.statCount !== undefined && !isCount(a.statCount)) throw bad('bad auxiliary move counts');
    if (![a.statMean, a.statM2, a.statAccept].every((v) => v === undefined || Number.isFinite(v))) throw bad('bad auxiliary move state');
    if (a.off !== undefined && typeof a.off !== 'boolean') throw bad('bad auxiliary move state');
  }
  return s;
}
