// Add or edit one observatory of the office's table: code, name, east longitude, and EITHER the parallax
// constants (rho cos phi', rho sin phi', Earth equatorial radii) OR the geodetic latitude and height (WGS84,
// METHODS.md §9.4). Checked here with the shared zod schema (its messages at the fields) and again by the server.
import { useState, type FormEvent } from 'react';
import { observatorySchema, type ObservatoryInput } from '../../../shared/schemas/od';
import type { ObservatoryRow } from '../../../shared/schemas/odApi';
import { fieldErrors } from '../../api/client';
import { useSaveObservatory } from '../../api/od';
import { Button, Card, Notice, TextField, errorMessage } from '../../components/ui';

type Mode = 'parallax' | 'geodetic';
type Text = { code: string; name: string; longitudeDeg: string; rhoCosPhi: string; rhoSinPhi: string; geodeticLatitudeDeg: string; heightM: string };
const NUMBER_FIELDS = ['longitudeDeg', 'rhoCosPhi', 'rhoSinPhi', 'geodeticLatitudeDeg', 'heightM'] as const;

const str = (v: number | null | undefined) => (v === null || v === undefined ? '' : String(v));

function initial(row: ObservatoryRow | null): Text {
  return {
    code: row?.code ?? '',
    name: row?.name ?? '',
    longitudeDeg: str(row?.longitudeDeg),
    rhoCosPhi: str(row?.rhoCosPhi),
    rhoSinPhi: str(row?.rhoSinPhi),
    geodeticLatitudeDeg: str(row?.geodeticLatitudeDeg),
    heightM: str(row?.heightM),
  };
}

/** The form's text as the schema's input, or the fields that are not numbers. */
function toInput(t: Text, mode: Mode): { input: ObservatoryInput } | { errors: Record<string, string> } {
  const errors: Record<string, string> = {};
  const num: Partial<Record<(typeof NUMBER_FIELDS)[number], number | null>> = {};
  for (const f of NUMBER_FIELDS) {
    const used = f === 'longitudeDeg' || (mode === 'parallax' ? f === 'rhoCosPhi' || f === 'rhoSinPhi' : f === 'geodeticLatitudeDeg' || f === 'heightM');
    const s = t[f].trim().replace(',', '.');
    if (!used || s === '') {
      num[f] = null;
      continue;
    }
    const v = Number(s);
    if (!Number.isFinite(v)) errors[f] = `Enter a number (for example ${f === 'heightM' ? '1250' : '0.8123'})`;
    else num[f] = v;
  }
  if (Object.keys(errors).length) return { errors };
  return {
    input: {
      code: t.code,
      name: t.name,
      longitudeDeg: (num.longitudeDeg ?? NaN) as number,
      rhoCosPhi: num.rhoCosPhi ?? null,
      rhoSinPhi: num.rhoSinPhi ?? null,
      geodeticLatitudeDeg: num.geodeticLatitudeDeg ?? null,
      heightM: num.heightM ?? null,
    },
  };
}

