import { useLocation } from 'react-router-dom';
import { ButtonLink } from '@client/components/Button';
import { Page } from '@client/components/Page';
import { LoadError, Loading, Notice } from '@client/components/Status';
import { useFigures } from '@client/lib/units';
import { unitSystemLabels } from '@shared/units';
import { surchargeMethodLabels } from '@shared/schemas/sites';
import { useSites } from '../api/sites';

export function SitesPage() {
  const sites = useSites();
  const f = useFigures();
  const notice = (useLocation().state as { notice?: string } | null)?.notice ?? null;
  return (
    <Page
      title="Sites"
      intro="Each site has an origin that its plans are measured from, its own clock and a minimum edge clearance."
      actions={
        <ButtonLink to="/admin/sites/new" variant="primary">
          Add a site
        </ButtonLink>
      }
    >
      <Notice>{notice}</Notice>
      {sites.isPending ? <Loading what="Loading sites" /> : null}
      {sites.isError ? <LoadError error={sites.error} retry={() => sites.refetch()} /> : null}
      {sites.data?.length === 0 ? <p>No sites yet. Add the first one.</p> : null}
      <ul className="grid gap-4 md:grid-cols-2">
        {sites.data?.map((site) => (
          <li key={site.id} className="flex flex-col gap-2 rounded-lg border border-rule bg-sheet p-5 shadow-sm">
            <h2 className="text-lg font-bold">{site.name}</h2>
            <dl className="grid grid-cols-[auto_1fr] gap-x-4 gap-y-1">
              <dt className="text-ink-soft">Origin</dt>
              <dd>
                {site.latitude.toFixed(6)}°, {site.longitude.toFixed(6)}°
              </dd>
              <dt className="text-ink-soft">Time zone</dt>
              <dd>{site.timezone}</dd>
              <dt className="text-ink-soft">Minimum clearance</dt>
              <dd>{f.length(site.minimumClearance, { rounding: 'up' })}</dd>
              <dt className="text-ink-soft">Default units</dt>
              <dd>{unitSystemLabels[site.units]}</dd>
              <dt className="text-ink-soft">Surcharge method</dt>
              <dd>{surchargeMethodLabels[site.defaultMethod] ?? site.defaultMethod}</dd>
            </dl>
            <div>
              <ButtonLink to={`/admin/sites/${site.id}`} aria-label={`Edit ${site.name}`}>
                Edit
              </ButtonLink>
            </div>
          </li>
        ))}
      </ul>
    </Page>
  );
}
