import { z } from 'zod';
import { idSchema } from '@shared/schemas/common';
import { mayInspect } from '@shared/inspectionDuty';
import { dashboardAnswer, dashboardLists, type DashboardAnswer } from '@shared/schemas/dashboard';
import { Api, siteFromParam } from '../http';
import { inspectionStates, needingInspection } from '../services/inspections';
import { listPermits } from '../services/permits/read';

const siteParams = z.object({ siteId: idSchema });

/**
 * A site's dashboard in one request: the panels a view shows were three requests, each paying for
 * a session read and a guard of its own. The guard here reads the person and their role once; the
 * lists and the inspection states are then read side by side.
 */
export function registerDashboardRoutes(api: Api): void {
  const { db } = api.deps;
  api.route(
    {
      method: 'get',
      path: '/api/sites/:siteId/dashboard',
      summary:
        'What my dashboard of the site shows, as my role there has it: permits awaiting my review, my own permits, live now (first few, with the count of all) and the open excavations still waiting for a safe inspection this shift, with how many are open',
      tag: 'Sites',
      access: { kind: 'site', roles: 'any', admin: true, siteId: siteFromParam },
      params: siteParams,
      response: dashboardAnswer,
    },
    async ({ user, site, deps }) => {
      const sites = [site.id];
      const list = (which: keyof typeof dashboardLists) => listPermits(db, user, { ...dashboardLists[which], siteId: site.id }, sites);
      const role = site.role;
      const inspects = mayInspect(site);
      const [review, mine, live, inspections] = await Promise.all([
        role === 'coordinator' ? list('review') : undefined,
        role === 'supervisor' ? list('mine') : undefined,
        role === 'coordinator' || role === 'supervisor' ? list('live') : undefined,
        // The panel lists only the excavations still waiting (a big site has hundreds open), and says how many are open.
        inspects
          ? inspectionStates(db, site.id, deps.now()).then(({ shift, excavations }) => ({
              shift,
              excavations: needingInspection(excavations),
              open: excavations.length,
            }))
          : undefined,
      ]);
      const answer: DashboardAnswer = { review, mine, live, inspections };
      return answer;
    },
  );
}
