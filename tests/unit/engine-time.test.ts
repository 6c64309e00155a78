import { describe, expect, it } from 'vitest';
import fc from 'fast-check';
import {
  EpochFormatError,
  LEAP_SECONDS,
  TimeScaleError,
  calendarFromDayIndex,
  dayIndexFromCalendar,
  formatTdbCalendar,
  isUtcPredicted,
  julianDayFromCalendar,
  leapSecondsAtEndOfDay,
  parseEpoch,
  taiMinusUtcSeconds,
  tdbDaysFromTdbCalendar,
  tdbDaysFromUtc,
  tdbJdFromDays,
  tdbMinusTtSeconds,
  tdbMinusTtSecondsSimple,
  ttDaysFromTdbDays,
  ttMinusTdbSeconds,
  utcCalendarFromTdbDays,
  utcFromTdbDays,
} from '../../server/engine/time';

const S = 1 / 86400; // one second in days

describe('TDB − TT', () => {
  it('7-term series at J2000 is −9.58e-5 s (METHODS §1.3 test value, computed there)', () => {
    expect(tdbMinusTtSeconds(0)).toBeCloseTo(-9.58e-5, 7);
  });
  it('simple two-term form at J2000 is −7.26e-5 s (METHODS §1.3 test value, computed there)', () => {
    expect(tdbMinusTtSecondsSimple(0)).toBeCloseTo(-7.26e-5, 7);
  });
  it('stays within the 1.7 ms bound and the two forms agree to ~30 µs over 1900–2100 (METHODS §1.3)', () => {
    for (let d = -36525; d <= 36525; d += 7.3) {
      const full = tdbMinusTtSeconds(d);
      expect(Math.abs(full)).toBeLessThan(1.7e-3 + 2.5e-5);
      expect(Math.abs(full - tdbMinusTtSecondsSimple(d))).toBeLessThan(5e-5);
    }
  });
  it('ttMinusTdbSeconds is the negative and TT<->TDB round-trips to < 1 ns', () => {
    for (const d of [-10000, 0, 3652.5, 11000.25]) {
      expect(ttMinusTdbSeconds(d)).toBeCloseTo(-tdbMinusTtSeconds(d), 12);
      const tt = ttDaysFromTdbDays(d);
      expect(Math.abs(tt + tdbMinusTtSeconds(tt) * S - d) / S).toBeLessThan(1e-9);
    }
  });
});

describe('Julian dates (Meeus 1998 ch. 7; METHODS §1.4 computed test values)', () => {
  it('2000-01-01.5 -> 2451545.0, 1970-01-01.0 -> 2440587.5, 2017-01-01.0 -> 2457754.5', () => {
    expect(julianDayFromCalendar(2000, 1, 1.5)).toBe(2451545.0);
    expect(julianDayFromCalendar(1970, 1, 1.0)).toBe(2440587.5);
    expect(julianDayFromCalendar(2017, 1, 1.0)).toBe(2457754.5);
  });
  it('agrees with the ECMAScript Date day count, JD_UTC = ms/86400000 + 2440587.5 (METHODS §1.4)', () => {
    fc.assert(
      fc.property(fc.integer({ min: -100000, max: 100000 }), (dayIndex) => {
        const { year, month, day } = calendarFromDayIndex(dayIndex);
        const ms = Date.UTC(year, month - 1, day);
        const d = new Date(ms);
        expect([d.getUTCFullYear(), d.getUTCMonth() + 1, d.getUTCDate()]).toEqual([year, month, day]);
        expect(julianDayFromCalendar(year, month, day)).toBe(ms / 86400000 + 2440587.5);
        expect(dayIndexFromCalendar(year, month, day)).toBe(dayIndex);
      }),
    );
  });
  it('tdbJdFromDays adds J2000', () => {
    expect(tdbJdFromDays(10957.5)).toBe(2462502.5);
  });
});

