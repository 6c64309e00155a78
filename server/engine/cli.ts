/**
 * Tocsin engine command line (issue 3 item 8). `npm run -s engine -- <command> [args]`
 *
 * Prints exactly ONE JSON document on stdout. On failure prints {"error":{"code","message"[,"issues"]}} on stderr and
 * exits non-zero: 2 for usage errors (unknown command or option, malformed epoch or number), 1 for everything else
 * (unreadable or invalid orbit file, time outside the supported range, feature not available, computation failure).
 *
 * Commands (output keys are fixed; other tools read them):
 *   ephemeris --body <body> --at EPOCH [--center sun|earth]
 *       -> {"body","center","frame":"ICRF","epochTdbJd","positionKm","velocityKmS"}
 *          full-series ephemeris (EPH seriesState); heliocentric, or geocentric with --center earth (meant for the Moon)
 *   propagate FILE --to EPOCH [--model n-body|two-body]
 *       -> {"object","model","epochTdbJd","center":"sun","frame":"ICRF","positionKm","velocityKmS","impact"}
 *          ("impact" is null, or {"body","epochTdbJd","utc"} when the trajectory reached a surface and stopped there)
 *   approaches FILE --until EPOCH [--max-au 0.05] [--body earth[,moon,...]]
 *       -> {"object","approaches":[{"body","epochTdbJd","utc","utcPredicted","distanceKm","relativeSpeedKmS",
 *           "vInfinityKmS","bPlane":{"xiKm","zetaKm"},"impact"}]}
 *   classify FILE
 *       -> {"object","eccentricity","eccentricitySigma","unboundSignificance","bound","vInfinityKmS","perihelionAu"}
 *   assess FILE --until EPOCH [--clones N] [--seed S] [--method linear|mc|lov|all] [--analysis-date EPOCH] [--repair-covariance]
 *       -> the Engine II risk assessment of issue 4 item 8 (server/engine/assess/assess.ts)
 *   fit FILE.psv --observatories FILE.json [--nongrav A1,A2[,A3]] [--law water-ice|inverse-square] [--epoch EPOCH] [--no-outliers] [--max-iterations N]
 *       [--station-sigma STN=ARCSEC[,STN=ARCSEC...]] [--ut1-utc SECONDS] [--progress]
 *       -> {"object","chosen","solution","fit","gravityOnly","comparison","preliminary","arc","warnings","caution"}
 *          orbit determination from IAU ADES PSV astrometry (server/engine/od/fit.ts, METHODS §9): "fit" is the chosen
 *          fit (the non-gravitational one with --nongrav, else gravity-only: state, covariance, RMS, chi-square,
 *          residuals of every observation, elements with 1-sigma, encounter uncertainty), "solution" the same fit as a
 *          Tocsin JSON orbit solution (usable as FILE by the other commands), "gravityOnly" the gravity-only fit when
 *          --nongrav is given (else null) and "comparison" the gravity-only/non-grav comparison (else null).
 *          --station-sigma reweights whole stations: every observation of STN uses ARCSEC (0 < ARCSEC <= 60) for
 *          RA·cos(dec) and Dec instead of its reported uncertainties (correlation dropped; the nightly de-weighting still
 *          applies); a named station without observations gives a warning. A malformed list is a usage error (exit 2).
 *          --ut1-utc SECONDS is UT1 − UTC for the observer positions' Earth rotation angle, one value for the arc, in
 *          [-0.9, 0.9] (default 0 = UT1 taken as UTC; a negative value as --ut1-utc=-0.3); outside that range or not a
 *          number is a usage error (exit 2).
 *          Malformed ADES lines and observatory files are INVALID_INPUT with one issue per line/field.
 *   help -> {"commands": {...}, "epochForms": [...]}
 *
 * FILE is a CCSDS OPM 2.0 (KVN) or a Tocsin JSON orbit solution (shared/schemas/orbit.ts).
 * EPOCH is "2030-01-01T00:00:00Z" (UTC), "TDB:2030-01-01T00:00:00" or "JD:2462502.5" (TDB).
 * `utc` strings come from time.ts; past the leap-second table they are predicted (utcPredicted = true).
 */
