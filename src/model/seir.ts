/**
 * Deterministic SEIR with Erlang-distributed latent and infectious periods (linear chain trick),
 * integrated with classical fourth-order Runge-Kutta at a fixed number of sub-steps per day,
 * beta constant within a day (MODEL.md section 1).
 *
 * State layout in the work buffer: [S, E_1..E_m, I_1..I_n]; R is N minus the rest and never
 * needed. Alongside the state the integrator accumulates two flows per day, exactly as RK4
 * weights them: infections (S -> E_1) and onsets (E_m -> I_1).
 *
 * The default stage counts (m = n = 2) run in {@link runOnsets22}: the state in local
 * variables, several times faster, same results (the log density's onsets, and the
 * trajectories' infections and susceptibles too).
 */

export interface SeirIntegrator {
  readonly latentStages: number;
  readonly infectiousStages: number;
  readonly substeps: number;
  /**
   * Integrates `days` days from the initial state set by {@link SeirIntegrator.seed}
   * (or the state left by the previous call when `resume` is true).
   * `betaOverN[s]` is beta on day s divided by N. Writes daily infections, onsets and the
   * susceptibles at the start of each day into the given arrays at offset `start`.
   * Returns false as soon as a state turns negative or non-finite (the caller then treats the
   * parameter vector as impossible); never throws.
   */
  run(
    betaOverN: Float64Array,
    start: number,
    days: number,
    latentDays: number,
    infectiousDays: number,
    infections: Float64Array | null,
    onsets: Float64Array,
    susceptibleStart: Float64Array | null,
  ): boolean;
  /**
   * Sets S = N - i0 and splits i0 over E_1..E_m, I_1..I_n in proportion to their mean stage
   * durations (L/m each for E stages, D/n each for I stages). Returns false if the state is
   * not valid (negative S, non-finite values).
   */
  seed(population: number, seedInfected: number, latentDays: number, infectiousDays: number): boolean;
  /** The current state [S, E_1..E_m, I_1..I_n] (a view on the work buffer; copy to keep). */
  readonly state: Float64Array;
}

/**
 * An integrator for m = `latentStages`, n = `infectiousStages` and `substeps` RK4 steps a day.
 * `generic: true` keeps m = n = 2 on the general code as well (the cross-check of the fast
 * path in the tests); the results are the same.
 */
