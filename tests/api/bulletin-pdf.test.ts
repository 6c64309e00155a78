/**
 * Bulletin PDF (issue 6 items 5 and 8): renderBulletinPdf on a locked version whose figures, risk table and plots
 * come from a real engine result (assess() with the linear method on a synthetic encounter, tests/api/
 * bulletinPdfFixture.ts). The PDF is read back with poppler-utils (pdftotext, pdffonts, pdfinfo, pdftoppm), an
 * independent PDF reader, so the checks do not trust pdfkit's own view of what it wrote.
 */
import { execFileSync } from 'node:child_process';
import { mkdtempSync, readdirSync, readFileSync, rmSync, statSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import path from 'node:path';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { clearBulletinPdfCache, renderBulletinPdf, type BulletinVersionForPdf } from '../../server/services/pdf';
import { FontSet } from '../../server/services/pdf/fonts';
import { STANDING_CAUTION } from '../../templates/pdf/layout';
import PDFDocument from 'pdfkit';
import { bulletinVersionFixture } from './bulletinPdfFixture';

const dir = mkdtempSync(path.join(tmpdir(), 'tocsin-pdf-'));
afterAll(() => rmSync(dir, { recursive: true, force: true }));

function save(name: string, pdf: Buffer): string {
  const file = path.join(dir, name);
  writeFileSync(file, pdf);
  return file;
}
const run = (cmd: string, args: string[]) => execFileSync(cmd, args, { encoding: 'utf8' });
/** Text of a PDF (or of one page) with runs of whitespace as one space: wrapping must not matter. */
const text = (file: string, page?: number) =>
  run('pdftotext', [...(page ? ['-f', String(page), '-l', String(page)] : []), '-enc', 'UTF-8', file, '-']).replace(/\s+/g, ' ');
const pages = (file: string) => Number(/Pages:\s+(\d+)/.exec(run('pdfinfo', [file]))![1]);

let version: BulletinVersionForPdf;
let result: Record<string, unknown>;
let pdf: Buffer;
let file: string;

beforeAll(async () => {
  ({ version, result } = await bulletinVersionFixture());
  pdf = await renderBulletinPdf(version);
  file = save('bulletin.pdf', pdf);
});

describe('bulletin PDF content (read back with pdftotext)', () => {
  it('shows every linked figure as frozen in the version, and the figures are the engine result’s numbers', () => {
    const t = text(file);
    expect(version.figures.length).toBeGreaterThanOrEqual(8);
    for (const f of version.figures) expect(t).toContain(f.value.text);
    // Independent of the snapshot texts: the engine's own linear IP and Palermo value, printed the usual way
    // (IP in exponent notation with one decimal, Palermo with two decimals and a true minus sign; common practice,
    // no source).
    const a = (result.approaches as { impactProbability: { linear: number }; palermo: number; distanceKm: number }[])[0];
    expect(a.impactProbability.linear).toBeGreaterThan(0);
    expect(t).toContain(a.impactProbability.linear.toExponential(1).replace('e+', 'e'));
    expect(t).toContain(`−${Math.abs(a.palermo).toFixed(2)}`);
    expect(t).toContain(`${Math.round(a.distanceKm).toLocaleString('en-US')} km`);
  });

  it('has the title block, the risk table, the plots, the sign-off and the standing caution', () => {
    const t = text(file);
    expect(t).toContain(version.officeName.toUpperCase());
    expect(t).toContain(version.title);
    expect(t).toContain(`Bulletin ${version.number}, version ${version.version}`);
    expect(t).toContain('Approved 2026-11-30 14:05 UTC');
    expect(t).toContain(version.distributionMarking);
    expect(t).toContain(STANDING_CAUTION);
    // risk table header and the run it comes from
    expect(t).toContain('Encounters of X26-KAPPA (run 41');
    // the row of the run's one approach, read with the layout kept (columns side by side)
    const a = (result.approaches as { impactProbability: { linear: number }; palermo: number; torino: number; distanceKm: number; vInfinityKmS: number }[])[0];
    const layout = run('pdftotext', ['-layout', '-enc', 'UTF-8', '-f', '1', '-l', '1', file, '-']);
    const row = new RegExp(
      `Earth\\s+2030-02-12\\s+${Math.round(a.distanceKm).toLocaleString('en-US')} km\\s+${a.vInfinityKmS.toFixed(2)} km/s\\s+` +
        `${a.impactProbability.linear.toExponential(1)}\\s+−${Math.abs(a.palermo).toFixed(2)}\\s+${a.torino}\\s+\\d+ Mt`,
    );
    expect(layout).toMatch(/Body\s+Encounter\s+Nominal distance\s+V-infinity\s+Impact\s+Palermo\s+Torino\s+Impact/);
    expect(layout).toMatch(row);
    // plots drawn from the shared SVG renderers (their titles and legends are vector text in the PDF)
    expect(t).toContain('b-plane: X26-KAPPA');
    expect(t).toContain('capture disk');
    expect(t).toContain('Distance from Earth');
    // sign-off
    expect(t).toContain(`Approved by ${version.signOff.reviewer.name} on 2026-11-30 14:05 UTC`);
    expect(t).toContain(version.signOff.comment!);
    // each confirmed figure with its run, the run number right after the value (no gap after an en dash: pdfkit's
    // word-by-word line measure is corrected in text.ts)
    for (const c of version.signOff.confirmedFigures) {
      const f = version.figures.find((x) => x.index === c.index)!;
      expect(t).toContain(`[${c.index + 1}]`);
      expect(t).toContain(`${f.value.text}, run ${c.runId}`);
    }
    expect(version.figures.some((f) => f.value.text.includes('–') && version.signOff.confirmedFigures.some((c) => c.index === f.index))).toBe(true);
  });

  it('has a footer with the version hash and "page x of y" on every page', async () => {
    const long = (await bulletinVersionFixture({ longBody: true })).version;
    const f = save('long.pdf', await renderBulletinPdf(long));
    const n = pages(f);
    expect(n).toBeGreaterThanOrEqual(4);
    for (let i = 1; i <= n; i++) {
      const t = text(f, i);
      expect(t).toContain(`page ${i} of ${n}`);
      expect(t).toContain(`Version SHA-256 ${long.sha256}`);
      expect(t).toContain(STANDING_CAUTION);
    }
    // No paragraph leaves a single line at the bottom of a page or carries a single line over to the next
    // (the long fixture's paragraphs are four lines each): count each paragraph's lines per page.
    const perPage = Array.from({ length: n }, (_, i) =>
      run('pdftotext', ['-f', String(i + 1), '-l', String(i + 1), '-enc', 'UTF-8', f, '-'])
        .split('\n')
        .map((l) => /^Paragraph (\d+) of a long bulletin/.exec(l)?.[1])
        .filter((x): x is string => !!x),
    );
    for (let i = 1; i < n; i++) {
      const carried = perPage[i][0];
      if (carried === undefined || perPage[i - 1].at(-1) !== carried) continue;
      expect(perPage[i - 1].filter((x) => x === carried).length, `paragraph ${carried} at the foot of page ${i}`).toBeGreaterThanOrEqual(2);
      expect(perPage[i].filter((x) => x === carried).length, `paragraph ${carried} at the top of page ${i + 1}`).toBeGreaterThanOrEqual(2);
    }
    expect(perPage.flat().length).toBeGreaterThan(100);
  });

  it('sets symbols Merriweather lacks in fallback fonts (no "?" or empty boxes): ≈ ≤ σ ∞', () => {
    const t = text(file);
    // The fixture's sentence, as written in the document.
    expect(t).toContain('p ≈ 2e-7, well ≤ 1e-6; the 1σ ellipse is wide and the chance is not ∞-small');
    // The SVG legend's sigma went through the same fallback.
    expect(t).toContain('linear 1σ');
  });
});

describe('navigation and the stale-figure reason', () => {
  it('has bookmarks for the title and the headings, and declares its language', () => {
    // pdfkit writes outline items and the catalog as plain (uncompressed) objects; ASCII titles as literal strings.
    const raw = pdf.toString('latin1');
    for (const title of [version.title, 'What is known', 'What is not known', 'Review and sign-off']) expect(raw).toContain(`/Title (${title})`);
    expect(raw).toMatch(/\/Lang \(en\)/);
  });

  it('prints the author’s written reason when the version was submitted with out-of-date figures', async () => {
    const reason = 'A newer run only moved the encounter time by 40 s; figures left bound to run 41.';
    const f = save('stale.pdf', await renderBulletinPdf({ ...structuredClone(version), staleReason: reason }));
    const t = text(f);
    expect(t).toContain('Submitted with out-of-date figures.');
    expect(t).toContain(reason);
    expect(text(file)).not.toContain('Submitted with out-of-date figures');
  });
});

describe('document tables', () => {
  it('places cells with colspan and rowspan on the column grid and uses the editor’s column widths', async () => {
    const t = (text: string) => ({ type: 'text' as const, text });
    const cell = (text: string, attrs: Record<string, unknown> = {}, type: 'tableCell' | 'tableHeader' = 'tableCell') => ({
      type,
      attrs,
      content: [{ type: 'paragraph' as const, content: [t(text)] }],
    });
    const v = structuredClone(version);
    v.document = {
      type: 'doc',
      content: [
        {
          type: 'table',
          content: [
            { type: 'tableRow', content: [cell('Quantity', { colwidth: [200] }, 'tableHeader'), cell('Two methods', { colspan: 2, colwidth: [120, 120] }, 'tableHeader')] },
            { type: 'tableRow', content: [cell('Impact probability', { rowspan: 2 }), cell('2.0e-7'), cell('below 3e-4')] },
            { type: 'tableRow', content: [cell('linear'), cell('MonteCarlo')] },
            { type: 'tableRow', content: [cell('Palermo'), cell('both methods agree', { colspan: 2 })] },
          ],
        },
      ],
    };
    const f = save('spans.pdf', await renderBulletinPdf(v));
    const lines = run('pdftotext', ['-layout', '-enc', 'UTF-8', '-f', '1', '-l', '1', f, '-']).split('\n');
    const line = (s: string) => lines.find((l) => l.includes(s))!;
    // the row under a rowspan starts in the second column: its cells line up with the row above
    expect(line('linear').indexOf('linear')).toBe(line('2.0e-7').indexOf('2.0e-7'));
    expect(line('MonteCarlo').indexOf('MonteCarlo')).toBe(line('below 3e-4').indexOf('below 3e-4'));
    // a colspan cell starts in its first column
    expect(line('both methods agree').indexOf('both')).toBe(line('2.0e-7').indexOf('2.0e-7'));
    // column widths 200 : 120 : 120 px: the second column starts at 200/440 of the row, the third at 320/440
    const start = line('Impact probability').indexOf('Impact');
    const c2 = line('2.0e-7').indexOf('2.0e-7') - start, c3 = line('below 3e-4').indexOf('below') - start;
    expect(c2 / c3).toBeCloseTo(200 / 320, 1);
  });
});

describe('merged table cells (rowspan) drawn across their rows', () => {
  // Read back independently: word boxes from poppler's pdftotext -bbox (points, origin top left) and pixels of the
  // page rasterised by pdftoppm -gray at 144 dpi (2 px per point). Rules are #b8bec5 (grey about 190; a 0.5 pt rule
  // gives one or two pixels darker than 240), stripes #f7f8f9 (about 248), the page white (255): templates/pdf/
  // layout.ts COLOR.
  const PX_PER_PT = 2;
  let words: { text: string; xMin: number; yMin: number; xMax: number; yMax: number }[];
  let px: (xPt: number, yPt: number) => number;

  beforeAll(async () => {
    const cell = (text: string, attrs: Record<string, unknown> = {}, type: 'tableCell' | 'tableHeader' = 'tableCell') => ({
      type,
      attrs,
      content: [{ type: 'paragraph' as const, content: [{ type: 'text' as const, text }] }],
    });
    const v = structuredClone(version);
    v.document = {
      type: 'doc',
      content: [
        {
          type: 'table',
          content: [
            { type: 'tableRow', content: [cell('Quantity', {}, 'tableHeader'), cell('Value', {}, 'tableHeader'), cell('Note', {}, 'tableHeader')] },
            { type: 'tableRow', content: [cell('Probability', { rowspan: 2 }), cell('2.0e-7'), cell('below 3e-4')] },
            { type: 'tableRow', content: [cell('linear'), cell('MonteCarlo')] },
            { type: 'tableRow', content: [cell('Palermo'), cell('both methods agree', { colspan: 2 })] },
            {
              type: 'tableRow',
              content: [cell('A merged note long enough to need more lines than the two rows it spans give it, wrapping here finally.', { rowspan: 2 }), cell('x1'), cell('y1')],
            },
            { type: 'tableRow', content: [cell('x2'), cell('y2')] },
            { type: 'tableRow', content: [cell('after'), cell('z'), cell('z')] },
          ],
        },
      ],
    };
    const f = save('rowspan.pdf', await renderBulletinPdf(v));
    words = [...run('pdftotext', ['-bbox', '-f', '1', '-l', '1', f, '-']).matchAll(/xMin="([\d.]+)" yMin="([\d.]+)" xMax="([\d.]+)" yMax="([\d.]+)">([^<]*)</g)].map(
      (m) => ({ xMin: +m[1], yMin: +m[2], xMax: +m[3], yMax: +m[4], text: m[5] }),
    );
    run('pdftoppm', ['-gray', '-r', String(72 * PX_PER_PT), '-f', '1', '-l', '1', f, path.join(dir, 'rowspan')]);
    const pgm = readFileSync(path.join(dir, readdirSync(dir).find((n) => /^rowspan-\d+\.pgm$/.test(n))!));
    // Binary PGM (P5): "P5 <width> <height> 255" then one byte per pixel, row by row.
    const head = /^P5\s+(\d+)\s+(\d+)\s+255\s/.exec(pgm.subarray(0, 40).toString('latin1'))!;
    const width = Number(head[1]);
    const data = pgm.subarray(head[0].length);
    px = (xPt, yPt) => data[Math.round(yPt * PX_PER_PT) * width + Math.round(xPt * PX_PER_PT)];
  });
  const word = (text: string) => words.find((w) => w.text === text)!;
  /** Darkest pixel on a vertical / horizontal segment (points). */
  const darkestDown = (xPt: number, y0: number, y1: number) => Math.min(...Array.from({ length: Math.round((y1 - y0) * PX_PER_PT) }, (_, i) => px(xPt, y0 + i / PX_PER_PT)));
  const darkestAcross = (yPt: number, x0: number, x1: number) => Math.min(...Array.from({ length: Math.round((x1 - x0) * PX_PER_PT) }, (_, i) => px(x0 + i / PX_PER_PT, yPt)));

  it('sets the spanning cell’s text at the top and keeps the rows it spans at their own height', () => {
    const [p, v1, l, x1, x2, last, after] = ['Probability', '2.0e-7', 'linear', 'x1', 'x2', 'finally.', 'after'].map(word);
    expect(Math.abs(p.yMin - v1.yMin)).toBeLessThan(0.5); // top-aligned like its neighbour in the first row
    // The second spanned row follows the first at the pitch of one-line rows (as x2 follows x1)...
    expect(Math.abs(l.yMin - v1.yMin - (x2.yMin - x1.yMin))).toBeLessThan(0.5);
    // ...even when the spanning cell is taller than both rows: x2 starts beside the note's text, not below it, and
    // the next row starts below the note (the last spanned row grew to hold it).
    expect(x2.yMin).toBeLessThan(last.yMin);
    expect(after.yMin).toBeGreaterThan(last.yMax);
  });

  it('draws one box: no rule and no stripe across the spanning cell, rules beside it', () => {
    const [p, v1, l] = ['Probability', '2.0e-7', 'linear'].map(word);
    // Between the first row's text and the second row's text: the rule between the rows is there in the value column
    // (left padding of "2.0e-7") and absent in the spanning cell's column.
    const xValuePad = v1.xMin - 1.5;
    expect(darkestDown(xValuePad, v1.yMax + 0.5, l.yMin - 0.5)).toBeLessThan(240);
    expect(darkestDown(p.xMin + 2, p.yMax + 0.5, l.yMax)).toBeGreaterThan(250);
    // The second body row is striped; the spanning cell keeps its first row's white across it.
    const yMid = (l.yMin + l.yMax) / 2;
    expect(px(xValuePad, yMid)).toBeLessThan(255);
    expect(px(xValuePad, yMid)).toBeGreaterThan(240);
    expect(px(p.xMin + 2, yMid)).toBe(255);
    // A rule on the spanning cell's side, between its text and the value column's text.
    expect(darkestAcross(yMid, p.xMax + 1, l.xMin - 1)).toBeLessThan(240);
  });
});

describe('images', () => {
  it('embeds a data-URL image from the document and names an external one instead of fetching it', () => {
    // pdfimages -list: header lines, then one line per image with its pixel size
    const list = run('pdfimages', ['-list', file]).split('\n').slice(2).filter((l) => l.trim() !== '');
    expect(list.length).toBe(1);
    expect(list[0]).toMatch(/^\s*\d+\s+\d+\s+image\s+48\s+24\s+rgb\s/);
    expect(text(file)).toContain('[Remote chart: external image, not embedded]');
  });
});

describe('fonts', () => {
  it('embeds Merriweather (and the fallbacks it needed); every font is embedded', () => {
    const lines = run('pdffonts', [file]).split('\n').slice(2).filter((l) => l.trim() !== '');
    expect(lines.some((l) => /\+Merriweather-Regular\s/.test(l))).toBe(true);
    expect(lines.some((l) => /\+Merriweather-Bold\s/.test(l))).toBe(true);
    expect(lines.some((l) => /\+NotoSansMath-Regular\s/.test(l))).toBe(true); // ≈ ≤ ∞
    expect(lines.some((l) => /\+NotoSerif-Regular\s/.test(l))).toBe(true); // σ ζ ξ
    // columns: name type encoding emb sub uni; "emb" must be yes everywhere (no font left to the viewer)
    for (const l of lines) expect(l).toMatch(/\s+yes\s+yes\s+yes\s+\d+\s+\d+\s*$/);
  });

  it('chooses the first font of the chain that has the glyph', () => {
    const fonts = new FontSet(new PDFDocument());
    expect(fonts.split('regular', 'a ± b')).toEqual([{ font: 'mw-latin-regular', text: 'a ± b' }]);
    expect(fonts.split('regular', '1σ')).toEqual([
      { font: 'mw-latin-regular', text: '1' },
      { font: 'ns-greek-regular', text: 'σ' },
    ]);
    expect(fonts.split('bold', 'p ≈ 2, x ≤ ∞').map((p) => p.font)).toEqual([
      'mw-latin-bold',
      'nsm-regular',
      'mw-latin-bold',
      'nsm-regular',
    ]);
    // A character no font has becomes "?" rather than an empty box (U+E000 is a private-use code point).
    expect(fonts.split('regular', 'a\uE000')).toEqual([{ font: 'mw-latin-regular', text: 'a?' }]);
    // A tab is a space; other control characters are dropped; line breaks are kept for the layout.
    expect(fonts.split('regular', 'a\tb\u0007c\nd')).toEqual([{ font: 'mw-latin-regular', text: 'a bc\nd' }]);
  });
});

describe('byte stability', () => {
  it('renders the same version to the same bytes', async () => {
    clearBulletinPdfCache(); // a fresh layout, not the cached copy
    const again = await renderBulletinPdf(structuredClone(version));
    expect(again).not.toBe(pdf);
    expect(again.equals(pdf)).toBe(true);
  });

  it('gives the same bytes when renderings run concurrently (they yield to the event loop between blocks)', async () => {
    const other = { ...structuredClone(version), staleReason: 'concurrent' };
    clearBulletinPdfCache();
    const alone = await renderBulletinPdf(other);
    clearBulletinPdfCache();
    const [a, b] = await Promise.all([renderBulletinPdf(structuredClone(version)), renderBulletinPdf(other)]);
    expect(a.equals(pdf)).toBe(true);
    expect(b.equals(alone)).toBe(true);
  });

  it('serves a repeated request from the cache as a copy the caller cannot spoil', async () => {
    const a = await renderBulletinPdf(version);
    a.fill(0);
    const b = await renderBulletinPdf(version);
    expect(b.equals(pdf)).toBe(true);
  });

  it('renders the same bytes in another process, time zone and locale', () => {
    const out = path.join(dir, 'child.pdf');
    execFileSync(process.execPath, ['--import', 'tsx', path.join(__dirname, 'bulletinPdfFixture.ts'), out], {
      env: { ...process.env, TZ: 'Pacific/Chatham', LANG: 'de_DE.UTF-8', LC_ALL: 'de_DE.UTF-8' },
      stdio: 'pipe',
    });
    expect(readFileSync(out).equals(pdf)).toBe(true);
  });

  it('uses the approval time, not the current time, and pins the trailer ID to the version hash', () => {
    const info = run('pdfinfo', ['-isodates', file]);
    expect(info).toMatch(/CreationDate:\s+2026-11-30T14:05:09Z/);
    expect(info).toMatch(/ModDate:\s+2026-11-30T14:05:09Z/);
    const trailer = pdf.subarray(pdf.lastIndexOf('trailer')).toString('latin1');
    const id = version.sha256.slice(0, 32);
    expect(trailer.toLowerCase()).toContain(`/id [<${id}> <${id}>]`);
  });

  it('gives different bytes for a different version', async () => {
    const other = await renderBulletinPdf({ ...structuredClone(version), sha256: 'f'.repeat(64), version: 3 });
    expect(other.equals(pdf)).toBe(false);
  });
});

describe('rendered pages (pdftoppm)', () => {
  it('rasterises every page without errors and no page is blank', () => {
    const n = pages(file);
    run('pdftoppm', ['-r', '40', '-png', file, path.join(dir, 'page')]);
    const pngs = readdirSync(dir).filter((f) => /^page-\d+\.png$/.test(f));
    expect(pngs.length).toBe(n);
    // A blank A4 page at 40 dpi compresses to well under 1 kB; a page with text and rules does not.
    for (const p of pngs) expect(statSync(path.join(dir, p)).size).toBeGreaterThan(3000);
  });
});

describe('degraded inputs', () => {
  it('says so in the PDF when a run result was not frozen with the version, and still renders', async () => {
    const v = { ...structuredClone(version), runs: {} };
    const f = save('norun.pdf', await renderBulletinPdf(v));
    const t = text(f);
    expect(t).toContain('the result of run 41 was not frozen with this version');
    // linked figures still come from their snapshots
    for (const fig of v.figures) expect(t).toContain(fig.value.text);
  });

  it('says why a plot was not drawn when its approach is not in the run, and still renders', async () => {
    const v = structuredClone(version);
    const plotNode = v.document.content.find((n) => n.type === 'plot')!;
    plotNode.attrs = { ...plotNode.attrs, epochTdbJd: Number(plotNode.attrs!.epochTdbJd) + 400 };
    const t = text(save('noplot.pdf', await renderBulletinPdf(v)));
    expect(t).toContain("[plot not drawn: the run has no approach to earth near the plot's epoch]");
    expect(t).toContain('Distance from Earth'); // the other plot is still there
  });

  it('refuses a version without a proper hash or approval time', async () => {
    await expect(renderBulletinPdf({ ...version, sha256: 'abc' })).rejects.toThrow(/sha256/);
    await expect(renderBulletinPdf({ ...version, signOff: { ...version.signOff, approvedAt: 'never' } })).rejects.toThrow(/approvedAt/);
  });
});