import { readFileSync } from 'node:fs';
import { pathToFileURL } from 'node:url';
import { parseArgs } from 'node:util';
import { AU_KM, DAY_S } from './constants';
import { EpochFormatError, TimeScaleError, parseEpoch, tdbJdFromDays, utcFromTdbDays } from './time';
import { OrbitInputError } from './input/errors';
import type { NormalizedOrbit } from '../../shared/schemas/orbit';
import type { Vec3 } from './vec';

export type ErrorCode =
  | 'USAGE'
  | 'INVALID_EPOCH'
  | 'INVALID_INPUT'
  | 'FILE_NOT_READABLE'
  | 'OUT_OF_RANGE'
  | 'NOT_AVAILABLE'
  | 'COMPUTATION_FAILED';

export class CliError extends Error {
  constructor(
    readonly code: ErrorCode,
    message: string,
    readonly exitCode: 1 | 2 = 1,
    readonly issues?: { where: string; message: string }[],
  ) {
    super(message);
    this.name = 'CliError';
  }
}

const AUD_TO_KMS = AU_KM / DAY_S;
const EPOCH_FORMS = ['2030-01-01T00:00:00Z (UTC)', 'TDB:2030-01-01T00:00:00 (TDB)', 'JD:2462502.5 (TDB Julian date)'];
const BODIES = ['mercury', 'venus', 'earth', 'moon', 'mars', 'jupiter', 'saturn', 'uranus', 'neptune'] as const;
type Body = (typeof BODIES)[number];

const USAGE: Record<string, string> = {
  ephemeris: 'ephemeris --body <mercury|venus|earth|moon|mars|jupiter|saturn|uranus|neptune> --at EPOCH [--center sun|earth]',
  propagate: 'propagate FILE --to EPOCH [--model n-body|two-body]',
  approaches: 'approaches FILE --until EPOCH [--max-au 0.05] [--body earth[,moon,venus,mars]]',
  classify: 'classify FILE',
  assess: 'assess FILE --until EPOCH [--clones N] [--seed S] [--method linear|mc|lov|all] [--analysis-date EPOCH] [--repair-covariance] [--max-au 0.05] [--body earth[,...]] [--progress]',
  fit: 'fit FILE.psv --observatories FILE.json [--nongrav A1,A2[,A3]] [--law water-ice|inverse-square] [--epoch EPOCH] [--no-outliers] [--max-iterations N] [--station-sigma HSA=0.5,HSB=0.8] [--ut1-utc SECONDS] [--progress]',
  help: 'help',
};

function usageError(message: string): CliError {
  return new CliError('USAGE', `${message}. Usage: npm run -s engine -- ${Object.values(USAGE).join(' | ')}`, 2);
}

function epochArg(name: string, value: string | undefined): number {
  if (value === undefined) throw usageError(`missing --${name} EPOCH`);
  try {
    return parseEpoch(value).tdbDays;
  } catch (err) {
    if (err instanceof EpochFormatError) throw new CliError('INVALID_EPOCH', `--${name}: ${err.message}`, 2);
    if (err instanceof TimeScaleError) throw new CliError('OUT_OF_RANGE', `--${name}: ${err.message}`, 1);
    throw err;
  }
}

function positional(args: string[], what: string): string {
  if (args.length === 0) throw usageError(`missing ${what}`);
  if (args.length > 1) throw usageError(`unexpected extra argument ${JSON.stringify(args[1])}`);
  return args[0];
}

function parse<O extends Record<string, { type: 'string' | 'boolean' }>>(argv: string[], options: O) {
  try {
    return parseArgs({ args: argv, options, allowPositionals: true as const, strict: true as const });
  } catch (err) {
    throw usageError((err as Error).message.replace(/\.$/, ''));
  }
}

async function loadOrbitFile(path: string): Promise<NormalizedOrbit> {
  const text = readText(path);
  const { loadOrbitSolution } = await import('./input/solution');
  try {
    return loadOrbitSolution(text);
  } catch (err) {
    if (err instanceof OrbitInputError) throw new CliError('INVALID_INPUT', `${path}: ${err.message}`, 1, err.issues);
    throw err;
  }
}

/** Import a sibling engine module; a missing module becomes a NOT_AVAILABLE error, never fake output. */
async function needModule<T>(what: string, load: () => Promise<T>): Promise<T> {
  try {
    return await load();
  } catch (err) {
    const code = (err as NodeJS.ErrnoException).code;
    if (code === 'ERR_MODULE_NOT_FOUND' || /Cannot find module/.test((err as Error).message)) {
      throw new CliError('NOT_AVAILABLE', `${what} is not available in this build (module not found)`);
    }
    throw err;
  }
}

