/**
 * Time scales: UTC, TAI, TT, TDB (handbook METHODS.md §1).
 *
 * Working variable everywhere in the engine: `tdbDays` = days of TDB since J2000.0 (JD 2451545.0 TDB).
 * A single double JD near 2.46e6 resolves only ~40 µs; days since J2000 (|x| < 1e5) resolve ~1 µs or better,
 * so Julian dates are only formed at the edges (output) and parsed from strings in two parts.
 *
 * Relations (METHODS §1.1):
 *   TAI = UTC + ΔAT (integer seconds from 1972 on, IERS Bulletin C leap-second table below)
 *   TT  = TAI + 32.184 s (exact)
 *   TDB = TT + (TDB − TT), periodic, |·| ≤ 1.7 ms: 7-term series of Kaplan 2005 (USNO Circular 179, eq. 2.6).
 *
 * Policy outside the table (METHODS §1.5):
 *   - UTC before 1972-01-01 is refused (TimeScaleError): 1961–1971 rubber seconds are not implemented.
 *   - UTC after the table's validity keeps the last offset (37 s) and is flagged `predicted`
 *     ("assumes no further leap seconds"). Leap seconds are never extrapolated.
 */
import { J2000_JD, DAY_S } from './constants';

/** TT − TAI in seconds, exact (IAU 1991 Res. A4; METHODS §1.1). */
export const TT_MINUS_TAI_S = 32.184;

/**
 * TAI − UTC from IERS Bulletin C, effective 00:00:00 UTC on the date shown (METHODS §1.2, checked there against
 * the IERS/IETF leap-seconds.list). Each step is a positive leap second 23:59:60 on the day before the date.
 */
export const LEAP_SECONDS: ReadonlyArray<readonly [year: number, month: number, taiMinusUtcS: number]> = [
  [1972, 1, 10], [1972, 7, 11], [1973, 1, 12], [1974, 1, 13], [1975, 1, 14],
  [1976, 1, 15], [1977, 1, 16], [1978, 1, 17], [1979, 1, 18], [1980, 1, 19],
  [1981, 7, 20], [1982, 7, 21], [1983, 7, 22], [1985, 7, 23], [1988, 1, 24],
  [1990, 1, 25], [1991, 1, 26], [1992, 7, 27], [1993, 7, 28], [1994, 7, 29],
  [1996, 1, 30], [1997, 7, 31], [1999, 1, 32], [2006, 1, 33], [2009, 1, 34],
  [2012, 7, 35], [2015, 7, 36], [2017, 1, 37],
];

/**
 * The table above is known to be complete up to (not including) this UTC date. Later UTC is "predicted".
 * Value: the expiry line (#@) of the IERS leap-seconds.list in the public copies of early 2025 is recalled from
 * memory as 28 December 2025 [M]; the handbook (METHODS §1.2) says to check the current Bulletin C before release.
 */
export const LEAP_TABLE_VALID_UNTIL_UTC: readonly [number, number, number] = [2025, 12, 28];

export class EpochFormatError extends Error {
  constructor(input: string, reason?: string) {
    super(
      `Unrecognised epoch ${JSON.stringify(input)}${reason ? ` (${reason})` : ''}. Accepted forms: ` +
        `"2030-01-01T00:00:00Z" (UTC, ISO 8601 with Z; fractional seconds allowed; second 60 only on a leap-second day), ` +
        `"TDB:2030-01-01T00:00:00" (TDB calendar date), ` +
        `"JD:2462502.5" (TDB Julian date).`,
    );
    this.name = 'EpochFormatError';
  }
}

/** A time that cannot be converted between scales (e.g. UTC before 1972). */
export class TimeScaleError extends Error {
  constructor(message: string) {
    super(message);
    this.name = 'TimeScaleError';
  }
}

// ---------------------------------------------------------------------------------------------------------
// Calendar arithmetic

/**
 * Julian date of a Gregorian calendar date, D may be fractional (Meeus 1998, Astronomical Algorithms, ch. 7;
 * METHODS §1.4). Exact in doubles for D integer (the result is then an exact half-integer).
 */
