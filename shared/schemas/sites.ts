import { z } from 'zod';
import { unitSystems } from '../units';
import { siteRoleSchema } from './common';

export const surchargeMethods = ['dispersion-45', 'elastic'] as const;
export type SurchargeMethod = (typeof surchargeMethods)[number];
/** How Brink names each way of spreading a surcharge onto the support (site defaults, permits, the calculation sheet). */
export const surchargeMethodLabels: Record<SurchargeMethod, string> = {
  'dispersion-45': '45° load spread',
  elastic: 'Elastic (Boussinesq-based)',
};

/** Metric or US customary (docs/calculation.md, "Units"). */
export const unitSystemSchema = z.enum(unitSystems, { error: 'must be metric or US customary' });

export const siteSchema = z.object({
  name: z.string().trim().min(1, 'is required').max(120),
  latitude: z.number().min(-85, 'must be between -85 and 85').max(85, 'must be between -85 and 85'),
  longitude: z.number().min(-180, 'must be between -180 and 180').max(180, 'must be between -180 and 180'),
  timezone: z
    .string()
    .min(1)
    .refine((tz) => {
      try {
        new Intl.DateTimeFormat('en-GB', { timeZone: tz });
        return true;
      } catch {
        return false;
      }
    }, 'is not a known time zone')
    .default('Europe/London'),
  /** Absent: 0.6 m, or OSHA's 2 ft (0.6096 m) on a US site (docs/calculation.md, "Units"). */
  minimumClearance: z.number().min(0, 'must be at least 0 m').max(10, 'must be at most 10 m').optional(),
  defaultMethod: z.enum(surchargeMethods).default('dispersion-45'),
  units: unitSystemSchema.default('metric'),
});
export type SiteInput = z.input<typeof siteSchema>;
export const siteUpdateSchema = siteSchema.partial();
/** What a coordinator may change of their site: its default units. */
export const siteUnitsSchema = z.object({ units: unitSystemSchema });

export const siteAnswer = z.object({
  id: z.number().int(),
  name: z.string(),
  latitude: z.number(),
  longitude: z.number(),
  timezone: z.string(),
  minimumClearance: z.number(),
  defaultMethod: z.enum(surchargeMethods),
  units: unitSystemSchema,
  createdAt: z.iso.datetime(),
});
export type Site = z.infer<typeof siteAnswer>;
export const sitesAnswer = z.object({ sites: z.array(siteAnswer) });
export const oneSiteAnswer = z.object({ site: siteAnswer });

export const membershipSchema = z.object({
  role: siteRoleSchema,
  canInspect: z.boolean().default(false),
});

export const userUpdateSchema = z.object({
  name: z.string().trim().min(1).max(120).optional(),
  isAdmin: z.boolean().optional(),
  active: z.boolean().optional(),
});

export const personAnswer = z.object({
  id: z.number().int(),
  email: z.string(),
  name: z.string(),
  isAdmin: z.boolean(),
  active: z.boolean(),
  memberships: z.array(z.object({ siteId: z.number().int(), siteName: z.string(), role: siteRoleSchema, canInspect: z.boolean() })),
});
export type Person = z.infer<typeof personAnswer>;
/** GET /api/users: one page of an organisation's people, by name, and the cursor of the next (null on the last). */
export const peopleAnswer = z.object({
  users: z.array(personAnswer),
  next: z.string().nullable(),
  /** How many people the organisation has, active and in all (every page says the same). */
  counts: z.object({ active: z.number().int(), total: z.number().int() }),
});
/** The longest text search of the people list (characters). */
export const peopleSearchMax = 100;

export const peopleListQuerySchema = z.object({
  /** Words to find in a person's name or e-mail address (case-insensitive). */
  q: z.string().trim().max(peopleSearchMax, `must be at most ${peopleSearchMax} characters`).optional(),
  limit: z.coerce.number().int().min(1).max(500).default(100),
  /** The `next` of the page before. */
  cursor: z.string().max(1000, 'must be at most 1000 characters').optional(),
});
export const onePersonAnswer = z.object({ user: personAnswer });
export const createdAnswer = z.object({ id: z.number().int() });