const kmFromAu = (v: Vec3): Vec3 => [v[0] * AU_KM, v[1] * AU_KM, v[2] * AU_KM];
const kmsFromAud = (v: Vec3): Vec3 => [v[0] * AUD_TO_KMS, v[1] * AUD_TO_KMS, v[2] * AUD_TO_KMS];

function bodyList(text: string | undefined, fallback: Body[]): Body[] {
  if (text === undefined) return fallback;
  const list = text.split(',').map((s) => s.trim().toLowerCase()).filter(Boolean);
  if (list.length === 0) throw usageError('--body needs a body name');
  for (const b of list) {
    if (!(BODIES as readonly string[]).includes(b)) throw usageError(`unknown body ${JSON.stringify(b)} (known: ${BODIES.join(', ')})`);
  }
  return list as Body[];
}

async function cmdEphemeris(argv: string[]): Promise<unknown> {
  const { values, positionals } = parse(argv, { body: { type: 'string' }, at: { type: 'string' }, center: { type: 'string' } });
  if (positionals.length) throw usageError(`unexpected argument ${JSON.stringify(positionals[0])}`);
  if (values.body === undefined) throw usageError('missing --body');
  const [body] = bodyList(values.body, []);
  if (values.body.includes(',')) throw usageError('ephemeris takes one --body');
  const center = (values.center ?? 'sun').toLowerCase();
  if (center !== 'sun' && center !== 'earth') throw usageError(`--center must be sun or earth, got ${JSON.stringify(values.center)}`);
  const t = epochArg('at', values.at);
  const eph = await needModule('the ephemeris (server/engine/ephemeris)', () => import('./ephemeris'));
  const s = eph.seriesState(body, t);
  let pos = s.positionAu;
  let vel = s.velocityAuD;
  if (center === 'earth') {
    const e = eph.seriesState('earth', t);
    pos = [pos[0] - e.positionAu[0], pos[1] - e.positionAu[1], pos[2] - e.positionAu[2]];
    vel = [vel[0] - e.velocityAuD[0], vel[1] - e.velocityAuD[1], vel[2] - e.velocityAuD[2]];
  }
  return {
    body,
    center,
    frame: 'ICRF',
    epochTdbJd: tdbJdFromDays(t),
    positionKm: kmFromAu(pos),
    velocityKmS: kmsFromAud(vel),
  };
}

function utcOf(tdbDays: number): { utc: string | null; utcPredicted: boolean } {
  try {
    const u = utcFromTdbDays(tdbDays);
    return { utc: u.utc, utcPredicted: u.predicted };
  } catch (err) {
    if (err instanceof TimeScaleError) return { utc: null, utcPredicted: false }; // before 1972: no UTC
    throw err;
  }
}

async function cmdPropagate(argv: string[]): Promise<unknown> {
  const { values, positionals } = parse(argv, { to: { type: 'string' }, model: { type: 'string' } });
  const file = positional(positionals, 'FILE (orbit solution)');
  const model = values.model ?? 'n-body';
  if (model !== 'n-body' && model !== 'two-body') throw usageError(`--model must be n-body or two-body, got ${JSON.stringify(model)}`);
  const to = epochArg('to', values.to);
  const orbit = await loadOrbitFile(file);
  const dyn = await needModule('the dynamics (server/engine/dynamics)', () => import('./dynamics'));
  const res = compute(() =>
    dyn.propagate({
      positionAu: orbit.positionAu,
      velocityAuD: orbit.velocityAuD,
      fromTdbDays: orbit.epochTdbDays,
      toTdbDays: to,
      model,
      nonGrav: orbit.nonGrav,
    }),
  );
  return {
    object: orbit.designation,
    model,
    epochTdbJd: tdbJdFromDays(res.tdbDays),
    center: 'sun',
    frame: 'ICRF',
    positionKm: kmFromAu(res.positionAu),
    velocityKmS: kmsFromAud(res.velocityAuD),
    impact: res.impact ? { body: res.impact.body, epochTdbJd: tdbJdFromDays(res.impact.tdbDays), utc: utcOf(res.impact.tdbDays).utc } : null,
  };
}

