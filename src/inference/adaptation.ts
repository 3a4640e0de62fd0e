/**
 * Warm-up adaptation of a random-walk Metropolis proposal, as a small machine
 * `{ init, update, final }`: a running mean and covariance of the chain (Welford) shrunk toward
 * an initial covariance, and a Robbins-Monro global scale steered toward acceptance 0.234.
 * `final` freezes the proposal that produces the kept draws.
 */
import { WaxwaneError } from '../errors.js';
import { choleskyInto, choleskyWithJitter } from './linalg.js';
import type { ChainState, StepInfo } from './types.js';

/** Tuning of the adaptation. Every field has a default; see {@link adaptiveMetropolis}. */
export interface AdaptationSettings {
  /** acceptance rate the global scale is steered toward (default 0.234) */
  targetAccept: number;
  /** the proposal factor is recomputed every this many updates (default 50) */
  refreshEvery: number;
  /**
   * at this update the running moments restart and the current covariance estimate becomes the
   * prior (0 = never; default 0 here, a quarter of warm-up in the chain runner)
   */
  resetAt: number;
  /** weight of the prior covariance, in pseudo-draws (default: the dimension) */
  priorWeight: number;
  /** Robbins-Monro step size gamma_t = t^-stepExponent, in (0.5, 1] (default 0.6) */
  stepExponent: number;
  /**
   * whether the proposal shape follows the chain's own running covariance (default true). When
   * false the shape stays the one given (at init or by {@link installShape}, e.g. pooled over
   * several chains); the running moments are still kept, for whoever pools them.
   */
  learnShape: boolean;
}

/**
 * The adaptation's working memory. `update` advances it in place and returns it: it holds a
 * d x d running covariance, and copying that every step would cost more than the kernel's own
 * bookkeeping. It belongs to whoever called `init`; `adaptationToJSON` takes a copy.
 */
export interface AdaptationState {
  readonly dim: number;
  readonly settings: Readonly<AdaptationSettings>;
  /** updates seen */
  t: number;
  /** draws in the running moments since the start or the reset */
  count: number;
  mean: Float64Array;
  /** sum of squared deviations from the running mean; lower triangle only */
  m2: Float64Array;
  /** covariance the running estimate is shrunk toward */
  priorCov: Float64Array;
  logScale: number;
  /** lower Cholesky factor of the proposal shape in use (refreshed every `refreshEvery`) */
  cholesky: Float64Array;
  /** shapes installed from outside by {@link installShape} so far */
  installed: number;
  /** value of t when the last shape was installed (the Robbins-Monro clock runs from there) */
  restartedAt: number;
  /** log scale given with the last installed shape (the shape itself is `priorCov`); 0 before any */
  installedLogScale: number;
}

/** The frozen proposal: N(x, scale^2 L L^T). */
export interface FrozenProposal {
  cholesky: Float64Array;
  scale: number;
}

export interface AdaptationMachine {
  init(dim: number, initialCov: Float64Array, initialScale?: number): AdaptationState;
  update(adaptState: AdaptationState, state: Readonly<ChainState>, info: Readonly<StepInfo>): AdaptationState;
  final(adaptState: AdaptationState): FrozenProposal;
}

/** The adaptation state as plain JSON (arrays of numbers). */
export interface AdaptationJSON {
  dim: number;
  settings: AdaptationSettings;
  t: number;
  count: number;
  mean: number[];
  m2: number[];
  priorCov: number[];
  logScale: number;
  cholesky: number[];
  /** absent in states saved before shapes could be installed (read as 0) */
  installed?: number;
  /** absent likewise (read as 0) */
  restartedAt?: number;
  /** absent likewise (read as 0) */
  installedLogScale?: number;
}

