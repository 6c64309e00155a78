// assess() with the Monte Carlo method: the encounter row carries the Monte Carlo sample and the window's b-plane
// points for the plots (one point per clone that reached the encounter, hits marked), consistent with the counts.
// Case: the demo asteroid's OPM (invented object, built with the engine to pass 26,000 km from Earth in 2034).
import { readFileSync } from 'node:fs';
import { describe, expect, it } from 'vitest';
import { assess } from '../../server/engine/assess';
import { loadOrbitSolution } from '../../server/engine/input/solution';
import { parseEpoch } from '../../server/engine/time';

describe('assess with Monte Carlo', () => {
  it('reports the sample and hands the window b-plane points to the plots', async () => {
    const solution = loadOrbitSolution(readFileSync('server/db/demo/hso-26-n4.opm', 'utf8'));
    const clones = 48;
    const result = (await assess(solution, {
      untilTdbDays: parseEpoch('2035-01-01T00:00:00Z').tdbDays,
      methods: ['mc'],
      clones,
      seed: 11,
      bodies: ['earth'],
      maxAu: 0.05,
      analysisTdbDays: parseEpoch('2026-12-01T00:00:00Z').tdbDays,
      workers: 0,
    })) as any;
    const a = result.approaches.find((x: any) => x.body === 'earth');
    expect(a).toBeDefined();
    const mc = a.impactProbability.monteCarlo;
    expect(mc.samples).toBe(clones);
    const points = a.monteCarloBPlanePoints as { xiKm: number; zetaKm: number; impact: boolean }[];
    expect(Array.isArray(points)).toBe(true);
    // Every clone of this well-determined orbit passes within 0.05 AU in 2034: one point per clone (cap 5000).
    expect(points.length).toBe(clones);
    expect(points.filter((p) => p.impact).length).toBe(mc.hits);
    // The cloud surrounds the nominal b-plane point: its mean is within a few of the cloud's own spreads.
    const mean = (k: 'xiKm' | 'zetaKm') => points.reduce((s, p) => s + p[k], 0) / points.length;
    const spread = (k: 'xiKm' | 'zetaKm') => Math.sqrt(points.reduce((s, p) => s + (p[k] - mean(k)) ** 2, 0) / points.length);
    for (const k of ['xiKm', 'zetaKm'] as const) {
      expect(Math.abs(mean(k) - a.bPlane[k])).toBeLessThan(4 * spread(k) / Math.sqrt(points.length) + 1000);
    }
  }, 180_000);
});
