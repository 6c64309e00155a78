/**
 * IAU ADES PSV reader (server/engine/od/ades.ts) against the PSV layout of the ADES description (METHODS.md §9.5:
 * "# version=" line, "# group" / "! keyword value" header, a "|"-separated column header, padding blanks allowed;
 * field names and units as listed there). Every malformed-line case must name its 1-based line and the field.
 * Observatory codes and designations are invented.
 */
import { describe, expect, it } from 'vitest';
import { normalizeObsTime, observationKey, parseAdesPsv } from '../../server/engine/od/ades';
import { tdbDaysFromUtc } from '../../server/engine/time';
import { opticalObservationSchema } from '../../shared/schemas/od';

const HEADER = [
  '# version=2022',
  '# observatory',
  '! mpcCode HSA',
  '! name Halden Sound Upper Station',
  '# submitter',
  '! name A. Example',
  '# telescope',
  '! design Reflector',
  '! aperture 0.8',
];
// line 10: column header (padding blanks and optional columns: rmsRA, rmsDec, rmsCorr, astCat, mag, band, remarks,
// plus fields we accept and ignore: obsID, exp, notes)
const COLUMNS =
  'permID |provID     |trkSub  |obsID|mode|stn |obsTime                 |ra          |dec         |rmsRA|rmsDec|rmsCorr|astCat|mag  |band|exp |notes|remarks';
const row = (over: Partial<Record<string, string>> = {}) => {
  const v: Record<string, string> = {
    permID: '', provID: 'HSO-26-U1', trkSub: '', obsID: '', mode: 'CCD', stn: 'HSA',
    obsTime: '2026-03-01T03:12:45.123Z', ra: '123.4567890', dec: '-12.3456789', rmsRA: '0.35', rmsDec: '0.30',
    rmsCorr: '0.1', astCat: 'Gaia3', mag: '19.5', band: 'G', exp: '60', notes: '', remarks: 'first night',
    ...over,
  };
  return ['permID', 'provID', 'trkSub', 'obsID', 'mode', 'stn', 'obsTime', 'ra', 'dec', 'rmsRA', 'rmsDec', 'rmsCorr', 'astCat', 'mag', 'band', 'exp', 'notes', 'remarks']
    .map((k) => ` ${v[k]} `)
    .join('|');
};
const file = (...data: string[]) => [...HEADER, COLUMNS, ...data].join('\n');

describe('parseAdesPsv: well-formed files', () => {
  it('reads header groups, padded columns, optional fields, and converts obsTime to TDB', () => {
    const text = file(
      row(),
      '',
      row({ obsTime: '2026-03-01T03:42:45.5Z', ra: '123.5', dec: '-12.3', rmsRA: '', rmsDec: '', rmsCorr: '', mag: '', band: '', remarks: '' }),
    );
    const r = parseAdesPsv(text);
    expect(r.issues).toEqual([]);
    expect(r.header).toEqual({
      observatory: { mpcCode: 'HSA', name: 'Halden Sound Upper Station' },
      submitter: { name: 'A. Example' },
      telescope: { design: 'Reflector', aperture: '0.8' },
    });
    expect(r.observations).toHaveLength(2);
    const [a, b] = r.observations;
    expect(() => opticalObservationSchema.parse(a)).not.toThrow();
    expect(a).toMatchObject({
      line: 11, permID: null, provID: 'HSO-26-U1', trkSub: null, mode: 'CCD', stn: 'HSA', obsTime: '2026-03-01T03:12:45.123Z',
      raDeg: 123.456789, decDeg: -12.3456789, rmsRaArcsec: 0.35, rmsDecArcsec: 0.3, rmsCorr: 0.1, astCat: 'Gaia3',
      mag: 19.5, band: 'G', remarks: 'first night',
    });
    expect(a.obsTimeTdbDays).toBe(tdbDaysFromUtc(2026, 3, 1, 3, 12, 45.123));
    // 2026: TT − UTC = 69.184 s (METHODS.md §1.1), TDB − TT < 1.7 ms.
    const utcDays = 9556 - 0.5 + (3 * 3600 + 12 * 60 + 45.123) / 86400; // 2026-03-01 is day 9556 from 2000-01-01 (computed)
    expect(Math.abs((a.obsTimeTdbDays - utcDays) * 86400 - 69.184)).toBeLessThan(0.002);
    expect(b).toMatchObject({ line: 13, rmsRaArcsec: null, rmsDecArcsec: null, rmsCorr: null, mag: null, band: null, remarks: null });
  });

  it('accepts 2017 files, CRLF line ends, a trailing "|" and several blocks', () => {
    const cols = 'trkSub|mode|stn|obsTime|ra|dec|';
    const text = [
      '# version=2017', '# observatory', '! mpcCode HSB', cols, 'K1a|CCD|HSB|2026-01-05T20:00:00Z|10.0|20.0|',
      '# observatory', '! mpcCode HSC', 'trkSub|mode|stn|obsTime|ra|dec', 'K1a|CCD|HSC|2026-01-06T20:00:00.000Z|10.5|20.5',
    ].join('\r\n');
    const r = parseAdesPsv(text);
    expect(r.issues).toEqual([]);
    expect(r.observations.map((o) => [o.line, o.stn, o.trkSub])).toEqual([[5, 'HSB', 'K1a'], [9, 'HSC', 'K1a']]);
    expect(r.header.observatory.mpcCode).toBe('HSB; HSC'); // both blocks' values kept
  });
});