/**
 * Adaptive Metropolis with global adaptive scaling.
 *
 * - Shape: Sigma_t = (n0 Sigma_0 + M_t) / (n0 + n_t), where M_t is the Welford sum of squared
 *   deviations of the n_t chain positions seen (rejected steps repeat the position and count),
 *   Sigma_0 the initial (Laplace) covariance and n0 = `priorWeight`. Its Cholesky factor is
 *   recomputed every `refreshEvery` updates, not every step (O(d^3) each time).
 * - Scale: log s_{t+1} = log s_t + (t - t0)^-kappa (alpha_t - 0.234), with alpha_t the step's
 *   acceptance probability (less noisy than the accept indicator), starting at 2.38 / sqrt(d);
 *   t0 = 0, or the update at which a shape was last installed from outside.
 * - Reset: at update `resetAt`, the running moments restart from zero and the covariance
 *   estimate at that moment becomes Sigma_0. The first part of warm-up is spent travelling from
 *   an over-dispersed start to the bulk of the target; those positions would inflate the running
 *   covariance along the path for the rest of warm-up, while a fresh start keeps what was learnt
 *   (as the new prior) and drops the transient from the moments.
 * - Fixed shape (`learnShape` false): the shape stays Sigma_0, or the last one installed by
 *   {@link installShape}; only the scale adapts, and the moments are kept for pooling.
 *
 * @remarks Haario, Saksman and Tamminen (2001), "An adaptive Metropolis algorithm", Bernoulli
 *   7(2) (running covariance); Andrieu and Thoms (2008), "A tutorial on adaptive MCMC",
 *   Statistics and Computing 18, Algorithm 4 (AM with global adaptive scaling, Robbins-Monro
 *   step t^-kappa with kappa in (0.5, 1]); target 0.234 and start 2.38 / sqrt(d): Roberts, Gelman
 *   and Gilks (1997), Annals of Applied Probability 7(1). Shrinking toward Sigma_0 with n0
 *   pseudo-draws is the conjugate (inverse-Wishart-style) weighting, common practice. Welford
 *   (1962), Technometrics 4(3): M_n = M_{n-1} + ((n - 1) / n) delta delta^T, delta = x - mean_{n-1}.
 *   Adaptation must stop before the kept draws (Andrieu and Thoms 2008, section 2.2):
 *   `final` freezes the proposal.
 */
export function adaptiveMetropolis(settings: Partial<AdaptationSettings> = {}): AdaptationMachine {
  return {
    init(dim, initialCov, initialScale) {
      if (!Number.isInteger(dim) || dim < 1) throw new WaxwaneError(`dimension must be a positive integer, got ${dim}`);
      const full = resolveSettings(settings, dim);
      if (initialCov.length !== dim * dim) {
        throw new WaxwaneError(`initial covariance must be ${dim} x ${dim} (${dim * dim} entries), got ${initialCov.length}`);
      }
      const cholesky = new Float64Array(dim * dim);
      if (!choleskyInto(initialCov, dim, cholesky)) {
        throw new WaxwaneError('initial covariance is not positive definite; pass a positive-definite matrix (for example the Laplace covariance)');
      }
      const scale = initialScale ?? 2.38 / Math.sqrt(dim);
      if (!(scale > 0) || !Number.isFinite(scale)) throw new WaxwaneError(`initial scale must be positive and finite, got ${scale}`);
      return {
        dim,
        settings: full,
        t: 0,
        count: 0,
        mean: new Float64Array(dim),
        m2: new Float64Array(dim * dim),
        priorCov: new Float64Array(initialCov),
        logScale: Math.log(scale),
        cholesky,
        installed: 0,
        restartedAt: 0,
        installedLogScale: 0,
      };
    },
    update(a, state, info) {
      const { settings: s } = a;
      a.t += 1;
      a.logScale += Math.pow(a.t - a.restartedAt, -s.stepExponent) * (info.acceptProb - s.targetAccept);
      addToMoments(a, state.position);
      if (!s.learnShape) return a;
      if (a.t === s.resetAt) {
        a.priorCov = adaptedCovariance(a);
        a.count = 0;
        a.mean.fill(0);
        a.m2.fill(0);
        refresh(a);
      } else if (a.t % s.refreshEvery === 0) {
        refresh(a);
      }
      return a;
    },
    final(a) {
      if (!a.settings.learnShape) return { cholesky: new Float64Array(a.cholesky), scale: Math.exp(a.logScale) };
      const factor = choleskyWithJitter(adaptedCovariance(a), a.dim);
      return { cholesky: factor ?? new Float64Array(a.cholesky), scale: Math.exp(a.logScale) };
    },
  };
}

