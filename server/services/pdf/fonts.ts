/**
 * Fonts of the bulletin PDF: Merriweather (body) embedded from @fontsource's .woff files (pdfkit cannot embed the
 * .woff2 files: doc.end() throws a RangeError), with fallbacks for glyphs Merriweather lacks: Noto Serif (latin,
 * latin-ext, greek subsets: sigma, xi, zeta, Delta ...) and Noto Sans Math (≈ ≤ ≥ ∞ √ →, which neither Merriweather
 * nor Noto Serif has). Text is split into runs by glyph coverage and each run is set in the first font of the chain
 * that has all of its characters.
 */
import { readFileSync } from 'node:fs';
import { createRequire } from 'node:module';
import path from 'node:path';
import { inflateSync } from 'node:zlib';
import PDFDocument from 'pdfkit';

export type FontStyle = 'regular' | 'bold' | 'italic' | 'boldItalic';

const require = createRequire(import.meta.url);
function fontsourceDir(pkg: string): string {
  return path.join(path.dirname(require.resolve(`@fontsource/${pkg}/package.json`)), 'files');
}

const WEIGHT: Record<FontStyle, [number, 'normal' | 'italic']> = {
  regular: [400, 'normal'],
  bold: [700, 'normal'],
  italic: [400, 'italic'],
  boldItalic: [700, 'italic'],
};

/** Font files of one style, in fallback order: [registered name, file]. */
export function fontChain(style: FontStyle): [string, string][] {
  const [w, s] = WEIGHT[style];
  const mw = fontsourceDir('merriweather');
  const ns = fontsourceDir('noto-serif');
  const math = fontsourceDir('noto-sans-math');
  return [
    [`mw-latin-${style}`, path.join(mw, `merriweather-latin-${w}-${s}.woff`)],
    [`mw-latinext-${style}`, path.join(mw, `merriweather-latin-ext-${w}-${s}.woff`)],
    [`ns-latin-${style}`, path.join(ns, `noto-serif-latin-${w}-${s}.woff`)],
    [`ns-latinext-${style}`, path.join(ns, `noto-serif-latin-ext-${w}-${s}.woff`)],
    [`ns-greek-${style}`, path.join(ns, `noto-serif-greek-${w}-${s}.woff`)],
    [`ns-math-${style}`, path.join(ns, `noto-serif-math-${w}-${s}.woff`)],
    // Noto Sans Math has one weight and no italic.
    ['nsm-regular', path.join(math, 'noto-sans-math-latin-400-normal.woff')],
  ];
}

export const STYLES: FontStyle[] = ['regular', 'bold', 'italic', 'boldItalic'];

export function styleOf(bold: boolean, italic: boolean): FontStyle {
  return bold ? (italic ? 'boldItalic' : 'bold') : italic ? 'italic' : 'regular';
}

/** The primary (Merriweather) font name of a style. */
export function primaryFont(style: FontStyle): string {
  return `mw-latin-${style}`;
}

type DocWithFont = PDFKit.PDFDocument & { _font: { font: { characterSet: number[] }; ascender: number } };

/**
 * WOFF 1.0 -> plain sfnt (TrueType/OpenType) bytes (W3C WOFF File Format 1.0, sections 4-5): the same tables,
 * inflated with node's zlib. fontkit would inflate WOFF tables itself with a pure-JS inflater, which costs about
 * 2 s per bulletin for the 25 font files; converted once per process here.
 */
export function woffToSfnt(woff: Buffer): Buffer {
  if (woff.readUInt32BE(0) !== 0x774f4646) throw new Error('not a WOFF 1.0 file');
  const flavor = woff.readUInt32BE(4);
  const numTables = woff.readUInt16BE(12);
  const tables: { tag: number; checksum: number; data: Buffer }[] = [];
  for (let i = 0; i < numTables; i++) {
    const e = 44 + 20 * i;
    const tag = woff.readUInt32BE(e), offset = woff.readUInt32BE(e + 4), compLength = woff.readUInt32BE(e + 8);
    const origLength = woff.readUInt32BE(e + 12), checksum = woff.readUInt32BE(e + 16);
    const raw = woff.subarray(offset, offset + compLength);
    const data = compLength < origLength ? inflateSync(raw) : Buffer.from(raw);
    if (data.length !== origLength) throw new Error('WOFF table length mismatch');
    tables.push({ tag, checksum, data });
  }
  let searchRange = 1, entrySelector = 0;
  while (searchRange * 2 <= numTables) {
    searchRange *= 2;
    entrySelector++;
  }
  const header = Buffer.alloc(12 + 16 * numTables);
  header.writeUInt32BE(flavor, 0);
  header.writeUInt16BE(numTables, 4);
  header.writeUInt16BE(searchRange * 16, 6);
  header.writeUInt16BE(entrySelector, 8);
  header.writeUInt16BE(numTables * 16 - searchRange * 16, 10);
  const parts: Buffer[] = [header];
  let offset = header.length;
  tables.forEach((t, i) => {
    const r = 12 + 16 * i;
    header.writeUInt32BE(t.tag, r);
    header.writeUInt32BE(t.checksum, r + 4);
    header.writeUInt32BE(offset, r + 8);
    header.writeUInt32BE(t.data.length, r + 12);
    const pad = (4 - (t.data.length % 4)) % 4;
    parts.push(t.data, Buffer.alloc(pad));
    offset += t.data.length + pad;
  });
  return Buffer.concat(parts);
}

