import { z } from 'zod';

/** Site roles. One person holds at most one role on a site; administrators are global. */
export const siteRoles = ['supervisor', 'coordinator', 'operator'] as const;
export const siteRoleSchema = z.enum(siteRoles);
export type SiteRole = z.infer<typeof siteRoleSchema>;

/** Where an excavation stands (declared here, not in ./excavations, so light modules can name it without the geometry). */
export const excavationStates = ['planned', 'open', 'backfilled'] as const;

export const roleLabels: Record<SiteRole, string> = {
  supervisor: 'Site supervisor',
  coordinator: 'Temporary works coordinator',
  operator: 'Plant operator',
};

/** The largest record id: PostgreSQL's integer (an id of 2³¹ or more is refused with 400, not 500). */
export const RECORD_ID_MAX = 2147483647;
const notAnId = 'must be a record id (a whole number)';
const tooLarge = 'must be a record id (a whole number below 2³¹)';
/** A record id in a path or a query (text): a positive whole number that fits PostgreSQL's integer. */
export const idSchema = z.coerce.number({ error: notAnId }).int(notAnId).positive(notAnId).max(RECORD_ID_MAX, tooLarge);
/** A record id in a JSON body: as idSchema, but a number, not text. */
export const bodyIdSchema = z.number({ error: notAnId }).int(notAnId).positive(notAnId).max(RECORD_ID_MAX, tooLarge);
export const emailSchema = z
  .email('must be an e-mail address')
  .max(254)
  .transform((s) => s.trim().toLowerCase());
export const passwordSchema = z.string().min(10, 'must be at least 10 characters').max(200, 'must be at most 200 characters');
export const nameSchema = z.string().trim().min(1, 'is required').max(120, 'must be at most 120 characters');

/** The JSON body of every error answer of the API. */
export interface ApiErrorBody {
  error: { code: string; message: string; fields?: Record<string, string> };
}