export function julianDayFromCalendar(year: number, month: number, day: number): number {
  let y = year;
  let m = month;
  if (m <= 2) {
    y -= 1;
    m += 12;
  }
  const a = Math.floor(y / 100);
  const b = 2 - a + Math.floor(a / 4);
  return Math.floor(365.25 * (y + 4716)) + Math.floor(30.6001 * (m + 1)) + day + b - 1524.5;
}

/** Integer count of days from 2000-01-01 (day 0) to the given Gregorian date at 00:00. */
export function dayIndexFromCalendar(year: number, month: number, day: number): number {
  // JD at 0h is an exact half-integer; JD(2000-01-01.0) = 2451544.5.
  return julianDayFromCalendar(year, month, day) - 2451544.5;
}

/** Gregorian date of a day index (days from 2000-01-01). Integer algorithm (days-from-civil inverse). */
export function calendarFromDayIndex(dayIndex: number): { year: number; month: number; day: number } {
  const z = dayIndex + 10957 + 719468; // days from 0000-03-01
  const era = Math.floor(z / 146097);
  const doe = z - era * 146097;
  const yoe = Math.floor((doe - Math.floor(doe / 1460) + Math.floor(doe / 36524) - Math.floor(doe / 146096)) / 365);
  const doy = doe - (365 * yoe + Math.floor(yoe / 4) - Math.floor(yoe / 100));
  const mp = Math.floor((5 * doy + 2) / 153);
  const day = doy - Math.floor((153 * mp + 2) / 5) + 1;
  const month = mp < 10 ? mp + 3 : mp - 9;
  const year = yoe + era * 400 + (month <= 2 ? 1 : 0);
  return { year, month, day };
}

export function isGregorianLeapYear(year: number): boolean {
  return (year % 4 === 0 && year % 100 !== 0) || year % 400 === 0;
}

export function daysInMonth(year: number, month: number): number {
  return [31, isGregorianLeapYear(year) ? 29 : 28, 31, 30, 31, 30, 31, 31, 30, 31, 30, 31][month - 1];
}

// ---------------------------------------------------------------------------------------------------------
// Leap seconds

interface LeapEntry {
  dayIndex: number; // UTC day index of the effective date
  taiMinusUtcS: number;
  taiStartS: number; // TAI seconds since 2000-01-01T00:00:00 TAI at which the entry takes effect
}

const LEAP_ENTRIES: LeapEntry[] = LEAP_SECONDS.map(([y, m, dat]) => {
  const dayIndex = dayIndexFromCalendar(y, m, 1);
  return { dayIndex, taiMinusUtcS: dat, taiStartS: dayIndex * DAY_S + dat };
});
const FIRST_UTC_DAY_INDEX = LEAP_ENTRIES[0].dayIndex;
const VALID_UNTIL_DAY_INDEX = dayIndexFromCalendar(...LEAP_TABLE_VALID_UNTIL_UTC);

function leapEntryIndexForDay(dayIndex: number): number {
  let j = -1;
  for (let k = 0; k < LEAP_ENTRIES.length; k++) {
    if (LEAP_ENTRIES[k].dayIndex <= dayIndex) j = k;
    else break;
  }
  return j;
}

function assertUtcCovered(dayIndex: number, what: string): void {
  if (dayIndex < FIRST_UTC_DAY_INDEX) {
    throw new TimeScaleError(
      `${what}: UTC before 1972-01-01 is not supported (1961–1971 UTC used fractional steps and rate offsets, ` +
        `which Tocsin does not model; before 1961 there is no UTC). Give the epoch in TDB instead ` +
        `("TDB:YYYY-MM-DDThh:mm:ss" or "JD:<TDB Julian date>").`,
    );
  }
}

/** TAI − UTC in seconds in effect during the given UTC day (throws TimeScaleError before 1972). */
export function taiMinusUtcSeconds(year: number, month: number, day: number): number {
  const dayIndex = dayIndexFromCalendar(year, month, day);
  assertUtcCovered(dayIndex, `${year}-${pad(month, 2)}-${pad(day, 2)}`);
  return LEAP_ENTRIES[leapEntryIndexForDay(dayIndex)].taiMinusUtcS;
}

