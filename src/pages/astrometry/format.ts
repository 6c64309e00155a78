// Sexagesimal display of astrometric positions (RA in hours, Dec in degrees), UTC times to the second.

function sexagesimal(value: number, decimals: number): [number, number, string] {
  const scale = Math.pow(10, decimals);
  // round on the smallest unit first so 59.9999 s never prints as 60.000
  const total = Math.round(value * 3600 * scale);
  const whole = Math.floor(total / (3600 * scale));
  const minutes = Math.floor((total - whole * 3600 * scale) / (60 * scale));
  const seconds = (total - whole * 3600 * scale - minutes * 60 * scale) / scale;
  return [whole, minutes, seconds.toFixed(decimals).padStart(decimals > 0 ? 3 + decimals : 2, '0')];
}

/** RA in degrees as "hh mm ss.sss". */
export function formatRa(raDeg: number): string {
  const [h, m, s] = sexagesimal(((raDeg % 360) + 360) % 360 / 15, 3);
  return `${String(h % 24).padStart(2, '0')} ${String(m).padStart(2, '0')} ${s}`;
}

/** Dec in degrees as "±dd mm ss.ss". */
export function formatDec(decDeg: number): string {
  const [d, m, s] = sexagesimal(Math.abs(decDeg), 2);
  return `${decDeg < 0 ? '−' : '+'}${String(d).padStart(2, '0')} ${String(m).padStart(2, '0')} ${s}`;
}

/** ISO UTC instant as "YYYY-MM-DD hh:mm:ss.sss" (milliseconds kept when present). */
export function formatObsTime(iso: string): string {
  const ms = Date.parse(iso);
  if (!Number.isFinite(ms)) return iso;
  const s = new Date(ms).toISOString().replace('T', ' ').replace('Z', '');
  return s.endsWith('.000') ? s.slice(0, -4) : s;
}
