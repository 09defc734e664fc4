import { useParams } from 'react-router-dom';
import { mayInspectOn, parseId, roleOnSite, useMe, useMySites } from '@client/lib/session';

/** The site of the page, the person, and what they may do there. */
export function usePageSite() {
  const params = useParams();
  const siteId = parseId(params.siteId);
  const excavationId = parseId(params.excavationId);
  const me = useMe().data ?? null;
  const site = useMySites().data?.find((s) => s.id === siteId) ?? null;
  const role = me && site ? roleOnSite(me, site.id) : null;
  const mayInspect = Boolean(site && mayInspectOn(me, site.id));
  const maySetShifts = Boolean(me && (me.isAdmin || role === 'coordinator'));
  return { siteId, excavationId, me, site, role, mayInspect, maySetShifts };
}
