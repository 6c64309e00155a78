/**
 * A locked bulletin version for the PDF tests (not a test file itself), built on a REAL engine result: assess() with
 * the linear method on the synthetic encounter of tests/unit/engine-assess-fixtures.ts (an invented object aimed at
 * xi = 30,000 km, zeta = 12,000 km with a wide covariance, so the linear impact probability is small but not zero).
 * Figure snapshots come from shared/bulletins/figures.ts extractFigure, as the bulletin service freezes them.
 */
import { createHash } from 'node:crypto';
import { crc32, deflateSync } from 'node:zlib';
import { assess } from '../../server/engine/assess';
import type { BulletinVersionForPdf } from '../../server/services/pdf';
import type { DocNode, FigureQuantity, LinkedFigureAttrs } from '../../shared/bulletins/document';
import { linkedFigures } from '../../shared/bulletins/document';
import { extractFigure, type RunRef } from '../../shared/bulletins/figures';
import { ENCOUNTER_TDB_DAYS, fixtureEphemeris, syntheticSolution } from '../unit/engine-assess-fixtures';

export const RUN_ID = 41;
const RUN_REF: RunRef = { runId: RUN_ID, solutionId: 7, solutionVersion: 3, inputSha256: '' };

let memo: Promise<Record<string, unknown>> | null = null;
/** The engine result, computed once per process (a copy each time). */
export async function engineResult(): Promise<Record<string, unknown>> {
  memo ??= computeEngineResult();
  return structuredClone(await memo);
}

async function computeEngineResult(): Promise<Record<string, unknown>> {
  const { solution } = syntheticSolution({
    xiKm: 30000,
    zetaKm: 12000,
    sigmaAlongTrackAuD: 2e-9,
    sigmaPositionAu: 3e-5,
    sigmaVelocityAuD: 1e-7,
    designation: 'X26-KAPPA',
  });
  const result = await assess(
    solution,
    { untilTdbDays: ENCOUNTER_TDB_DAYS + 20, methods: ['linear'], clones: 100, seed: 1, bodies: ['earth'], maxAu: 0.05, analysisTdbDays: solution.epochTdbDays },
    { ephemeris: fixtureEphemeris() },
  );
  // Timings differ between runs of the engine; a stored run result is one fixed JSON, so drop them here.
  const prov = result.provenance as Record<string, unknown>;
  delete prov.timings;
  return JSON.parse(JSON.stringify(result)) as Record<string, unknown>;
}

/** A small PNG (48 x 24 px, RGB gradient) built here, for the image node (PNG spec: signature, IHDR, IDAT, IEND). */
export function gradientPng(): Buffer {
  const w = 48, h = 24;
  const raw = Buffer.alloc((w * 3 + 1) * h);
  for (let y = 0; y < h; y++) {
    raw[y * (w * 3 + 1)] = 0; // filter: none
    for (let x = 0; x < w; x++) {
      const o = y * (w * 3 + 1) + 1 + x * 3;
      raw[o] = Math.round((255 * x) / (w - 1));
      raw[o + 1] = Math.round((255 * y) / (h - 1));
      raw[o + 2] = 128;
    }
  }
  const chunk = (type: string, data: Buffer) => {
    const len = Buffer.alloc(4);
    len.writeUInt32BE(data.length);
    const td = Buffer.concat([Buffer.from(type, 'latin1'), data]);
    const crc = Buffer.alloc(4);
    crc.writeUInt32BE(crc32(td));
    return Buffer.concat([len, td, crc]);
  };
  const ihdr = Buffer.alloc(13);
  ihdr.writeUInt32BE(w, 0);
  ihdr.writeUInt32BE(h, 4);
  ihdr[8] = 8; // bit depth
  ihdr[9] = 2; // colour type: RGB
  return Buffer.concat([Buffer.from([0x89, 0x50, 0x4e, 0x47, 0x0d, 0x0a, 0x1a, 0x0a]), chunk('IHDR', ihdr), chunk('IDAT', deflateSync(raw)), chunk('IEND', Buffer.alloc(0))]);
}

const t = (text: string, marks: string[] = []): DocNode => ({ type: 'text', text, ...(marks.length ? { marks: marks.map((m) => ({ type: m as 'bold' })) } : {}) });
const p = (...content: DocNode[]): DocNode => ({ type: 'paragraph', content });
const li = (...content: DocNode[]): DocNode => ({ type: 'listItem', content: [p(...content)] });

/** Canonical JSON (keys sorted, no whitespace) for the fixture's hash; the service's canonical.ts does the same. */
function canonical(v: unknown): string {
  if (Array.isArray(v)) return `[${v.map(canonical).join(',')}]`;
  if (v && typeof v === 'object') {
    return `{${Object.keys(v)
      .sort()
      .filter((k) => (v as Record<string, unknown>)[k] !== undefined)
      .map((k) => `${JSON.stringify(k)}:${canonical((v as Record<string, unknown>)[k])}`)
      .join(',')}}`;
  }
  return JSON.stringify(v);
}

