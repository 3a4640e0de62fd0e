/**
 * A check of a reporting-delay setting read from a user's file (prior sets, simulation
 * scenarios): the schema can say that mean and sd are positive, not that the distribution
 * they give fits within 0..max_days, nor that it can be computed at all.
 */
import { inputError } from '../errors.js';
import type { DelaySpec } from '../model/prior-set.js';
import { delayCdf, discretiseDelay } from '../model/delay.js';

/**
 * Least share of the continuous delay distribution that must fall within 0..max_days days.
 * The model cuts the delay at max_days and renormalises (MODEL.md section 3); cutting off
 * more than half of it would fit a delay quite unlike the one written in the file.
 */
export const MIN_DELAY_MASS = 0.5;

/**
 * Refuses a delay whose distribution cannot be computed (e.g. an sd so small beside the mean
 * that the shape overflows) or that puts less than {@link MIN_DELAY_MASS} of its probability
 * on 0..max_days.
 *
 * @param field where the delay sits in the file, for the message (e.g. `model.delay`)
 * @throws WaxwaneError naming the file and the field
 */
export function checkDelay(delay: DelaySpec, file: string, field: string): void {
  const what = `the ${delay.family} delay with mean ${delay.mean} and sd ${delay.sd}`;
  let mass = Number.NaN;
  let usable = false;
  try {
    mass = delayCdf(delay)(delay.max_days + 1);
    usable = discretiseDelay(delay).every((p) => Number.isFinite(p) && p >= 0);
  } catch (err) {
    // discretiseDelay refuses a distribution with no mass on 0..max_days; anything else is ours
    if (!(err instanceof RangeError)) throw err;
  }
  if (!Number.isFinite(mass)) {
    throw inputError(
      { file, field },
      `${what} cannot be computed`,
      'give a mean and an sd of a plausible number of days (an sd far smaller than the mean gives no usable distribution)',
    );
  }
  if (!(mass >= MIN_DELAY_MASS) || !usable) {
    const share = mass < 0.001 ? 'almost none' : `${(100 * mass).toPrecision(2)}%`;
    throw inputError(
      { file, field: `${field}.max_days` },
      `${what} keeps ${share} of its probability within 0 to ${delay.max_days} days (at least ${100 * MIN_DELAY_MASS}% is needed: the rest is cut off)`,
      'raise max_days (up to 60), or check the mean and the sd',
    );
  }
}
