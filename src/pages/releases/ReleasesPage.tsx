// Press releases of the office: a list (filter by state; scheduled rows show when their embargo ends, in the
// viewer's time zone and UTC), and for communications staff a form to start a release from one approved bulletin
// version (its figures are copied from that version).
import { useState } from 'react';
import { Link, useNavigate, useSearchParams } from 'react-router';
import { PUBLIC_CAUTION } from '../../../shared/releases/plainLanguage';
import { RELEASE_STATE_LABELS, RELEASE_STATES, type ReleaseState } from '../../../shared/releases/workflow';
import { formatUtc } from '../../../shared/format';
import { useBulletins } from '../../api/bulletins';
import { fieldErrors } from '../../api/client';
import { PUBLIC_FEED_URL, PUBLIC_SITE_URL, publicReleaseUrl, useBulletinVersionsFor, useCreateRelease, useReleases } from '../../api/releases';
import { useAppAbility } from '../../auth/useAppAbility';
import { Button, Card, ErrorState, LoadingState, Notice, PageHeader, SelectField, errorMessage } from '../../components/ui';
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
    <Card>
      <h2 className="text-lg font-semibold">Start a release</h2>
      <p className="mt-1 text-sm text-ink-soft">
        A release starts from one approved bulletin version: its figures are copied as they were approved and stated in plain language as well.
      </p>
      <form
        className="mt-4 grid gap-4 sm:grid-cols-[2fr_1fr_auto] sm:items-end"
        onSubmit={(e) => {
          e.preventDefault();
          create.mutate({ bulletinId: Number(bulletinId), version: Number(version) }, { onSuccess: (r) => navigate(`/releases/${r.id}`) });
        }}
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
        <Button type="submit" busy={create.isPending} disabled={!bulletinId || !version}>
          Create release draft
        </Button>
      </form>
      {bulletins.isSuccess && withVersions.length === 0 && <p className="mt-3 text-sm text-ink-soft">No bulletin has an approved version yet.</p>}
      {create.isError && Object.keys(errors).length === 0 && (
        <Notice tone="error" className="mt-3">
          {errorMessage(create.error)}
        </Notice>
      )}
    </Card>
  );
}

export function ReleasesPage() {
  const ability = useAppAbility();
  const [search, setSearch] = useSearchParams();
  const raw = search.get('state') ?? '';
  const state: ReleaseState | '' = (RELEASE_STATES as readonly string[]).includes(raw) ? (raw as ReleaseState) : '';
  const setState = (s: ReleaseState | '') => setSearch(s ? { state: s } : {}, { replace: true });
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
        <section aria-labelledby="release-list-heading">
          <div className="mb-3 flex flex-wrap items-end justify-between gap-3">
            <h2 id="release-list-heading" className="text-lg font-semibold">
              All releases
            </h2>
            <SelectField label="State" value={state} onChange={(e) => setState(e.target.value as ReleaseState | '')} className="w-56">
              <option value="">Any</option>
              {RELEASE_STATES.map((s) => (
                <option key={s} value={s}>
                  {RELEASE_STATE_LABELS[s]}
                </option>
              ))}
            </SelectField>
          </div>
          {list.isPending && <LoadingState label="Loading releases…" />}
          {list.isError && <ErrorState error={list.error} onRetry={() => list.refetch()} />}
          {list.isSuccess &&
            (list.data.length === 0 ? (
              <p className="text-ink-soft">No release{state ? ' in this state' : ' yet'}.</p>
            ) : (
              <div className="overflow-x-auto rounded-lg border border-rule bg-white">
                <table className="w-full min-w-[52rem] text-left text-sm">
                  <thead className="bg-accent-50">
                    <tr>
                      <th scope="col" className="px-3 py-2">Number</th>
                      <th scope="col" className="px-3 py-2">Headline</th>
                      <th scope="col" className="px-3 py-2">From</th>
                      <th scope="col" className="px-3 py-2">State</th>
                      <th scope="col" className="px-3 py-2">Publication</th>
                      <th scope="col" className="px-3 py-2">Author</th>
                    </tr>
                  </thead>
                  <tbody>
                    {list.data.map((r) => (
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
                    ))}
                  </tbody>
                </table>
              </div>
            ))}
        </section>
      </div>
    </div>
  );
}