export function createSeirIntegrator(
  latentStages: number,
  infectiousStages: number,
  substeps: number,
  options: { generic?: boolean } = {},
): SeirIntegrator {
  const fastPath = latentStages === 2 && infectiousStages === 2 && options.generic !== true;
  const m = latentStages;
  const n = infectiousStages;
  const size = 1 + m + n;
  const x = new Float64Array(size);
  const xs = new Float64Array(size); // stage evaluation point
  const k = new Float64Array(size); // stage derivative
  const acc = new Float64Array(size); // k1 + 2 k2 + 2 k3 + k4
  const h = 1 / substeps;
  const hh = h / 2;
  const h6 = h / 6;
  const rates = new Float64Array(2); // [m/L, n/D] for the m = n = 2 fast path

  // Derivative at y into k; returns [infection flow, onset flow] through the two scratch slots.
  const flow = new Float64Array(2);
  function deriv(y: Float64Array, b: number, a: number, g: number): void {
    let inf = 0;
    for (let j = 1 + m; j < size; j++) inf += y[j];
    const F = b * y[0] * inf;
    k[0] = -F;
    let inflow = F;
    for (let j = 1; j <= m; j++) {
      const out = a * y[j];
      k[j] = inflow - out;
      inflow = out;
    }
    flow[1] = inflow; // a * E_m: onsets
    for (let j = m + 1; j < size; j++) {
      const out = g * y[j];
      k[j] = inflow - out;
      inflow = out;
    }
    flow[0] = F;
  }

  return {
    latentStages: m,
    infectiousStages: n,
    substeps,
    state: x,
    seed(population, seedInfected, latentDays, infectiousDays) {
      const total = latentDays + infectiousDays;
      const e = (seedInfected * (latentDays / m)) / total;
      const i = (seedInfected * (infectiousDays / n)) / total;
      x[0] = population - seedInfected;
      for (let j = 1; j <= m; j++) x[j] = e;
      for (let j = m + 1; j < size; j++) x[j] = i;
      return x[0] >= 0 && e >= 0 && i >= 0 && Number.isFinite(x[0] + e + i);
    },
    run(betaOverN, start, days, latentDays, infectiousDays, infections, onsets, susceptibleStart) {
      const a = m / latentDays;
      const g = n / infectiousDays;
      if (fastPath) {
        rates[0] = a;
        rates[1] = g;
        return runOnsets22(x, rates, substeps, betaOverN, start, days, onsets, start, infections, susceptibleStart);
      }
      for (let s = start; s < start + days; s++) {
        const b = betaOverN[s];
        if (susceptibleStart !== null) susceptibleStart[s] = x[0];
        let dayInf = 0;
        let dayOn = 0;
        for (let q = 0; q < substeps; q++) {
          // stage 1
          deriv(x, b, a, g);
          let fInf = flow[0];
          let fOn = flow[1];
          for (let j = 0; j < size; j++) {
            acc[j] = k[j];
            xs[j] = x[j] + hh * k[j];
          }
          // stage 2
          deriv(xs, b, a, g);
          fInf += 2 * flow[0];
          fOn += 2 * flow[1];
          for (let j = 0; j < size; j++) {
            acc[j] += 2 * k[j];
            xs[j] = x[j] + hh * k[j];
          }
          // stage 3
          deriv(xs, b, a, g);
          fInf += 2 * flow[0];
          fOn += 2 * flow[1];
          for (let j = 0; j < size; j++) {
            acc[j] += 2 * k[j];
            xs[j] = x[j] + h * k[j];
          }
          // stage 4
          deriv(xs, b, a, g);
          fInf += flow[0];
          fOn += flow[1];
          for (let j = 0; j < size; j++) x[j] += h6 * (acc[j] + k[j]);
          dayInf += fInf;
          dayOn += fOn;
        }
        dayInf *= h6;
        dayOn *= h6;
        if (infections !== null) infections[s] = dayInf;
        onsets[s] = dayOn;
        let total = 0;
        let ok = dayOn >= 0 && dayInf >= 0;
        for (let j = 0; j < size; j++) {
          if (!(x[j] >= 0)) ok = false;
          total += x[j];
        }
        if (!ok || !(total < Infinity)) return false;
      }
      return true;
    },
  };
}

/**
 * The m = n = 2 case of {@link SeirIntegrator.run}, with the state in local variables: the
 * log density's case (onsets only) and the trajectories' (daily infections and the
 * susceptibles at the start of each day too, when those arrays are given).
 *
 * `x` holds [S, E_1, E_2, I_1, I_2] on entry and the state after the last day on exit;
 * `rates` holds [m/L, n/D] (in an array, not as arguments: a double passed to a function the
 * optimising compiler does not inline has to be boxed on the heap). `betaOverN` is read from
 * index `start`, the daily onsets (and infections, susceptibles) are written from index
 * `onsetsStart`.
 * Returns false as soon as a state or a daily onset or infection count turns negative or
 * non-finite, exactly when the generic integrator does (the state left in `x` is then that of
 * the failing day); never throws.
 *
 * @remarks
 * Classical RK4 (Butcher, Numerical Methods for Ordinary Differential Equations, 2016,
 * section 23; from memory): stage points x + (h/2) k1, x + (h/2) k2, x + h k3, then
 * x += (h/6)(k1 + 2 k2 + 2 k3 + k4); the onset flow a E_2 is weighted the same way, so that
 * daily onsets are exactly the sum of the sub-step flows.
 *
 * Every flow is computed already multiplied by h/2 (beta/N, m/L and n/D are premultiplied), so
 * that the flows are directly the (h/2) k the stage points need: one multiplication less on each
 * link of the chain of dependent operations that bounds the speed of this loop (it is latency,
 * not arithmetic, that limits it). When h/2 is a power of two (substeps 1, 2, 4, 8, ...),
 * scaling by it is exact in binary floating point: a product with one scaled factor, and a sum
 * or difference of scaled terms, is exactly the scaled value of the plain one, so onsets and
 * state are the same doubles as the generic integrator's (barring results in the subnormal
 * range, below about 2e-307); other sub-step counts agree to rounding. The step itself is
 * x += ((h/6)/(h/2)) (scaled weighted sum), and (h/6)/(h/2) is exactly the double nearest 1/3.
 */