/** Number of leap seconds inserted at the end of this UTC day (0 or 1). */
export function leapSecondsAtEndOfDay(year: number, month: number, day: number): number {
  return leapSecondsAtEndOfDayIndex(dayIndexFromCalendar(year, month, day));
}

function leapSecondsAtEndOfDayIndex(dayIndex: number): number {
  for (let k = 1; k < LEAP_ENTRIES.length; k++) {
    if (LEAP_ENTRIES[k].dayIndex === dayIndex + 1) {
      return LEAP_ENTRIES[k].taiMinusUtcS - LEAP_ENTRIES[k - 1].taiMinusUtcS;
    }
  }
  return 0;
}

/** True when UTC on this date lies past the leap-second table's validity (TAI − UTC is then assumed). */
export function isUtcPredicted(year: number, month: number, day: number): boolean {
  return dayIndexFromCalendar(year, month, day) >= VALID_UNTIL_DAY_INDEX;
}

// ---------------------------------------------------------------------------------------------------------
// TDB − TT

/**
 * TDB − TT in seconds, 7-term series (Kaplan 2005, USNO Circular 179, eq. 2.6; Fairhead & Bretagnon 1990),
 * ≈10 µs over 1600–2200 (METHODS §1.3). Argument: TT days since J2000 (TDB days may be passed instead: the
 * difference changes the result by < 1e-12 s).
 */
export function tdbMinusTtSeconds(ttDays: number): number {
  const t = ttDays / 36525;
  return (
    0.001657 * Math.sin(628.3076 * t + 6.2401) +
    0.000022 * Math.sin(575.3385 * t + 4.297) +
    0.000014 * Math.sin(1256.6152 * t + 6.1969) +
    0.000005 * Math.sin(606.9777 * t + 4.0212) +
    0.000005 * Math.sin(52.9691 * t + 0.4444) +
    0.000002 * Math.sin(21.3299 * t + 5.5431) +
    0.00001 * t * Math.sin(628.3076 * t + 4.249)
  );
}

/** Simple two-term form (~30 µs): 0.001657 sin g + 0.000014 sin 2g (Astronomical Almanac; METHODS §1.3). */
export function tdbMinusTtSecondsSimple(ttDays: number): number {
  const g = ((357.53 + 0.98560028 * ttDays) * Math.PI) / 180;
  return 0.001657 * Math.sin(g) + 0.000014 * Math.sin(2 * g);
}

/** TT − TDB in seconds at the given TDB instant (days since J2000). */
export function ttMinusTdbSeconds(tdbDays: number): number {
  return -tdbMinusTtSeconds(tdbDays);
}

export function ttDaysFromTdbDays(tdbDays: number): number {
  // One fixed-point pass is exact to ~1e-12 s (d(TDB−TT)/dt ≈ 3e-10).
  let tt = tdbDays;
  for (let k = 0; k < 2; k++) tt = tdbDays - tdbMinusTtSeconds(tt) / DAY_S;
  return tt;
}

export function tdbDaysFromTtDays(ttDays: number): number {
  return ttDays + tdbMinusTtSeconds(ttDays) / DAY_S;
}

export function taiDaysFromTtDays(ttDays: number): number {
  return ttDays - TT_MINUS_TAI_S / DAY_S;
}

// ---------------------------------------------------------------------------------------------------------
// Julian dates

/** TDB Julian date from days since J2000 (one double: ~40 µs resolution; use for output only). */
export function tdbJdFromDays(tdbDays: number): number {
  return J2000_JD + tdbDays;
}

/** Days since J2000 from a one-double JD. Prefer parseEpoch("JD:...") which keeps the full decimal precision. */
export function tdbDaysFromJd(jd: number): number {
  return jd - J2000_JD;
}

/** Two-part JD [jd1, jd2] with jd1 = 2451545.0 (SOFA style), lossless. */
export function tdbJdParts(tdbDays: number): [number, number] {
  return [J2000_JD, tdbDays];
}

// ---------------------------------------------------------------------------------------------------------
// UTC <-> TDB

