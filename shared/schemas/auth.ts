import { z } from 'zod';
import { bodyIdSchema, emailSchema, nameSchema, passwordSchema, siteRoleSchema } from './common';
import { unitSystemSchema } from './sites';

export const signInSchema = z.object({
  email: emailSchema,
  password: z.string().min(1, 'is required').max(200),
});

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
    siteId: bodyIdSchema.nullable().default(null),
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

const membershipAnswer = z.object({ siteId: z.number().int(), siteName: z.string(), role: siteRoleSchema, canInspect: z.boolean() });

/** An organisation as its people see it: the one they belong to. */
export const organisationAnswer = z.object({ id: z.number().int(), name: z.string() });
export type Organisation = z.infer<typeof organisationAnswer>;

/** PATCH /api/organisation: an administrator renames their own organisation. */
export const organisationUpdateSchema = z.object({ name: nameSchema });
export const oneOrganisationAnswer = z.object({ organisation: organisationAnswer });

export const meAnswer = z.object({
  id: z.number().int(),
  email: z.string(),
  name: z.string(),
  isAdmin: z.boolean(),
  /** The organisation the person belongs to (an administrator manages that one only). */
  organisation: organisationAnswer,
  /** The person's own units; null follows each site's (docs/calculation.md, "Units"). */
  units: unitSystemSchema.nullable(),
  memberships: z.array(membershipAnswer),
});
export type Me = z.infer<typeof meAnswer>;

/** A person's own choice of units (null: follow each site's default). */
export const myUnitsSchema = z.object({ units: unitSystemSchema.nullable() });

// Answers of the sign-in and invitation routes (server/src/routes/auth.ts).
/** Signed in (sign-in, who-am-I, an accepted invitation): the person with their site roles. */
export const signedInAnswer = z.object({ user: meAnswer });
export const messageAnswer = z.object({ message: z.string() });
export const invitationOfferAnswer = z.object({
  email: z.string(),
  name: z.string(),
  siteName: z.string().nullable(),
  role: siteRoleSchema.nullable(),
});
export type InvitationOffer = z.infer<typeof invitationOfferAnswer>;
