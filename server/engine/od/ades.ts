/**
 * IAU ADES optical astrometry in the PSV (pipe-separated values) form (METHODS.md §9.5).
 *
 * Layout read here (ADES description, versions 2017 and 2022 [M for the citation; C for the PSV layout]):
 *   # version=2022                       first non-blank line
 *   # observatory                        header group
 *   ! mpcCode HSA                        keyword value (the value may contain blanks)
 *   permID |provID  |trkSub |mode|stn |obsTime                 |ra         |dec        |...   column-header line
 *          |2026 AB1|       |CCD |HSA |2026-03-01T03:12:45.123Z|123.4567890|-12.3456789|...   data lines
 * Fields are separated by "|", padding blanks around a value are allowed and dropped, an empty field is absent.
 * A file may hold several blocks: a "#" line after data lines starts a new header and a new column-header line.
 *
 * Every problem is an AdesIssue with the 1-based line number and the ADES field name when one field is at fault;
 * the parser never stops at the first problem, so the analyst sees all of them at once. Lines with an issue do not
 * produce observations; the caller refuses the whole file when `issues` is not empty (nothing stored).
 *
 * Units: ra, dec in decimal degrees (ICRF, astrometric); rmsRA is the uncertainty of RA·cos(dec) in arcsec
 * (METHODS.md §9.5 [M]); rmsDec arcsec; obsTime ISO 8601 UTC with "Z", converted to TDB days since J2000 by
 * server/engine/time.ts.
 */
import type { AdesIssue, OpticalObservation } from '../../../shared/schemas/od';
import { tdbDaysFromUtc } from '../time';

export type AdesParseResult = {
  /** Header groups: group name -> keyword -> value (a repeated keyword, in one group or in later blocks, keeps every
   * distinct value, joined with "; "). */
  header: Record<string, Record<string, string>>;
  /** The well-formed observations, in file order. */
  observations: OpticalObservation[];
  /** Every problem found, in line order (empty when the file is acceptable). */
  issues: AdesIssue[];
};

/** ADES versions whose PSV form this parser reads. */
export const ADES_VERSIONS = ['2017', '2022'] as const;

/** Fields every optical data line needs (plus one of the identity fields). */
const REQUIRED_FIELDS = ['obsTime', 'ra', 'dec', 'stn', 'mode'] as const;
const IDENTITY_FIELDS = ['permID', 'provID', 'trkSub'] as const;

/**
 * ADES mode values for images (the MPC's ADES field-value list as quoted in public validation code: CCD, CMOS, video,
 * photographic, encoder, photomultiplier, micrometer, meridian circle, time-delay integration, unknown). OCC
 * (occultation timings) gives no RA/Dec of the object and is refused like radar.
 */
const OPTICAL_MODES = new Set(['CCD', 'CMO', 'VID', 'PHO', 'ENC', 'PMT', 'MIC', 'MER', 'TDI', 'UNK']);

/**
 * ADES field names accepted in a column header: the element names of the IAU ADES 2022 schema (general.xsd of the
 * ADES-Master repository, read for this list). Fields other than those Tocsin reads are accepted and ignored; a name
 * outside this list is reported as unknown, since it is most often a misspelling of a field we would need.
 */
const KNOWN_FIELDS = new Set([
  // identification
  'permID', 'provID', 'artSat', 'trkSub', 'obsID', 'obsSubID', 'trkID', 'trkMPC',
  // observation and observer location
  'mode', 'stn', 'sys', 'ctr', 'pos1', 'pos2', 'pos3', 'vel1', 'vel2', 'vel3',
  'posCov11', 'posCov12', 'posCov13', 'posCov22', 'posCov23', 'posCov33', 'prog', 'obsTime', 'rmsTime',
  // astrometry (optical, offset, occultation, radar)
  'ra', 'dec', 'raStar', 'decStar', 'obsCenter', 'deltaRA', 'deltaDec', 'dist', 'pa', 'rmsRA', 'rmsDec', 'rmsDist',
  'rmsPA', 'rmsCorr', 'delay', 'rmsDelay', 'doppler', 'rmsDoppler', 'astCat', 'com', 'frq', 'trx', 'rcv',
  // photometry and image
  'mag', 'rmsMag', 'band', 'fltr', 'photCat', 'photAp', 'nucMag', 'logSNR', 'seeing', 'exp', 'rmsFit', 'nStars', 'shapeOcc',
  // reference, precision, notes
  'ref', 'disc', 'subFmt', 'subFrm', 'precTime', 'precRA', 'precDec', 'uncTime', 'notes', 'remarks', 'deprecated', 'localUse',
  // residual records
  'orbProd', 'orbID', 'resRA', 'resDec', 'selAst', 'sigRA', 'sigDec', 'sigCorr', 'sigTime', 'biasRA', 'biasDec', 'biasTime',
  'photProd', 'resMag', 'selPhot', 'sigMag', 'biasMag', 'photMod', 'resDelay', 'selDelay', 'sigDelay', 'resDoppler',
  'selDoppler', 'sigDoppler',
]);