/**
 * Installs a proposal shape and global scale from outside (for example pooled over parallel
 * chains between warm-up rounds, see pooled-adaptation.ts): the shape becomes Sigma_0 and the
 * factor in use, the log scale is set, and the running moments restart from zero so that they
 * hold only the draws made with this shape. The Robbins-Monro clock restarts too, so the
 * scale re-adapts to the new shape with large steps first, as Stan restarts its step-size
 * adaptation at the end of each metric window (Stan Reference Manual, "Automatic parameter
 * tuning", from memory). In place, like `update`.
 *
 * @throws WaxwaneError if the shape is not a positive-definite dim x dim matrix or the log
 *   scale is not finite.
 */
export function installShape(a: AdaptationState, cov: Float64Array, logScale: number): void {
  const d = a.dim;
  if (cov.length !== d * d) throw new WaxwaneError(`installed shape must be ${d} x ${d}, got ${cov.length} entries`);
  if (!Number.isFinite(logScale)) throw new WaxwaneError(`installed log scale must be finite, got ${logScale}`);
  const factor = choleskyWithJitter(cov, d);
  if (factor === null) throw new WaxwaneError('installed shape is not positive definite');
  a.priorCov = new Float64Array(cov);
  a.cholesky.set(factor);
  a.logScale = logScale;
  a.installedLogScale = logScale;
  a.restartedAt = a.t;
  a.count = 0;
  a.mean.fill(0);
  a.m2.fill(0);
  a.installed += 1;
}

/**
 * The current covariance estimate (n0 Sigma_0 + M) / (n0 + n), full symmetric matrix.
 */
export function adaptedCovariance(a: Readonly<AdaptationState>): Float64Array {
  const d = a.dim;
  const n0 = a.settings.priorWeight;
  const denom = n0 + a.count;
  const cov = new Float64Array(d * d);
  for (let i = 0; i < d; i++) {
    for (let j = 0; j <= i; j++) {
      const v = (n0 * 0.5 * (a.priorCov[i * d + j]! + a.priorCov[j * d + i]!) + a.m2[i * d + j]!) / denom;
      cov[i * d + j] = v;
      cov[j * d + i] = v;
    }
  }
  return cov;
}

/** Copy of the state as plain JSON. */
export function adaptationToJSON(a: Readonly<AdaptationState>): AdaptationJSON {
  return {
    dim: a.dim,
    settings: { ...a.settings },
    t: a.t,
    count: a.count,
    mean: Array.from(a.mean),
    m2: Array.from(a.m2),
    priorCov: Array.from(a.priorCov),
    logScale: a.logScale,
    cholesky: Array.from(a.cholesky),
    installed: a.installed,
    restartedAt: a.restartedAt,
    installedLogScale: a.installedLogScale,
  };
}

