// Start an orbit fit of the object's astrometry (its non-excluded observations at queue time): epoch, the
// non-gravitational terms of the second fit (none = gravity-only fit only), their law, outlier rejection, where
// the iteration starts (Gauss's method or a stored solution version), the iteration cap, and an optional sigma per
// observatory among the object's observations (settings.stationWeights: that station's reported uncertainties are
// replaced), and UT1 − UTC for the observer positions (settings.ut1MinusUtcSeconds, empty = 0). Checked with the
// shared fitSettingsSchema, messages at the fields; a queued fit opens its page.
import { useState, type FormEvent } from 'react';
import { Link, useNavigate } from 'react-router';
import { fitSettingsSchema, MAX_STATION_SIGMA_ARCSEC, MAX_UT1_MINUS_UTC_SECONDS, NONGRAV_TERMS, type FitSettingsInput, type NonGravTerm, type OrbitDeterminationResult } from '../../../shared/schemas/od';
import type { SolutionSummary } from '../../../shared/schemas/objects';
import { ApiError, fieldErrors } from '../../api/client';
import { useAstrometry, useCreateFit, useFit } from '../../api/od';
import { Button, Card, Notice, SelectField, TextField, errorMessage } from '../../components/ui';
import { stationsOf } from './stationWeights';

const TERM_LABELS: Record<NonGravTerm, string> = { a1: 'A1 (radial)', a2: 'A2 (transverse)', a3: 'A3 (normal)' };