/** Radar measurement fields: a line with a value in one of them is a radar observation. */
const RADAR_FIELDS = ['delay', 'doppler'] as const;

/** Space-based or roving observer fields: the observer position would come from the line, which we do not support. */
const OBSERVER_POSITION_FIELDS = ['sys', 'ctr', 'pos1', 'pos2', 'pos3'] as const;

const NUMBER_RE = /^[+-]?(?:\d+(?:\.\d*)?|\.\d+)(?:[eE][+-]?\d+)?$/;
const OBS_TIME_RE = /^(\d{4})-(\d{2})-(\d{2})T(\d{2}):(\d{2}):(\d{2}(?:\.\d+)?)Z$/;
const VERSION_RE = /^#\s*version\s*=\s*(\S*)\s*$/;
const STN_RE = /^[A-Za-z0-9]{1,8}$/;

/** Splits a PSV line into trimmed fields; one trailing "|" (an empty last field) is tolerated. */
function splitPsv(line: string, expected: number | null): string[] {
  const parts = line.split('|').map((s) => s.trim());
  if (parts.length > 1 && parts[parts.length - 1] === '' && (expected === null || parts.length === expected + 1)) parts.pop();
  return parts;
}

type ParsedTime = { year: number; month: number; day: number; hour: number; minute: number; second: number };

function parseObsTimeText(text: string): ParsedTime | null {
  const m = OBS_TIME_RE.exec(text);
  if (!m) return null;
  const [year, month, day, hour, minute] = m.slice(1, 6).map(Number);
  return { year, month, day, hour, minute, second: Number(m[6]) };
}

function pad(n: number, w: number): string {
  return String(n).padStart(w, '0');
}

/**
 * The instant of an ADES obsTime rounded to the millisecond, as "YYYY-MM-DDThh:mm:ss.sssZ" (so "…45.1Z" and
 * "…45.100Z" are the same instant). Throws RangeError for a text that is not an ADES obsTime.
 */
export function normalizeObsTime(obsTime: string): string {
  const t = parseObsTimeText(obsTime.trim());
  if (!t) throw new RangeError(`obsTime "${obsTime}" is not an ISO 8601 UTC time like 2026-03-01T03:12:45.123Z`);
  const ms = Math.round(t.second * 1000);
  if (t.second >= 60) {
    // Inside a leap second (23:59:60.xxx): Date cannot represent it; keep the text form at ms resolution.
    return `${pad(t.year, 4)}-${pad(t.month, 2)}-${pad(t.day, 2)}T${pad(t.hour, 2)}:${pad(t.minute, 2)}:60.${pad(Math.min(ms - 60_000, 999), 3)}Z`;
  }
  // Date.UTC maps years 0..99 to 1900+; ADES times are four-digit years >= 1583 here (time.ts rejects earlier).
  const base = Date.UTC(t.year, t.month - 1, t.day, t.hour, t.minute, 0);
  return new Date(base + ms).toISOString();
}

/**
 * Key that identifies one observation for duplicate detection: station code and obsTime to the millisecond
 * (the server compares uploads against stored observations with it). Same key = same observation.
 */
export function observationKey(o: { stn: string; obsTime: string }): string {
  return `${o.stn.trim()}@${normalizeObsTime(o.obsTime)}`;
}

