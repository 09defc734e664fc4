import { Link, useNavigate, useParams } from 'react-router-dom';
import { Page } from '@client/components/Page';
import { LoadError, Loading } from '@client/components/Status';
import { parseId } from '@client/lib/session';
import { useSaveSite, useSites } from '../api/sites';
import { SiteForm } from '../components/SiteForm';

/** /admin/sites/new and /admin/sites/:siteId */
export function SiteEditPage() {
  const raw = useParams().siteId;
  const siteId = raw === undefined ? null : parseId(raw);
  const navigate = useNavigate();
  const sites = useSites();
  const save = useSaveSite(siteId);

  if (raw !== undefined && siteId === null) return <SiteNotFound />;
  if (siteId !== null && sites.isPending) return <Loading what="Loading the site" />;
  if (siteId !== null && sites.isError) return <LoadError error={sites.error} retry={() => sites.refetch()} />;
  const site = siteId === null ? null : sites.data?.find((s) => s.id === siteId);
  if (site === undefined) return <SiteNotFound />;

  return (
    <Page title={site ? `Edit ${site.name}` : 'Add a site'} intro={<Link to="/admin/sites">Back to all sites</Link>}>
      <SiteForm
        key={site?.id ?? 'new'}
        site={site}
        saveLabel={site ? 'Save changes' : 'Add the site'}
        onSave={async (values) => {
          const saved = await save.mutateAsync(values);
          void navigate('/admin/sites', { state: { notice: site ? `Saved ${saved.name}.` : `Added ${saved.name}.` } });
        }}
      />
    </Page>
  );
}

function SiteNotFound() {
  return (
    <Page title="Site not found">
      <p>
        There is no such site. <Link to="/admin/sites">See all sites</Link>.
      </p>
    </Page>
  );
}
