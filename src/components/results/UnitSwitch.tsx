// Distance unit switch: km / lunar distances / Earth radii / au (values and sources in shared/format.ts).
import { DISTANCE_UNIT_KEYS, DISTANCE_UNITS, type DistanceUnit } from '../../../shared/format';

export function UnitSwitch({ value, onChange, name = 'distance-unit' }: { value: DistanceUnit; onChange(u: DistanceUnit): void; name?: string }) {
  return (
    <fieldset className="inline-flex items-center gap-1 text-sm">
      <legend className="sr-only">Distance unit</legend>
      <span className="mr-1 text-ink-soft" aria-hidden="true">Distances in</span>
      {DISTANCE_UNIT_KEYS.map((u) => (
        <label
          key={u}
          title={`1 ${DISTANCE_UNITS[u].label} = ${DISTANCE_UNITS[u].km.toLocaleString('en-GB')} km: ${DISTANCE_UNITS[u].source}`}
          className={`cursor-pointer rounded border px-2 py-0.5 ${value === u ? 'border-accent-700 bg-accent-700 text-white' : 'border-rule bg-white hover:bg-accent-50'}`}
        >
          <input type="radio" className="sr-only" name={name} value={u} checked={value === u} onChange={() => onChange(u)} aria-label={DISTANCE_UNITS[u].name} />
          {DISTANCE_UNITS[u].label}
        </label>
      ))}
    </fieldset>
  );
}
