import { z } from 'zod';
import type { LineString, MultiPolygon, Polygon } from 'geojson';
import type { PermitSummary } from './permits';
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

export { CONCERN_NOTE_MAX, CONCERN_PHOTOS_MAX, CONCERN_PHOTO_BYTES_MAX } from './concern';

/** The text fields of a concern (multipart form fields, so numbers arrive as text). */
export const concernFormSchema = z.object({
  excavationId: z.coerce.number({ message: 'is required' }).int('must be one of the permit’s excavations').positive('is required'),
  note: z
    .string({ message: 'is required' })
    .trim()
    .superRefine((note, ctx) => {
      const reason = concernNoteReason(note);
      if (reason) ctx.addIssue({ code: 'custom', message: reason });
    }),
  idempotencyKey: idempotencyKeySchema.optional(),
});
export type ConcernForm = z.infer<typeof concernFormSchema>;

export interface Concern {
  id: number;
  permitId: number;
  excavationId: number | null;
  excavationReference: string;
  note: string;
  /** Stored photos, each served by GET /api/uploads/:id to members of the site. */
  photoIds: number[];
  reporter: { id: number; name: string };
  createdAt: string;
  idempotencyKey: string;
}

/** An excavation a permit names, with its zones for the phone's map and reading. */
export interface FieldExcavation {
  id: number;
  reference: string;
  name: string;
  kind: 'trench' | 'pit';
  state: 'planned' | 'open' | 'backfilled';
  depth: number;
  supportLabel: string;
  /** The shape as the shared geometry reads it: a trench's centre line with its width, or a pit's outline. */
  shape: { kind: 'trench'; centreLine: LineString; width: number } | { kind: 'pit'; outline: Polygon };
  /** The outline on the ground (WGS84). */
  outline: Polygon;
  /** Ground within the depth H of the edge: ISO 3864 warning yellow on the map. */
  influenceZone: Polygon | MultiPolygon;
  /** Where no part of the permitted load may go: within `standoff` of the edge. Null when none was set. */
  exclusionZone: Polygon | MultiPolygon | null;
  /** Distance (m) of the exclusion zone's boundary from the excavation's edge. */
  standoff: number | null;
}

/** A load the permit allows, as drawn on the ground. */
export interface FieldFootprint {
  label: string;
  geometry: Polygon | LineString;
}

export interface FieldOperator {
  id: number;
  name: string;
  briefedAt: string | null;
}

/** One permit as the phone shows it: its summary, then what the operator needs on the ground. */
export interface FieldPermit extends Pick<
  PermitSummary,
  | 'id'
  | 'number'
  | 'siteId'
  | 'siteName'
  | 'kind'
  | 'status'
  | 'statusLabel'
  | 'version'
  | 'revision'
  | 'description'
  | 'windowStart'
  | 'windowEnd'
> {
  /** The site's origin: the centre of the local projection the geometry is measured in. */
  origin: { latitude: number; longitude: number };
  /** The permitted position: the middle of the permitted loads (or of the excavations for a dig). */
  centre: { latitude: number; longitude: number };
  /** The standoff that governs this permit (m): the largest exclusion distance of its excavations. */
  standoff: number | null;
  /** The site's least clearance from any edge (m), which no standoff goes below. */
  minimumClearance: number;
  conditions: string[];
  decidedBy: { name: string; at: string } | null;
  operators: FieldOperator[];
  /** Whether the person reading is named on the permit, and their briefing. */
  named: boolean;
  myBriefedAt: string | null;
  /** Named, not confirmed yet, and the permit is approved or later (the briefing comes after approval). */
  briefingDue: boolean;
  excavations: FieldExcavation[];
  footprints: FieldFootprint[];
  concerns: Concern[];
  caution: string;
}

/** GET /api/field/permits: the permits that name me; `asOf` is the server's time of the answer. */
export interface FieldPermitsAnswer {
  asOf: string;
  permits: FieldPermit[];
}

/** GET /api/field/permits/:id */
export interface FieldPermitAnswer {
  asOf: string;
  permit: FieldPermit;
}