function validateClock(hour: number, minute: number, second: number, maxSecond: number, label: string): void {
  if (!Number.isInteger(hour) || hour < 0 || hour > 23) throw new RangeError(`${label}: hour ${hour} out of range 0–23`);
  if (!Number.isInteger(minute) || minute < 0 || minute > 59)
    throw new RangeError(`${label}: minute ${minute} out of range 0–59`);
  if (!(second >= 0 && second < maxSecond)) throw new RangeError(`${label}: second ${second} out of range`);
}

function validateDate(year: number, month: number, day: number, label: string): void {
  if (!Number.isInteger(year) || year < 1583 || year > 9999)
    throw new RangeError(`${label}: year ${year} outside the supported Gregorian range 1583–9999`);
  if (!Number.isInteger(month) || month < 1 || month > 12) throw new RangeError(`${label}: month ${month} out of range`);
  if (!Number.isInteger(day) || day < 1 || day > daysInMonth(year, month))
    throw new RangeError(`${label}: day ${day} does not exist in ${year}-${pad(month, 2)}`);
}

/**
 * TDB days since J2000 for a UTC calendar instant. Second 60 (up to 60.999…) is accepted only at 23:59 on a
 * day that ends with a leap second (that day has 86401 s, as in SOFA/ERFA). Throws TimeScaleError before 1972.
 * Past the table validity the last offset is kept (see isUtcPredicted).
 */
export function tdbDaysFromUtc(
  year: number,
  month: number,
  day: number,
  hour = 0,
  minute = 0,
  second = 0,
): number {
  const label = `UTC ${year}-${pad(month, 2)}-${pad(day, 2)}T${pad(hour, 2)}:${pad(minute, 2)}:${second < 10 ? "0" : ""}${second}`;
  validateDate(year, month, day, label);
  const dayIndex = dayIndexFromCalendar(year, month, day);
  assertUtcCovered(dayIndex, label);
  const leap = leapSecondsAtEndOfDayIndex(dayIndex);
  const maxSecond = hour === 23 && minute === 59 ? 60 + leap : 60;
  if (second >= 60 && second < 61 && maxSecond === 60) {
    throw new RangeError(`${label}: second 60 is only valid at 23:59 on a day that ends with a leap second`);
  }
  validateClock(hour, minute, second, maxSecond, label);
  const dat = LEAP_ENTRIES[leapEntryIndexForDay(dayIndex)].taiMinusUtcS;
  // TAI seconds of day since 2000-01-01T00:00:00 on the TAI clock, split as day count + seconds.
  const secondsOfDay = hour * 3600 + minute * 60 + second;
  const ttFractionDays = (secondsOfDay + dat + TT_MINUS_TAI_S) / DAY_S;
  const ttDays = dayIndex - 0.5 + ttFractionDays;
  return ttDays + tdbMinusTtSeconds(ttDays) / DAY_S;
}

/** TDB days since J2000 for a TDB calendar instant. */
export function tdbDaysFromTdbCalendar(
  year: number,
  month: number,
  day: number,
  hour = 0,
  minute = 0,
  second = 0,
): number {
  const label = `TDB ${year}-${pad(month, 2)}-${pad(day, 2)}T${pad(hour, 2)}:${pad(minute, 2)}:${second < 10 ? "0" : ""}${second}`;
  validateDate(year, month, day, label);
  validateClock(hour, minute, second, 60, label);
  return dayIndexFromCalendar(year, month, day) - 0.5 + (hour * 3600 + minute * 60 + second) / DAY_S;
}

export interface UtcCalendar {
  year: number;
  month: number;
  day: number;
  hour: number;
  minute: number;
  /** may be in [60, 61) during a leap second */
  second: number;
  predicted: boolean;
}

/** UTC calendar fields for a TDB instant. Throws TimeScaleError before 1972-01-01 UTC. */
export function utcCalendarFromTdbDays(tdbDays: number): UtcCalendar {
  const { dayIndex, secondsOfDay } = utcDaySecondsFromTdbDays(tdbDays);
  const { year, month, day } = calendarFromDayIndex(dayIndex);
  return { year, month, day, ...clockFromSeconds(secondsOfDay), predicted: dayIndex >= VALID_UNTIL_DAY_INDEX };
}

