/**
 * The risk table of a bulletin PDF: the encounters of one frozen run result (the engine's assess JSON), one row per
 * nominal approach and per extra Monte Carlo / LOV window, with the figures formatted by shared/format.ts (the same
 * texts the client and the linked figures show).
 */
import {
  describeImpactProbability,
  formatDistance,
  formatDistanceRange,
  formatEnergyRange,
  formatPalermo,
  formatSpeedKmS,
  formatTorino,
  formatUtc,
  formatDiameterRange,
} from '../../../shared/format';
import { safeParseAssessment } from '../../../shared/schemas/assessment';
import { COLOR } from '../../../templates/pdf/layout';
import type { TableSpec } from './table';
import type { Run } from './text';

const WINDOW_SOURCE: Record<string, string> = { monteCarlo: 'MC', lov: 'LOV' };
const cap = (s: string) => (s ? s[0].toUpperCase() + s.slice(1) : s);

export function riskTableSpec(result: unknown): { table: TableSpec; notes: string[] } {
  const parsed = safeParseAssessment(result);
  if (!parsed.ok) {
    return {
      table: { shares: [1], header: null, rows: [[[{ text: `The frozen run result could not be read: ${parsed.error}`, italic: true }]]] },
      notes: [],
    };
  }
  const r = parsed.value;
  const header: Run[][] = ['Body', 'Encounter (UTC)', 'Nominal distance', 'V-infinity', 'Impact probability', 'Palermo', 'Torino', 'Impact energy'].map(
    (t) => [{ text: t }],
  );
  const rows: Run[][][] = [];
  for (const a of r.approaches) {
    const ip = describeImpactProbability(a.impactProbability, a.ratingProbabilitySource ?? null);
    const ipCell: Run[] = [{ text: ip.text }];
    // The method on its own line; the wording of its detail only where it carries numbers (Monte Carlo hits) or a
    // warning (linear not validated): the rest is the same on every row.
    if (ip.method) {
      const detail = ip.methodDetail && (ip.method === 'Monte Carlo' || /NOT/.test(ip.methodDetail)) ? `: ${ip.methodDetail}` : '';
      ipCell.push({ text: `\n${ip.method}${detail}`, color: /NOT/.test(ip.methodDetail ?? '') ? COLOR.accent : COLOR.muted });
    }
    const dist: Run[] = [{ text: formatDistance(a.distanceKm, 'km') }, { text: `\n${formatDistance(a.distanceKm, 'ld')}`, color: COLOR.muted }];
    if (a.distanceRangeKm?.threeSigma) {
      dist.push({ text: `\n3σ ${formatDistanceRange(a.distanceRangeKm.threeSigma, 'km')}`, color: COLOR.muted });
    }
    rows.push([
      [{ text: cap(a.body) }],
      [{ text: formatUtc(a.utc, { seconds: false }).replace(' UTC', '') }, ...(a.impact ? [{ text: '\nimpact (nominal)', bold: true, color: COLOR.accent }] : [])],
      dist,
      [{ text: formatSpeedKmS(a.vInfinityKmS) }],
      ipCell,
      [{ text: formatPalermo(a.palermo) }],
      [{ text: formatTorino(a.torino) }],
      [{ text: formatEnergyRange(a.energyMt) }],
    ]);
  }
  for (const w of r.otherWindows ?? []) {
    const ip = describeImpactProbability(w.impactProbability, w.ratingProbabilitySource ?? null);
    rows.push([
      [{ text: cap(w.body) }, { text: `\n${WINDOW_SOURCE[w.source] ?? w.source} window`, color: COLOR.muted }],
      [{ text: formatUtc(w.utc, { seconds: false }).replace(' UTC', '') }],
      [{ text: w.minDistanceKm ? `min ${formatDistance(w.minDistanceKm.min, 'km')}` : '—' }],
      [{ text: formatSpeedKmS(w.vInfinityKmS) }],
      [{ text: ip.text }, ...(ip.method ? [{ text: `\n${ip.method}${ip.method === 'Monte Carlo' && ip.methodDetail ? `: ${ip.methodDetail}` : ''}`, color: COLOR.muted }] : [])],
      [{ text: formatPalermo(w.palermo) }],
      [{ text: formatTorino(w.torino) }],
      [{ text: formatEnergyRange(w.energyMt) }],
    ]);
  }
  if (rows.length === 0) rows.push([[{ text: 'No close approach within the reporting threshold.', italic: true }], [], [], [], [], [], [], []]);
  const notes: string[] = [];
  notes.push(
    `Diameter ${formatDiameterRange(r.diameterM)}; cumulative Palermo ${formatPalermo(r.palermoCumulative)}; highest Torino ${formatTorino(r.torinoMax)}. ` +
      `Engine: ${String(r.provenance.engineVersion)}; input SHA-256 ${r.provenance.inputSha256.slice(0, 16)}…`,
  );
  for (const n of r.notes ?? []) notes.push(`Note: ${n}`);
  return {
    table: { shares: [0.7, 1.0, 1.75, 1.0, 1.4, 0.8, 0.7, 1.0], header, rows, align: ['left', 'left', 'left', 'right', 'left', 'right', 'right', 'left'] },
    notes,
  };
}
