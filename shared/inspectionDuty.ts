import type { SiteRole } from './schemas/common';

/**
 * Who may record a shift-start inspection on a site: its supervisors and coordinators always, an
 * operator only where the site gives them the inspection duty. The one rule for the inspection
 * route, the dashboard and the pages that offer an inspection (apart from the schemas: the phone
 * view asks it too, and loads no zod).
 */
export function mayInspect(membership: { role: SiteRole | null; canInspect: boolean } | null | undefined): boolean {
  const role = membership?.role;
  return role === 'supervisor' || role === 'coordinator' || (role === 'operator' && membership!.canInspect);
}