function utcDaySecondsFromTdbDays(tdbDays: number): { dayIndex: number; secondsOfDay: number } {
  if (!Number.isFinite(tdbDays)) throw new RangeError(`tdbDays must be finite, got ${tdbDays}`);
  const ttDays = ttDaysFromTdbDays(tdbDays);
  // TAI seconds since 2000-01-01T00:00:00 (TAI clock) = (ttDays + 0.5) * 86400 − 32.184.
  // Split into whole days and seconds to keep precision.
  const taiDaysFromMidnight = ttDays + 0.5 - TT_MINUS_TAI_S / DAY_S;
  const wholeDays = Math.floor(taiDaysFromMidnight);
  const taiSecondsInDay = (taiDaysFromMidnight - wholeDays) * DAY_S;
  const taiS = wholeDays * DAY_S + taiSecondsInDay;
  if (taiS < LEAP_ENTRIES[0].taiStartS) {
    assertUtcCovered(FIRST_UTC_DAY_INDEX - 1, `TDB day ${tdbDays}`);
  }
  let j = 0;
  for (let k = 0; k < LEAP_ENTRIES.length; k++) {
    if (LEAP_ENTRIES[k].taiStartS <= taiS) j = k;
    else break;
  }
  const dat = LEAP_ENTRIES[j].taiMinusUtcS;
  const next = LEAP_ENTRIES[j + 1];
  // Work relative to whole days to keep ~µs precision: UTC seconds since midnight of `wholeDays`.
  let dayIndex = wholeDays;
  let secondsOfDay = taiSecondsInDay - dat;
  while (secondsOfDay < 0) {
    dayIndex -= 1;
    secondsOfDay += DAY_S;
  }
  // Inside a leap second the new offset has not yet taken effect (taiS < next.taiStartS by the choice of j)
  // but the old offset already puts us on the next day: that instant is 23:59:60 of the previous day.
  if (next && dayIndex >= next.dayIndex) {
    dayIndex -= 1;
    secondsOfDay += DAY_S;
  }
  return { dayIndex, secondsOfDay };
}

function clockFromSeconds(secondsOfDay: number): { hour: number; minute: number; second: number } {
  if (secondsOfDay >= DAY_S) return { hour: 23, minute: 59, second: secondsOfDay - (DAY_S - 60) };
  const hour = Math.floor(secondsOfDay / 3600);
  const minute = Math.floor((secondsOfDay - hour * 3600) / 60);
  return { hour, minute, second: secondsOfDay - hour * 3600 - minute * 60 };
}

function pad(n: number, width: number): string {
  return String(n).padStart(width, '0');
}

function formatClock(dayIndex: number, secondsOfDay: number, fractionDigits: number, dayLengthS: (d: number) => number) {
  const unit = 10 ** fractionDigits;
  let total = Math.round(secondsOfDay * unit);
  let d = dayIndex;
  if (total >= dayLengthS(d) * unit) {
    total -= dayLengthS(d) * unit;
    d += 1;
  }
  const { year, month, day } = calendarFromDayIndex(d);
  let hh: number, mm: number, ssUnits: number;
  if (total >= DAY_S * unit) {
    hh = 23;
    mm = 59;
    ssUnits = total - (DAY_S - 60) * unit;
  } else {
    hh = Math.floor(total / (3600 * unit));
    mm = Math.floor((total - hh * 3600 * unit) / (60 * unit));
    ssUnits = total - hh * 3600 * unit - mm * 60 * unit;
  }
  const secInt = Math.floor(ssUnits / unit);
  const frac = ssUnits - secInt * unit;
  const secText = fractionDigits > 0 ? `${pad(secInt, 2)}.${pad(frac, fractionDigits)}` : pad(secInt, 2);
  return { text: `${pad(year, 4)}-${pad(month, 2)}-${pad(day, 2)}T${pad(hh, 2)}:${pad(mm, 2)}:${secText}`, dayIndex: d };
}

/**
 * UTC ISO string (with Z) for a TDB instant, rounded to `fractionDigits` (default 3, milliseconds).
 * `predicted` is true past the leap-second table's validity: TAI − UTC is then held at the last value (37 s)
 * and the string assumes no further leap seconds. Throws TimeScaleError before 1972.
 */