describe('parseAdesPsv: leap seconds', () => {
  it('an obsTime inside a real leap second (2016-12-31T23:59:60, IERS Bulletin C; METHODS.md §1.2) is read', () => {
    const r = parseAdesPsv(
      ['# version=2022', 'provID|mode|stn|obsTime|ra|dec',
        'X|CCD|HSA|2016-12-31T23:59:59.5Z|1|2', 'X|CCD|HSA|2016-12-31T23:59:60.5Z|1|2', 'X|CCD|HSA|2017-01-01T00:00:00.5Z|1|2'].join('\n'),
    );
    expect(r.issues).toEqual([]);
    const [a, b, c] = r.observations.map((o) => o.obsTimeTdbDays * 86400);
    // one SI second apart each (the leap second is a real second of time)
    expect(b - a).toBeCloseTo(1, 4);
    expect(c - b).toBeCloseTo(1, 4);
  });
});

describe('parseAdesPsv: header keywords that repeat', () => {
  it('keeps every distinct value (several observers, several comment lines)', () => {
    const r = parseAdesPsv(
      ['# version=2022', '# observers', '! name B. Example', '! name C. Example', '# comment', '! line first', '! line second',
        'provID|mode|stn|obsTime|ra|dec', 'X|CCD|HSA|2026-03-01T03:12:45Z|1|2'].join('\n'),
    );
    expect(r.issues).toEqual([]);
    expect(r.header).toEqual({ observers: { name: 'B. Example; C. Example' }, comment: { line: 'first; second' } });
  });
});

