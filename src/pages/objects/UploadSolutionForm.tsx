// Add an orbit-solution version: upload a CCSDS OPM (KVN) or Tocsin JSON file, or enter elements in a form.
// A refused input shows the engine's issues, each with its line or field.
import { useState, type FormEvent } from 'react';
import { useAddSolution, uploadIssues } from '../../api/objects';
import { Button, Card, Notice, SelectField, TextField, errorMessage } from '../../components/ui';

type Mode = 'file' | 'form';

const FIT_FIELDS = [
  { key: 'observationArcDays', label: 'Observation arc (days)' },
  { key: 'observationCount', label: 'Number of observations' },
  { key: 'fitRmsArcsec', label: 'Fit RMS (arcsec)' },
] as const;

const ELEMENT_FIELDS = [
  { key: 'perihelionDistanceAu', label: 'q, perihelion distance (AU)' },
  { key: 'eccentricity', label: 'e, eccentricity' },
  { key: 'inclinationDeg', label: 'i, inclination (deg)' },
  { key: 'ascendingNodeDeg', label: 'Ω, ascending node (deg)' },
  { key: 'argPerihelionDeg', label: 'ω, argument of perihelion (deg)' },
  { key: 'meanAnomalyDeg', label: 'M, mean anomaly at epoch (deg)' },
] as const;
const SIGMA_KEYS = ['q', 'e', 'i', 'node', 'argPeri', 'meanAnomaly'] as const;

export function UploadSolutionForm({ objectId, onDone }: { objectId: number; onDone: (version: number) => void }) {
  const add = useAddSolution(objectId);
  const [mode, setMode] = useState<Mode>('file');
  const [file, setFile] = useState<File | null>(null);
  const [fit, setFit] = useState<Record<string, string>>({});
  const [epoch, setEpoch] = useState('');
  const [el, setEl] = useState<Record<string, string>>({});
  const [sigma, setSigma] = useState<Record<string, string>>({});
  const [ng, setNg] = useState({ a1: '', a2: '', a3: '', law: 'water-ice' });
  const issues = uploadIssues(add.error);

  const num = (s: string | undefined) => (s === undefined || s.trim() === '' ? undefined : Number(s));

  const submit = (e: FormEvent) => {
    e.preventDefault();
    if (mode === 'file') {
      if (!file) return;
      add.mutate({ kind: 'file', file, fields: fit }, { onSuccess: (s) => onDone(s.version) });
      return;
    }
    const elements = Object.fromEntries(ELEMENT_FIELDS.map((f) => [f.key, num(el[f.key])]).filter(([, v]) => v !== undefined));
    const sig = SIGMA_KEYS.map((k) => num(sigma[k]));
    const hasNg = [ng.a1, ng.a2, ng.a3].some((v) => v.trim() !== '');
    const solution: Record<string, unknown> = { epoch: epoch.trim(), elements };
    if (hasNg) solution.nonGrav = { a1: num(ng.a1) ?? 0, a2: num(ng.a2) ?? 0, a3: num(ng.a3) ?? 0, law: ng.law };
    if (sig.every((v) => v !== undefined)) {
      solution.covariance = { parameters: [...SIGMA_KEYS], matrix: sig.map((s, i) => sig.map((t, j) => (i === j ? s! * t! : 0))) };
    }
    const body: Record<string, unknown> = { solution };
    for (const f of FIT_FIELDS) if (num(fit[f.key]) !== undefined) body[f.key] = num(fit[f.key]);
    add.mutate({ kind: 'form', body }, { onSuccess: (s) => onDone(s.version) });
  };

  return (
    <Card aria-labelledby="upload-heading">
      <h2 id="upload-heading" className="mb-1 text-lg font-semibold">Add a solution version</h2>
      <p className="mb-4 text-sm text-ink-soft">Each accepted solution becomes a new, unchangeable version. A refused one stores nothing.</p>
      <div role="radiogroup" aria-label="Source" className="mb-4 flex gap-4 text-sm">
        <label className="flex items-center gap-2">
          <input type="radio" name="mode" checked={mode === 'file'} onChange={() => setMode('file')} /> Upload a file (CCSDS OPM or Tocsin JSON)
        </label>
        <label className="flex items-center gap-2">
          <input type="radio" name="mode" checked={mode === 'form'} onChange={() => setMode('form')} /> Enter elements
        </label>
      </div>
      <form onSubmit={submit} noValidate className="space-y-4">
        {mode === 'file' ? (
          <div>
            <label htmlFor="solution-file" className="mb-1 block text-sm font-medium">Orbit solution file</label>
            <input id="solution-file" type="file" accept=".opm,.kvn,.txt,.json,application/json,text/plain" onChange={(e) => setFile(e.target.files?.[0] ?? null)} className="block text-sm" />
          </div>
        ) : (
          <>
            <TextField label="Epoch" hint='"2030-01-01T00:00:00Z" (UTC), "TDB:2030-01-01T00:00:00" or "JD:2462502.5" (TDB)' value={epoch} onChange={(e) => setEpoch(e.target.value)} />
            <fieldset>
              <legend className="mb-2 text-sm font-semibold">Heliocentric ecliptic J2000 elements and their 1-sigma (optional; all six for a covariance)</legend>
              <div className="grid gap-3 sm:grid-cols-2">
                {ELEMENT_FIELDS.map((f, k) => (
                  <div key={f.key} className="grid grid-cols-3 gap-2">
                    <TextField className="col-span-2" label={f.label} inputMode="decimal" value={el[f.key] ?? ''} onChange={(e) => setEl({ ...el, [f.key]: e.target.value })} />
                    <TextField label="1σ" inputMode="decimal" value={sigma[SIGMA_KEYS[k]] ?? ''} onChange={(e) => setSigma({ ...sigma, [SIGMA_KEYS[k]]: e.target.value })} />
                  </div>
                ))}
              </div>
            </fieldset>
            <fieldset>
              <legend className="mb-2 text-sm font-semibold">Non-gravitational parameters (AU/d², optional)</legend>
              <div className="grid gap-3 sm:grid-cols-4">
                {(['a1', 'a2', 'a3'] as const).map((k) => (
                  <TextField key={k} label={k.toUpperCase()} inputMode="decimal" value={ng[k]} onChange={(e) => setNg({ ...ng, [k]: e.target.value })} />
                ))}
                <SelectField label="Law" value={ng.law} onChange={(e) => setNg({ ...ng, law: e.target.value })}>
                  <option value="water-ice">Water ice g(r)</option>
                  <option value="inverse-square">Inverse square</option>
                </SelectField>
              </div>
            </fieldset>
          </>
        )}
        <div className="grid gap-3 sm:grid-cols-3">
          {FIT_FIELDS.map((f) => (
            <TextField key={f.key} label={f.label} inputMode="decimal" value={fit[f.key] ?? ''} onChange={(e) => setFit({ ...fit, [f.key]: e.target.value })} />
          ))}
        </div>
        <Button type="submit" busy={add.isPending} disabled={mode === 'file' && !file}>
          Add version
        </Button>
      </form>
      {add.isError && (
        <Notice tone="error" title={errorMessage(add.error)} className="mt-4">
          {issues.length > 0 && (
            <ul className="list-disc space-y-1 pl-5" data-testid="upload-issues">
              {issues.map((i, k) => (
                <li key={k}>
                  <span className="font-mono font-semibold">{i.where}</span>: {i.message}
                </li>
              ))}
            </ul>
          )}
        </Notice>
      )}
    </Card>
  );
}