export function utcFromTdbDays(tdbDays: number, fractionDigits = 3): { utc: string; predicted: boolean } {
  const { dayIndex, secondsOfDay } = utcDaySecondsFromTdbDays(tdbDays);
  const out = formatClock(dayIndex, secondsOfDay, fractionDigits, (d) => DAY_S + leapSecondsAtEndOfDayIndex(d));
  return { utc: `${out.text}Z`, predicted: out.dayIndex >= VALID_UNTIL_DAY_INDEX };
}

/** TDB calendar string "YYYY-MM-DDThh:mm:ss.sss" (no Z: this is not UTC). */
export function formatTdbCalendar(tdbDays: number, fractionDigits = 3): string {
  const fromMidnight = tdbDays + 0.5;
  const dayIndex = Math.floor(fromMidnight);
  return formatClock(dayIndex, (fromMidnight - dayIndex) * DAY_S, fractionDigits, () => DAY_S).text;
}

// ---------------------------------------------------------------------------------------------------------
// Epoch strings

const UTC_RE = /^(\d{4})-(\d{2})-(\d{2})T(\d{2}):(\d{2}):(\d{2}(?:\.\d+)?)Z$/;
const TDB_RE = /^TDB:(\d{4})-(\d{2})-(\d{2})T(\d{2}):(\d{2}):(\d{2}(?:\.\d+)?)$/;
const JD_RE = /^JD:(\d{1,8})(?:\.(\d*))?$/;

export interface ParsedEpoch {
  tdbDays: number;
  scale: 'UTC' | 'TDB';
  notes: string[];
}

/**
 * Parse an epoch string into TDB days since J2000. Accepted forms (issue 3 item 1):
 *   "2030-01-01T00:00:00Z"      UTC (fractional seconds allowed; second 60 only on a leap-second day)
 *   "TDB:2030-01-01T00:00:00"   TDB calendar
 *   "JD:2462502.5"              TDB Julian date (integer and fraction parsed separately: no precision loss)
 * Anything else throws EpochFormatError listing these forms. UTC before 1972 throws TimeScaleError.
 */
export function parseEpoch(text: string): ParsedEpoch {
  if (typeof text !== 'string') throw new EpochFormatError(String(text), 'not a string');
  const s = text.trim();
  let m = UTC_RE.exec(s);
  if (m) {
    const [y, mo, d, h, mi] = m.slice(1, 6).map(Number);
    const sec = Number(m[6]);
    let tdbDays: number;
    try {
      tdbDays = tdbDaysFromUtc(y, mo, d, h, mi, sec);
    } catch (err) {
      if (err instanceof RangeError) throw new EpochFormatError(text, err.message);
      throw err;
    }
    const notes = [`UTC converted with TAI−UTC = ${taiMinusUtcSeconds(y, mo, d)} s (IERS Bulletin C table)`];
    if (isUtcPredicted(y, mo, d)) {
      notes.push(
        `predicted: UTC on or after ${LEAP_TABLE_VALID_UNTIL_UTC.map((v, i) => (i ? pad(v, 2) : v)).join('-')} ` +
          `is past the leap-second table; assumes no further leap seconds (TAI−UTC held at ` +
          `${LEAP_ENTRIES[LEAP_ENTRIES.length - 1].taiMinusUtcS} s)`,
      );
    }
    return { tdbDays, scale: 'UTC', notes };
  }
  m = TDB_RE.exec(s);
  if (m) {
    const [y, mo, d, h, mi] = m.slice(1, 6).map(Number);
    const sec = Number(m[6]);
    try {
      return { tdbDays: tdbDaysFromTdbCalendar(y, mo, d, h, mi, sec), scale: 'TDB', notes: [] };
    } catch (err) {
      if (err instanceof RangeError) throw new EpochFormatError(text, err.message);
      throw err;
    }
  }
  m = JD_RE.exec(s);
  if (m) {
    const whole = Number(m[1]);
    const frac = m[2] ? Number(`0.${m[2]}`) : 0;
    return { tdbDays: whole - J2000_JD + frac, scale: 'TDB', notes: ['Julian date read as TDB'] };
  }
  throw new EpochFormatError(text);
}
