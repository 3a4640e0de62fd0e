/**
 * Exponential growth rate r from a reproduction number R for the SEIR model with Erlang (or,
 * more generally, gamma) latent and infectious periods, and the doubling or halving time
 * (MODEL.md section 5).
 *
 * @remarks
 * The generation interval of this model is the latent period (gamma, shape m, mean L) plus the
 * time from the onset of infectiousness to an infection, whose density is S(t)/D with S the
 * survival function of the infectious period (gamma, shape n, mean D). Its moment generating
 * function at -r is M(-r) = (1 + rL/m)^(-m) (1 - (1 + rD/n)^(-n)) / (rD), and
 * R = 1 / M(-r) (Wallinga and Lipsitch 2007, "How generation intervals shape the relationship
 * between growth rates and reproductive numbers", Proc R Soc B 274), that is
 *
 *     R = r D (1 + r L/m)^m / (1 - (1 + r D/n)^(-n)),
 *
 * with the limit R = 1 at r = 0. R(r) increases from 0 to infinity on
 * r in (-min(m/L, n/D), infinity), so every R > 0 has exactly one root.
 */

/**
 * Mean generation interval L + D (n + 1) / (2n): the infectious part has density S(t)/D, whose
 * mean is E[X^2] / (2 E[X]) = D (n + 1) / (2n) for X ~ gamma(shape n, mean D).
 */
function meanGeneration(L: number, D: number, n: number): number {
  return L + (D * (n + 1)) / (2 * n);
}

/** Below this |rD| the infectious factor is taken from its cumulant series (see below). */
const SMALL_X = 1e-4;

/**
 * Cumulants k1, k2, k3 of the infectious part of the generation interval in units of D
 * (density S(t) on (0, infinity) for X ~ gamma(shape n, mean 1)): E[T^j] = E[X^(j+1)] / (j + 1)
 * with E[X^i] = n (n + 1) ... (n + i - 1) / n^i.
 */
function cumulant1(n: number): number {
  return (n + 1) / (2 * n);
}
function cumulant2(n: number): number {
  return ((n + 1) * (n + 5)) / (12 * n * n);
}
function cumulant3(n: number): number {
  const e1 = (n + 1) / (2 * n);
  const e2 = ((n + 1) * (n + 2)) / (3 * n * n);
  const e3 = ((n + 1) * (n + 2) * (n + 3)) / (4 * n * n * n);
  return e3 - 3 * e1 * e2 + 2 * e1 * e1 * e1;
}

/**
 * log of the infectious factor x / (1 - (1 + x/n)^(-n)), x = rD. Near x = 0 the closed form
 * keeps only absolute accuracy (the factor is 1 + O(x)), so below SMALL_X the cumulant series
 * x k1 - x^2 k2 / 2 + x^3 k3 / 6 (error O(x^4)) keeps the relative accuracy that a growth
 * rate near 0 needs.
 */
function logInfectiousFactor(x: number, n: number): number {
  if (Math.abs(x) < SMALL_X) return x * (cumulant1(n) - x * (cumulant2(n) / 2 - (x * cumulant3(n)) / 6));
  return Math.log(x / -Math.expm1(-n * Math.log1p(x / n)));
}

/** log R(r) inside the domain (1 + rL/m > 0 and 1 + rD/n > 0); 0 at r = 0. */
function logReproduction(r: number, L: number, D: number, m: number, n: number): number {
  return m * Math.log1p((r * L) / m) + logInfectiousFactor(r * D, n);
}

function validShape(L: number, D: number, m: number, n: number): boolean {
  return L > 0 && D > 0 && m > 0 && n > 0 && L < Infinity && D < Infinity && m < Infinity && n < Infinity;
}

/**
 * The reproduction number implied by a growth rate r (the inverse of {@link growthRate}).
 *
 * @remarks
 * R = r D (1 + r L/m)^m / (1 - (1 + r D/n)^(-n)) (Wallinga and Lipsitch 2007, with gamma
 * stages); 1 at r = 0. NaN for a non-finite r, non-positive or non-finite L, D, m or n, and
 * 0 for r at or below the lower end of the domain, -min(m/L, n/D), where the generation
 * interval's moment generating function diverges.
 *
 * @example reproductionFromGrowth(0.1, 3, 5, 1, 1) is (1 + 0.3)(1 + 0.5) = 1.95, to rounding
 */
export function reproductionFromGrowth(r: number, L: number, D: number, m: number, n: number): number {
  if (!validShape(L, D, m, n) || !Number.isFinite(r)) return NaN;
  if (r <= -Math.min(m / L, n / D)) return 0;
  return Math.exp(logReproduction(r, L, D, m, n));
}

