// Building blocks of the release screens: the state badge, the standing public caution, the plain-language
// statements generated from the copied figures, the copied figures themselves, and the publication record
// (scheduled time in the user's zone and in UTC, embargo, published time and how late).
import { FIGURE_QUANTITY_LABELS, RISK_QUANTITIES } from '../../../shared/bulletins/document';
import { RELEASE_STATE_LABELS, type ReleaseState } from '../../../shared/releases/workflow';
import type { FigureSnapshot } from '../../../shared/schemas/bulletins';
import type { PlainLanguage, Publication, ReleaseSource } from '../../../shared/schemas/releases';
import { publicReleaseUrl } from '../../api/releases';
import { Button } from '../../components/ui';
import { browserTimeZone, formatInZone, formatUtcInstant } from './zonedTime';

const TONES: Record<ReleaseState, string> = {
  draft: 'bg-white text-ink border-rule',
  in_review: 'bg-accent-50 text-accent-800 border-accent-100',
  changes_requested: 'bg-signal-50 text-signal-700 border-signal-200',
  approved: 'bg-ok-50 text-ok-700 border-ok-700/30',
  scheduled: 'bg-signal-50 text-signal-700 border-signal-200',
  published: 'bg-ok-700 text-white border-ok-700',
  cancelled: 'bg-danger-50 text-danger-700 border-danger-200',
};

export function ReleaseStateBadge({ state }: { state: ReleaseState }) {
  return (
    <span className={`inline-block rounded border px-2 py-0.5 text-xs font-semibold whitespace-nowrap ${TONES[state]}`} data-testid="release-state">
      {RELEASE_STATE_LABELS[state]}
    </span>
  );
}

/** The standing public caution: shown on every release screen, exactly as it is published with the release. */
export function PublicCaution({ text }: { text: string }) {
  return (
    <aside aria-label="Public caution" className="rounded-md border-l-4 border-signal-700 bg-signal-50 px-4 py-3 text-sm text-signal-700" data-testid="public-caution">
      <p className="font-semibold">Published with every release</p>
      <p className="mt-1">{text}</p>
    </aside>
  );
}

export function PlainLanguagePanel({ plain }: { plain: PlainLanguage }) {
  return (
    <section aria-labelledby="plain-heading" className="rounded-lg border border-rule bg-white p-5" data-testid="plain-language">
      <h2 id="plain-heading" className="text-lg font-semibold">
        In plain language
      </h2>
      <p className="mt-1 text-sm text-ink-soft">Generated from the copied figures; published beside the text. Same numbers, no more certainty than they carry.</p>
      {plain.statements.length === 0 ? (
        <p className="mt-3 text-sm text-ink-soft">No figure of the bulletin version has a plain-language statement.</p>
      ) : (
        <dl className="mt-3 grid gap-x-6 gap-y-2 sm:grid-cols-[max-content_1fr]">
          {plain.statements.map((s) => (
            <div key={s.figureIndex} className="contents">
              <dt className="text-sm font-medium">{s.label}</dt>
              <dd className="font-serif" data-testid="plain-statement">
                {s.text}
              </dd>
            </div>
          ))}
        </dl>
      )}
      <p className="mt-3 border-t border-rule pt-3 font-serif" data-testid="plain-uncertainty">
        {plain.uncertainty}
      </p>
    </section>
  );
}

export function SourceLine({ source }: { source: ReleaseSource }) {
  return (
    <span>
      From bulletin {source.bulletinNumber} version {source.version} about {source.objectDesignation}{' '}
      <code className="text-xs" title={`SHA-256 of the bulletin version ${source.sha256}`}>
        {source.sha256.slice(0, 12)}…
      </code>
    </span>
  );
}