const sfntCache = new Map<string, Buffer>();
function fontBytes(file: string): Buffer {
  let b = sfntCache.get(file);
  if (!b) {
    b = woffToSfnt(readFileSync(file));
    sfntCache.set(file, b);
  }
  return b;
}

type FontInfo = { codePoints: Set<number>; ascender: number };
let infoCache: Map<string, FontInfo> | null = null;

/**
 * Coverage (code points) and ascender of every font of the chains, read once per process from a scratch pdfkit
 * document (pdfkit opens the file with fontkit), so a bulletin only opens the fonts it actually uses.
 */
function fontInfo(): Map<string, FontInfo> {
  if (infoCache) return infoCache;
  const scratch = new PDFDocument({ autoFirstPage: false }) as DocWithFont;
  const m = new Map<string, FontInfo>();
  for (const style of STYLES) {
    for (const [name, file] of fontChain(style)) {
      if (m.has(name)) continue;
      scratch.registerFont(name, fontBytes(file));
      scratch.font(name);
      m.set(name, { codePoints: new Set(scratch._font.font.characterSet), ascender: scratch._font.ascender });
    }
  }
  infoCache = m;
  return m;
}

/** Registers every font file with one document and answers coverage questions for it. */
export class FontSet {
  private readonly info: Map<string, FontInfo>;
  private readonly chains = new Map<FontStyle, string[]>();

  constructor(private readonly doc: PDFKit.PDFDocument) {
    this.info = fontInfo();
    const registered = new Set<string>();
    for (const style of STYLES) {
      const names: string[] = [];
      for (const [name, file] of fontChain(style)) {
        // Registration only records the source; pdfkit opens (and embeds) a font when it is first used.
        if (!registered.has(name)) doc.registerFont(name, fontBytes(file));
        registered.add(name);
        names.push(name);
      }
      this.chains.set(style, names);
    }
    doc.font(primaryFont('regular'));
  }

  /**
   * Size factor for a fallback font so its symbols match Merriweather's large x-height (Noto Sans Math's ≈ ≤ ∞ look
   * a size too small beside it at the same point size; judged on rendered pages).
   */
  scale(name: string): number {
    return name === 'nsm-regular' ? 1.15 : 1;
  }

  /** Ascender of a registered font, in 1/1000 em (pdfkit's unit). */
  ascender(name: string): number {
    return this.info.get(name)!.ascender;
  }

  /** First font of the style's chain that has the code point, or null (no font has it). */
  fontFor(style: FontStyle, cp: number): string | null {
    for (const name of this.chains.get(style)!) if (this.info.get(name)!.codePoints.has(cp)) return name;
    return null;
  }

  /**
   * Split a text into runs that each one font can set. Spaces and other whitespace stay in the current run (every
   * font of the chain has them), so a switch happens only at a character the current font lacks. A character that no
   * font of the chain has is set as "?" in the primary font (never an empty box).
   */
  split(style: FontStyle, text: string): { font: string; text: string }[] {
    const out: { font: string; text: string }[] = [];
    const primary = primaryFont(style);
    for (const raw of text) {
      // Tabs and other control characters have no glyph: a tab is a space, the rest are dropped.
      const ch = raw === '\t' ? ' ' : raw;
      if (ch !== '\n' && ch !== '\r' && /[\u0000-\u001f\u007f]/.test(ch)) continue;
      const cp = ch.codePointAt(0)!;
      const last = out[out.length - 1];
      let font: string;
      let piece = ch;
      if (ch === '\n' || ch === '\r') {
        // Line breaks are layout, not glyphs: they stay in the current run.
        font = last ? last.font : primary;
      } else if (/\s/.test(ch) && last && this.info.get(last.font)!.codePoints.has(cp)) {
        font = last.font;
      } else {
        const f = this.fontFor(style, cp);
        if (f === null) {
          font = primary;
          piece = '?';
        } else {
          font = f;
        }
      }
      if (last && last.font === font) last.text += piece;
      else out.push({ font, text: piece });
    }
    return out;
  }
}