export function ObservatoryForm({ row, onDone, onCancel }: { row: ObservatoryRow | null; onDone: (code: string, added: boolean) => void; onCancel?: () => void }) {
  const save = useSaveObservatory();
  const [text, setText] = useState<Text>(() => initial(row));
  const [mode, setMode] = useState<Mode>(row && row.rhoCosPhi === null && row.geodeticLatitudeDeg !== null ? 'geodetic' : 'parallax');
  const [local, setLocal] = useState<Record<string, string>>({});
  const set = (k: keyof Text) => (e: { target: { value: string } }) => setText((t) => ({ ...t, [k]: e.target.value }));
  const server = fieldErrors(save.error);
  const errors = { ...server, ...local };
  const editing = row !== null;

  const submit = (e: FormEvent) => {
    e.preventDefault();
    const parsed = toInput(text, mode);
    if ('errors' in parsed) {
      setLocal(parsed.errors);
      return;
    }
    if (text.longitudeDeg.trim() === '') {
      setLocal({ longitudeDeg: 'Enter the east longitude in degrees' });
      return;
    }
    const check = observatorySchema.safeParse(parsed.input);
    if (!check.success) {
      const out: Record<string, string> = {};
      for (const issue of check.error.issues) {
        const key = String(issue.path[0] ?? '');
        if (key && !out[key]) out[key] = issue.message;
      }
      // a missing pair member is reported on the first field of the pair the user chose
      if (out.rhoCosPhi && mode === 'geodetic' && !out.geodeticLatitudeDeg) out.geodeticLatitudeDeg = out.rhoCosPhi;
      setLocal(out);
      return;
    }
    setLocal({});
    save.mutate({ code: row?.code ?? null, body: check.data }, { onSuccess: () => onDone(check.data.code, !editing) });
  };

  const headingId = editing ? `edit-observatory-${row.code}` : 'add-observatory-heading';
  return (
    <Card aria-labelledby={headingId}>
      <h2 id={headingId} className="mb-4 text-lg font-semibold">{editing ? `Edit observatory ${row.code}` : 'Add an observatory'}</h2>
      <form onSubmit={submit} noValidate className="grid gap-4 sm:grid-cols-2">
        <TextField label="Code" value={text.code} onChange={set('code')} error={errors.code} readOnly={editing} hint={editing ? 'The code cannot change (observations name it).' : 'As written in the ADES stn field: 1 to 8 letters or digits'} />
        {/* focused when editing, so the form (above the table) comes into view */}
        <TextField label="Name" value={text.name} onChange={set('name')} error={errors.name} autoFocus={editing} />
        <TextField label="East longitude (°)" inputMode="decimal" value={text.longitudeDeg} onChange={set('longitudeDeg')} error={errors.longitudeDeg} hint="0 to 360, east of Greenwich" />
        <fieldset className="sm:col-span-2">
          <legend className="mb-1 block text-sm font-medium text-ink">Site given by</legend>
          <div className="flex flex-wrap gap-x-6 gap-y-1 text-sm">
            <label className="inline-flex items-center gap-2">
              <input type="radio" name="site-mode" checked={mode === 'parallax'} onChange={() => setMode('parallax')} />
              Parallax constants (ρ cos φ′, ρ sin φ′)
            </label>
            <label className="inline-flex items-center gap-2">
              <input type="radio" name="site-mode" checked={mode === 'geodetic'} onChange={() => setMode('geodetic')} />
              Geodetic latitude and height (WGS84)
            </label>
          </div>
        </fieldset>
        {mode === 'parallax' ? (
          <>
            <TextField label="ρ cos φ′" inputMode="decimal" value={text.rhoCosPhi} onChange={set('rhoCosPhi')} error={errors.rhoCosPhi} hint="Earth equatorial radii, 0 to 1.001" />
            <TextField label="ρ sin φ′" inputMode="decimal" value={text.rhoSinPhi} onChange={set('rhoSinPhi')} error={errors.rhoSinPhi} hint="Earth equatorial radii, −1.001 to 1.001 (negative south)" />
          </>
        ) : (
          <>
            <TextField label="Geodetic latitude (°)" inputMode="decimal" value={text.geodeticLatitudeDeg} onChange={set('geodeticLatitudeDeg')} error={errors.geodeticLatitudeDeg} hint="−90 to 90, north positive" />
            <TextField label="Height (m)" inputMode="decimal" value={text.heightM} onChange={set('heightM')} error={errors.heightM} hint="Above the WGS84 ellipsoid" />
          </>
        )}
        <div className="flex flex-wrap items-center gap-2 sm:col-span-2">
          {save.isError && Object.keys(server).length === 0 && <Notice tone="error" className="mb-2 w-full">{errorMessage(save.error)}</Notice>}
          <Button type="submit" busy={save.isPending}>{editing ? 'Save the observatory' : 'Add the observatory'}</Button>
          {onCancel && <Button variant="secondary" onClick={onCancel}>Cancel</Button>}
        </div>
      </form>
    </Card>
  );
}
