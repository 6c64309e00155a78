// Wall-clock times in a named IANA time zone <-> UTC instants, with the browser's own Intl data (no library).
// The schedule form takes a date and time as the user reads it on their clock ("2034-09-10 09:00" in
// Europe/Berlin), shows the zone, and sends the UTC instant; scheduled times are shown back in both.
//
// Conversion: the zone's offset at an instant is read from Intl.DateTimeFormat's parts; a local time maps to
// local - offset(local - offset(local)), re-checked once (the usual fixed-point method). Local times that do not
// exist (the hour skipped when clocks go forward) are reported; a time that exists twice (clocks go back) takes the
// earlier instant and says so.

export type WallTime = { year: number; month: number; day: number; hour: number; minute: number; second: number };

const formatters = new Map<string, Intl.DateTimeFormat>();

function formatterFor(timeZone: string): Intl.DateTimeFormat {
  let f = formatters.get(timeZone);
  if (!f) {
    f = new Intl.DateTimeFormat('en-US', {
      timeZone,
      hourCycle: 'h23',
      year: 'numeric',
      month: '2-digit',
      day: '2-digit',
      hour: '2-digit',
      minute: '2-digit',
      second: '2-digit',
    });
    formatters.set(timeZone, f);
  }
  return f;
}

/** The browser's time zone (IANA name), "UTC" when it cannot be told. */
export function browserTimeZone(): string {
  try {
    return Intl.DateTimeFormat().resolvedOptions().timeZone || 'UTC';
  } catch {
    return 'UTC';
  }
}

export function isValidTimeZone(timeZone: string): boolean {
  try {
    formatterFor(timeZone);
    return true;
  } catch {
    return false;
  }
}

/** The wall-clock reading in `timeZone` at the instant `utcMs`. */
export function wallTimeAt(utcMs: number, timeZone: string): WallTime {
  const parts = formatterFor(timeZone).formatToParts(new Date(utcMs));
  const get = (type: Intl.DateTimeFormatPartTypes) => Number(parts.find((p) => p.type === type)?.value ?? NaN);
  return { year: get('year'), month: get('month'), day: get('day'), hour: get('hour') % 24, minute: get('minute'), second: get('second') };
}

function wallAsUtcMs(w: WallTime): number {
  const d = new Date(0);
  d.setUTCFullYear(w.year, w.month - 1, w.day);
  d.setUTCHours(w.hour, w.minute, w.second, 0);
  return d.getTime();
}

/** Offset of the zone from UTC at the instant, in minutes (east positive: Europe/Berlin in summer is +120). */
export function offsetMinutesAt(utcMs: number, timeZone: string): number {
  const whole = Math.floor(utcMs / 1000) * 1000;
  return Math.round((wallAsUtcMs(wallTimeAt(whole, timeZone)) - whole) / 60_000);
}

/** "+02:00", "-05:00", "+05:45", "+00:00". */
export function formatOffset(minutes: number): string {
  const sign = minutes < 0 ? '-' : '+';
  const m = Math.abs(minutes);
  return `${sign}${String(Math.floor(m / 60)).padStart(2, '0')}:${String(m % 60).padStart(2, '0')}`;
}

export type ZonedResult =
  | { ok: true; utcMs: number; iso: string; offsetMinutes: number; ambiguous: boolean }
  | { ok: false; error: string };

/** Parse "YYYY-MM-DDTHH:mm" or "YYYY-MM-DDTHH:mm:ss" (what <input type="datetime-local"> gives). */
export function parseLocalInput(value: string): WallTime | null {
  const m = /^(\d{4})-(\d{2})-(\d{2})T(\d{2}):(\d{2})(?::(\d{2})(?:\.\d+)?)?$/.exec(value.trim());
  if (!m) return null;
  const w = { year: +m[1], month: +m[2], day: +m[3], hour: +m[4], minute: +m[5], second: m[6] ? +m[6] : 0 };
  if (w.month < 1 || w.month > 12 || w.day < 1 || w.day > 31 || w.hour > 23 || w.minute > 59 || w.second > 59) return null;
  // reject 31 April and the like
  const check = new Date(wallAsUtcMs(w));
  if (check.getUTCDate() !== w.day || check.getUTCMonth() !== w.month - 1) return null;
  return w;
}

function sameWall(a: WallTime, b: WallTime): boolean {
  return a.year === b.year && a.month === b.month && a.day === b.day && a.hour === b.hour && a.minute === b.minute && a.second === b.second;
}

/** The UTC instant of a wall-clock time in a zone. */
export function zonedToUtc(w: WallTime, timeZone: string): ZonedResult {
  if (!isValidTimeZone(timeZone)) return { ok: false, error: `Unknown time zone "${timeZone}"` };
  const local = wallAsUtcMs(w);
  // candidates from the offsets a day either side (covers every transition of the day)
  const offsets = new Set([offsetMinutesAt(local - 86_400_000, timeZone), offsetMinutesAt(local, timeZone), offsetMinutesAt(local + 86_400_000, timeZone)]);
  const hits: { utcMs: number; offsetMinutes: number }[] = [];
  for (const off of offsets) {
    const utcMs = local - off * 60_000;
    if (sameWall(wallTimeAt(utcMs, timeZone), w) && !hits.some((h) => h.utcMs === utcMs)) hits.push({ utcMs, offsetMinutes: off });
  }
  if (hits.length === 0) {
    return { ok: false, error: `${formatWall(w)} does not exist in ${timeZone} (the clocks skip it); choose another time.` };
  }
  hits.sort((a, b) => a.utcMs - b.utcMs);
  const first = hits[0];
  return { ok: true, utcMs: first.utcMs, iso: new Date(first.utcMs).toISOString(), offsetMinutes: first.offsetMinutes, ambiguous: hits.length > 1 };
}

function pad(n: number, w = 2): string {
  return String(n).padStart(w, '0');
}

/** "2034-09-10 09:00:00" */
export function formatWall(w: WallTime, seconds = true): string {
  return `${pad(w.year, 4)}-${pad(w.month)}-${pad(w.day)} ${pad(w.hour)}:${pad(w.minute)}${seconds ? `:${pad(w.second)}` : ''}`;
}

/** The value for <input type="datetime-local" step="1"> showing `utcMs` in the zone. */
export function toLocalInput(utcMs: number, timeZone: string): string {
  const w = wallTimeAt(utcMs, timeZone);
  return `${pad(w.year, 4)}-${pad(w.month)}-${pad(w.day)}T${pad(w.hour)}:${pad(w.minute)}:${pad(w.second)}`;
}

/** "2034-09-10 09:00:00 Europe/Berlin (UTC+02:00)" */
export function formatInZone(iso: string, timeZone: string, seconds = true): string {
  const ms = Date.parse(iso);
  if (!Number.isFinite(ms)) return iso;
  return `${formatWall(wallTimeAt(ms, timeZone), seconds)} ${timeZone} (UTC${formatOffset(offsetMinutesAt(ms, timeZone))})`;
}

/** "2034-09-10 07:00:00 UTC" */
export function formatUtcInstant(iso: string, seconds = true): string {
  const ms = Date.parse(iso);
  if (!Number.isFinite(ms)) return iso;
  return `${formatWall(wallTimeAt(ms, 'UTC'), seconds)} UTC`;
}