async function cmdApproaches(argv: string[]): Promise<unknown> {
  const { values, positionals } = parse(argv, { until: { type: 'string' }, 'max-au': { type: 'string' }, body: { type: 'string' } });
  const file = positional(positionals, 'FILE (orbit solution)');
  const until = epochArg('until', values.until);
  let maxAu = 0.05;
  if (values['max-au'] !== undefined) {
    maxAu = Number(values['max-au']);
    if (!(maxAu > 0 && maxAu < 10)) throw usageError(`--max-au must be a number in (0, 10), got ${JSON.stringify(values['max-au'])}`);
  }
  const bodies = bodyList(values.body, ['earth']);
  const orbit = await loadOrbitFile(file);
  const dyn = await needModule('the dynamics (server/engine/dynamics)', () => import('./dynamics'));
  const list = compute(() =>
    dyn.findCloseApproaches({
      positionAu: orbit.positionAu,
      velocityAuD: orbit.velocityAuD,
      fromTdbDays: orbit.epochTdbDays,
      untilTdbDays: until,
      bodies,
      maxAu,
      nonGrav: orbit.nonGrav,
    }),
  );
  return {
    object: orbit.designation,
    approaches: list.map((a) => {
      const u = utcOf(a.tdbDays);
      return {
        body: a.body,
        epochTdbJd: tdbJdFromDays(a.tdbDays),
        utc: u.utc,
        utcPredicted: u.utcPredicted,
        distanceKm: a.distanceKm,
        relativeSpeedKmS: a.relativeSpeedKmS,
        vInfinityKmS: a.vInfinityKmS,
        bPlane: a.bPlane ? { xiKm: a.bPlane.xiKm, zetaKm: a.bPlane.zetaKm } : null,
        impact: a.impact,
      };
    }),
  };
}

async function cmdClassify(argv: string[]): Promise<unknown> {
  const { positionals } = parse(argv, {});
  const file = positional(positionals, 'FILE (orbit solution)');
  const orbit = await loadOrbitFile(file);
  const { classifyOrbit } = await import('./classify');
  const c = classifyOrbit({ positionAu: orbit.positionAu, velocityAuD: orbit.velocityAuD, covariance: orbit.covariance });
  return {
    object: orbit.designation,
    eccentricity: c.eccentricity,
    eccentricitySigma: c.eccentricitySigma,
    unboundSignificance: c.unboundSignificance,
    bound: c.bound,
    vInfinityKmS: c.vInfinityKmS,
    perihelionAu: c.perihelionAu,
  };
}

/**
 * assess FILE --until EPOCH [--clones N] [--seed S] [--method linear|mc|lov|all (or a comma list; default linear)]
 *   [--analysis-date EPOCH (default: now)] [--repair-covariance] [--max-au 0.05] [--body earth[,...]] [--workers N]
 *   [--tolerance EPS] [--progress]
 * -> the issue 4 item 8 document (server/engine/assess/assess.ts). Progress lines go to stderr only with --progress.
 */
