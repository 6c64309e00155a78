// Schedule or reschedule publication: the date and time are entered as read on the user's clock in a named time
// zone (the browser's by default, shown and changeable); the form shows the UTC instant it converts to and sends
// that (with the zone, kept for display). Until then the release is under embargo.
import { useMemo, useState } from 'react';
import { PUBLISH_AT_PAST_TOLERANCE_MS, RELEASE_ACTION_LABELS } from '../../../shared/releases/workflow';
import type { Release } from '../../../shared/schemas/releases';
import { useReleaseTransition } from '../../api/releases';
import { ConfirmDialog } from '../../components/ConfirmDialog';
import { browserTimeZone, formatOffset, formatUtcInstant, formatWall, parseLocalInput, toLocalInput, zonedToUtc } from './zonedTime';

function zoneChoices(current: string): string[] {
  let all: string[] = [];
  try {
    all = (Intl as unknown as { supportedValuesOf?: (k: string) => string[] }).supportedValuesOf?.('timeZone') ?? [];
  } catch {
    all = [];
  }
  return [...new Set([current, 'UTC', ...all])];
}

export function ScheduleDialog({ release, action, open, onClose }: { release: Release; action: 'schedule' | 'reschedule'; open: boolean; onClose: () => void }) {
  const transition = useReleaseTransition(release.id);
  const [timeZone, setTimeZone] = useState(() => release.publication.timeZone ?? browserTimeZone());
  const [value, setValue] = useState(() =>
    release.publication.publishAt ? toLocalInput(Date.parse(release.publication.publishAt), release.publication.timeZone ?? browserTimeZone()) : '',
  );
  const zones = useMemo(() => zoneChoices(browserTimeZone()), []);
  const wall = value ? parseLocalInput(value) : null;
  const converted = wall ? zonedToUtc(wall, timeZone) : null;
  const past = converted?.ok && converted.utcMs < Date.now() - PUBLISH_AT_PAST_TOLERANCE_MS;
  const problem = !value ? null : !wall ? 'Enter a complete date and time.' : converted && !converted.ok ? converted.error : past ? 'This time is in the past.' : null;
  const title = RELEASE_ACTION_LABELS[action];

  return (
    <ConfirmDialog
      open={open}
      title={title}
      confirmLabel={action === 'schedule' ? 'Schedule' : 'Reschedule'}
      busy={transition.isPending}
      confirmDisabled={!converted?.ok || !!problem}
      error={transition.error}
      onCancel={() => {
        transition.reset();
        onClose();
      }}
      onConfirm={() => {
        if (!converted?.ok) return;
        transition.mutate({ action, publishAt: converted.iso, timeZone, revision: release.revision }, { onSuccess: onClose });
      }}
    >
      <p>The release stays under embargo until this time, then it is published on the public site and in the feed, and the press list is e-mailed.</p>
      <div className="grid gap-3 text-ink">
        <div>
          <label htmlFor="publish-at" className="mb-1 block text-sm font-medium">
            Date and time ({timeZone})
          </label>
          <input
            id="publish-at"
            type="datetime-local"
            step={1}
            className="block h-10 w-full rounded-md border border-rule bg-white px-3 text-base"
            value={value}
            onChange={(e) => setValue(e.target.value)}
            aria-describedby="publish-at-conversion"
            required
          />
        </div>
        <div>
          <label htmlFor="publish-zone" className="mb-1 block text-sm font-medium">
            Time zone
          </label>
          <select id="publish-zone" className="block h-10 w-full rounded-md border border-rule bg-white px-3 text-base" value={timeZone} onChange={(e) => setTimeZone(e.target.value)}>
            {zones.map((z) => (
              <option key={z} value={z}>
                {z}
              </option>
            ))}
          </select>
        </div>
      </div>
      <div id="publish-at-conversion" aria-live="polite" data-testid="schedule-conversion">
        {converted?.ok && wall && (
          <p className="text-ink">
            <span className="tabular-nums">
              {formatWall(wall)} {timeZone} (UTC{formatOffset(converted.offsetMinutes)})
            </span>{' '}
            = <strong className="tabular-nums" data-testid="schedule-utc">{formatUtcInstant(converted.iso)}</strong>
            {converted.ambiguous && <span className="block text-signal-700">This time occurs twice when the clocks go back; the earlier one is used.</span>}
          </p>
        )}
        {problem && <p className="font-medium text-danger-700">{problem}</p>}
      </div>
    </ConfirmDialog>
  );
}