describe('parseAdesPsv: every malformed line gives its line and field', () => {
  // Data lines start at line 11 of `file(...)`.
  const cases: { name: string; over: Record<string, string>; field: string | null; message: RegExp }[] = [
    { name: 'bad number in ra', over: { ra: '12h30m' }, field: 'ra', message: /not a number/ },
    { name: 'ra at 360', over: { ra: '360.0' }, field: 'ra', message: /outside \[0, 360\)/ },
    { name: 'negative ra', over: { ra: '-0.1' }, field: 'ra', message: /outside \[0, 360\)/ },
    { name: 'dec above 90', over: { dec: '90.0001' }, field: 'dec', message: /outside \[-90, 90\]/ },
    { name: 'empty dec', over: { dec: '' }, field: 'dec', message: /required/ },
    { name: 'time without Z', over: { obsTime: '2026-03-01T03:12:45' }, field: 'obsTime', message: /ISO 8601 UTC/ },
    { name: 'impossible date', over: { obsTime: '2026-02-30T03:12:45Z' }, field: 'obsTime', message: /does not exist/ },
    { name: 'leap second on a normal day', over: { obsTime: '2026-03-01T23:59:60.5Z' }, field: 'obsTime', message: /second 60/ },
    { name: 'UTC before 1972', over: { obsTime: '1969-07-20T20:17:40Z' }, field: 'obsTime', message: /1972/ },
    { name: 'negative rmsRA', over: { rmsRA: '-0.2' }, field: 'rmsRA', message: /positive/ },
    { name: 'zero rmsDec', over: { rmsDec: '0' }, field: 'rmsDec', message: /positive/ },
    { name: 'rmsCorr of 1', over: { rmsCorr: '1.0' }, field: 'rmsCorr', message: /between -1 and 1/ },
    { name: 'rmsCorr below -1', over: { rmsCorr: '-1.2' }, field: 'rmsCorr', message: /between -1 and 1/ },
    { name: 'rmsCorr without rms', over: { rmsRA: '', rmsDec: '' }, field: 'rmsCorr', message: /without both/ },
    { name: 'bad mag', over: { mag: 'bright' }, field: 'mag', message: /not a number/ },
    { name: 'radar line', over: { mode: 'RAD' }, field: 'mode', message: /Radar.*not supported/ },
    { name: 'unknown mode', over: { mode: 'XYZ' }, field: 'mode', message: /not an optical ADES mode/ },
    { name: 'occultation line', over: { mode: 'OCC' }, field: 'mode', message: /Occultation.*not supported/ },
    { name: 'magnitude out of the ADES range', over: { mag: '36' }, field: 'mag', message: /\[-5, 35\]/ },
    { name: 'empty mode', over: { mode: '' }, field: 'mode', message: /required/ },
    { name: 'no identity', over: { provID: '' }, field: 'permID', message: /permID, provID or trkSub/ },
    { name: 'bad station code', over: { stn: 'H-1' }, field: 'stn', message: /observatory code/ },
    { name: 'empty station', over: { stn: '' }, field: 'stn', message: /required/ },
  ];
  for (const c of cases) {
    it(c.name, () => {
      const r = parseAdesPsv(file(row(), row({ obsTime: '2026-03-01T04:00:00Z', ...c.over })));
      expect(r.issues.length).toBeGreaterThan(0);
      expect(r.issues[0]).toMatchObject({ line: 12, field: c.field });
      expect(r.issues[0].message).toMatch(c.message);
      // The good line is still read; the bad one is not.
      expect(r.observations.map((o) => o.line)).toEqual([11]);
    });
  }

  it('wrong column count names the line and the column header line', () => {
    const r = parseAdesPsv(file(row(), 'HSO-26-U1|CCD|HSA'));
    expect(r.issues).toEqual([{ line: 12, field: null, message: 'Expected 18 fields (column header on line 10), found 3' }]);
  });

  it('reports several faults of one line, each with its field', () => {
    const r = parseAdesPsv(file(row({ ra: 'x', dec: '-95', rmsRA: '-1' })));
    expect(r.issues.map((i) => [i.line, i.field])).toEqual([[11, 'ra'], [11, 'dec'], [11, 'rmsRA']]);
  });

  it('missing required column and unknown column are reported on the column-header line', () => {
    const r = parseAdesPsv(['# version=2022', 'provID|mode|stn|obsTime|ra|decl', 'X|CCD|HSA|2026-03-01T03:12:45Z|1|2'].join('\n'));
    expect(r.issues).toEqual([
      { line: 2, field: 'decl', message: 'Unknown ADES field "decl" in the column header' },
      { line: 2, field: 'dec', message: 'Required field "dec" is missing from the column header' },
      { line: 3, field: null, message: 'Data lines not read: the column header on line 2 has errors' },
    ]);
    expect(r.observations).toEqual([]);
  });

  it('column header without any identity field', () => {
    const r = parseAdesPsv(['# version=2022', 'mode|stn|obsTime|ra|dec', 'CCD|HSA|2026-03-01T03:12:45Z|1|2'].join('\n'));
    expect(r.issues[0]).toMatchObject({ line: 2, field: 'permID' });
  });

  it('space-based observer positions are refused with the field', () => {
    const r = parseAdesPsv(['# version=2022', 'provID|mode|stn|sys|obsTime|ra|dec', 'X|CCD|HSA|ICRF_KM|2026-03-01T03:12:45Z|1|2'].join('\n'));
    expect(r.issues).toEqual([{ line: 3, field: 'sys', message: expect.stringMatching(/not supported/) }]);
  });

  it('radar delay on a line is refused with the field (ADES radar records are not optical astrometry)', () => {
    const r = parseAdesPsv(['# version=2022', 'provID|mode|stn|obsTime|ra|dec|delay|rmsDelay', 'X|CCD|HSA|2026-03-01T03:12:45Z|1|2|12.5|0.1'].join('\n'));
    expect(r.issues).toEqual([{ line: 3, field: 'delay', message: expect.stringMatching(/Radar.*not supported/) }]);
  });

  it('every mode of the ADES field-value list for images is accepted (MPC list as quoted in public code)', () => {
    const modes = ['CCD', 'CMO', 'VID', 'PHO', 'ENC', 'PMT', 'MIC', 'MER', 'TDI', 'UNK'];
    const r = parseAdesPsv(file(...modes.map((mode, k) => row({ mode, obsTime: `2026-03-01T0${k}:00:00Z` }))));
    expect(r.issues).toEqual([]);
    expect(r.observations.map((o) => o.mode)).toEqual(modes);
  });

  it('version line missing, unsupported, or repeated', () => {
    expect(parseAdesPsv(['provID|mode|stn|obsTime|ra|dec', 'X|CCD|HSA|2026-03-01T03:12:45Z|1|2'].join('\n')).issues).toEqual([
      { line: 1, field: 'version', message: expect.stringMatching(/must start with the ADES version line/) },
    ]);
    expect(parseAdesPsv('# version=1.0\nprovID|mode|stn|obsTime|ra|dec\nX|CCD|HSA|2026-03-01T03:12:45Z|1|2').issues).toEqual([
      { line: 1, field: 'version', message: expect.stringMatching(/not supported/) },
    ]);
    expect(parseAdesPsv('# version=2022\n# version=2022\nprovID|mode|stn|obsTime|ra|dec\nX|CCD|HSA|2026-03-01T03:12:45Z|1|2').issues).toEqual([
      { line: 2, field: 'version', message: expect.stringMatching(/appear once/) },
    ]);
  });

  it('keyword line outside a group, empty file, header without data', () => {
    expect(parseAdesPsv('# version=2022\n! mpcCode HSA\nprovID|mode|stn|obsTime|ra|dec\nX|CCD|HSA|2026-03-01T03:12:45Z|1|2').issues).toEqual([
      { line: 2, field: null, message: expect.stringMatching(/outside a header group/) },
    ]);
    expect(parseAdesPsv('\n\n').issues).toEqual([{ line: 0, field: null, message: 'The file is empty' }]);
    expect(parseAdesPsv('# version=2022\n# observatory\n! mpcCode HSA\n').issues).toEqual([
      { line: 0, field: null, message: expect.stringMatching(/No column-header line/) },
    ]);
    expect(parseAdesPsv('# version=2022\nprovID|mode|stn|obsTime|ra|dec\nX|CCD|HSA|2026-03-01T03:12:45Z|1|2\n# observatory\n! mpcCode HSB\n').issues).toEqual([
      { line: 4, field: null, message: expect.stringMatching(/end of the file with no column header/) },
    ]);
    expect(parseAdesPsv('# version=2022\nprovID|mode|stn|obsTime|ra|dec\n').issues).toEqual([
      { line: 0, field: null, message: 'No observations in the file' },
    ]);
  });
});

