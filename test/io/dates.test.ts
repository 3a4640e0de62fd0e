import { describe, expect, it } from 'vitest';
import {
  MAX_DAY,
  MIN_DAY,
  addDays,
  dayOfWeek,
  daysInMonth,
  isLeapYear,
  isoFromDay,
  parseIsoDate,
  weekdayOfDay,
} from '../../src/io/dates.js';

const MS_PER_DAY = 86_400_000;

/** Reference: JavaScript's Date, which counts UTC milliseconds in the proleptic Gregorian calendar. */
function referenceIso(day: number): string {
  return new Date(day * MS_PER_DAY).toISOString().slice(0, 10);
}

describe('parseIsoDate', () => {
  it('counts days from 1970-01-01', () => {
    expect(parseIsoDate('1970-01-01')).toBe(0);
    expect(parseIsoDate('1970-01-02')).toBe(1);
    expect(parseIsoDate('1969-12-31')).toBe(-1);
    // 30 years of 365 days plus the 7 leap days of 1972..1996 (Gregorian rule, common knowledge)
    expect(parseIsoDate('2000-01-01')).toBe(30 * 365 + 7);
  });

  it('follows the Gregorian leap-year rule (common knowledge)', () => {
    expect(parseIsoDate('2000-02-29')).not.toBeNull(); // divisible by 400
    expect(parseIsoDate('2024-02-29')).not.toBeNull(); // divisible by 4
    expect(parseIsoDate('2100-02-29')).toBeNull(); // century not divisible by 400
    expect(parseIsoDate('1900-02-29')).toBeNull();
    expect(parseIsoDate('2031-02-29')).toBeNull();
    expect(isLeapYear(2000)).toBe(true);
    expect(isLeapYear(2100)).toBe(false);
    expect(daysInMonth(2032, 2)).toBe(29);
    expect(daysInMonth(2031, 2)).toBe(28);
    expect(daysInMonth(2031, 4)).toBe(30);
    expect(daysInMonth(2031, 12)).toBe(31);
  });

  it.each([
    '2031-13-01',
    '2031-00-10',
    '2031-01-00',
    '2031-01-32',
    '2031-04-31',
    '03/02/2031',
    '2031/02/03',
    '2031-2-03',
    '2031-02-3',
    '31-02-03',
    '+2031-02-03',
    '20310203',
    ' 2031-02-03',
    '2031-02-03 ',
    '2031-02-03T00:00:00Z',
    '2031-02-03\n',
    '２０３１-02-03',
    '',
  ])('refuses %j', (s) => {
    expect(parseIsoDate(s)).toBeNull();
  });

  it('matches JavaScript Date on every day from 1800 to 2200', () => {
    const first = Date.UTC(1800, 0, 1) / MS_PER_DAY;
    const last = Date.UTC(2200, 11, 31) / MS_PER_DAY;
    for (let day = first; day <= last; day += 1) {
      const iso = referenceIso(day);
      if (parseIsoDate(iso) !== day || isoFromDay(day) !== iso) {
        throw new Error(`day ${day}: reference ${iso}, parse ${parseIsoDate(iso)}, format ${isoFromDay(day)}`);
      }
    }
  });

  it('matches JavaScript Date across the whole four-digit range', () => {
    // step 997 (prime) visits every day of the week and month over the range
    for (let day = MIN_DAY; day <= MAX_DAY; day += 997) {
      expect(isoFromDay(day)).toBe(referenceIso(day));
      expect(parseIsoDate(referenceIso(day))).toBe(day);
    }
    expect(isoFromDay(MIN_DAY)).toBe('0000-01-01');
    expect(isoFromDay(MAX_DAY)).toBe('9999-12-31');
  });
});

describe('isoFromDay', () => {
  it('formats with zero padding', () => {
    expect(isoFromDay(0)).toBe('1970-01-01');
    expect(isoFromDay(MIN_DAY + 31 + 28)).toBe('0000-02-29'); // year 0 is divisible by 400
  });

  it.each([0.5, Number.NaN, MIN_DAY - 1, MAX_DAY + 1])('refuses %s', (day) => {
    expect(() => isoFromDay(day)).toThrow(RangeError);
  });
});

describe('addDays', () => {
  it('crosses month, year and leap-day boundaries', () => {
    expect(addDays('2031-12-31', 1)).toBe('2032-01-01');
    expect(addDays('2032-02-28', 1)).toBe('2032-02-29');
    expect(addDays('2031-02-28', 1)).toBe('2031-03-01');
    expect(addDays('2031-03-01', -1)).toBe('2031-02-28');
    expect(addDays('2031-06-15', 0)).toBe('2031-06-15');
    expect(addDays('2031-01-01', 365)).toBe('2032-01-01');
    expect(addDays('2032-01-01', 365)).toBe('2032-12-31');
  });

  it('agrees with JavaScript Date for a sweep of offsets', () => {
    const base = '2031-02-03';
    const baseMs = Date.UTC(2031, 1, 3);
    for (let n = -5000; n <= 5000; n += 37) {
      expect(addDays(base, n)).toBe(new Date(baseMs + n * MS_PER_DAY).toISOString().slice(0, 10));
    }
  });

  it('refuses an invalid date or a fractional offset', () => {
    expect(() => addDays('2031-02-30', 1)).toThrow(RangeError);
    expect(() => addDays('2031-02-03', 1.5)).toThrow(RangeError);
  });
});

describe('dayOfWeek', () => {
  it('knows well-known weekdays (common knowledge), Monday = 0', () => {
    expect(dayOfWeek('1970-01-01')).toBe(3); // Thursday
    expect(dayOfWeek('2000-01-01')).toBe(5); // Saturday
    expect(dayOfWeek('1969-12-28')).toBe(6); // Sunday, the Sunday before 1970-01-01
    expect(dayOfWeek('1969-12-29')).toBe(0); // Monday
  });

  it('agrees with JavaScript Date.getUTCDay for a sweep of days', () => {
    for (let day = -100_000; day <= 100_000; day += 101) {
      const jsDay = new Date(day * MS_PER_DAY).getUTCDay(); // 0 = Sunday
      expect(weekdayOfDay(day)).toBe((jsDay + 6) % 7);
      expect(dayOfWeek(referenceIso(day))).toBe((jsDay + 6) % 7);
    }
  });

  it('refuses an invalid date', () => {
    expect(() => dayOfWeek('2031-02-29')).toThrow(RangeError);
  });
});
