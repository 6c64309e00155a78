// The schedule form's conversion of a wall-clock time in a named time zone to UTC (src/pages/releases/zonedTime.ts).
// Sources: the IANA time zone database rules, as also published by the governments concerned:
//  - EU summer time (Directive 2000/84/EC): clocks go forward at 01:00 UTC on the last Sunday of March and back at
//    01:00 UTC on the last Sunday of October; Europe/Berlin is UTC+1 (CET) in winter and UTC+2 (CEST) in summer.
//  - US daylight time (Energy Policy Act of 2005): from 02:00 local on the second Sunday of March to 02:00 local on
//    the first Sunday of November; America/New_York is UTC-5 (EST) / UTC-4 (EDT).
//  - Asia/Kathmandu is UTC+05:45 (Nepal Standard Time since 1986, IANA tzdata).
// Independent cross-check: Date.UTC arithmetic written out by hand below (no Intl).
import { describe, expect, it } from 'vitest';
import { formatInZone, formatOffset, offsetMinutesAt, parseLocalInput, toLocalInput, zonedToUtc } from '../../src/pages/releases/zonedTime';

const wall = (s: string) => {
  const w = parseLocalInput(s);
  if (!w) throw new Error(`bad ${s}`);
  return w;
};

describe('zonedToUtc', () => {
  it('converts summer and winter times in Europe/Berlin', () => {
    const summer = zonedToUtc(wall('2034-09-10T09:00'), 'Europe/Berlin');
    expect(summer).toMatchObject({ ok: true, iso: new Date(Date.UTC(2034, 8, 10, 7, 0, 0)).toISOString(), offsetMinutes: 120, ambiguous: false });
    const winter = zonedToUtc(wall('2034-01-10T09:00:30'), 'Europe/Berlin');
    expect(winter).toMatchObject({ ok: true, iso: new Date(Date.UTC(2034, 0, 10, 8, 0, 30)).toISOString(), offsetMinutes: 60 });
  });

  it('handles negative and non-whole-hour offsets and UTC itself', () => {
    expect(zonedToUtc(wall('2030-07-04T20:15'), 'America/New_York')).toMatchObject({ ok: true, iso: '2030-07-05T00:15:00.000Z', offsetMinutes: -240 });
    expect(zonedToUtc(wall('2030-12-04T20:15'), 'America/New_York')).toMatchObject({ ok: true, iso: '2030-12-05T01:15:00.000Z', offsetMinutes: -300 });
    expect(zonedToUtc(wall('2030-01-01T00:00'), 'Asia/Kathmandu')).toMatchObject({ ok: true, iso: '2029-12-31T18:15:00.000Z', offsetMinutes: 345 });
    expect(zonedToUtc(wall('2030-01-01T00:00'), 'UTC')).toMatchObject({ ok: true, iso: '2030-01-01T00:00:00.000Z', offsetMinutes: 0 });
  });

  it('refuses the skipped hour and takes the earlier of a repeated hour', () => {
    // last Sunday of March 2031 is 30 March: 02:00-02:59 local does not exist in Berlin
    const gap = zonedToUtc(wall('2031-03-30T02:30'), 'Europe/Berlin');
    expect(gap.ok).toBe(false);
    // last Sunday of October 2031 is 26 October: 02:30 local happens at 00:30 UTC (CEST) and 01:30 UTC (CET)
    const twice = zonedToUtc(wall('2031-10-26T02:30'), 'Europe/Berlin');
    expect(twice).toMatchObject({ ok: true, iso: '2031-10-26T00:30:00.000Z', ambiguous: true, offsetMinutes: 120 });
  });

  it('refuses unknown zones and impossible dates', () => {
    expect(zonedToUtc(wall('2030-01-01T00:00'), 'Mars/Olympus_Mons').ok).toBe(false);
    expect(parseLocalInput('2030-04-31T10:00')).toBeNull();
    expect(parseLocalInput('2030-02-29T10:00')).toBeNull(); // 2030 is not a leap year
    expect(parseLocalInput('2032-02-29T10:00')).not.toBeNull();
    expect(parseLocalInput('tomorrow')).toBeNull();
  });

  it('round-trips through the input value and formats both readings', () => {
    const ms = Date.UTC(2034, 8, 10, 7, 0, 5);
    expect(toLocalInput(ms, 'Europe/Berlin')).toBe('2034-09-10T09:00:05');
    const back = zonedToUtc(wall(toLocalInput(ms, 'Europe/Berlin')), 'Europe/Berlin');
    expect(back.ok && back.utcMs).toBe(ms);
    expect(formatInZone('2034-09-10T07:00:05.000Z', 'Europe/Berlin')).toBe('2034-09-10 09:00:05 Europe/Berlin (UTC+02:00)');
    expect(offsetMinutesAt(ms, 'America/New_York')).toBe(-240);
    expect(formatOffset(-300)).toBe('-05:00');
    expect(formatOffset(345)).toBe('+05:45');
  });
});