export function StartFitForm({ objectId, solutions, observationCount, lastFitId = null }: { objectId: number; solutions: SolutionSummary[]; observationCount: number | null; lastFitId?: number | null }) {
  const navigate = useNavigate();
  const create = useCreateFit(objectId);
  const [epoch, setEpoch] = useState('');
  const [terms, setTerms] = useState<NonGravTerm[]>(['a1', 'a2']);
  const [law, setLaw] = useState<'water-ice' | 'inverse-square'>('water-ice');
  const [rejectOutliers, setRejectOutliers] = useState(true);
  const [initial, setInitial] = useState('');
  const [maxIterations, setMaxIterations] = useState('25');
  /** UT1 − UTC text in seconds ('' = 0, UT1 taken as UTC). */
  const [ut1MinusUtc, setUt1MinusUtc] = useState('');
  const [local, setLocal] = useState<Record<string, string>>({});
  /** Analyst sigma text per station code ('' = use the reported uncertainties). */
  const [stationSigma, setStationSigma] = useState<Record<string, string>>({});
  const [stationLocal, setStationLocal] = useState<Record<string, string>>({});
  const astrometry = useAstrometry(objectId);
  const stations = astrometry.data ? stationsOf(astrometry.data.observations) : [];
  const lastFit = useFit(lastFitId ?? 0, { enabled: lastFitId !== null });
  const last = lastFitId !== null && lastFit.data?.result ? lastFitStations(lastFit.data.id, lastFit.data.result) : { hints: new Map<string, string>(), flagged: [] };
  const lastStations = last.hints;
  // flagged stations that are among this form's stations (their RMS offered as the new sigma)
  const offer = last.flagged.filter((f) => stations.some((st) => st.stn === f.stn) && f.rmsArcsec > 0 && f.rmsArcsec <= MAX_STATION_SIGMA_ARCSEC);
  const errors = { ...fieldErrors(create.error), ...local };
  const stationErrors = { ...stationServerErrors(create.error, create.variables?.stationWeights), ...stationLocal };

  const submit = (e: FormEvent) => {
    e.preventDefault();
    const body: FitSettingsInput = {
      epoch: epoch.trim() === '' ? null : epoch.trim(),
      nonGravTerms: terms,
      nonGravLaw: law,
      rejectOutliers,
      initialSolutionId: initial === '' ? null : Number(initial),
      maxIterations: Number(maxIterations),
      // Only stations with a sigma typed in; a non-number becomes NaN so the schema's message lands at the field.
      stationWeights: stations
        .filter((st) => (stationSigma[st.stn] ?? '').trim() !== '')
        .map((st) => ({ stn: st.stn, sigmaArcsec: Number((stationSigma[st.stn] ?? '').trim().replace(',', '.')) })),
      // Empty = 0 (UT1 taken as UTC); a non-number becomes NaN so the schema's message lands at the field.
      ut1MinusUtcSeconds: ut1MinusUtc.trim() === '' ? 0 : Number(ut1MinusUtc.trim().replace(',', '.').replace('−', '-')),
    };
    const parsed = fitSettingsSchema.safeParse(body);
    if (!parsed.success) {
      const out: Record<string, string> = {};
      const perStation: Record<string, string> = {};
      for (const i of parsed.error.issues) {
        const k = String(i.path[0] ?? '');
        if (k === 'stationWeights' && typeof i.path[1] === 'number') {
          const stn = body.stationWeights![i.path[1]]?.stn;
          if (stn && !perStation[stn]) perStation[stn] = i.message;
        } else if (k && !out[k]) out[k] = k === 'maxIterations' ? 'A whole number from 1 to 100' : i.message;
      }
      setLocal(out);
      setStationLocal(perStation);
      return;
    }
    setLocal({});
    setStationLocal({});
    create.mutate(parsed.data, { onSuccess: (fit) => navigate(`/fits/${fit.id}`) });
  };

  return (
    <Card aria-labelledby="start-fit-heading">
      <h2 id="start-fit-heading" className="mb-1 text-lg font-semibold">Start an orbit fit</h2>
      <p className="mb-4 text-sm text-ink-soft">
        Fits the {observationCount === null ? '' : `${observationCount} `}observations not excluded, first with gravity only, then with the chosen
        non-gravitational terms, and compares the two.
      </p>
      {observationCount !== null && observationCount < 3 && (
        <Notice tone="caution" className="mb-4">
          A fit needs at least 3 observations from 2 nights; this object has {observationCount === 0 ? 'none' : observationCount} not excluded.{' '}
          <Link to={`/objects/${objectId}/astrometry`}>Add astrometry</Link>.
        </Notice>
      )}
      <form onSubmit={submit} noValidate className="grid gap-4 sm:grid-cols-2">
        <TextField label="Solution epoch" value={epoch} onChange={(e) => setEpoch(e.target.value)} error={errors.epoch} placeholder="middle of the arc" hint="Empty: the middle of the arc at 0h TDB. Or UTC like 2026-06-01T00:00:00Z, TDB:… or JD:…" />
        <SelectField label="Start from" value={initial} onChange={(e) => setInitial(e.target.value)} error={errors.initialSolutionId} hint="Gauss's method needs no prior orbit">
          <option value="">Gauss's method (preliminary orbit)</option>
          {solutions.map((s) => (
            <option key={s.id} value={s.id}>Solution v{s.version} · epoch {s.epochUtc.slice(0, 10)}</option>
          ))}
        </SelectField>
        <fieldset>
          <legend className="mb-1 block text-sm font-medium text-ink">Non-gravitational terms of the second fit</legend>
          <div className="flex flex-wrap gap-x-4 gap-y-1 text-sm">
            {NONGRAV_TERMS.map((t) => (
              <label key={t} className="inline-flex items-center gap-2">
                <input type="checkbox" checked={terms.includes(t)} onChange={() => setTerms((x) => (x.includes(t) ? x.filter((y) => y !== t) : [...x, t].sort()))} />
                {TERM_LABELS[t]}
              </label>
            ))}
          </div>
          <p className="mt-1 text-sm text-ink-soft">None ticked: the gravity-only fit alone, no comparison.</p>
          {errors.nonGravTerms && <p className="mt-1 text-sm font-medium text-danger-700">{errors.nonGravTerms}</p>}
        </fieldset>
        <SelectField label="Non-gravitational law" value={law} onChange={(e) => setLaw(e.target.value as typeof law)} error={errors.nonGravLaw} disabled={terms.length === 0}>
          <option value="water-ice">Water-ice sublimation g(r)</option>
          <option value="inverse-square">Inverse square of the distance</option>
        </SelectField>
        <TextField label="Iterations at most" type="number" min={1} max={100} value={maxIterations} onChange={(e) => setMaxIterations(e.target.value)} error={errors.maxIterations} />
        <TextField
          label="UT1 − UTC (s)"
          inputMode="decimal"
          value={ut1MinusUtc}
          onChange={(e) => setUt1MinusUtc(e.target.value)}
          error={errors.ut1MinusUtcSeconds}
          placeholder="0"
          hint={`One value for the whole arc, from the IERS bulletins for the arc's dates (within ±${MAX_UT1_MINUS_UTC_SECONDS} s). Empty or 0: UT1 taken as UTC. Matters for very close objects.`}
        />
        <label className="inline-flex items-center gap-2 self-center text-sm">
          <input type="checkbox" checked={rejectOutliers} onChange={(e) => setRejectOutliers(e.target.checked)} />
          Reject and recover outliers by the χ² rule
        </label>
        <fieldset className="sm:col-span-2">
          <legend className="mb-1 block text-sm font-medium text-ink">Reweight observatories</legend>
          <p className="mb-2 text-sm text-ink-soft">
            A sigma (arcsec, up to {MAX_STATION_SIGMA_ARCSEC}) replaces the reported uncertainties of every observation from that observatory, for RA·cos δ
            and Dec alike. Empty: use the reported uncertainties. Several observations from one observatory in one night are still de-weighted on top.
          </p>
          {astrometry.isPending ? (
            <p className="text-sm text-ink-soft">Loading the observatories of the observations…</p>
          ) : stations.length === 0 ? (
            <p className="text-sm text-ink-soft">No observations to reweight yet.</p>
          ) : (
            <div className="grid gap-3 sm:grid-cols-3">
              {stations.map((st) => (
                <TextField
                  key={st.stn}
                  label={`${st.stn} sigma (″)`}
                  inputMode="decimal"
                  value={stationSigma[st.stn] ?? ''}
                  onChange={(e) => setStationSigma((x) => ({ ...x, [st.stn]: e.target.value }))}
                  placeholder="reported"
                  hint={`${st.count} observation${st.count === 1 ? '' : 's'}${lastStations.has(st.stn) ? ` · ${lastStations.get(st.stn)}` : ''}`}
                  error={stationErrors[st.stn]}
                />
              ))}
            </div>
          )}
          {offer.length > 0 && (
            <Button
              type="button"
              variant="secondary"
              className="mt-3"
              onClick={() => setStationSigma((x) => ({ ...x, ...Object.fromEntries(offer.map((f) => [f.stn, f.rmsArcsec.toFixed(2)])) }))}
            >
              Use fit #{lastFitId}'s RMS for {offer.map((f) => f.stn).join(', ')}
            </Button>
          )}
          {errors.stationWeights && Object.keys(stationErrors).length === 0 && <p className="mt-1 text-sm font-medium text-danger-700">{errors.stationWeights}</p>}
        </fieldset>
        <div className="sm:col-span-2">
          {create.isError && Object.keys(fieldErrors(create.error)).length === 0 && <Notice tone="error" className="mb-3">{errorMessage(create.error)}</Notice>}
          <Button type="submit" busy={create.isPending} disabled={observationCount !== null && observationCount < 3}>Queue the fit</Button>
        </div>
      </form>
    </Card>
  );
}