async function cmdAssess(argv: string[]): Promise<unknown> {
  const { values, positionals } = parse(argv, {
    until: { type: 'string' }, clones: { type: 'string' }, seed: { type: 'string' }, method: { type: 'string' },
    'analysis-date': { type: 'string' }, 'repair-covariance': { type: 'boolean' }, 'max-au': { type: 'string' },
    body: { type: 'string' }, workers: { type: 'string' }, tolerance: { type: 'string' }, progress: { type: 'boolean' },
  });
  const file = positional(positionals, 'FILE (orbit solution)');
  const until = epochArg('until', values.until);
  const intArg = (name: string, v: string | undefined, dflt: number, min: number) => {
    if (v === undefined) return dflt;
    const n = Number(v);
    if (!Number.isInteger(n) || n < min) throw usageError(`--${name} must be an integer >= ${min}, got ${JSON.stringify(v)}`);
    return n;
  };
  const clones = intArg('clones', values.clones, 1000, 1);
  const seed = intArg('seed', values.seed, 1, 0);
  const workers = values.workers === undefined ? undefined : intArg('workers', values.workers, 1, 1);
  const known = ['linear', 'mc', 'lov'] as const;
  const methodText = (values.method ?? 'linear').toLowerCase();
  const methods = methodText === 'all' ? [...known] : methodText.split(',').map((m) => m.trim());
  for (const m of methods) if (!(known as readonly string[]).includes(m)) throw usageError(`--method must be linear, mc, lov, all or a comma list, got ${JSON.stringify(values.method)}`);
  let maxAu = 0.05;
  if (values['max-au'] !== undefined) {
    maxAu = Number(values['max-au']);
    if (!(maxAu > 0 && maxAu < 10)) throw usageError(`--max-au must be a number in (0, 10), got ${JSON.stringify(values['max-au'])}`);
  }
  let tolerance: number | undefined;
  if (values.tolerance !== undefined) {
    tolerance = Number(values.tolerance);
    if (!(tolerance > 0 && tolerance < 1e-3)) throw usageError(`--tolerance must be a number in (0, 1e-3), got ${JSON.stringify(values.tolerance)}`);
  }
  const analysis = values['analysis-date'] !== undefined
    ? epochArg('analysis-date', values['analysis-date'])
    : parseEpoch(new Date().toISOString().replace(/\.\d+Z$/, 'Z')).tdbDays;
  const bodies = bodyList(values.body, ['earth']);
  const text = readText(file);
  const { loadOrbitSolution } = await import('./input/solution');
  let orbit: NormalizedOrbit;
  try {
    orbit = loadOrbitSolution(text, { deferCovarianceCheck: true });
  } catch (err) {
    if (err instanceof OrbitInputError) throw new CliError('INVALID_INPUT', `${file}: ${err.message}`, 1, err.issues);
    throw err;
  }
  const { assess, AssessError } = await needModule('the assessment (server/engine/assess)', () => import('./assess'));
  const progress = values.progress
    ? (p: { stage: string; done: number; total: number; rateClonesPerS?: number; etaS?: number | null }) =>
        process.stderr.write(`${JSON.stringify({ progress: p })}\n`)
    : undefined;
  try {
    return await assess(
      orbit,
      { untilTdbDays: until, methods: methods as ('linear' | 'mc' | 'lov')[], clones, seed, bodies, maxAu, analysisTdbDays: analysis, workers, repairCovariance: !!values['repair-covariance'], tolerance },
      { onProgress: progress },
    );
  } catch (err) {
    if (err instanceof AssessError) {
      if (err.code === 'NOT_AVAILABLE') throw new CliError('NOT_AVAILABLE', err.message);
      if (err.code === 'INVALID_OPTIONS') throw usageError(err.message);
      throw new CliError('INVALID_INPUT', `${file}: ${err.message}`, 1, [{ where: 'covariance', message: err.message }]);
    }
    return compute(() => {
      throw err;
    });
  }
}

function readText(path: string): string {
  try {
    return readFileSync(path, 'utf8');
  } catch (err) {
    throw new CliError('FILE_NOT_READABLE', `cannot read ${path}: ${(err as NodeJS.ErrnoException).code ?? (err as Error).message}`);
  }
}

/**
 * --station-sigma "HSA=0.5,HSB=0.8": station code = sigma in arcsec, comma separated. Checked here with the same rules
 * as the settings schema (code of 1-8 letters or digits, 0 < sigma <= 60, each station once); any fault is a usage error.
 */
export function stationSigmaArg(text: string): { stn: string; sigmaArcsec: number }[] {
  const bad = (why: string) => usageError(`--station-sigma takes STN=ARCSEC[,STN=ARCSEC...] (e.g. HSA=0.5,HSB=0.8): ${why}`);
  const out: { stn: string; sigmaArcsec: number }[] = [];
  for (const item of text.split(',')) {
    const m = /^\s*([A-Za-z0-9]{1,8})\s*=\s*(\S+)\s*$/.exec(item);
    if (!m) throw bad(`${JSON.stringify(item)} is not STN=ARCSEC with a code of 1 to 8 letters or digits`);
    const [, stn, valueText] = m;
    const sigmaArcsec = Number(valueText);
    if (!Number.isFinite(sigmaArcsec) || sigmaArcsec <= 0 || sigmaArcsec > 60) throw bad(`the sigma of ${stn} must be a number of arcseconds in (0, 60], got ${JSON.stringify(valueText)}`);
    if (out.some((w) => w.stn === stn)) throw bad(`station ${stn} is given twice`);
    out.push({ stn, sigmaArcsec });
  }
  return out;
}