/**
 * The exponential growth rate r (per day) at which an epidemic with reproduction number `rEff`
 * grows, for a latent period Erlang(m, mean `latentDays`) and an infectious period
 * Erlang(n, mean `infectiousDays`): the root of
 * R = r D (1 + r L/m)^m / (1 - (1 + r D/n)^(-n)).
 *
 * @remarks
 * Wallinga and Lipsitch 2007 (Proc R Soc B 274), extended to Erlang stages (MODEL.md section 5).
 * R = 1 gives r = 0, R < 1 a negative r. Non-integer m or n are accepted and mean gamma-shaped
 * periods. Returns NaN when rEff is not a finite positive number, or when L, D, m or n is not
 * finite and positive: this runs over every posterior draw and day, so it flags rather than
 * throws.
 *
 * Solved by Newton's method on f(r) = log R(r) - log R, safeguarded by bisection. log R(r) is
 * minus the cumulant generating function of the generation interval at -r, so it is increasing
 * and concave in r; Newton's iterates from any point then land at or below the root and climb
 * to it monotonically and quadratically (a standard property of Newton's method on convex or
 * concave functions; e.g. Press et al., Numerical Recipes, 3rd ed., section 9.4; from memory).
 * It starts from the root for a gamma generation interval with the same mean Tg and variance,
 * R = (1 + r K2/Tg)^(Tg^2/K2) (Wallinga and Lipsitch 2007), which is off by O(r^3). A bracket
 * (the domain edge or the last point below the root, and the last point above it) catches any
 * step that leaves it, including steps out of the domain, and bisects instead. Stops when a
 * step, or the error Newton's quadratic convergence predicts after it (with f'' estimated from
 * the last two slopes), is below 2 eps |r| + 1e-15 / Tg; typically 2 or 3 evaluations.
 *
 * For m = n = 1 the root is r = (-(a + g) + sqrt((a - g)^2 + 4 a R g)) / 2 with a = 1/L,
 * g = 1/D (the dominant eigenvalue of the linearised SEIR system).
 *
 * @example growthRate(2, 3, 5, 1, 1) is (-(1/3 + 1/5) + sqrt((1/3 - 1/5)^2 + 4 (1/3)(2/5))) / 2, about 0.104518
 */
export function growthRate(rEff: number, latentDays: number, infectiousDays: number, m: number, n: number): number {
  const L = latentDays;
  const D = infectiousDays;
  if (!validShape(L, D, m, n) || !(rEff > 0) || !(rEff < Infinity)) return NaN;
  if (rEff === 1) return 0;
  const target = Math.log(rEff);
  const tg = meanGeneration(L, D, n);
  const absTol = 1e-15 / tg;
  const k1 = cumulant1(n);
  const k2 = cumulant2(n);
  const k3 = cumulant3(n);
  // starting point: the generation interval replaced by the gamma distribution with the same
  // mean Tg and variance K2, for which R = (1 + r K2/Tg)^(Tg^2/K2) inverts in closed form
  // (Wallinga and Lipsitch 2007 give this gamma relation); its error is O(r^3)
  const variance = (L * L) / m + D * D * k2;
  const shape = (tg * tg) / variance;
  const scale = variance / tg;
  // bracket: f(lo) < 0 < f(hi); lo starts at the domain edge, where R -> 0
  let lo = rEff < 1 ? -Math.min(m / L, n / D) : 0;
  let hi = rEff < 1 ? 0 : Infinity;
  let r = Math.expm1(target / shape) / scale;
  let prevR = NaN;
  let prevFp = NaN;
  for (let iter = 0; iter < 200; iter++) {
    // a step out of the bracket bisects it (hi is finite whenever a step can leave it on the
    // right: a start above the root has set hi, and from below concavity stops short of it)
    if (!(r > lo && r < hi)) r = hi < Infinity ? lo + 0.5 * (hi - lo) : 2 * lo + 1 / tg;
    // f = log R(r) - target and f' (logInfectiousFactor and its slope, sharing one expm1)
    const x = r * D;
    let logInf: number;
    let slopeInf: number;
    if (Math.abs(x) < SMALL_X) {
      logInf = x * (k1 - x * (k2 / 2 - (x * k3) / 6));
      slopeInf = k1 - x * (k2 - (x * k3) / 2);
    } else {
      const oneMinusU = -Math.expm1(-n * Math.log1p(x / n));
      logInf = Math.log(x / oneMinusU);
      slopeInf = 1 / x - (1 - oneMinusU) / ((1 + x / n) * oneMinusU);
    }
    const f = m * Math.log1p((r * L) / m) + logInf - target;
    if (f === 0) return r;
    if (f > 0) hi = r;
    else lo = r;
    const fp = L / (1 + (r * L) / m) + D * slopeInf;
    if (!(fp > 0)) {
      r = NaN; // cannot happen on the domain; bisect
      continue;
    }
    const step = f / fp;
    const tol = 2 * Number.EPSILON * Math.abs(r) + absTol;
    if (Math.abs(step) <= tol) return r - step;
    // Newton's error after this step is about |f''| / (2 f') step^2; f'' from the last two
    // slopes. Stop without another evaluation when that is 100 times below the tolerance.
    const curvature = Math.abs((fp - prevFp) / (r - prevR));
    if ((curvature / (2 * fp)) * step * step * 100 <= tol) return r - step;
    prevR = r;
    prevFp = fp;
    r -= step;
  }
  return r;
}

/** Doubling (r > 0) or halving (r < 0) time ln 2 / |r|, in the units of 1/r; Infinity at r = 0, NaN for NaN. */
export function doublingTime(r: number): number {
  return Math.LN2 / Math.abs(r);
}

/** Whether a growth rate means the epidemic doubles (r > 0), halves (r < 0) or stays level (r = 0); NaN gives 'unknown'. */
export function growthDirection(r: number): 'doubling' | 'halving' | 'level' | 'unknown' {
  if (r > 0) return 'doubling';
  if (r < 0) return 'halving';
  if (r === 0) return 'level';
  return 'unknown';
}
