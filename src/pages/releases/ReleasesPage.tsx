// Press releases of the office: a list (filter by state; scheduled rows show when their embargo ends, in the
// viewer's time zone and UTC), and for communications staff a form to start a release from one approved bulletin
// version (its figures are copied from that version).
import { useState } from 'react';
import { Link, useNavigate } from 'react-router';
import { PUBLIC_CAUTION } from '../../../shared/releases/plainLanguage';
import { RELEASE_STATE_LABELS, RELEASE_STATES } from '../../../shared/releases/workflow';
import { formatUtc } from '../../../shared/format';
import { useBulletins } from '../../api/bulletins';
import { fieldErrors } from '../../api/client';
import { PUBLIC_FEED_URL, PUBLIC_SITE_URL, publicReleaseUrl, useBulletinVersionsFor, useCreateRelease, useReleases } from '../../api/releases';
import { useAppAbility } from '../../auth/useAppAbility';
import { StartForm } from '../../components/StartForm';
import { StateFilteredList, useStateFilter } from '../../components/StateFilteredList';
import { PageHeader, SelectField } from '../../components/ui';
import { PublicCaution, ReleaseStateBadge } from './ReleaseParts';
import { browserTimeZone, formatInZone } from './zonedTime';

function NewReleaseForm() {
  const bulletins = useBulletins();
  const create = useCreateRelease();
  const navigate = useNavigate();
  const [bulletinId, setBulletinId] = useState('');
  const [version, setVersion] = useState('');
  const withVersions = (bulletins.data ?? []).filter((b) => b.latestVersion !== null && b.state !== 'withdrawn');
  const versions = useBulletinVersionsFor(bulletinId ? Number(bulletinId) : null);
  const usable = bulletinId ? (versions.data ?? []).filter((v) => v.status === 'approved' || v.status === 'distributed') : [];
  const errors = fieldErrors(create.error);
  return (
    <StartForm
      heading="Start a release"
      intro="A release starts from one approved bulletin version: its figures are copied as they were approved and stated in plain language as well."
      gridClassName="sm:grid-cols-[2fr_1fr_auto]"
      onSubmit={() => create.mutate({ bulletinId: Number(bulletinId), version: Number(version) }, { onSuccess: (r) => navigate(`/releases/${r.id}`) })}
      submitLabel="Create release draft"
      busy={create.isPending}
      canSubmit={!!bulletinId && !!version}
      error={create.error}
      note={bulletins.isSuccess && withVersions.length === 0 && <p className="mt-3 text-sm text-ink-soft">No bulletin has an approved version yet.</p>}
    >
      <SelectField
        label="Bulletin"
        value={bulletinId}
        onChange={(e) => {
          setBulletinId(e.target.value);
          setVersion('');
        }}
        error={errors.bulletinId}
        required
      >
        <option value="">Choose…</option>
        {withVersions.map((b) => (
          <option key={b.id} value={b.id}>
            {b.number} · {b.title}
          </option>
        ))}
      </SelectField>
      <SelectField label="Approved version" value={version} onChange={(e) => setVersion(e.target.value)} error={errors.version} required disabled={!bulletinId}>
        <option value="">{bulletinId && versions.isPending ? 'Loading…' : 'Choose…'}</option>
        {usable.map((v) => (
          <option key={v.version} value={v.version}>
            Version {v.version} · approved {formatUtc(v.approvedAt, { seconds: false })}
          </option>
        ))}
      </SelectField>
    </StartForm>
  );
}

export function ReleasesPage() {
  const ability = useAppAbility();
  const [state, setState] = useStateFilter(RELEASE_STATES);
  const list = useReleases(state);
  const here = browserTimeZone();
  return (
    <div>
      <title>Releases · Tocsin</title>
      <PageHeader
        title="Releases"
        intro={
          <>
            Statements for the public and the press, written from an approved bulletin version, approved by a reviewer and published at an agreed time.{' '}
            <a href={PUBLIC_SITE_URL}>Public site</a> · <a href={PUBLIC_FEED_URL}>Atom feed</a>
          </>
        }
      />
      <div className="space-y-6">
        <PublicCaution text={PUBLIC_CAUTION} />
        {ability.can('create', 'Release') && ability.can('read', 'Bulletin') && <NewReleaseForm />}
        <StateFilteredList
          headingId="release-list-heading"
          heading="All releases"
          noun="release"
          states={RELEASE_STATES}
          labels={RELEASE_STATE_LABELS}
          state={state}
          onStateChange={setState}
          filterClassName="w-56"
          list={list}
          tableClassName="min-w-[52rem]"
          columns={['Number', 'Headline', 'From', 'State', 'Publication', 'Author']}
          row={(r) => (
            <tr key={r.id} className="border-t border-rule align-top" data-testid={`release-row-${r.id}`}>
              <td className="px-3 py-2 whitespace-nowrap tabular-nums">{r.number}</td>
              <td className="px-3 py-2">
                <Link to={`/releases/${r.id}`} className="font-medium">
                  {r.title}
                </Link>
              </td>
              <td className="px-3 py-2 whitespace-nowrap">
                {r.source.bulletinNumber} v{r.source.version}
              </td>
              <td className="px-3 py-2">
                <ReleaseStateBadge state={r.state} />
              </td>
              <td className="px-3 py-2 tabular-nums">
                {r.state === 'published' && r.publication.publishedAt ? (
                  <>
                    {formatUtc(r.publication.publishedAt, { seconds: false })}
                    {r.publication.slug && (
                      <a className="block" href={publicReleaseUrl(r.publication.slug)}>
                        public page
                      </a>
                    )}
                  </>
                ) : r.state === 'scheduled' && r.publication.publishAt ? (
                  <>
                    {formatUtc(r.publication.publishAt)}
                    {here !== 'UTC' && <span className="block text-xs text-ink-soft">{formatInZone(r.publication.publishAt, here)}</span>}
                  </>
                ) : (
                  '—'
                )}
              </td>
              <td className="px-3 py-2 whitespace-nowrap">{r.author?.name ?? '—'}</td>
            </tr>
          )}
        />
      </div>
    </div>
  );
}