/**
 * fit FILE.psv --observatories FILE.json [--nongrav A1,A2[,A3]] [--law water-ice|inverse-square] [--epoch EPOCH]
 *   [--no-outliers] [--max-iterations N] [--station-sigma STN=ARCSEC,...] [--ut1-utc SECONDS] [--progress]: orbit determination from optical astrometry (issue 8 item 7; server/engine/od/fit.ts).
 */
async function cmdFit(argv: string[]): Promise<unknown> {
  const { values, positionals } = parse(argv, {
    observatories: { type: 'string' }, nongrav: { type: 'string' }, epoch: { type: 'string' },
    'no-outliers': { type: 'boolean' }, 'max-iterations': { type: 'string' }, progress: { type: 'boolean' },
    law: { type: 'string' }, 'station-sigma': { type: 'string' }, 'ut1-utc': { type: 'string' },
  });
  const file = positional(positionals, 'FILE.psv (IAU ADES PSV astrometry)');
  if (values.observatories === undefined) throw usageError('missing --observatories FILE.json');
  const terms: ('a1' | 'a2' | 'a3')[] = [];
  if (values.nongrav !== undefined) {
    for (const t of values.nongrav.split(',').map((x) => x.trim().toLowerCase())) {
      if (t !== 'a1' && t !== 'a2' && t !== 'a3') throw usageError(`--nongrav takes a comma list of A1, A2, A3, got ${JSON.stringify(values.nongrav)}`);
      if (terms.includes(t)) throw usageError(`--nongrav names ${t.toUpperCase()} twice`);
      terms.push(t);
    }
  }
  const law = (values.law ?? 'water-ice').toLowerCase();
  if (law !== 'water-ice' && law !== 'inverse-square') throw usageError(`--law must be water-ice or inverse-square, got ${JSON.stringify(values.law)}`);
  let epoch: string | null = null;
  if (values.epoch !== undefined) {
    epochArg('epoch', values.epoch);
    epoch = values.epoch.trim();
  }
  let maxIterations = 25;
  if (values['max-iterations'] !== undefined) {
    maxIterations = Number(values['max-iterations']);
    if (!Number.isInteger(maxIterations) || maxIterations < 1 || maxIterations > 100) {
      throw usageError(`--max-iterations must be an integer in [1, 100], got ${JSON.stringify(values['max-iterations'])}`);
    }
  }
  const stationWeights = values['station-sigma'] === undefined ? [] : stationSigmaArg(values['station-sigma']);
  let ut1MinusUtcSeconds = 0;
  if (values['ut1-utc'] !== undefined) {
    // Same range as the settings schema: leap seconds keep UTC within 0.9 s of UT1.
    ut1MinusUtcSeconds = values['ut1-utc'].trim() === '' ? NaN : Number(values['ut1-utc']);
    if (!Number.isFinite(ut1MinusUtcSeconds) || Math.abs(ut1MinusUtcSeconds) > 0.9) {
      throw usageError(`--ut1-utc must be a number of seconds in [-0.9, 0.9] (UT1 − UTC from the IERS bulletins), got ${JSON.stringify(values['ut1-utc'])}`);
    }
  }
  const psv = readText(file);
  const obsText = readText(values.observatories);
  const od = await needModule('orbit determination (server/engine/od)', () => import('./od'));
  const { observatoryFileSchema, fitSettingsSchema } = await import('../../shared/schemas/od');
  const ades = od.parseAdesPsv(psv);
  if (ades.issues.length > 0) {
    throw new CliError(
      'INVALID_INPUT',
      `${file}: ${ades.issues.length} problem${ades.issues.length === 1 ? '' : 's'} in the ADES file (first: line ${ades.issues[0].line}: ${ades.issues[0].message})`,
      1,
      ades.issues.map((i) => ({ where: `line ${i.line}${i.field ? `, field ${i.field}` : ''}`, message: i.message })),
    );
  }
  let json: unknown;
  try {
    json = JSON.parse(obsText);
  } catch (err) {
    throw new CliError('INVALID_INPUT', `${values.observatories}: not valid JSON (${(err as Error).message})`);
  }
  const table = observatoryFileSchema.safeParse(json);
  if (!table.success) {
    throw new CliError(
      'INVALID_INPUT',
      `${values.observatories}: not a valid observatory file`,
      1,
      table.error.issues.map((i) => ({ where: i.path.join('.') || '(file)', message: i.message })),
    );
  }
  const ids = [...new Set(ades.observations.map((o) => o.permID ?? o.provID ?? o.trkSub ?? ''))];
  if (ids.length > 1) {
    throw new CliError('INVALID_INPUT', `${file}: observations of ${ids.length} objects (${ids.slice(0, 5).join(', ')}); give one object per file`);
  }
  const settings = fitSettingsSchema.parse({ epoch, nonGravTerms: terms, nonGravLaw: law, rejectOutliers: !values['no-outliers'], maxIterations, stationWeights, ut1MinusUtcSeconds });
  const onProgress = values.progress ? (p: { stage: string; done: number; total: number }) => process.stderr.write(`${JSON.stringify({ progress: p })}\n`) : undefined;
  let result;
  try {
    result = od.determineOrbit({ observations: ades.observations, observatories: table.data.observatories, settings }, { onProgress });
  } catch (err) {
    if (err instanceof od.OrbitDeterminationError) {
      if (err.code === 'FIT_FAILED') throw new CliError('COMPUTATION_FAILED', err.message);
      throw new CliError('INVALID_INPUT', `${file}: ${err.message}`);
    }
    return compute(() => {
      throw err;
    });
  }
  const chosen = result.nonGrav ?? result.gravityOnly;
  let solution: unknown = null;
  if (chosen.status !== 'failed') solution = od.fitToSolutionInput(chosen, { designation: ids[0] || 'unnamed', notes: `fitted by the engine fit command from ${file}` });
  return {
    object: ids[0] || null,
    chosen: chosen.label,
    solution,
    fit: chosen,
    gravityOnly: result.nonGrav ? result.gravityOnly : null,
    comparison: result.comparison,
    preliminary: result.preliminary,
    arc: result.arc,
    warnings: result.warnings,
    engineVersion: result.engineVersion,
    caution: 'Orbit fits and the figures derived from them are analysis aids; official statements come from the responsible authorities.',
  };
}

