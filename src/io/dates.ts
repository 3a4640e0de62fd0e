/**
 * Calendar days as integers. A day number counts days since 1970-01-01 (day 0) in the
 * proleptic Gregorian calendar; arithmetic is plain integer arithmetic, so there are no time
 * zones, no daylight-saving shifts and no `Date` objects involved.
 *
 * @remarks
 * The conversions are the `days_from_civil` / `civil_from_days` algorithms of Howard Hinnant,
 * "chrono-Compatible Low-Level Date Algorithms" (2013), which shift the year to start on
 * 1 March so that the leap day falls at the end, and count in 400-year eras of 146097 days.
 */

const ISO_DATE = /^(\d{4})-(\d{2})-(\d{2})$/;

/** Days from 0000-03-01 to 1970-01-01 in the shifted calendar (Hinnant's constant). */
const EPOCH_SHIFT = 719468;
const DAYS_PER_ERA = 146097;

/** Smallest and largest day numbers with a four-digit year (0000-01-01 and 9999-12-31). */
export const MIN_DAY = -719528;
export const MAX_DAY = 2932896;

/** Gregorian leap-year rule: every 4th year, except centuries not divisible by 400. */
export function isLeapYear(year: number): boolean {
  return (year % 4 === 0 && year % 100 !== 0) || year % 400 === 0;
}

/** Number of days in `month` (1-12) of `year`. */
export function daysInMonth(year: number, month: number): number {
  if (month === 2) return isLeapYear(year) ? 29 : 28;
  return month === 4 || month === 6 || month === 9 || month === 11 ? 30 : 31;
}

function dayFromCivil(year: number, month: number, day: number): number {
  const y = month <= 2 ? year - 1 : year;
  const era = Math.floor(y / 400);
  const yoe = y - era * 400;
  const doy = Math.floor((153 * (month + (month > 2 ? -3 : 9)) + 2) / 5) + day - 1;
  const doe = yoe * 365 + Math.floor(yoe / 4) - Math.floor(yoe / 100) + doy;
  return era * DAYS_PER_ERA + doe - EPOCH_SHIFT;
}

/**
 * Parses a strict ISO 8601 calendar date, `YYYY-MM-DD`, to a day number.
 *
 * Only the exact form is accepted: four-digit year, two-digit month and day, hyphens, no
 * time, no surrounding spaces. The date must exist (2031-02-30 does not).
 *
 * @returns days since 1970-01-01, or `null` if `s` is not a valid ISO calendar date.
 * @example parseIsoDate('1970-01-02') // 1
 */
export function parseIsoDate(s: string): number | null {
  const m = ISO_DATE.exec(s);
  if (m === null) return null;
  const year = Number(m[1]);
  const month = Number(m[2]);
  const day = Number(m[3]);
  if (month < 1 || month > 12) return null;
  if (day < 1 || day > daysInMonth(year, month)) return null;
  return dayFromCivil(year, month, day);
}

/**
 * Formats a day number as `YYYY-MM-DD`.
 *
 * @throws RangeError if `day` is not an integer between {@link MIN_DAY} and {@link MAX_DAY}
 *   (years outside 0000-9999 have no four-digit form).
 * @example isoFromDay(0) // '1970-01-01'
 */
export function isoFromDay(day: number): string {
  if (!Number.isInteger(day) || day < MIN_DAY || day > MAX_DAY) {
    throw new RangeError(`isoFromDay: ${day} is not a day number between ${MIN_DAY} and ${MAX_DAY}`);
  }
  const z = day + EPOCH_SHIFT;
  const era = Math.floor(z / DAYS_PER_ERA);
  const doe = z - era * DAYS_PER_ERA;
  const yoe = Math.floor(
    (doe - Math.floor(doe / 1460) + Math.floor(doe / 36524) - Math.floor(doe / 146096)) / 365,
  );
  const doy = doe - (365 * yoe + Math.floor(yoe / 4) - Math.floor(yoe / 100));
  const mp = Math.floor((5 * doy + 2) / 153);
  const d = doy - Math.floor((153 * mp + 2) / 5) + 1;
  const month = mp < 10 ? mp + 3 : mp - 9;
  const year = yoe + era * 400 + (month <= 2 ? 1 : 0);
  return `${pad(year, 4)}-${pad(month, 2)}-${pad(d, 2)}`;
}

function pad(n: number, width: number): string {
  return String(n).padStart(width, '0');
}

function dayOrThrow(iso: string, caller: string): number {
  const day = parseIsoDate(iso);
  if (day === null) throw new RangeError(`${caller}: "${iso}" is not a YYYY-MM-DD date`);
  return day;
}

/**
 * The ISO date `n` days after `iso` (before it when `n` is negative).
 *
 * @throws RangeError if `iso` is not a valid date or `n` is not an integer.
 * @example addDays('2032-02-28', 1) // '2032-02-29'
 */
export function addDays(iso: string, n: number): string {
  if (!Number.isInteger(n)) throw new RangeError(`addDays: ${n} is not a whole number of days`);
  return isoFromDay(dayOrThrow(iso, 'addDays') + n);
}

/**
 * Day of the week of an ISO date, 0 = Monday ... 6 = Sunday (the ISO 8601 order).
 *
 * @remarks 1970-01-01 (day 0) was a Thursday, so the weekday is `(day + 3) mod 7`.
 * @throws RangeError if `iso` is not a valid date.
 * @example dayOfWeek('1970-01-01') // 3 (Thursday)
 */
export function dayOfWeek(iso: string): number {
  return weekdayOfDay(dayOrThrow(iso, 'dayOfWeek'));
}

/** Day of the week of a day number, 0 = Monday ... 6 = Sunday. */
export function weekdayOfDay(day: number): number {
  return (((day + 3) % 7) + 7) % 7;
}
