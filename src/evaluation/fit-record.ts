/**
 * What the evaluation commands keep of each fit they run: its draws pooled over chains and a
 * one-line account of its convergence.
 */
import type { FitResult } from '../inference/fit.js';
import { diagnosticRows, isConverged } from '../outputs/summary.js';

/** The kept draws of every chain, one after the other (row-major draws x dim). */
export function pooledDraws(fit: FitResult): Float64Array {
  const total = fit.chains.reduce((a, c) => a + c.draws.length, 0);
  const out = new Float64Array(total);
  let off = 0;
  for (const c of fit.chains) {
    out.set(c.draws, off);
    off += c.draws.length;
  }
  return out;
}

export interface FitCheck {
  maxRhat: number;
  minEssBulk: number;
  minEssTail: number;
  /** the rule of MODEL.md section 7 */
  converged: boolean;
}

/** The convergence diagnostics of a fit, reduced to their worst values (NaN counts as worst). */
export function checkFit(fit: FitResult): FitCheck {
  const rows = diagnosticRows(fit.model.layout, fit.chains.map((c) => c.draws));
  const worst = (values: number[], pick: (a: number, b: number) => number, nanValue: number) =>
    values.reduce((w, v) => pick(w, Number.isNaN(v) ? nanValue : v), pick === Math.max ? -Infinity : Infinity);
  return {
    maxRhat: worst(rows.map((r) => r.rhat), Math.max, Infinity),
    minEssBulk: worst(rows.map((r) => r.ess_bulk), Math.min, 0),
    minEssTail: worst(rows.map((r) => r.ess_tail), Math.min, 0),
    converged: isConverged(rows),
  };
}
