// The start-run form of the object page: solution version, window end, methods, Monte Carlo clones and seed,
// monitored bodies. Field refusals from the server are shown at their field; a queued run opens its page.
import { useState, type FormEvent } from 'react';
import { useNavigate } from 'react-router';
import type { SolutionSummary } from '../../../shared/schemas/objects';
import { MAX_RUN_CLONES, RUN_BODIES, RUN_METHOD_LABELS, RUN_METHODS, type RunBody, type RunMethod } from '../../../shared/schemas/runs';
import { fieldErrors } from '../../api/client';
import { useCreateRun } from '../../api/runs';
import { Button, Card, Notice, SelectField, TextField, errorMessage } from '../../components/ui';

/** Default window end: 1 January ten years after the solution epoch (UTC). */
function defaultUntil(epochUtc: string): string {
  const year = new Date(epochUtc).getUTCFullYear();
  return `${Number.isFinite(year) ? year + 10 : 2036}-01-01T00:00:00Z`;
}

function CheckboxGroup<T extends string>({ legend, options, labels, value, onChange, error }: { legend: string; options: readonly T[]; labels?: Record<T, string>; value: T[]; onChange: (v: T[]) => void; error?: string }) {
  return (
    <fieldset>
      <legend className="mb-1 block text-sm font-medium text-ink">{legend}</legend>
      <div className="flex flex-wrap gap-x-4 gap-y-1">
        {options.map((o) => (
          <label key={o} className="inline-flex items-center gap-2 text-sm">
            <input type="checkbox" checked={value.includes(o)} onChange={() => onChange(value.includes(o) ? value.filter((x) => x !== o) : [...value, o])} />
            {labels ? labels[o] : o[0].toUpperCase() + o.slice(1)}
          </label>
        ))}
      </div>
      {error && <p className="mt-1 text-sm font-medium text-danger-700">{error}</p>}
    </fieldset>
  );
}

export function StartRunForm({ solutions }: { solutions: SolutionSummary[] }) {
  const navigate = useNavigate();
  const create = useCreateRun();
  const latest = solutions[0];
  const [solutionId, setSolutionId] = useState<number>(latest?.id ?? 0);
  const [until, setUntil] = useState(latest ? defaultUntil(latest.epochUtc) : '');
  const [methods, setMethods] = useState<RunMethod[]>(['linear']);
  const [clones, setClones] = useState('1000');
  const [seed, setSeed] = useState('1');
  const [bodies, setBodies] = useState<RunBody[]>(['earth']);
  if (!latest) return null;
  const errors = fieldErrors(create.error);

  const submit = (e: FormEvent) => {
    e.preventDefault();
    create.mutate(
      { solutionId, until: until.trim(), methods, clones: Number(clones), seed: Number(seed), bodies },
      { onSuccess: (run) => navigate(`/runs/${run.id}`) },
    );
  };

  return (
    <Card aria-labelledby="start-run-heading">
      <h2 id="start-run-heading" className="mb-4 text-lg font-semibold">Start an assessment run</h2>
      <form onSubmit={submit} className="grid gap-4 sm:grid-cols-2" noValidate>
        <SelectField label="Solution version" value={solutionId} onChange={(e) => setSolutionId(Number(e.target.value))} error={errors.solutionId}>
          {solutions.map((s) => (
            <option key={s.id} value={s.id}>
              v{s.version} · epoch {s.epochUtc.slice(0, 10)} · {s.forceModel === 'gravity-only' ? 'gravity only' : `with ${s.nonGravTerms.join(', ')}`}
            </option>
          ))}
        </SelectField>
        <TextField label="Window end" value={until} onChange={(e) => setUntil(e.target.value)} error={errors.until} hint="UTC like 2036-01-01T00:00:00Z, or TDB:… or JD:…" />
        <CheckboxGroup legend="Methods" options={RUN_METHODS} labels={RUN_METHOD_LABELS} value={methods} onChange={setMethods} error={errors.methods} />
        <CheckboxGroup legend="Bodies" options={RUN_BODIES} value={bodies} onChange={setBodies} error={errors.bodies} />
        <TextField label="Monte Carlo clones" type="number" min={1} max={MAX_RUN_CLONES} value={clones} onChange={(e) => setClones(e.target.value)} error={errors.clones} hint={`Used by Monte Carlo only; at most ${MAX_RUN_CLONES.toLocaleString('en')}`} />
        <TextField label="Seed" type="number" min={0} value={seed} onChange={(e) => setSeed(e.target.value)} error={errors.seed} hint="The same seed repeats the same clones" />
        <div className="sm:col-span-2">
          {create.isError && Object.keys(errors).length === 0 && <Notice tone="error" className="mb-3">{errorMessage(create.error)}</Notice>}
          <Button type="submit" busy={create.isPending}>Queue the run</Button>
        </div>
      </form>
    </Card>
  );
}
