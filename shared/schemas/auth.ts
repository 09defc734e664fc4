import { z } from 'zod';
import { emailSchema, nameSchema, passwordSchema, siteRoleSchema, type SiteRole } from './common';

export const signInSchema = z.object({
  email: emailSchema,
  password: z.string().min(1, 'is required').max(200),
});
export type SignIn = z.infer<typeof signInSchema>;

export const forgotPasswordSchema = z.object({ email: emailSchema });

export const resetPasswordSchema = z.object({
  token: z.string().min(20, 'is not a valid link').max(200),
  password: passwordSchema,
});

export const invitationSchema = z
  .object({
    email: emailSchema,
    name: nameSchema,
    isAdmin: z.boolean().default(false),
    siteId: z.number().int().positive().nullable().default(null),
    role: siteRoleSchema.nullable().default(null),
  })
  .refine((v) => (v.siteId === null) === (v.role === null), {
    message: 'give both a site and a role, or neither',
    path: ['role'],
  });
export type InvitationInput = z.input<typeof invitationSchema>;

export const acceptInvitationSchema = z.object({
  token: z.string().min(20, 'is not a valid link').max(200),
  name: nameSchema,
  password: passwordSchema,
});

export interface Membership {
  siteId: number;
  siteName: string;
  role: SiteRole;
  canInspect: boolean;
}

export interface Me {
  id: number;
  email: string;
  name: string;
  isAdmin: boolean;
  memberships: Membership[];
}