describe('duplicates', () => {
  it('same stn and obsTime to the millisecond inside the file: an issue naming both lines', () => {
    const r = parseAdesPsv(file(row(), row({ obsTime: '2026-03-01T03:30:00Z' }), row({ obsTime: '2026-03-01T03:12:45.1230Z', ra: '123.46' })));
    expect(r.issues).toEqual([
      { line: 13, field: 'obsTime', message: 'Duplicate observation: line 13 repeats line 11 (same stn HSA and obsTime 2026-03-01T03:12:45.123Z)' },
    ]);
    expect(r.observations.map((o) => o.line)).toEqual([11, 12]);
  });

  it('a different station or a different millisecond is not a duplicate', () => {
    const r = parseAdesPsv(file(row(), row({ stn: 'HSB' }), row({ obsTime: '2026-03-01T03:12:45.124Z' })));
    expect(r.issues).toEqual([]);
    expect(r.observations).toHaveLength(3);
  });

  it('observationKey normalises the instant to milliseconds', () => {
    expect(observationKey({ stn: 'HSA', obsTime: '2026-03-01T03:12:45.1Z' })).toBe(observationKey({ stn: 'HSA', obsTime: '2026-03-01T03:12:45.1004Z' }));
    expect(observationKey({ stn: 'HSA', obsTime: '2026-03-01T03:12:45.1Z' })).not.toBe(observationKey({ stn: 'HSB', obsTime: '2026-03-01T03:12:45.1Z' }));
    // rounding carries into the next day
    expect(normalizeObsTime('2026-12-31T23:59:59.9996Z')).toBe('2027-01-01T00:00:00.000Z');
    // inside a real leap second (2016-12-31, IERS Bulletin C; METHODS.md §1.2) the text form is kept
    expect(normalizeObsTime('2016-12-31T23:59:60.25Z')).toBe('2016-12-31T23:59:60.250Z');
    expect(() => normalizeObsTime('yesterday')).toThrow(/ISO 8601/);
  });
});