async function cmdHelp(): Promise<unknown> {
  return { commands: USAGE, epochForms: EPOCH_FORMS };
}

const COMMANDS: Record<string, (argv: string[]) => Promise<unknown>> = {
  ephemeris: cmdEphemeris,
  propagate: cmdPropagate,
  approaches: cmdApproaches,
  classify: cmdClassify,
  assess: cmdAssess,
  fit: cmdFit,
  help: cmdHelp,
};

/** Wrap engine computation errors (ranges, integrator failures) as COMPUTATION_FAILED / OUT_OF_RANGE. */
function compute<T>(fn: () => T): T {
  try {
    return fn();
  } catch (err) {
    if (err instanceof CliError) throw err;
    const msg = (err as Error).message ?? String(err);
    if (err instanceof RangeError || /outside the ephemeris span/.test(msg)) throw new CliError('OUT_OF_RANGE', msg);
    throw new CliError('COMPUTATION_FAILED', msg);
  }
}

export interface CliResult {
  stdout: string;
  stderr: string;
  exitCode: 0 | 1 | 2;
}

/** Run the CLI on an argument vector (without node and script). Pure apart from reading files. */
export async function runCli(argv: string[]): Promise<CliResult> {
  try {
    const [command, ...rest] = argv;
    if (command === undefined) throw usageError('no command given');
    const fn = COMMANDS[command];
    if (!fn) throw usageError(`unknown command ${JSON.stringify(command)}`);
    const out = await fn(rest);
    return { stdout: `${JSON.stringify(out)}\n`, stderr: '', exitCode: 0 };
  } catch (err) {
    let e: CliError;
    if (err instanceof CliError) e = err;
    else if (err instanceof OrbitInputError) e = new CliError('INVALID_INPUT', err.message, 1, err.issues);
    else e = new CliError('COMPUTATION_FAILED', (err as Error)?.message ?? String(err));
    const error: Record<string, unknown> = { code: e.code, message: e.message };
    if (e.issues) error.issues = e.issues;
    return { stdout: '', stderr: `${JSON.stringify({ error })}\n`, exitCode: e.exitCode };
  }
}

const isMain = process.argv[1] !== undefined && import.meta.url === pathToFileURL(process.argv[1]).href;
if (isMain) {
  runCli(process.argv.slice(2)).then((r) => {
    if (r.stdout) process.stdout.write(r.stdout);
    if (r.stderr) process.stderr.write(r.stderr);
    process.exitCode = r.exitCode;
  });
}