describe('UTC <-> TDB', () => {
  it('J2000.0 = 2000-01-01T11:58:55.816 UTC (METHODS §1.4), i.e. TDB days = (TDB−TT)/86400 there', () => {
    const d = tdbDaysFromUtc(2000, 1, 1, 11, 58, 55.816);
    expect(Math.abs(d - tdbMinusTtSeconds(0) * S) / S).toBeLessThan(1e-6);
    expect(utcFromTdbDays(0).utc).toBe('2000-01-01T11:58:55.816Z');
  });
  it('TT − UTC = 69.184 s since 2017-01-01 (METHODS §1.1)', () => {
    const tdb = tdbDaysFromUtc(2020, 6, 1, 0, 0, 0);
    const tt = ttDaysFromTdbDays(tdb);
    const utcDays = dayIndexFromCalendar(2020, 6, 1) - 0.5;
    expect((tt - utcDays) / S).toBeCloseTo(69.184, 6);
    expect(taiMinusUtcSeconds(2020, 6, 1)).toBe(37);
  });
  it('the table has 28 entries (10 s in 1972 plus 27 leap seconds) and ends at 37 s on 2017-01-01 (METHODS §1.2)', () => {
    expect(LEAP_SECONDS.length).toBe(28);
    expect(LEAP_SECONDS[0]).toEqual([1972, 1, 10]);
    expect(LEAP_SECONDS[LEAP_SECONDS.length - 1]).toEqual([2017, 1, 37]);
  });
  it('every leap-second day has 86401 s, and 23:59:60 is one second before 00:00:00 of the next day', () => {
    for (let k = 1; k < LEAP_SECONDS.length; k++) {
      const [y, m] = LEAP_SECONDS[k];
      const prev = calendarFromDayIndex(dayIndexFromCalendar(y, m, 1) - 1);
      expect(leapSecondsAtEndOfDay(prev.year, prev.month, prev.day)).toBe(1);
      const start = tdbDaysFromUtc(prev.year, prev.month, prev.day, 0, 0, 0);
      const s59 = tdbDaysFromUtc(prev.year, prev.month, prev.day, 23, 59, 59);
      const s60 = tdbDaysFromUtc(prev.year, prev.month, prev.day, 23, 59, 60);
      const next = tdbDaysFromUtc(y, m, 1, 0, 0, 0);
      expect((next - start) / S).toBeCloseTo(86401, 4);
      expect((s60 - s59) / S).toBeCloseTo(1, 6);
      expect((next - s60) / S).toBeCloseTo(1, 6);
      expect(taiMinusUtcSeconds(y, m, 1) - taiMinusUtcSeconds(prev.year, prev.month, prev.day)).toBe(1);
    }
  });
  it('formats the leap second itself as 23:59:60 and the instants around it correctly', () => {
    const base = tdbDaysFromUtc(2016, 12, 31, 23, 59, 59);
    expect(utcFromTdbDays(base).utc).toBe('2016-12-31T23:59:59.000Z');
    expect(utcFromTdbDays(base + 1 * S).utc).toBe('2016-12-31T23:59:60.000Z');
    expect(utcFromTdbDays(base + 1.5 * S).utc).toBe('2016-12-31T23:59:60.500Z');
    expect(utcFromTdbDays(base + 2 * S).utc).toBe('2017-01-01T00:00:00.000Z');
    expect(utcFromTdbDays(base + 1.9999 * S, 4).utc).toBe('2016-12-31T23:59:60.9999Z');
    // rounding 23:59:60.9996 to ms carries into the next day, not into "23:59:61"
    expect(utcFromTdbDays(base + 1.9996 * S).utc).toBe('2017-01-01T00:00:00.000Z');
    const cal = utcCalendarFromTdbDays(base + 1.25 * S);
    expect([cal.hour, cal.minute]).toEqual([23, 59]);
    expect(cal.second).toBeCloseTo(60.25, 5);
  });
  it('accepts 23:59:60 only on leap-second days', () => {
    expect(() => parseEpoch('1972-06-30T23:59:60Z')).not.toThrow();
    expect(() => parseEpoch('2016-12-31T23:59:60.999Z')).not.toThrow();
    expect(() => parseEpoch('2017-06-30T23:59:60Z')).toThrow(EpochFormatError);
    expect(() => parseEpoch('2016-12-31T23:58:60Z')).toThrow(EpochFormatError);
    expect(() => parseEpoch('2016-12-31T23:59:61Z')).toThrow(EpochFormatError);
  });
  it('refuses UTC before 1972 with a clear error, both directions (METHODS §1.5 item 2)', () => {
    expect(() => parseEpoch('1971-12-31T23:59:59Z')).toThrow(TimeScaleError);
    expect(() => parseEpoch('1971-12-31T23:59:59Z')).toThrow(/before 1972/);
    expect(() => utcFromTdbDays(tdbDaysFromTdbCalendar(1965, 1, 1))).toThrow(TimeScaleError);
    // TDB input before 1972 is fine
    expect(parseEpoch('TDB:1965-01-01T00:00:00').tdbDays).toBe(dayIndexFromCalendar(1965, 1, 1) - 0.5);
    // first instant of the table works
    expect(utcFromTdbDays(tdbDaysFromUtc(1972, 1, 1)).utc).toBe('1972-01-01T00:00:00.000Z');
  });
  it('keeps the last offset past the table and says so (METHODS §1.5 item 1)', () => {
    expect(isUtcPredicted(2024, 6, 1)).toBe(false);
    expect(isUtcPredicted(2030, 1, 1)).toBe(true);
    expect(taiMinusUtcSeconds(2099, 1, 1)).toBe(37);
    const p = parseEpoch('2030-01-01T00:00:00Z');
    expect(p.notes.join(' ')).toMatch(/predicted/);
    const out = utcFromTdbDays(p.tdbDays);
    expect(out).toEqual({ utc: '2030-01-01T00:00:00.000Z', predicted: true });
    expect(utcFromTdbDays(parseEpoch('2024-01-01T00:00:00Z').tdbDays).predicted).toBe(false);
    expect(parseEpoch('2024-01-01T00:00:00Z').notes.join(' ')).not.toMatch(/predicted/);
  });
  it('UTC round trip through TDB to 1 µs for random instants 1972–2199 (property)', () => {
    fc.assert(
      fc.property(
        fc.integer({ min: dayIndexFromCalendar(1972, 1, 1), max: dayIndexFromCalendar(2199, 12, 31) }),
        fc.integer({ min: 0, max: 86399 }),
        fc.integer({ min: 0, max: 999999 }),
        (dayIndex, sod, micro) => {
          const { year, month, day } = calendarFromDayIndex(dayIndex);
          const h = Math.floor(sod / 3600);
          const mi = Math.floor((sod % 3600) / 60);
          const s = (sod % 60) + micro / 1e6;
          const t = tdbDaysFromUtc(year, month, day, h, mi, s);
          const text = utcFromTdbDays(t, 6).utc;
          const back = parseEpoch(text).tdbDays;
          expect(Math.abs(back - t) / S).toBeLessThan(1e-6);
          const expected = `${String(year).padStart(4, '0')}-${String(month).padStart(2, '0')}-${String(day).padStart(2, '0')}T`;
          expect(text.startsWith(expected)).toBe(true);
        },
      ),
      { numRuns: 300 },
    );
  });
});

