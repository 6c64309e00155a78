// The object-list summary columns from one finished run's assess JSON (pure; no database).
//  - nextCloseApproachAt: the earliest nominal close approach at or after the analysis date (any monitored body);
//  - maxImpactProbability: the largest rating probability over the approaches and the other (MC/LOV) windows not
//    before the analysis date, each taken from the method the engine used for its ratings ("ratingProbabilitySource");
//  - cumulativePalermo, maxTorino: the engine's own figures.
type Ip = { linear?: number | null; monteCarlo?: { estimate?: number | null } | null; lov?: number | null } | null | undefined;
type Rated = { utc?: string; impactProbability?: Ip; ratingProbabilitySource?: string | null };

export interface ObjectRiskSummary {
  nextCloseApproachAt: Date | null;
  maxImpactProbability: number | null;
  cumulativePalermo: number | null;
  maxTorino: number | null;
}

/** The probability the engine rated this approach with (null when it had none). */
export function ratingProbability(a: Rated): number | null {
  const ip = a.impactProbability;
  if (!ip) return null;
  const src = a.ratingProbabilitySource ?? null;
  const pick = (v: number | null | undefined) => (typeof v === 'number' && Number.isFinite(v) ? v : null);
  if (src === null) return null;
  if (src.startsWith('linear')) return pick(ip.linear);
  if (src === 'monteCarlo') return pick(ip.monteCarlo?.estimate);
  if (src === 'lov') return pick(ip.lov);
  return null;
}

export function objectRiskSummary(result: Record<string, unknown>): ObjectRiskSummary {
  const approaches = (Array.isArray(result.approaches) ? result.approaches : []) as Rated[];
  const others = (Array.isArray(result.otherWindows) ? result.otherWindows : []) as Rated[];
  const analysisMs = typeof result.analysisDateUtc === 'string' ? Date.parse(result.analysisDateUtc) : Number.NaN;
  let next: number | null = null;
  for (const a of approaches) {
    const t = typeof a.utc === 'string' ? Date.parse(a.utc) : Number.NaN;
    if (!Number.isFinite(t) || (Number.isFinite(analysisMs) && t < analysisMs)) continue;
    if (next === null || t < next) next = t;
  }
  let maxIp: number | null = null;
  for (const a of [...approaches, ...others]) {
    const t = typeof a.utc === 'string' ? Date.parse(a.utc) : Number.NaN;
    if (Number.isFinite(t) && Number.isFinite(analysisMs) && t < analysisMs) continue; // already past
    const p = ratingProbability(a);
    if (p !== null && (maxIp === null || p > maxIp)) maxIp = p;
  }
  const num = (v: unknown) => (typeof v === 'number' && Number.isFinite(v) ? v : null);
  const torino = num(result.torinoMax);
  return {
    nextCloseApproachAt: next === null ? null : new Date(next),
    maxImpactProbability: maxIp,
    cumulativePalermo: num(result.palermoCumulative),
    maxTorino: torino === null ? null : Math.round(torino),
  };
}
