// The encounter table of an assessment run as plain rows (raw numbers with units in the column names, and the
// source of every figure), for the client table, CSV/JSON exports and later the PDF. Pure.
import type { AssessmentResult } from '../schemas/assessment';
import { describeImpactProbability } from '../format';

/** Where the numbers come from: the run, its solution version and the engine. */
export type ResultSource = {
  runId: number;
  objectDesignation: string;
  solutionVersion: number;
  inputSha256: string;
  engineVersion: string | null;
  methods: string[];
};

export type EncounterRow = {
  /** 'approach': a nominal close approach (index into result.approaches); 'window': a Monte Carlo/LOV window without one. */
  kind: 'approach' | 'window';
  index: number;
  body: string;
  utc: string;
  /** The UTC is a prediction (future leap seconds unknown; the engine's utcPredicted). */
  utcPredicted: boolean;
  epochTdbJd: number;
  /** 1-sigma of the encounter time from the linear method, seconds (null without it). */
  timeSigmaSeconds: number | null;
  distanceKm: number | null;
  distance3SigmaKm: [number, number] | null;
  relativeSpeedKmS: number | null;
  vInfinityKmS: number | null;
  ip: number | null;
  ipLow95: number | null;
  ipHigh95: number | null;
  /** One-sided 95% upper bound when Monte Carlo had no hits and nothing else rated the approach. */
  ipUpperBound95: number | null;
  ipText: string;
  ipMethod: string | null;
  ipMethodDetail: string | null;
  ipOdds: string | null;
  ipLinear: number | null;
  ipMonteCarlo: number | null;
  ipMonteCarloHits: number | null;
  ipMonteCarloSamples: number | null;
  ipMonteCarloCi95: [number, number] | null;
  ipMonteCarloUpperBound95: number | null;
  ipLov: number | null;
  palermo: number | null;
  torino: number | null;
  energyMt: { nominal: number | null; low: number | null; high: number | null };
  methodFlags: string[];
  linearValid: boolean | null;
  /** The nominal orbit reaches the surface at this approach. */
  impact: boolean;
  /** The minimum is at an end of the window (the true closest approach may lie outside it). */
  windowEdge: boolean;
};

type ImpactProbabilityInput = NonNullable<Parameters<typeof describeImpactProbability>[0]>;
type ProbabilityColumns = Pick<
  EncounterRow,
  | 'ip' | 'ipLow95' | 'ipHigh95' | 'ipUpperBound95' | 'ipText' | 'ipMethod' | 'ipMethodDetail' | 'ipOdds' | 'ipLinear'
  | 'ipMonteCarlo' | 'ipMonteCarloHits' | 'ipMonteCarloSamples' | 'ipMonteCarloCi95' | 'ipMonteCarloUpperBound95' | 'ipLov'
>;

/** The impact-probability columns of a row: the rated figure with its interval or bound, and every method's own. */
function probabilityColumns(ip: ImpactProbabilityInput, ratingSource: string | null): ProbabilityColumns {
  const s = describeImpactProbability(ip, ratingSource);
  const mc = ip.monteCarlo;
  return {
    ip: s.value,
    ipLow95: s.method === 'Monte Carlo' ? s.low : null,
    ipHigh95: s.method === 'Monte Carlo' && s.value !== null ? s.high : null,
    ipUpperBound95: s.value === null && s.high !== null ? s.high : null,
    ipText: s.text,
    ipMethod: s.method,
    ipMethodDetail: s.methodDetail,
    ipOdds: s.odds,
    ipLinear: ip.linear,
    ipMonteCarlo: mc?.estimate ?? null,
    ipMonteCarloHits: mc?.hits ?? null,
    ipMonteCarloSamples: mc?.samples ?? null,
    ipMonteCarloCi95: mc?.ci95 ? [mc.ci95[0], mc.ci95[1]] : null,
    ipMonteCarloUpperBound95: mc?.upperBound95 ?? null,
    ipLov: ip.lov,
  };
}

/** Every approach, then every window found by Monte Carlo or LOV alone, in time order within each group. */
export function encounterRows(result: AssessmentResult): EncounterRow[] {
  const rows: EncounterRow[] = result.approaches.map((a, i) => {
    return {
      kind: 'approach',
      index: i,
      body: a.body,
      utc: a.utc,
      utcPredicted: a.utcPredicted === true,
      epochTdbJd: a.epochTdbJd,
      timeSigmaSeconds: a.encounterTime?.sigmaSeconds ?? null,
      distanceKm: a.distanceKm,
      distance3SigmaKm: a.distanceRangeKm ? [a.distanceRangeKm.threeSigma[0], a.distanceRangeKm.threeSigma[1]] : null,
      relativeSpeedKmS: a.relativeSpeedKmS,
      vInfinityKmS: a.vInfinityKmS,
      ...probabilityColumns(a.impactProbability, a.ratingProbabilitySource ?? null),
      palermo: a.palermo,
      torino: a.torino,
      energyMt: { nominal: a.energyMt.nominal, low: a.energyMt.low, high: a.energyMt.high },
      methodFlags: a.methodFlags ?? [],
      linearValid: a.linearValidity?.valid ?? null,
      impact: a.impact,
      windowEdge: a.windowEdge === true,
    };
  });
  (result.otherWindows ?? []).forEach((w, i) => {
    rows.push({
      kind: 'window',
      index: i,
      body: w.body,
      utc: w.utc,
      utcPredicted: true,
      epochTdbJd: w.epochTdbJd,
      timeSigmaSeconds: null,
      distanceKm: w.minDistanceKm ? w.minDistanceKm.median : null,
      distance3SigmaKm: w.minDistanceKm ? [w.minDistanceKm.min, w.minDistanceKm.max] : null,
      relativeSpeedKmS: null,
      vInfinityKmS: w.vInfinityKmS,
      ...probabilityColumns(w.impactProbability, w.ratingProbabilitySource ?? null),
      palermo: w.palermo,
      torino: w.torino,
      energyMt: { nominal: w.energyMt.nominal, low: w.energyMt.low, high: w.energyMt.high },
      methodFlags: w.methodFlags ?? [],
      linearValid: null,
      impact: false,
      windowEdge: false,
    });
  });
  return rows;
}

