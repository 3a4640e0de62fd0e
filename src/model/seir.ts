/**
 * Deterministic SEIR with Erlang-distributed latent and infectious periods (linear chain trick),
 * integrated with classical fourth-order Runge-Kutta at a fixed number of sub-steps per day,
 * beta constant within a day (MODEL.md section 1).
 *
 * State layout in the work buffer: [S, E_1..E_m, I_1..I_n]; R is N minus the rest and never
 * needed. Alongside the state the integrator accumulates two flows per day, exactly as RK4
 * weights them: infections (S -> E_1) and onsets (E_m -> I_1).
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

export function createSeirIntegrator(
  latentStages: number,
  infectiousStages: number,
  substeps: number,
): SeirIntegrator {
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
