import { z } from 'zod';
import { permitSummaryAnswer } from './permits';
import { excavationStates, RECORD_ID_MAX } from './common';
import { excavationKinds, lineAnswer, multiPolygonAnswer, polygonAnswer } from './excavations';
import { concernNoteReason } from './concern';

/**
 * The field view: what an operator's phone reads (the permits that name them, with everything needed
 * to show one permit with no signal) and what it sends (briefing confirmations and concerns, each
 * with an idempotency key made on the phone, so a send repeated after a lost answer counts once).
 */

/** An idempotency key: made on the phone when the action is taken, sent with every attempt. */
export const idempotencyKeySchema = z
  .string()
  .trim()
  .regex(/^[A-Za-z0-9_-]{16,100}$/, 'must be 16 to 100 letters, digits, - or _');

export { CONCERN_PHOTOS_MAX } from './concern';

/** The text fields of a concern (multipart form fields, so numbers arrive as text). */
export const concernFormSchema = z.object({
  excavationId: z.coerce
    .number({ message: 'is required' })
    .int('must be one of the permit’s excavations')
    .positive('is required')
    .max(RECORD_ID_MAX, 'must be one of the permit’s excavations'),
  note: z
    .string({ message: 'is required' })
    .trim()
    .superRefine((note, ctx) => {
      const reason = concernNoteReason(note);
      if (reason) ctx.addIssue({ code: 'custom', message: reason });
    }),
  idempotencyKey: idempotencyKeySchema.optional(),
});

const int = z.number().int();
const isoTime = z.iso.datetime();

export const concernAnswer = z.object({
  id: int,
  permitId: int,
  excavationId: int.nullable(),
  excavationReference: z.string(),
  note: z.string(),
  /** Stored photos, each served by GET /api/uploads/:id to members of the site. */
  photoIds: z.array(int),
  reporter: z.object({ id: int, name: z.string() }),
  createdAt: isoTime,
  idempotencyKey: z.string(),
});
export type Concern = z.output<typeof concernAnswer>;

/** POST /api/permits/:id/concerns: the concern (the first one when the key was already used); `id` on a new one. */
export const concernReportedAnswer = z.object({ concern: concernAnswer, replayed: z.boolean(), id: int.optional() });

const zone = z.discriminatedUnion('type', [polygonAnswer, multiPolygonAnswer]);

/**
 * Where an approved permit's exclusion distance comes from: the standoff the coordinator set, the
 * standoff the check computed for that excavation (approved as placed, no standoff set), the whole
 * reach of the check, 3H (no standoff found), or the site's least clearance when that is larger.
 */
export const exclusionBases = ['set', 'computed', 'whole-reach', 'clearance'] as const;
export type ExclusionBasis = (typeof exclusionBases)[number];

/** An excavation a permit names, with its zones for the phone's map and reading. */
export const fieldExcavationAnswer = z.object({
  id: int,
  reference: z.string(),
  name: z.string(),
  kind: z.enum(excavationKinds),
  state: z.enum(excavationStates),
  depth: z.number(),
  supportLabel: z.string(),
  /** The shape as the shared geometry reads it: a trench's centre line with its width, or a pit's outline. */
  shape: z.discriminatedUnion('kind', [
    z.object({ kind: z.literal('trench'), centreLine: lineAnswer, width: z.number() }),
    z.object({ kind: z.literal('pit'), outline: polygonAnswer }),
  ]),
  /** The outline on the ground (WGS84). */
  outline: polygonAnswer,
  /** Ground within the depth H of the edge: ISO 3864 warning yellow on the map. */
  influenceZone: zone,
  /** Where no part of the permitted load may go: within `standoff` of the edge. Null when none was set. */
  exclusionZone: zone.nullable(),
  /** Distance (m) of the exclusion zone's boundary from the excavation's edge (shared/permits/exclusion.ts). */
  standoff: z.number().nullable(),
  /** Where that distance comes from (the coordinator's standoff, the computed one, …); null when none is set. */
  standoffBasis: z.enum(exclusionBases).nullable(),
});
export type FieldExcavation = z.output<typeof fieldExcavationAnswer>;

/** A load the permit allows, as drawn on the ground. */
export const fieldFootprintAnswer = z.object({ label: z.string(), geometry: z.discriminatedUnion('type', [polygonAnswer, lineAnswer]) });
export type FieldFootprint = z.output<typeof fieldFootprintAnswer>;

const fieldOperatorAnswer = z.object({ id: int, name: z.string(), briefedAt: isoTime.nullable() });

const latLng = z.object({ latitude: z.number(), longitude: z.number() });

/** One permit as the phone shows it: its summary, then what the operator needs on the ground. */
export const fieldPermitAnswer = permitSummaryAnswer
  .pick({
    id: true,
    number: true,
    siteId: true,
    siteName: true,
    kind: true,
    status: true,
    statusLabel: true,
    version: true,
    revision: true,
    description: true,
    windowStart: true,
    windowEnd: true,
  })
  .extend({
    /** The site's origin: the centre of the local projection the geometry is measured in. */
    origin: latLng,
    /** The permitted position: the middle of the permitted loads (or of the excavations for a dig). */
    centre: latLng,
    /** The standoff that governs this permit (m): the largest exclusion distance of its excavations. */
    standoff: z.number().nullable(),
    /** The site's least clearance from any edge (m), which no standoff goes below. */
    minimumClearance: z.number(),
    conditions: z.array(z.string()),
    decidedBy: z.object({ name: z.string(), at: isoTime }).nullable(),
    operators: z.array(fieldOperatorAnswer),
    /** Whether the person reading is named on the permit, and their briefing. */
    named: z.boolean(),
    myBriefedAt: isoTime.nullable(),
    /** Named, not confirmed yet, and the permit is approved or later (the briefing comes after approval). */
    briefingDue: z.boolean(),
    excavations: z.array(fieldExcavationAnswer),
    footprints: z.array(fieldFootprintAnswer),
    concerns: z.array(concernAnswer),
    caution: z.string(),
  });
export type FieldPermit = z.output<typeof fieldPermitAnswer>;

/** GET /api/field/permits: the permits that name me; `asOf` is the server's time of the answer. */
export const fieldPermitsAnswer = z.object({ asOf: isoTime, permits: z.array(fieldPermitAnswer) });
export type FieldPermitsAnswer = z.output<typeof fieldPermitsAnswer>;

/** GET /api/field/permits/:id */
export const oneFieldPermitAnswer = z.object({ asOf: isoTime, permit: fieldPermitAnswer });
export type FieldPermitAnswer = z.output<typeof oneFieldPermitAnswer>;