/** The state back from {@link adaptationToJSON}; a malformed object is a `WaxwaneError`. */
export function adaptationFromJSON(json: AdaptationJSON): AdaptationState {
  const bad = (what: string) => new WaxwaneError(`checkpoint adaptation state: ${what}`);
  if (json === null || typeof json !== 'object') throw bad('missing');
  const d = json.dim;
  if (!Number.isInteger(d) || d < 1) throw bad('dimension is not a positive integer');
  const settings = resolveSettings(json.settings ?? {}, d);
  const vec = (name: 'mean' | 'm2' | 'priorCov' | 'cholesky', len: number) => {
    const v = json[name];
    if (!Array.isArray(v) || v.length !== len || !v.every((x) => typeof x === 'number' && Number.isFinite(x))) {
      throw bad(`"${name}" must hold ${len} finite numbers`);
    }
    return Float64Array.from(v);
  };
  if (!Number.isInteger(json.t) || json.t < 0) throw bad('"t" is not a non-negative integer');
  if (!Number.isInteger(json.count) || json.count < 0 || json.count > json.t) throw bad('"count" is out of range');
  if (typeof json.logScale !== 'number' || !Number.isFinite(json.logScale)) throw bad('"logScale" is not finite');
  const installed = json.installed ?? 0;
  if (!Number.isInteger(installed) || installed < 0) throw bad('"installed" is not a non-negative integer');
  const restartedAt = json.restartedAt ?? 0;
  if (!Number.isInteger(restartedAt) || restartedAt < 0 || restartedAt > json.t) throw bad('"restartedAt" is out of range');
  const installedLogScale = json.installedLogScale ?? 0;
  if (typeof installedLogScale !== 'number' || !Number.isFinite(installedLogScale)) throw bad('"installedLogScale" is not finite');
  return {
    dim: d,
    settings,
    t: json.t,
    count: json.count,
    mean: vec('mean', d),
    m2: vec('m2', d * d),
    priorCov: vec('priorCov', d * d),
    logScale: json.logScale,
    cholesky: vec('cholesky', d * d),
    installed,
    restartedAt,
    installedLogScale,
  };
}

function resolveSettings(given: Partial<AdaptationSettings>, dim: number): AdaptationSettings {
  const s: AdaptationSettings = {
    targetAccept: given.targetAccept ?? 0.234,
    refreshEvery: given.refreshEvery ?? 50,
    resetAt: given.resetAt ?? 0,
    priorWeight: given.priorWeight ?? dim,
    stepExponent: given.stepExponent ?? 0.6,
    learnShape: given.learnShape ?? true,
  };
  if (!(s.targetAccept > 0 && s.targetAccept < 1)) throw new WaxwaneError(`target acceptance must be in (0, 1), got ${s.targetAccept}`);
  if (!Number.isInteger(s.refreshEvery) || s.refreshEvery < 1) throw new WaxwaneError(`refreshEvery must be a positive integer, got ${s.refreshEvery}`);
  if (!Number.isInteger(s.resetAt) || s.resetAt < 0) throw new WaxwaneError(`resetAt must be a non-negative integer, got ${s.resetAt}`);
  if (!(s.priorWeight > 0) || !Number.isFinite(s.priorWeight)) throw new WaxwaneError(`priorWeight must be positive, got ${s.priorWeight}`);
  if (!(s.stepExponent > 0.5 && s.stepExponent <= 1)) throw new WaxwaneError(`stepExponent must be in (0.5, 1], got ${s.stepExponent}`);
  if (typeof s.learnShape !== 'boolean') throw new WaxwaneError(`learnShape must be true or false, got ${String(s.learnShape)}`);
  return s;
}

/** Welford: M += ((n - 1) / n) delta delta^T (lower triangle), then mean += delta / n. */
function addToMoments(a: AdaptationState, x: Float64Array): void {
  const d = a.dim;
  const { mean, m2 } = a;
  a.count += 1;
  const f = (a.count - 1) / a.count;
  for (let i = 0; i < d; i++) {
    const di = f * (x[i]! - mean[i]!);
    const row = i * d;
    for (let j = 0; j <= i; j++) m2[row + j] += di * (x[j]! - mean[j]!);
  }
  for (let i = 0; i < d; i++) mean[i] += (x[i]! - mean[i]!) / a.count;
}

/** Re-factorises the proposal shape; keeps the previous factor if even jitter cannot help. */
function refresh(a: AdaptationState): void {
  const factor = choleskyWithJitter(adaptedCovariance(a), a.dim);
  if (factor !== null) a.cholesky.set(factor);
}