type Block = {
  /** Line of the column header. */
  headerLine: number;
  columns: string[];
  index: Map<string, number>;
  /** False when the column header itself was refused (its data lines are then skipped with one issue). */
  usable: boolean;
};

/**
 * Parses ADES PSV text. Never throws for bad content: every problem becomes an issue. Line numbers are 1-based
 * in the text as given (CRLF and LF both accepted; a leading byte-order mark is ignored).
 */
export function parseAdesPsv(text: string): AdesParseResult {
  const header: Record<string, Record<string, string>> = {};
  const observations: OpticalObservation[] = [];
  const issues: AdesIssue[] = [];
  const issue = (line: number, field: string | null, message: string) => issues.push({ line, field, message });

  const lines = text.replace(/^\uFEFF/, '').split(/\r\n|\n|\r/);
  let sawVersion = false;
  let sawContent = false;
  let group: string | null = null;
  let block: Block | null = null;
  /** True while reading header lines (a column-header line is expected next). */
  let inHeader = true;
  let skippedBlockReported = false;
  let lastGroupLine = 0;
  let sawData = false;
  /** key -> first line with it, for duplicates inside the file. */
  const seen = new Map<string, number>();

  for (let i = 0; i < lines.length; i++) {
    const lineNo = i + 1;
    const raw = lines[i];
    const line = raw.trim();
    if (line === '') continue;

    if (!sawContent) {
      sawContent = true;
      const v = VERSION_RE.exec(line);
      if (v) {
        sawVersion = true;
        if (!(ADES_VERSIONS as readonly string[]).includes(v[1])) {
          issue(lineNo, 'version', `ADES version "${v[1]}" is not supported (expected ${ADES_VERSIONS.join(' or ')})`);
        }
        continue;
      }
      issue(lineNo, 'version', `The file must start with the ADES version line "# version=2022" (or 2017); found "${truncate(line)}"`);
    } else if (VERSION_RE.test(line)) {
      issue(lineNo, 'version', 'A second version line: the version line must appear once, at the top of the file');
      continue;
    }

    if (line.startsWith('#')) {
      // A header group; after data lines it starts a new block with its own column header.
      if (!inHeader) {
        inHeader = true;
        block = null;
      }
      const name = line.slice(1).trim();
      if (name === '' || /\s/.test(name)) {
        issue(lineNo, null, `Header group line must be "# groupName" (one word); found "${truncate(line)}"`);
        group = null;
        continue;
      }
      group = name;
      header[group] ??= {};
      lastGroupLine = lineNo;
      continue;
    }

    if (line.startsWith('!')) {
      if (!inHeader || group === null) {
        issue(lineNo, null, 'Keyword line "! keyword value" outside a header group (it must follow a "# group" line)');
        continue;
      }
      const m = /^!\s*(\S+)(?:\s+(.*))?$/.exec(line);
      if (!m) {
        issue(lineNo, null, `Keyword line must be "! keyword value"; found "${truncate(line)}"`);
        continue;
      }
      const g = header[group];
      const value = (m[2] ?? '').trim();
      // Repeated keywords (several observers, several comment lines, the same group in later blocks): the distinct
      // values joined with "; ", so nothing is lost.
      if (!(m[1] in g)) g[m[1]] = value;
      else if (value !== '' && !g[m[1]].split('; ').includes(value)) g[m[1]] = g[m[1]] === '' ? value : `${g[m[1]]}; ${value}`;
      continue;
    }

    if (inHeader || block === null) {
      block = readColumnHeader(line, lineNo, issue);
      inHeader = false;
      skippedBlockReported = false;
      continue;
    }

    if (!block.usable) {
      if (!skippedBlockReported) {
        issue(lineNo, null, `Data lines not read: the column header on line ${block.headerLine} has errors`);
        skippedBlockReported = true;
      }
      continue;
    }

    sawData = true;
    const obs = readDataLine(line, lineNo, block, issue);
    if (!obs) continue;
    const key = observationKey(obs);
    const first = seen.get(key);
    if (first !== undefined) {
      issue(
        lineNo,
        'obsTime',
        `Duplicate observation: line ${lineNo} repeats line ${first} (same stn ${obs.stn} and obsTime ${normalizeObsTime(obs.obsTime)})`,
      );
      continue;
    }
    seen.set(key, lineNo);
    observations.push(obs);
  }

  if (!sawContent) issue(0, null, 'The file is empty');
  else if (!sawVersion && issues.every((x) => x.field !== 'version')) issue(0, 'version', 'Missing "# version=2022" line');
  else if (block === null && lastGroupLine > 0 && sawData) {
    issue(lastGroupLine, null, 'Header group at the end of the file with no column header or data lines after it');
  } else if (block === null) issue(0, null, 'No column-header line and no data lines after the header');
  else if (block.usable && observations.length === 0 && issues.length === 0) issue(0, null, 'No observations in the file');

  issues.sort((a, b) => a.line - b.line);
  return { header, observations, issues };
}

