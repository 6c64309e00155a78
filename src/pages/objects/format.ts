// Number and date formatting for the object pages (UTC, units beside the values).

export function formatUtc(iso: string | null): string {
  if (!iso) return '—';
  const d = new Date(iso);
  if (Number.isNaN(d.getTime())) return iso;
  return d.toISOString().slice(0, 16).replace('T', ' ') + ' UTC';
}

export function formatDateUtc(iso: string | null): string {
  return iso ? formatUtc(iso).slice(0, 10) : '—';
}

/** A number with `digits` significant digits; exponent form for very small or large magnitudes. */
export function formatNumber(x: number | null | undefined, digits = 6): string {
  if (x === null || x === undefined || !Number.isFinite(x)) return '—';
  if (x === 0) return '0';
  const a = Math.abs(x);
  if (a < 1e-3 || a >= 1e7) {
    const [m, e] = Number(x.toPrecision(digits)).toExponential().split('e');
    return `${m}×10${superscript(e.replace('+', ''))}`;
  }
  return Number(x.toPrecision(digits)).toString();
}

/** Always in scientific notation with `digits` significant digits (columns of uncertainties read alike). */
export function formatScientific(x: number | null | undefined, digits = 3): string {
  if (x === null || x === undefined || !Number.isFinite(x)) return '—';
  if (x === 0) return '0';
  const [m, e] = x.toExponential(digits - 1).split('e');
  return e === '+0' ? m : `${m}×10${superscript(e.replace('+', ''))}`;
}

export function formatSigma(x: number | null | undefined): string {
  return x === null || x === undefined ? '—' : `± ${formatNumber(x, 3)}`;
}

export function formatRatio(r: number | null): string {
  return r === null ? '—' : `×${r >= 10 ? r.toFixed(0) : r.toFixed(2)}`;
}

const SUPERSCRIPT: Record<string, string> = { '-': '⁻', '0': '⁰', '1': '¹', '2': '²', '3': '³', '4': '⁴', '5': '⁵', '6': '⁶', '7': '⁷', '8': '⁸', '9': '⁹' };
function superscript(s: string): string {
  return [...s].map((c) => SUPERSCRIPT[c] ?? c).join('');
}
