import { z } from 'zod';
import { siteRoleSchema } from './common';

export const surchargeMethods = ['dispersion-45', 'elastic'] as const;
export type SurchargeMethod = (typeof surchargeMethods)[number];

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
  minimumClearance: z.number().min(0, 'must be at least 0 m').max(10, 'must be at most 10 m').default(0.6),
  defaultMethod: z.enum(surchargeMethods).default('dispersion-45'),
});
export type SiteInput = z.input<typeof siteSchema>;
export const siteUpdateSchema = siteSchema.partial();

export interface Site {
  id: number;
  name: string;
  latitude: number;
  longitude: number;
  timezone: string;
  minimumClearance: number;
  defaultMethod: (typeof surchargeMethods)[number];
  createdAt: string;
}

export const membershipSchema = z.object({
  role: siteRoleSchema,
  canInspect: z.boolean().default(false),
});

export const userUpdateSchema = z.object({
  name: z.string().trim().min(1).max(120).optional(),
  isAdmin: z.boolean().optional(),
  active: z.boolean().optional(),
});

export interface Person {
  id: number;
  email: string;
  name: string;
  isAdmin: boolean;
  active: boolean;
  memberships: { siteId: number; siteName: string; role: z.infer<typeof siteRoleSchema>; canInspect: boolean }[];
}