function truncate(s: string, n = 60): string {
  return s.length > n ? `${s.slice(0, n)}…` : s;
}

function readColumnHeader(line: string, lineNo: number, issue: (line: number, field: string | null, message: string) => void): Block {
  const columns = splitPsv(line, null);
  const index = new Map<string, number>();
  let usable = true;
  columns.forEach((name, k) => {
    if (name === '') {
      issue(lineNo, null, `Column ${k + 1} of the column header is empty`);
      usable = false;
      return;
    }
    if (NUMBER_RE.test(name) || /[^A-Za-z0-9]/.test(name)) {
      issue(lineNo, name, `"${truncate(name, 30)}" is not a field name: expected the column-header line (e.g. "permID|provID|mode|stn|obsTime|ra|dec") after the header`);
      usable = false;
      return;
    }
    if (!KNOWN_FIELDS.has(name)) {
      issue(lineNo, name, `Unknown ADES field "${name}" in the column header`);
      usable = false;
      return;
    }
    if (index.has(name)) {
      issue(lineNo, name, `Field "${name}" appears twice in the column header`);
      usable = false;
      return;
    }
    index.set(name, k);
  });
  if (usable || columns.some((c) => KNOWN_FIELDS.has(c))) {
    for (const f of REQUIRED_FIELDS) {
      if (!index.has(f)) {
        issue(lineNo, f, `Required field "${f}" is missing from the column header`);
        usable = false;
      }
    }
    if (!IDENTITY_FIELDS.some((f) => index.has(f))) {
      issue(lineNo, 'permID', 'The column header needs one of permID, provID or trkSub to identify the object');
      usable = false;
    }
  }
  return { headerLine: lineNo, columns, index, usable };
}

