// The object page's way into orbit determination: its astrometry and its orbit fits, with counts and the latest
// fit's status. Shown only to those who may read them (analysts, reviewers, admins).
import { Link } from 'react-router';
import { useAstrometry, useObjectFits } from '../../api/od';
import { useAppAbility } from '../../auth/useAppAbility';
import { Card, buttonClass } from '../../components/ui';
import { odAccess } from './access';
import { FitStatusBadge } from './FitStatus';

export function ObjectOdLinks({ objectId }: { objectId: number }) {
  const access = odAccess(useAppAbility());
  const astrometry = useAstrometry(objectId, { enabled: access.readAstrometry });
  const fits = useObjectFits(objectId, { enabled: access.readFits });
  if (!access.readAstrometry && !access.readFits) return null;
  const obs = astrometry.data?.observations ?? null;
  const latest = fits.data?.[0] ?? null;
  return (
    <Card aria-labelledby="od-heading" data-testid="object-od">
      <h2 id="od-heading" className="mb-3 text-lg font-semibold">Astrometry and orbit fits</h2>
      <div className="grid gap-4 sm:grid-cols-2">
        <div>
          <p className="text-sm text-ink-soft">
            {astrometry.isError
              ? 'The astrometry could not be loaded.'
              : obs === null
                ? 'Loading…'
                : obs.length === 0
                  ? 'No astrometry yet.'
                  : `${obs.length} observations from ${new Set(obs.map((o) => o.stn)).size} stations · ${obs.filter((o) => o.excluded).length} excluded`}
          </p>
          <Link to={`/objects/${objectId}/astrometry`} className={buttonClass('secondary', 'mt-2')}>Astrometry</Link>
        </div>
        <div>
          <p className="flex items-center gap-2 text-sm text-ink-soft">
            {fits.isError ? (
              'The fits could not be loaded.'
            ) : !fits.data ? (
              'Loading…'
            ) : latest ? (
              <>
                {fits.data.length} fit{fits.data.length === 1 ? '' : 's'} · latest <Link to={`/fits/${latest.id}`}>#{latest.id}</Link> <FitStatusBadge status={latest.status} />
              </>
            ) : (
              'No fit yet.'
            )}
          </p>
          <Link to={`/objects/${objectId}/fits`} className={buttonClass('secondary', 'mt-2')}>Orbit fits</Link>
        </div>
      </div>
    </Card>
  );
}