describe('parseEpoch (issue 3 item 1: the three accepted forms)', () => {
  it('UTC form', () => {
    const p = parseEpoch('2030-01-01T00:00:00Z');
    expect(p.scale).toBe('UTC');
    // 2030-01-01T00:00:00 UTC = 00:01:09.184 TT; TDB − TT there is of order a millisecond
    expect(Math.abs(p.tdbDays - (10957.5 + 69.184 * S)) / S).toBeLessThan(2e-3);
  });
  it('TDB calendar form', () => {
    const p = parseEpoch('TDB:2030-01-01T00:00:00');
    expect(p).toEqual({ tdbDays: 10957.5, scale: 'TDB', notes: [] });
    expect(formatTdbCalendar(p.tdbDays)).toBe('2030-01-01T00:00:00.000');
    expect(parseEpoch('TDB:2000-01-01T12:00:00').tdbDays).toBe(0);
  });
  it('JD form is TDB and keeps the decimal digits beyond one double JD (METHODS §1.4 precision)', () => {
    expect(parseEpoch('JD:2462502.5').tdbDays).toBe(10957.5);
    expect(parseEpoch('JD:2451545').tdbDays).toBe(0);
    const fine = parseEpoch('JD:2462502.500000001').tdbDays; // 1e-9 d = 86 µs
    // resolution of days-since-J2000 near 1e4 is ~2e-12 d (0.2 µs) …
    expect(Math.abs(fine - 10957.5 - 1e-9)).toBeLessThan(4e-12);
    // … while one double JD near 2.46e6 is quantised at ~4.7e-10 d (≈40 µs, METHODS §1.4)
    const naive = 2462502.500000001 - 2451545.0;
    expect(Math.abs(naive - 10957.5 - 1e-9)).toBeGreaterThan(1e-11);
  });
  it('rejects everything else with an error that lists the accepted forms', () => {
    const bad = [
      '2030-01-01',
      '2030-01-01T00:00:00',
      '2030-01-01 00:00:00Z',
      'UTC:2030-01-01T00:00:00',
      'TDB:2030-01-01T00:00:00Z',
      'JD:abc',
      'JD:-5',
      'MJD:60000',
      '2030-02-30T00:00:00Z',
      '2030-13-01T00:00:00Z',
      'TDB:2030-01-01T24:00:00',
      '',
    ];
    for (const b of bad) {
      let err: unknown;
      try {
        parseEpoch(b);
      } catch (e) {
        err = e;
      }
      expect(err, b).toBeInstanceOf(EpochFormatError);
      const msg = (err as Error).message;
      expect(msg).toContain('2030-01-01T00:00:00Z');
      expect(msg).toContain('TDB:2030-01-01T00:00:00');
      expect(msg).toContain('JD:2462502.5');
    }
  });
});