export function runOnsets22(
  x: Float64Array,
  rates: Float64Array,
  substeps: number,
  betaOverN: Float64Array,
  start: number,
  days: number,
  onsets: Float64Array,
  onsetsStart: number,
  infections: Float64Array | null = null,
  susceptible: Float64Array | null = null,
): boolean {
  const h = 1 / substeps;
  const hh = h / 2;
  const third = h / 6 / hh;
  const ha = hh * rates[0]; // (h/2) m/L
  const hg = hh * rates[1]; // (h/2) n/D
  let S = x[0];
  let E1 = x[1];
  let E2 = x[2];
  let I1 = x[3];
  let I2 = x[4];
  let ok = true;
  for (let d = 0; d < days; d++) {
    const hb = hh * betaOverN[start + d];
    if (susceptible !== null) susceptible[onsetsStart + d] = S;
    let o = 0; // the day's sums of weighted onset and infection flows (scaled like them)
    let inf = 0;
    for (let q = 0; q < substeps; q++) {
      // stage 1 at x. Scaled flows: F infections, pE E_1 -> E_2, oE onsets, pI I_1 -> I_2, qI recoveries
      let F = hb * S * (I1 + I2);
      let pE = ha * E1;
      let oE = ha * E2;
      let pI = hg * I1;
      let qI = hg * I2;
      let kE1 = F - pE;
      let kE2 = pE - oE;
      let kI1 = oE - pI;
      let kI2 = pI - qI;
      // weighted sums k1 + 2 k2 + 2 k3 + k4 (S's is minus the infections')
      let aF = F;
      let aE1 = kE1;
      let aE2 = kE2;
      let aI1 = kI1;
      let aI2 = kI2;
      let aO = oE;
      let xS = S - F;
      let xE1 = E1 + kE1;
      let xE2 = E2 + kE2;
      let xI1 = I1 + kI1;
      let xI2 = I2 + kI2;
      // stage 2 at x + (h/2) k1
      F = hb * xS * (xI1 + xI2);
      pE = ha * xE1;
      oE = ha * xE2;
      pI = hg * xI1;
      qI = hg * xI2;
      kE1 = F - pE;
      kE2 = pE - oE;
      kI1 = oE - pI;
      kI2 = pI - qI;
      aF += 2 * F;
      aE1 += 2 * kE1;
      aE2 += 2 * kE2;
      aI1 += 2 * kI1;
      aI2 += 2 * kI2;
      aO += 2 * oE;
      xS = S - F;
      xE1 = E1 + kE1;
      xE2 = E2 + kE2;
      xI1 = I1 + kI1;
      xI2 = I2 + kI2;
      // stage 3 at x + (h/2) k2
      F = hb * xS * (xI1 + xI2);
      pE = ha * xE1;
      oE = ha * xE2;
      pI = hg * xI1;
      qI = hg * xI2;
      kE1 = F - pE;
      kE2 = pE - oE;
      kI1 = oE - pI;
      kI2 = pI - qI;
      aF += 2 * F;
      aE1 += 2 * kE1;
      aE2 += 2 * kE2;
      aI1 += 2 * kI1;
      aI2 += 2 * kI2;
      aO += 2 * oE;
      xS = S - 2 * F;
      xE1 = E1 + 2 * kE1;
      xE2 = E2 + 2 * kE2;
      xI1 = I1 + 2 * kI1;
      xI2 = I2 + 2 * kI2;
      // stage 4 at x + h k3, and the step
      F = hb * xS * (xI1 + xI2);
      pE = ha * xE1;
      oE = ha * xE2;
      pI = hg * xI1;
      qI = hg * xI2;
      aF += F;
      S -= third * aF;
      E1 += third * (aE1 + (F - pE));
      E2 += third * (aE2 + (pE - oE));
      I1 += third * (aI1 + (oE - pI));
      I2 += third * (aI2 + (pI - qI));
      o += aO + oE;
      inf += aF;
    }
    o *= third;
    onsets[onsetsStart + d] = o;
    if (infections !== null) infections[onsetsStart + d] = inf * third;
    // negative daily infections (S growing) make the vector impossible, as in the generic path
    const valid = S >= 0 && E1 >= 0 && E2 >= 0 && I1 >= 0 && I2 >= 0 && o >= 0 && inf >= 0;
    if (!(valid && S + E1 + E2 + I1 + I2 < Infinity)) {
      ok = false;
      break;
    }
  }
  x[0] = S;
  x[1] = E1;
  x[2] = E2;
  x[3] = I1;
  x[4] = I2;
  return ok;
}
