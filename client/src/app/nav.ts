import type { Me } from '@shared/schemas/auth';
import type { SiteRole } from '@shared/schemas/common';

export interface NavItem {
  label: string;
  /** A path; ":siteId" is replaced by the current site's id, and the link is hidden when there is none. */
  to: string;
  /** Who sees it: everyone signed in (default), administrators only, or these roles on the current site (administrators too). */
  who?: 'everyone' | 'admin' | readonly SiteRole[];
  /** Active only on this exact path, not on the pages below it. */
  end?: boolean;
}

/**
 * The main navigation, in order. Adding a page's link is one line here, e.g.
 * `{ label: 'Site map', to: '/sites/:siteId/map', who: ['supervisor', 'coordinator', 'operator'] },`
 */
export const navItems: NavItem[] = [
  { label: 'Dashboard', to: '/sites/:siteId', end: true },
  { label: 'Site map', to: '/sites/:siteId/map' },
  { label: 'Permits', to: '/sites/:siteId/permits', who: ['supervisor', 'coordinator', 'operator'] },
  { label: 'My permits (phone view)', to: '/field', who: ['operator'] },
  { label: 'Register', to: '/sites/:siteId/register' },
  { label: 'Inspections', to: '/sites/:siteId/inspections', who: ['supervisor', 'coordinator', 'operator'] },
  { label: 'Plant', to: '/plant' },
  { label: 'People', to: '/admin/people', who: 'admin' },
  { label: 'Sites', to: '/admin/sites', who: 'admin' },
];

interface NavLinkTarget {
  label: string;
  to: string;
  end: boolean;
}

/** The links this person sees, with the current site filled in. */
export function visibleNavLinks(items: readonly NavItem[], me: Me, siteId: number | null): NavLinkTarget[] {
  const role = siteId === null ? null : (me.memberships.find((m) => m.siteId === siteId)?.role ?? null);
  return items.flatMap((item) => {
    const who = item.who ?? 'everyone';
    const allowed = who === 'everyone' ? true : who === 'admin' ? me.isAdmin : me.isAdmin || (role !== null && who.includes(role));
    if (!allowed) return [];
    if (item.to.includes(':siteId')) {
      if (siteId === null) return [];
      return [{ label: item.label, to: item.to.replace(':siteId', String(siteId)), end: item.end ?? false }];
    }
    return [{ label: item.label, to: item.to, end: item.end ?? false }];
  });
}