/** CSV columns: name (units in the name) and how to read the value from a row. */
const CSV_COLUMNS: [string, (r: EncounterRow, s: ResultSource, res: AssessmentResult) => string | number | null][] = [
  ['run_id', (_r, s) => s.runId],
  ['object', (_r, s) => s.objectDesignation],
  ['solution_version', (_r, s) => s.solutionVersion],
  ['solution_sha256', (_r, s) => s.inputSha256],
  ['engine_version', (_r, s) => s.engineVersion],
  ['row_kind', (r) => r.kind],
  ['body', (r) => r.body],
  ['date_utc', (r) => r.utc],
  ['epoch_tdb_jd', (r) => r.epochTdbJd],
  ['time_sigma_s', (r) => r.timeSigmaSeconds],
  ['distance_km', (r) => r.distanceKm],
  ['distance_3sigma_low_km', (r) => r.distance3SigmaKm?.[0] ?? null],
  ['distance_3sigma_high_km', (r) => r.distance3SigmaKm?.[1] ?? null],
  ['relative_speed_km_s', (r) => r.relativeSpeedKmS],
  ['v_infinity_km_s', (r) => r.vInfinityKmS],
  ['impact_probability', (r) => r.ip],
  ['impact_probability_low95', (r) => r.ipLow95],
  ['impact_probability_high95', (r) => r.ipHigh95],
  ['impact_probability_upper_bound95', (r) => r.ipUpperBound95],
  ['impact_probability_method', (r) => r.ipMethod],
  ['ip_linear', (r) => r.ipLinear],
  ['ip_monte_carlo', (r) => r.ipMonteCarlo],
  ['ip_monte_carlo_hits', (r) => r.ipMonteCarloHits],
  ['ip_monte_carlo_samples', (r) => r.ipMonteCarloSamples],
  ['ip_monte_carlo_low95', (r) => r.ipMonteCarloCi95?.[0] ?? null],
  ['ip_monte_carlo_high95', (r) => r.ipMonteCarloCi95?.[1] ?? null],
  ['ip_monte_carlo_upper_bound95', (r) => r.ipMonteCarloUpperBound95],
  ['ip_lov', (r) => r.ipLov],
  ['palermo', (r) => r.palermo],
  ['torino', (r) => r.torino],
  ['energy_mt_nominal', (r) => r.energyMt.nominal],
  ['energy_mt_low', (r) => r.energyMt.low],
  ['energy_mt_high', (r) => r.energyMt.high],
  ['diameter_m_nominal', (_r, _s, res) => res.diameterM.nominal],
  ['diameter_m_low', (_r, _s, res) => res.diameterM.low],
  ['diameter_m_high', (_r, _s, res) => res.diameterM.high],
  ['nominal_impact', (r) => String(r.impact)],
  ['window_edge', (r) => String(r.windowEdge)],
  ['linear_valid', (r) => (r.linearValid === null ? null : String(r.linearValid))],
  ['method_flags', (r) => r.methodFlags.join('; ')],
];

/** One CSV field (RFC 4180: quoted when it holds a comma, quote or line break; quotes doubled). */
export function csvField(v: string | number | null): string {
  if (v === null || v === undefined) return '';
  const s = typeof v === 'number' ? (Number.isFinite(v) ? String(v) : '') : v;
  return /[",\r\n]/.test(s) ? `"${s.replace(/"/g, '""')}"` : s;
}

/** The encounter table as CSV (RFC 4180, CRLF line ends, full-precision numbers, one header line). */
export function encounterCsv(result: AssessmentResult, source: ResultSource): string {
  const lines = [CSV_COLUMNS.map(([name]) => name).join(',')];
  for (const r of encounterRows(result)) lines.push(CSV_COLUMNS.map(([, get]) => csvField(get(r, source, result))).join(','));
  return lines.join('\r\n') + '\r\n';
}

/** The tables as JSON: source, object-level figures, the encounter rows and the consequence assumptions. */
export function resultTablesJson(result: AssessmentResult, source: ResultSource): Record<string, unknown> {
  return {
    format: 'tocsin-result-tables/1',
    source,
    object: result.object,
    analysisDateUtc: result.analysisDateUtc,
    palermoCumulative: result.palermoCumulative,
    torinoMax: result.torinoMax,
    diameterM: result.diameterM,
    encounters: encounterRows(result),
    consequenceAssumptions: result.methodNotes?.consequences ?? null,
  };
}
