/**
 * `assess` command (issue 4 item 8): JSON on stdout, errors as {"error":{...}} with a non-zero exit, covariance
 * refusal naming the eigenvalue and direction (METHODS.md §6.1), repair only on request.
 */
import { mkdtempSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { describe, expect, it } from 'vitest';
import { runCli } from '../../server/engine/cli';
import { syntheticSolution } from './engine-assess-fixtures';

const dir = mkdtempSync(join(tmpdir(), 'tocsin-assess-'));
function write(name: string, corr: number | null): string {
  const { solution: s } = syntheticSolution({ xiKm: 30000, zetaKm: 0 });
  const cov = { parameters: s.covariance!.parameters, matrix: s.covariance!.matrix.map((r) => [...r]) };
  if (corr !== null) cov.matrix[0][1] = cov.matrix[1][0] = corr * cov.matrix[0][0];
  const p = join(dir, name);
  writeFileSync(p, JSON.stringify({ designation: 'SYN-CLI', epoch: `JD:${s.epochTdbJd}`, cartesian: { positionAu: s.positionAu, velocityAuD: s.velocityAuD }, covariance: cov, hMagnitude: 22 }));
  return p;
}

describe('engine CLI assess', () => {
  it('prints the assessment JSON for a valid solution', async () => {
    const r = await runCli(['assess', write('ok.json', null), '--until', 'TDB:2030-03-01T00:00:00', '--analysis-date', '2029-11-01T00:00:00Z']);
    expect(r.exitCode).toBe(0);
    expect(r.stderr).toBe('');
    const out = JSON.parse(r.stdout);
    expect(out.object).toBe('SYN-CLI');
    expect(out.analysisDateUtc).toBe('2029-11-01T00:00:00.000Z');
    expect(out.approaches).toHaveLength(1);
    expect(out.approaches[0].impactProbability.linear).toBeLessThan(1e-100);
    expect(out.provenance.inputSha256).toMatch(/^[0-9a-f]{64}$/);
  });

  it('refuses a non-positive-definite covariance on stderr with exit 1, naming eigenvalue and direction', async () => {
    const r = await runCli(['assess', write('bad.json', 1.5), '--until', 'TDB:2030-03-01T00:00:00']);
    expect(r.exitCode).toBe(1);
    expect(r.stdout).toBe('');
    const e = JSON.parse(r.stderr).error;
    expect(e.code).toBe('INVALID_INPUT');
    expect(e.message).toMatch(/eigenvalue -5\.000e-1 .*along \+0\.707 x -0\.707 y/);
  });

  it('repairs a round-off-level defect only with --repair-covariance and reports it', async () => {
    const f = write('tiny.json', 1 + 1e-9);
    const refused = await runCli(['assess', f, '--until', 'TDB:2030-03-01T00:00:00']);
    expect(refused.exitCode).toBe(1);
    const ok = await runCli(['assess', f, '--until', 'TDB:2030-03-01T00:00:00', '--repair-covariance']);
    expect(ok.exitCode).toBe(0);
    expect(JSON.parse(ok.stdout).covariance.repair.clippedCount).toBeGreaterThanOrEqual(1);
  });

  it('usage errors exit 2', async () => {
    const r = await runCli(['assess', write('u.json', null), '--until', 'TDB:2030-03-01T00:00:00', '--method', 'guess']);
    expect(r.exitCode).toBe(2);
    expect(JSON.parse(r.stderr).error.code).toBe('USAGE');
  });
});