export async function bulletinVersionFixture(opts: { longBody?: boolean } = {}): Promise<{ version: BulletinVersionForPdf; result: Record<string, unknown> }> {
  const result = await engineResult();
  const approach = (result.approaches as { body: string; epochTdbJd: number }[])[0];
  const ref = { ...RUN_REF, inputSha256: String((result.provenance as Record<string, unknown>).inputSha256) };
  const fig = (quantity: FigureQuantity, objectLevel = false): DocNode => ({
    type: 'linkedFigure',
    attrs: { runId: RUN_ID, quantity, body: objectLevel ? null : approach.body, epochTdbJd: objectLevel ? null : approach.epochTdbJd },
  });

  const content: DocNode[] = [
    { type: 'heading', attrs: { level: 2 }, content: [t('What is known')] },
    p(
      t('The exercise object X26-KAPPA passes the Earth on '),
      fig('encounterDate'),
      t(' at a nominal distance of '),
      fig('missDistance'),
      t('. The '),
      t('impact probability', ['bold']),
      t(' from the linear method is '),
      fig('impactProbability'),
      t(', Palermo '),
      fig('palermo'),
      t(', Torino '),
      fig('torino'),
      t('.'),
    ),
    p(
      t('Its size is '),
      fig('diameter', true),
      t('; an impact would release '),
      fig('energy'),
      t(' at '),
      fig('vInfinity'),
      t(' (v-infinity). In short: p ≈ 2e-7, well ≤ 1e-6; the 1σ ellipse is wide and the chance is not ∞-small but small. '),
      t('Italic note on the method.', ['italic']),
    ),
    { type: 'heading', attrs: { level: 3 }, content: [t('What is not known')] },
    {
      type: 'bulletList',
      content: [
        li(t('The albedo: the diameter range spans 0.05–0.25.')),
        li(t('Non-gravitational forces were not modelled for this object.')),
      ],
    },
    {
      type: 'orderedList',
      attrs: { start: 1 },
      content: [li(t('New astrometry within two weeks.')), li(t('A radar observation would shrink the ellipse by a factor ~10.'))],
    },
    p(
      t('Method notes: '),
      { type: 'text', text: 'see the office handbook', marks: [{ type: 'link', attrs: { href: 'https://example.org/handbook' } }] },
      t('.'),
    ),
    {
      type: 'table',
      content: [
        { type: 'tableRow', content: [{ type: 'tableHeader', content: [p(t('Quantity'))] }, { type: 'tableHeader', content: [p(t('Value'))] }] },
        { type: 'tableRow', content: [{ type: 'tableCell', content: [p(t('Impact probability'))] }, { type: 'tableCell', content: [p(fig('impactProbability'))] }] },
        { type: 'tableRow', content: [{ type: 'tableCell', content: [p(t('Cumulative Palermo'))] }, { type: 'tableCell', content: [p(fig('palermoCumulative', true))] }] },
      ],
    },
    { type: 'riskTable', attrs: { runId: RUN_ID } },
    { type: 'plot', attrs: { runId: RUN_ID, kind: 'bplane', body: approach.body, epochTdbJd: approach.epochTdbJd } },
    { type: 'plot', attrs: { runId: RUN_ID, kind: 'distance', body: approach.body, epochTdbJd: approach.epochTdbJd } },
    { type: 'image', attrs: { src: `data:image/png;base64,${gradientPng().toString('base64')}`, alt: 'Exercise finder chart' } },
    { type: 'image', attrs: { src: 'https://example.org/chart.png', alt: 'Remote chart' } },
    { type: 'heading', attrs: { level: 3 }, content: [t('What would change the assessment')] },
    p(t('Observations in the coming weeks will shrink the uncertainty; the office will issue a new version when they do.')),
  ];
  if (opts.longBody) {
    for (let i = 0; i < 40; i++) content.push(p(t(`Paragraph ${i + 1} of a long bulletin. `.repeat(12))));
  }
  const document = { type: 'doc' as const, content };
  const figures = linkedFigures(document).map(({ index, attrs }: { index: number; attrs: LinkedFigureAttrs }) => ({
    index,
    attrs,
    value: extractFigure(result, ref, attrs),
  }));
  const contentHashed = {
    bulletinId: 3,
    number: 'XO-B-0007',
    version: 2,
    title: 'Close approach of X26-KAPPA in February 2030',
    objectId: 11,
    objectDesignation: 'X26-KAPPA',
    document,
    figures,
    runIds: [RUN_ID],
    author: { id: 5, name: 'Ada Quill' },
    signOff: {
      reviewer: { id: 6, name: 'Brann Okoro' },
      comment: 'Checked the linear IP against the b-plane plot; σ and ≈ render.',
      confirmedFigures: figures.filter((f) => ['impactProbability', 'palermo', 'torino', 'energy', 'palermoCumulative'].includes(f.attrs.quantity)).map((f) => ({ index: f.index, runId: RUN_ID, quantity: f.attrs.quantity })),
      approvedAt: '2026-11-30T14:05:09.000Z',
    },
    staleReason: null,
  };
  const sha256 = createHash('sha256').update(canonical(contentHashed)).digest('hex');
  const version: BulletinVersionForPdf = {
    ...contentHashed,
    status: 'approved',
    sha256,
    createdAt: '2026-11-30T14:05:09.000Z',
    officeName: 'Exercise Planetary Defence Office',
    objectName: 'Exercise object Kappa',
    distributionMarking: 'OFFICIAL – for government liaisons and partner offices',
    runs: { [String(RUN_ID)]: { runId: RUN_ID, result } },
  };
  return { version, result };
}

// Run as a script (`node --import tsx tests/api/bulletinPdfFixture.ts OUT.pdf`): render the fixture in a separate
// process, so a test can compare bytes across processes, time zones and locales.
if (process.argv[1] && /bulletinPdfFixture\.ts$/.test(process.argv[1]) && process.argv[2]) {
  const { renderBulletinPdf } = await import('../../server/services/pdf');
  const { writeFileSync } = await import('node:fs');
  const { version } = await bulletinVersionFixture();
  writeFileSync(process.argv[2], await renderBulletinPdf(version));
}