function readDataLine(
  line: string,
  lineNo: number,
  block: Block,
  issue: (line: number, field: string | null, message: string) => void,
): OpticalObservation | null {
  const values = splitPsv(line, block.columns.length);
  if (values.length !== block.columns.length) {
    issue(
      lineNo,
      null,
      `Expected ${block.columns.length} fields (column header on line ${block.headerLine}), found ${values.length}`,
    );
    return null;
  }
  const get = (name: string): string | null => {
    const k = block.index.get(name);
    if (k === undefined) return null;
    const v = values[k];
    return v === '' ? null : v;
  };
  let ok = true;
  const bad = (field: string, message: string) => {
    issue(lineNo, field, message);
    ok = false;
  };
  const number = (field: string, required: boolean): number | null => {
    const v = get(field);
    if (v === null) {
      if (required) bad(field, `${field} is empty (required)`);
      return null;
    }
    if (!NUMBER_RE.test(v)) {
      bad(field, `${field} "${truncate(v, 30)}" is not a number`);
      return null;
    }
    const x = Number(v);
    if (!Number.isFinite(x)) {
      bad(field, `${field} "${truncate(v, 30)}" is not a finite number`);
      return null;
    }
    return x;
  };

  // Mode first: radar and other non-optical lines get one clear message instead of a cascade of missing fields.
  const mode = get('mode');
  if (mode === null) {
    bad('mode', 'mode is empty (required, e.g. CCD)');
  } else if (mode === 'RAD') {
    issue(lineNo, 'mode', 'Radar observations (mode RAD) are not supported: Tocsin fits optical astrometry only');
    return null;
  } else if (mode === 'OCC') {
    issue(lineNo, 'mode', 'Occultation timings (mode OCC) are not supported: Tocsin fits optical RA/Dec astrometry only');
    return null;
  } else if (!OPTICAL_MODES.has(mode)) {
    bad('mode', `mode "${truncate(mode, 20)}" is not an optical ADES mode (${[...OPTICAL_MODES].join(', ')})`);
  }
  for (const f of RADAR_FIELDS) {
    if (get(f) !== null) {
      issue(lineNo, f, `Radar observations (${f}) are not supported: Tocsin fits optical astrometry only`);
      return null;
    }
  }
  for (const f of OBSERVER_POSITION_FIELDS) {
    if (get(f) !== null) {
      issue(lineNo, f, `Observer positions given on the line (${f}: space-based or roving observers) are not supported; use a fixed observatory code`);
      return null;
    }
  }

  const permID = get('permID');
  const provID = get('provID');
  const trkSub = get('trkSub');
  if (permID === null && provID === null && trkSub === null) bad('permID', 'One of permID, provID or trkSub is required to identify the object');

  const stn = get('stn');
  if (stn === null) bad('stn', 'stn is empty (required: observatory code)');
  else if (!STN_RE.test(stn)) bad('stn', `stn "${truncate(stn, 20)}" is not an observatory code (1 to 8 letters or digits)`);

  const obsTime = get('obsTime');
  let obsTimeTdbDays = Number.NaN;
  if (obsTime === null) {
    bad('obsTime', 'obsTime is empty (required)');
  } else {
    const t = parseObsTimeText(obsTime);
    if (!t) {
      bad('obsTime', `obsTime "${truncate(obsTime, 40)}" is not an ISO 8601 UTC time like 2026-03-01T03:12:45.123Z`);
    } else {
      try {
        obsTimeTdbDays = tdbDaysFromUtc(t.year, t.month, t.day, t.hour, t.minute, t.second);
      } catch (err) {
        bad('obsTime', `obsTime "${obsTime}": ${(err as Error).message}`);
      }
    }
  }

  const raDeg = number('ra', true);
  if (raDeg !== null && !(raDeg >= 0 && raDeg < 360)) bad('ra', `ra ${raDeg} is outside [0, 360) degrees`);
  const decDeg = number('dec', true);
  if (decDeg !== null && !(decDeg >= -90 && decDeg <= 90)) bad('dec', `dec ${decDeg} is outside [-90, 90] degrees`);
  const rmsRaArcsec = number('rmsRA', false);
  if (rmsRaArcsec !== null && !(rmsRaArcsec > 0)) bad('rmsRA', `rmsRA ${rmsRaArcsec} must be positive (arcsec)`);
  const rmsDecArcsec = number('rmsDec', false);
  if (rmsDecArcsec !== null && !(rmsDecArcsec > 0)) bad('rmsDec', `rmsDec ${rmsDecArcsec} must be positive (arcsec)`);
  const rmsCorr = number('rmsCorr', false);
  if (rmsCorr !== null && !(Math.abs(rmsCorr) < 1)) bad('rmsCorr', `rmsCorr ${rmsCorr} must be strictly between -1 and 1`);
  if (rmsCorr !== null && (rmsRaArcsec === null || rmsDecArcsec === null) && ok) {
    bad('rmsCorr', 'rmsCorr is given without both rmsRA and rmsDec');
  }
  const mag = number('mag', false);
  if (mag !== null && !(mag >= -5 && mag <= 35)) bad('mag', `mag ${mag} is outside the ADES range [-5, 35]`);

  if (!ok || stn === null || obsTime === null || raDeg === null || decDeg === null || mode === null) return null;
  return {
    line: lineNo,
    permID,
    provID,
    trkSub,
    mode,
    stn,
    obsTime,
    obsTimeTdbDays,
    raDeg,
    decDeg,
    rmsRaArcsec,
    rmsDecArcsec,
    rmsCorr,
    astCat: get('astCat'),
    mag,
    band: get('band'),
    remarks: get('remarks'),
  };
}