/** The figures copied from the bulletin version; when editing, each can be put into the text at the cursor. */
export function CopiedFigures({ figures, source, onInsert }: { figures: FigureSnapshot[]; source: ReleaseSource; onInsert?: (f: FigureSnapshot) => void }) {
  return (
    <section aria-labelledby="figures-heading" className="rounded-lg border border-rule bg-white p-5" data-testid="copied-figures">
      <h2 id="figures-heading" className="text-lg font-semibold">
        Figures of bulletin {source.bulletinNumber} v{source.version}
      </h2>
      <p className="mt-1 text-sm text-ink-soft">Copied when the release was created; they do not change when newer runs arrive.</p>
      {figures.length === 0 ? (
        <p className="mt-3 text-sm text-ink-soft">The bulletin version has no linked figures.</p>
      ) : (
        <ul className="mt-3 divide-y divide-rule">
          {figures.map((f) => (
            <li key={f.index} className="flex flex-wrap items-center gap-x-3 gap-y-1 py-2 text-sm">
              <span className="min-w-40 font-medium">
                {FIGURE_QUANTITY_LABELS[f.attrs.quantity]}
                {RISK_QUANTITIES.includes(f.attrs.quantity) && <span className="ml-2 rounded bg-signal-50 px-1.5 py-0.5 text-xs font-semibold text-signal-700">risk</span>}
              </span>
              <span className="font-serif text-base tabular-nums">{f.value.text}</span>
              {onInsert && (
                <Button variant="quiet" className="ml-auto !px-2 !py-1" onClick={() => onInsert(f)} aria-label={`Insert ${FIGURE_QUANTITY_LABELS[f.attrs.quantity]} into the text`}>
                  Insert in text
                </Button>
              )}
            </li>
          ))}
        </ul>
      )}
    </section>
  );
}

function formatLate(ms: number): string {
  if (ms < 1000) return `${ms} ms`;
  const s = ms / 1000;
  if (s < 120) return `${s.toFixed(1)} s`;
  const m = s / 60;
  if (m < 120) return `${m.toFixed(0)} min`;
  return `${(m / 60).toFixed(1)} h`;
}

/** When the release goes (or went) public: the scheduled time in the zone it was entered in, the viewer's zone and UTC. */
export function PublicationPanel({ state, publication }: { state: ReleaseState; publication: Publication }) {
  const here = browserTimeZone();
  const p = publication;
  if (!p.publishAt && !p.publishedAt) return null;
  const zones = [...new Set([p.timeZone, here].filter((z): z is string => !!z && z !== 'UTC'))];
  return (
    <section aria-labelledby="publication-heading" className="rounded-lg border border-rule bg-white p-5" data-testid="publication">
      <h2 id="publication-heading" className="text-lg font-semibold">
        Publication
      </h2>
      {p.publishAt && (
        <dl className="mt-3 grid gap-x-6 gap-y-1 text-sm sm:grid-cols-[max-content_1fr]">
          <dt className="font-medium">{state === 'scheduled' ? 'Embargoed until' : 'Scheduled for'}</dt>
          <dd>
            <span className="tabular-nums" data-testid="publish-at-utc">
              {formatUtcInstant(p.publishAt)}
            </span>
            {zones.map((z) => (
              <span key={z} className="block text-ink-soft tabular-nums" data-testid="publish-at-zone">
                {formatInZone(p.publishAt!, z)}
                {z === p.timeZone && z !== here ? ' (as entered)' : z === here ? ' (your time)' : ''}
              </span>
            ))}
          </dd>
          {p.publishedAt && (
            <>
              <dt className="font-medium">Published</dt>
              <dd className="tabular-nums" data-testid="published-at">
                {formatUtcInstant(p.publishedAt)}
                {p.lateByMs !== null && (
                  <span className="text-ink-soft">
                    {' '}
                    · {p.publishedOnStart ? `on server start, ${formatLate(p.lateByMs)} late` : `${formatLate(p.lateByMs)} after the set time`}
                  </span>
                )}
              </dd>
            </>
          )}
        </dl>
      )}
      {state === 'scheduled' && (
        <p className="mt-3 text-sm text-signal-700">Under embargo: nothing of this release appears on the public site, in the feed or in the public API before this time.</p>
      )}
      {state === 'published' && p.slug && (
        <p className="mt-3 text-sm">
          <a href={publicReleaseUrl(p.slug)} data-testid="public-link">
            Public page of this release
          </a>
        </p>
      )}
    </section>
  );
}
