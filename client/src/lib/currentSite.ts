import { matchPath, useLocation } from 'react-router-dom';
import type { Site } from '@shared/schemas/sites';
import { parseId, rememberedSiteId, useMe, useMySites } from './session';

/** The site of a /sites/:siteId/… address, or null elsewhere. */
function siteIdFromPath(pathname: string): number | null {
  const match = matchPath({ path: '/sites/:siteId', end: false }, pathname);
  return match ? parseId(match.params.siteId) : null;
}

/**
 * The site the person is working on: the one in the address on /sites/:siteId/… pages, otherwise the
 * one they last chose on this device, otherwise their first site. Null while loading or with no site.
 */
export function useCurrentSite(): { siteId: number | null; site: Site | null; sites: Site[] } {
  const { pathname } = useLocation();
  const me = useMe();
  const sites = useMySites(Boolean(me.data));
  const list = sites.data ?? [];
  const fromPath = siteIdFromPath(pathname);
  const remembered = me.data ? rememberedSiteId(me.data.id) : null;
  const site =
    list.find((s) => s.id === fromPath) ?? (fromPath === null ? (list.find((s) => s.id === remembered) ?? list[0]) : undefined) ?? null;
  return { siteId: site?.id ?? null, site, sites: list };
}

/** The address of the same section on another site: /sites/3/map → /sites/7/map. */
export function switchSitePath(pathname: string, siteId: number): string {
  const match = matchPath({ path: '/sites/:siteId/:section/*', end: false }, pathname);
  const section = match?.params.section;
  return section ? `/sites/${siteId}/${section}` : `/sites/${siteId}`;
}