/** The server's per-station refusals (issue paths "stationWeights.N.stn", e.g. a code not in the observatory table), keyed by the code sent at N. */
function stationServerErrors(error: unknown, sent: readonly { stn: string }[] | undefined): Record<string, string> {
  if (!sent || !(error instanceof ApiError) || typeof error.details !== 'object' || error.details === null) return {};
  const issues = (error.details as { issues?: unknown }).issues;
  if (!Array.isArray(issues)) return {};
  const out: Record<string, string> = {};
  for (const i of issues as { path?: unknown; message?: unknown }[]) {
    const m = typeof i.path === 'string' ? /^stationWeights\.(\d+)/.exec(i.path) : null;
    const stn = m ? sent[Number(m[1])]?.stn : undefined;
    if (stn && typeof i.message === 'string' && !out[stn]) out[stn] = i.message;
  }
  return out;
}

/**
 * Per station, what the last fit said of it (the non-gravitational fit when it converged, else the gravity-only
 * one): "fit #3: RMS 0.131″, stated σ overstated" — a starting point for the sigma to type.
 */
function lastFitStations(fitId: number, result: OrbitDeterminationResult): { hints: Map<string, string>; flagged: { stn: string; rmsArcsec: number }[] } {
  const judged = result.nonGrav && result.nonGrav.status === 'converged' ? result.nonGrav : result.gravityOnly;
  const hints = new Map<string, string>();
  const flagged: { stn: string; rmsArcsec: number }[] = [];
  for (const s of judged.stations ?? []) {
    if (s.rmsArcsec === null) continue;
    const isFlagged = s.weights === 'understated' || s.weights === 'overstated';
    hints.set(s.stn, `fit #${fitId}: RMS ${s.rmsArcsec.toFixed(3)}″${isFlagged ? `, stated σ ${s.weights}` : ''}`);
    if (isFlagged) flagged.push({ stn: s.stn, rmsArcsec: s.rmsArcsec });
  }
  return { hints, flagged };
}
