import { z } from 'zod';
import { inspectionStatesAnswer } from './inspections';
import { permitListQuerySchema, permitsAnswer, type PermitStatus } from './permits';

/** The statuses a supervisor's "what needs you first" panel asks for (the others need nothing from them). */
const needStatuses: PermitStatus[] = ['returned', 'draft', 'live', 'suspended', 'approved'];

/**
 * The permit lists of a site's dashboard, each as the permit list would be asked for it
 * (GET /api/permits): awaiting my review (oldest first: the queue, up to 20 so none is a page
 * away), live now (by when their window opens, the first 5 with the count of all) and a
 * supervisor's own permits by what needs them (all of theirs in the statuses above).
 */
export const dashboardLists = {
  review: permitListQuerySchema.parse({ view: 'review', sort: 'updated', order: 'asc', limit: '20', total: 'true' }),
  live: permitListQuerySchema.parse({ view: 'live', sort: 'windowStart', order: 'asc', limit: '5', total: 'true' }),
  mine: permitListQuerySchema.parse({ view: 'mine', status: needStatuses.join(','), sort: 'updated', order: 'desc' }),
};
export type DashboardList = keyof typeof dashboardLists;

/**
 * GET /api/sites/:siteId/dashboard: what the panels of my dashboard show, in one answer. Each part
 * is there only where my role on the site has that panel: a coordinator's review and live lists,
 * a supervisor's own permits and live list, the inspections due for whoever may inspect (an
 * operator only with the site's inspection duty); an administrator without a role there gets none.
 */
export const dashboardAnswer = z.object({
  review: permitsAnswer.optional(),
  live: permitsAnswer.optional(),
  mine: permitsAnswer.optional(),
  /** This shift, the open excavations still waiting for a safe inspection (due, overdue or found not safe), and how many are open. */
  inspections: inspectionStatesAnswer.extend({ open: z.number().int() }).optional(),
});
export type DashboardAnswer = z.output<typeof dashboardAnswer>;
