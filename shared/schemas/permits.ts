/**
 * Permits: the words, the status machine's table, and the zod schemas of the permit API, shared by
 * the server (which enforces them) and the client (which shows only what may be done).
 *
 * Units: positions are WGS84 [longitude, latitude] in degrees; rotations are bearings in degrees
 * clockwise from north; lengths in m; pressures in kPa; line loads in kN/m; unit weights in kN/m³.
 */
import { z } from 'zod';
import { bodyIdSchema, idSchema, RECORD_ID_MAX, type SiteRole } from './common';
import { surchargeMethods } from './sites';
import { plantElementSchema } from './plant';
import { readStored, readStoredOrNull, type Stored } from './stored';
import { lineStringOf, lngLatSchema, polygonOf } from './geojson';
import { loadKinds, ranRequestSchema } from './calc';

// ---------------------------------------------------------------------------------------------
// Statuses and actions

export const permitStatuses = [
  'draft',
  'submitted',
  'returned',
  'approved',
  'declined',
  'live',
  'suspended',
  'handed_back',
  'lapsed',
  'withdrawn',
] as const;
export type PermitStatus = (typeof permitStatuses)[number];

/** A load permit places loads beside excavations; a dig permit opens one. */
export const permitKinds = ['load', 'dig'] as const;
export type PermitKind = (typeof permitKinds)[number];

/** What people read for each status. */
export const statusLabels: Record<PermitStatus, string> = {
  draft: 'Draft',
  submitted: 'Awaiting review',
  returned: 'Returned for changes',
  approved: 'Approved',
  declined: 'Declined',
  live: 'Live',
  suspended: 'Suspended',
  handed_back: 'Handed back',
  lapsed: 'Lapsed',
  withdrawn: 'Withdrawn',
};

/** Statuses whose content the requester may still edit (PATCH). */
export const editableStatuses: readonly PermitStatus[] = ['draft', 'returned'];
/** Permits whose loads may stand beside an excavation during their window: counted in the cumulative check. */
export const countedStatuses: readonly PermitStatus[] = ['approved', 'live', 'suspended'];

export const permitActions = [
  'submit',
  'approve',
  'return',
  'decline',
  'start',
  'suspend',
  'resume',
  'hand_back',
  'lapse',
  'revise',
  'withdraw',
  'reconsider',
] as const;
export type PermitAction = (typeof permitActions)[number];

/** Who acts: a role on the permit's site, or Brink itself (the schedule, a failed inspection). */
export type ActorRole = SiteRole | 'system';

interface TransitionRule {
  from: readonly PermitStatus[];
  to: PermitStatus;
  by: readonly ActorRole[];
  /** A reason (comments) must be given. */
  reason: boolean;
  /** A coordinator's decision: signed by typing the password again. */
  signed: boolean;
  /** The button's words. */
  label: string;
}

/**
 * The status machine. The server refuses anything not in this table: a role not in `by` gets 403,
 * a permit not in a `from` status (or a stale version) gets 409.
 */
export const transitionRules: Record<PermitAction, TransitionRule> = {
  submit: { from: ['draft', 'returned'], to: 'submitted', by: ['supervisor'], reason: false, signed: false, label: 'Send for review' },
  approve: { from: ['submitted'], to: 'approved', by: ['coordinator'], reason: false, signed: true, label: 'Approve' },
  return: { from: ['submitted'], to: 'returned', by: ['coordinator'], reason: true, signed: true, label: 'Return for changes' },
  decline: { from: ['submitted'], to: 'declined', by: ['coordinator'], reason: true, signed: true, label: 'Decline' },
  start: { from: ['approved'], to: 'live', by: ['system'], reason: false, signed: false, label: 'Start' },
  suspend: { from: ['live'], to: 'suspended', by: ['coordinator', 'system'], reason: true, signed: false, label: 'Suspend work' },
  resume: { from: ['suspended'], to: 'live', by: ['coordinator'], reason: true, signed: false, label: 'Resume work' },
  hand_back: { from: ['live', 'suspended'], to: 'handed_back', by: ['supervisor'], reason: false, signed: false, label: 'Hand back' },
  lapse: { from: ['approved', 'live', 'suspended'], to: 'lapsed', by: ['system'], reason: false, signed: false, label: 'Lapse' },
  revise: {
    from: ['approved', 'live', 'suspended'],
    to: 'draft',
    by: ['supervisor'],
    reason: true,
    signed: false,
    label: 'Change (new revision)',
  },
  withdraw: {
    from: ['draft', 'submitted', 'returned', 'approved'],
    to: 'withdrawn',
    by: ['supervisor'],
    reason: false,
    signed: false,
    label: 'Withdraw',
  },
  // An approved permit whose excavation changed so that its loads now fail, or need more standoff
  // than was approved, goes back for a coordinator's decision (server/src/services/permits/recheck.ts).
  reconsider: { from: ['approved'], to: 'submitted', by: ['system'], reason: true, signed: false, label: 'Send back for review' },
};

/** The actions a person in this role may take on a permit in this status. */
export function allowedActions(status: PermitStatus, role: ActorRole | null): PermitAction[] {
  if (!role) return [];
  return permitActions.filter((a) => transitionRules[a].from.includes(status) && transitionRules[a].by.includes(role));
}

// ---------------------------------------------------------------------------------------------
// Verdict colours (ISO 3864: red prohibition/danger, yellow warning, green safe condition)

/** Above this utilisation a passing check is shown as close to the limit (yellow). */
const CLOSE_TO_LIMIT = 0.85;
export type Verdict = 'fails' | 'close' | 'passes';
export const verdictRule =
  'Red: the support is overloaded (utilisation above 1.00) or has no allowance. Yellow: it passes but the utilisation is above 0.85. Green: utilisation 0.85 or less.';

export function verdictOf(utilisation: number | null, passes: boolean): Verdict {
  if (!passes || utilisation === null) return 'fails';
  return utilisation > CLOSE_TO_LIMIT ? 'close' : 'passes';
}

// ---------------------------------------------------------------------------------------------
// Conditions a coordinator can tick (own words)

export const commonConditions = [
  { key: 'mats', text: 'Outriggers and pads stand on mats of the agreed size, never on bare ground.' },
  { key: 'banksman', text: 'A banksman is present whenever the machine moves or slews inside the influence zone.' },
  { key: 'no-tracking', text: 'No tracking, parking or stacking inside the exclusion zone.' },
  { key: 'water', text: 'Stop and tell the coordinator if water appears in the excavation or cracks open at the edge.' },
  { key: 'barrier', text: 'The exclusion zone is marked on the ground with barriers before the load arrives.' },
] as const;

// ---------------------------------------------------------------------------------------------
// Geometry and placed loads

export { lngLatSchema };
export type LngLat = z.infer<typeof lngLatSchema>;

export const polygonSchema = polygonOf(
  lngLatSchema,
  'an outline needs at least three corners and the first repeated at the end',
  'must be one outer ring without holes',
);

export const lineStringSchema = lineStringOf(lngLatSchema, 'a line needs at least two points');

const loadId = z.string().trim().min(1, 'is required').max(40, 'must be at most 40 characters');
const label = z.string().trim().max(80, 'must be at most 80 characters').default('');
const kPa = z.number().gt(0, 'must be more than 0 kPa').max(2000, 'must be at most 2000 kPa');

export const placedLoadSchema = z.discriminatedUnion('kind', [
  z.object({
    id: loadId,
    kind: z.literal('plant'),
    label,
    plantItemId: bodyIdSchema,
    position: lngLatSchema,
    /** Bearing of the machine's forward axis, degrees clockwise from north. */
    rotation: z.number().min(0, 'must be 0° to 360°').max(360, 'must be 0° to 360°').default(0),
  }),
  z.object({
    id: loadId,
    kind: z.literal('stockpile'),
    label,
    outline: polygonSchema,
    unitWeight: z.number().gt(0, 'must be more than 0 kN/m³').max(30, 'must be at most 30 kN/m³'),
    height: z.number().gt(0, 'must be more than 0 m').max(20, 'must be at most 20 m'),
  }),
  z.object({ id: loadId, kind: z.literal('area'), label, outline: polygonSchema, pressure: kPa }),
  z.object({ id: loadId, kind: z.literal('strip'), label, outline: polygonSchema, pressure: kPa }),
  z.object({
    id: loadId,
    kind: z.literal('line'),
    label,
    path: lineStringSchema,
    force: z.number().gt(0, 'must be more than 0 kN/m').max(2000, 'must be at most 2000 kN/m'),
  }),
]);
export type PlacedLoad = z.infer<typeof placedLoadSchema>;
export type PlacedLoadKind = PlacedLoad['kind'];

/** A load's kind in words, for a load with no label. */
const loadKindWords: Record<PlacedLoadKind, string> = {
  plant: 'Machine',
  stockpile: 'Stockpile',
  area: 'Area load',
  strip: 'Strip load',
  line: 'Line load',
};

/** What people read for a load: its label, else its machine's name, else its kind; never its internal id. */
export function loadName(load: PlacedLoad, plantName?: (plantItemId: number) => string | undefined): string {
  return load.label || (load.kind === 'plant' ? plantName?.(load.plantItemId) : undefined) || loadKindWords[load.kind];
}

export const placedLoadLabels: Record<PlacedLoadKind, string> = {
  plant: 'Plant from the library',
  stockpile: 'Stockpile (unit weight × height)',
  area: 'Area load (pressure over a drawn area)',
  strip: 'Strip load (runs along the face)',
  line: 'Line load (force per unit of length)',
};

// ---------------------------------------------------------------------------------------------
// Dig permits: buried-services checks

export const serviceCheckKeys = ['drawings', 'locatorScan', 'trialHoles'] as const;
type ServiceCheckKey = (typeof serviceCheckKeys)[number];
export const serviceCheckLabels: Record<ServiceCheckKey, string> = {
  drawings: 'Record drawings of buried services consulted',
  locatorScan: 'Cable-locator scan of the dig area done',
  trialHoles: 'Trial holes dug by hand near the services found',
};

const serviceCheckSchema = z
  .object({
    /** `not-needed` is accepted for trial holes only (no services found near the dig), with a note. */
    state: z.enum(['pending', 'done', 'not-needed']).default('pending'),
    by: z.string().trim().max(120).default(''),
    at: z.iso.datetime({ offset: true, message: 'must be a date and time' }).nullable().default(null),
    notes: z.string().trim().max(1000).default(''),
  })
  .superRefine((c, ctx) => {
    if (c.state === 'done') {
      if (!c.by) ctx.addIssue({ code: 'custom', path: ['by'], message: 'who did it is required once it is done' });
      if (!c.at) ctx.addIssue({ code: 'custom', path: ['at'], message: 'when it was done is required once it is done' });
    }
    if (c.state === 'not-needed' && !c.notes) ctx.addIssue({ code: 'custom', path: ['notes'], message: 'say why it is not needed' });
  });

export const digDetailsSchema = z
  .object({
    depth: z.number().gt(0, 'must be more than 0 m').max(50, 'must be at most 50 m'),
    supportMethod: z.string().trim().min(1, 'is required').max(300),
    servicesChecks: z.object({
      drawings: serviceCheckSchema.default({ state: 'pending', by: '', at: null, notes: '' }),
      locatorScan: serviceCheckSchema.default({ state: 'pending', by: '', at: null, notes: '' }),
      trialHoles: serviceCheckSchema.default({ state: 'pending', by: '', at: null, notes: '' }),
    }),
  })
  .superRefine((d, ctx) => {
    for (const k of ['drawings', 'locatorScan'] as const) {
      if (d.servicesChecks[k].state === 'not-needed') {
        ctx.addIssue({ code: 'custom', path: ['servicesChecks', k, 'state'], message: 'is always needed before digging' });
      }
    }
  });
export type DigDetails = z.infer<typeof digDetailsSchema>;

// ---------------------------------------------------------------------------------------------
// Requests

const when = z.iso.datetime({ offset: true, message: 'must be a date and time (ISO 8601)' });
const ids = (most: number) => z.array(bodyIdSchema).max(most, `must list at most ${most}`);

/** What a request says; the create, update and check-proposal schemas are all drawn from it. */
const content = z.object({
  description: z
    .string({ error: 'is required: say what the work is' })
    .trim()
    .min(1, 'is required: say what the work is')
    .max(1000, 'must be at most 1000 characters'),
  windowStart: when,
  windowEnd: when,
  excavationIds: ids(20),
  loads: z.array(placedLoadSchema).max(50, 'must list at most 50 loads'),
  operatorIds: ids(20),
  dig: digDetailsSchema.nullable(),
  method: z.enum(surchargeMethods).optional(),
});

function windowOrder(v: { windowStart?: string; windowEnd?: string }, ctx: z.RefinementCtx): void {
  if (v.windowStart && v.windowEnd && Date.parse(v.windowEnd) <= Date.parse(v.windowStart)) {
    ctx.addIssue({ code: 'custom', path: ['windowEnd'], message: 'must be after the window opens' });
  }
}

function uniqueLoadIds(v: { loads?: { id: string }[] }, ctx: z.RefinementCtx): void {
  const seen = new Map<string, number>();
  (v.loads ?? []).forEach((l, i) => {
    if (seen.has(l.id))
      ctx.addIssue({ code: 'custom', path: ['loads', i, 'id'], message: `repeats the id of load ${(seen.get(l.id) ?? 0) + 1}` });
    else seen.set(l.id, i);
  });
}

export const permitCreateSchema = content
  .extend({
    siteId: bodyIdSchema,
    kind: z.enum(permitKinds),
    excavationIds: content.shape.excavationIds.min(1, 'must name at least one excavation: choose the excavation the work is beside'),
    loads: content.shape.loads.default([]),
    operatorIds: content.shape.operatorIds.default([]),
    dig: content.shape.dig.default(null),
  })
  .superRefine(windowOrder)
  .superRefine(uniqueLoadIds);
export type PermitCreate = z.infer<typeof permitCreateSchema>;
export type PermitCreateInput = z.input<typeof permitCreateSchema>;

/** A change to a draft: any of the request's fields, with the version the person was looking at. */
export const permitUpdateSchema = content
  .partial()
  .extend({ version: z.number().int().positive().max(RECORD_ID_MAX) })
  .superRefine(windowOrder)
  .superRefine(uniqueLoadIds);
export type PermitUpdate = z.infer<typeof permitUpdateSchema>;

/** A proposal to check without saving it (the live check while placing); absent fields come from the saved permit. */
export const checkProposalSchema = content
  .pick({ windowStart: true, windowEnd: true, excavationIds: true, loads: true, method: true })
  .partial()
  .superRefine(windowOrder)
  .superRefine(uniqueLoadIds);
export type CheckProposal = z.infer<typeof checkProposalSchema>;

export const transitionSchema = z
  .object({
    action: z.enum(permitActions, { message: `must be one of ${permitActions.join(', ')}` }),
    version: z.number({ message: 'is required: the version of the permit you are looking at' }).int().positive().max(RECORD_ID_MAX),
    reason: z.string().trim().max(4000, 'must be at most 4000 characters').optional(),
    /** Approve with a standoff (m) from the excavation edge for every load of the permit. */
    standoff: z.number().min(0, 'must be at least 0 m').max(100, 'must be at most 100 m').optional(),
    conditions: z.array(z.string().trim().min(1, 'must not be empty').max(500)).max(20).optional(),
    password: z.string().max(200).optional(),
  })
  .superRefine((t, ctx) => {
    const rule = transitionRules[t.action];
    if (rule.reason && !t.reason) ctx.addIssue({ code: 'custom', path: ['reason'], message: `is required to ${rule.label.toLowerCase()}` });
    if (rule.signed && !t.password)
      ctx.addIssue({ code: 'custom', path: ['password'], message: 'is required: type your password again to sign the decision' });
    if (t.action !== 'approve' && (t.standoff !== undefined || t.conditions !== undefined)) {
      ctx.addIssue({
        code: 'custom',
        path: [t.standoff !== undefined ? 'standoff' : 'conditions'],
        message: 'belongs to an approval only',
      });
    }
  });
export type TransitionInput = z.input<typeof transitionSchema>;

export const commentSchema = z.object({ text: z.string().trim().min(1, 'is required').max(4000, 'must be at most 4000 characters') });

export const attachmentKinds = ['method-statement', 'photo', 'other'] as const;
export type AttachmentKind = (typeof attachmentKinds)[number];
export const attachmentKindLabels: Record<AttachmentKind, string> = {
  'method-statement': 'Method statement (PDF)',
  photo: 'Photo',
  other: 'Other document',
};
export const attachmentFormSchema = z.object({ kind: z.enum(attachmentKinds).default('other') });

export const permitViews = ['all', 'review', 'mine', 'live'] as const;
export type PermitView = (typeof permitViews)[number];
export const permitViewLabels: Record<PermitView, string> = {
  review: 'Awaiting my review',
  mine: 'My requests',
  live: 'Live now',
  all: 'All permits',
};
export const permitSorts = ['number', 'windowStart', 'windowEnd', 'status', 'updated'] as const;

/** The longest text search of the permits list (characters). */
export const permitSearchMax = 100;

export const permitListQuerySchema = z.object({
  siteId: idSchema.optional(),
  view: z.enum(permitViews).default('all'),
  /** One status or several, comma-separated. */
  status: z
    .string()
    .optional()
    .transform((s, ctx) => {
      if (!s) return undefined;
      const list = s
        .split(',')
        .map((x) => x.trim())
        .filter(Boolean);
      const bad = list.filter((x) => !(permitStatuses as readonly string[]).includes(x));
      if (bad.length) {
        ctx.addIssue({ code: 'custom', message: `unknown status ${bad.join(', ')}: use ${permitStatuses.join(', ')}` });
        return z.NEVER;
      }
      return list as PermitStatus[];
    }),
  kind: z.enum(permitKinds).optional(),
  excavationId: idSchema.optional(),
  /** Words to find in the reference, the work, a named excavation's reference or name, or a load's machine or label. */
  q: z.string().trim().max(permitSearchMax, `must be at most ${permitSearchMax} characters`).optional(),
  /** Permits whose window overlaps from..to. */
  from: when.optional(),
  to: when.optional(),
  sort: z.enum(permitSorts).default('updated'),
  order: z.enum(['asc', 'desc']).default('desc'),
  limit: z.coerce.number().int().min(1).max(500).default(200),
  /** Where the page starts: the `next` of the page before (opaque; keeps the sort and filters of the first page's query). */
  cursor: z.string().max(300, 'must be at most 300 characters').optional(),
  /** true: the answer also counts every permit the filters match (`total`, all pages), e.g. for "All 34". */
  total: z.stringbool({ error: 'must be true or false' }).optional(),
});
export type PermitListQuery = z.infer<typeof permitListQuerySchema>;

// ---------------------------------------------------------------------------------------------
// Answers: each is a zod schema, and its type is what the schema puts out. The server checks every
// answer against its schema under NODE_ENV=test; the client takes the types (server/src/http.ts).
// Stored jsonb (a check, a decision, snapshots) is parsed with the same schemas when read: a stored
// shape that drifts fails loudly where it is read (and in the tests), never silently in a PDF.

const int = z.number().int();
const isoTime = z.iso.datetime();
const nullableNumber = z.number().nullable();
const personRef = z.object({ id: int, name: z.string() });
const verdictSchema = z.enum(['fails', 'close', 'passes']);

export const permitSummaryAnswer = z.object({
  id: int,
  siteId: int,
  siteName: z.string(),
  number: z.string(),
  kind: z.enum(permitKinds),
  status: z.enum(permitStatuses),
  statusLabel: z.string(),
  version: int,
  revision: int,
  description: z.string(),
  windowStart: isoTime,
  windowEnd: isoTime,
  excavationIds: z.array(int),
  requestedBy: personRef,
  /** The governing utilisation of the last check, and whether it passed (null before any check). */
  utilisation: nullableNumber,
  passes: z.boolean().nullable(),
  updatedAt: isoTime,
});
export type PermitSummary = z.output<typeof permitSummaryAnswer>;

/**
 * A coordinator's decision (permit_revisions.decision). Decisions stored before the computed
 * standoff was recorded (the demo seed's too) have no `computedStandoff`: it stays absent.
 */
export const permitDecisionSchema = z.object({
  action: z.enum(['approve', 'return', 'decline']),
  by: personRef,
  at: isoTime,
  reason: z.string(),
  /** The standoff the coordinator set (m), or null when approved as placed. */
  standoff: nullableNumber,
  /** The computed standoff when the decision was made (m; null when no offset works; absent where none was recorded). */
  computedStandoff: nullableNumber.optional(),
  conditions: z.array(z.string()),
  /** "Signed by typing the password": name and time. */
  signature: z.string(),
});
export type PermitDecision = z.output<typeof permitDecisionSchema>;

const permitOperatorAnswer = z.object({ id: int, name: z.string(), email: z.string(), briefedAt: isoTime.nullable() });

/**
 * What an event of the timeline keeps beside its action (permit_events.detail): fields that depend on
 * the action; those a screen reads are typed here (the decision signed, what started a live window,
 * the inspection that suspended it, a concern's excavation and photos, a re-check's verdict).
 */
export const permitEventDetailSchema = z.looseObject({
  decision: permitDecisionSchema.optional(),
  startedBy: z.string().optional(),
  inspection: z.looseObject({ id: int, excavationReference: z.string() }).optional(),
  excavationReference: z.string().optional(),
  photoIds: z.array(int).optional(),
  passes: z.boolean().optional(),
});
export type PermitEventDetail = z.output<typeof permitEventDetailSchema>;
/** An event's detail as stored ({} when none was kept). */
export const storedEventDetail = (json: Stored<PermitEventDetail>): PermitEventDetail =>
  readStored('permit event detail', permitEventDetailSchema, json);

export const permitEventAnswer = z.object({
  id: int,
  revision: int,
  at: isoTime,
  actor: z.object({ id: int.nullable(), name: z.string() }),
  action: z.string(),
  fromStatus: z.enum(permitStatuses).nullable(),
  toStatus: z.enum(permitStatuses).nullable(),
  comment: z.string(),
  detail: permitEventDetailSchema,
});
export type PermitEvent = z.output<typeof permitEventAnswer>;

export const permitAttachmentAnswer = z.object({
  id: int,
  revision: int,
  kind: z.enum(attachmentKinds),
  name: z.string(),
  mime: z.string(),
  size: z.number(),
  addedBy: z.string(),
  addedAt: isoTime,
  url: z.string(),
});
export type PermitAttachment = z.output<typeof permitAttachmentAnswer>;

/** A machine of the plant library as a revision's check used it (element loads and footprints). */
const snapshotMachineSchema = z.object({
  id: int,
  name: z.string(),
  operatingMass: z.number(),
  designFactor: z.number(),
  elements: z.array(plantElementSchema),
  /** The library entry's version and last change when it was taken. */
  version: int,
  updatedAt: isoTime,
});

/**
 * The machines a revision's loads name, frozen when it was sent for review: from then on its check
 * uses these, so a later change to the shared plant library changes drafts only.
 */
export const plantSnapshotSchema = z.object({ takenAt: isoTime, machines: z.array(snapshotMachineSchema) });
export type PlantSnapshot = z.output<typeof plantSnapshotSchema>;

/** The check inputs of the excavations a revision's last stored check used, with their register version. */
export const excavationSnapshotSchema = z.object({
  takenAt: isoTime,
  excavations: z.array(z.looseObject({ id: int, reference: z.string(), name: z.string(), version: int })),
});
export type ExcavationSnapshot = z.output<typeof excavationSnapshotSchema>;

// The cumulative check, per excavation. Checks are stored whole and never migrated; the fields added
// after the first checks were stored are accepted absent, explicitly: `named` (true), `failingBands`
// (none recorded), the engine's `caution` ('').

const offsetBandSchema = z.object({ from: z.number(), to: z.number() });

/** The engine's result (shared/engineering, CheckResult: shared/permits/check.ts stores it as this type); the pressure profile is left out of the check route's answer. */
const checkResultSchema = z.object({
  method: z.enum(surchargeMethods),
  coefficients: z.array(z.object({ top: z.number(), K: z.number() })),
  profile: z
    .array(
      z.object({ z: z.number(), soil: z.number(), water: z.number(), surcharge: z.number(), total: z.number(), allowance: z.number() }),
    )
    .optional(),
  forces: z.object({ soil: z.number(), water: z.number(), surcharge: z.number(), allowance: z.number() }),
  moments: z.object({ surcharge: z.number(), allowance: z.number() }),
  loads: z.array(
    z.object({
      id: z.string(),
      kind: z.enum(loadKinds),
      force: z.number(),
      moment: z.number(),
      top: nullableNumber,
      bottom: nullableNumber,
      standoff: nullableNumber,
      failingBands: z.array(offsetBandSchema).default([]),
    }),
  ),
  utilisation: nullableNumber,
  governing: z.enum(['force', 'moment', 'rated-pressure', 'no-allowance']).nullable(),
  maxTotalPressure: z.number(),
  passes: z.boolean(),
  warnings: z.array(z.string()),
  caution: z.string().default(''),
});

export const checkedLoadSchema = z.object({
  /** The id the engine saw (`<permit number>/<load id>/<element>`). */
  engineId: z.string(),
  permitId: int.nullable(),
  permitNumber: z.string(),
  loadId: z.string(),
  label: z.string(),
  /** The bearing element of a plant item (track, pad, wheel), or '' for an ad hoc load. */
  element: z.string(),
  kind: z.enum(['area', 'strip', 'line', 'point']),
  /** Clear distance from the excavation edge (m). */
  offset: z.number(),
  /** Force on the support of this load alone (kN/m). */
  force: z.number(),
  /** The least offset at which this load alone passes (m), or null when none within 3H. */
  standoff: nullableNumber,
  /** A load of this permit (false: of another permit counted in the cumulative check). */
  own: z.boolean(),
});
export type CheckedLoad = z.output<typeof checkedLoadSchema>;

export const countedPermitSchema = z.object({
  id: int,
  number: z.string(),
  status: z.enum(permitStatuses),
  windowStart: z.string(),
  windowEnd: z.string(),
});
export type CountedPermit = z.output<typeof countedPermitSchema>;

export const excavationCheckSchema = z.object({
  excavationId: int,
  /** False for an open excavation the permit does not name but whose influence zone a load reaches (checked all the same). */
  named: z.boolean().default(true),
  reference: z.string(),
  name: z.string(),
  depth: z.number(),
  /** The engine's request (shared/engineering), as run. */
  request: ranRequestSchema,
  /** The engine's result; without its pressure profile in the answer to POST /api/permits/:id/check (`withoutProfiles`). */
  result: checkResultSchema,
  loads: z.array(checkedLoadSchema),
  /**
   * Each of this permit's placed loads: its nearest clear distance now and its standoff (m). A
   * machine's elements move together, so its standoff is that of all of them at once.
   * `failingBands`: clear distances (m) at which this load alone fails, nearest first
   * (docs/calculation.md, "Standoff"); absent on checks stored before they were recorded.
   */
  loadStandoffs: z.array(
    z.object({
      loadId: z.string(),
      label: z.string(),
      offset: z.number(),
      standoff: nullableNumber,
      failingBands: z.array(offsetBandSchema).optional(),
    }),
  ),
  /** Other approved, live or suspended permits whose window overlaps, counted in this check. */
  counted: z.array(countedPermitSchema),
  /** The largest of `loadStandoffs` (m); null when one has none. */
  standoff: nullableNumber,
  verdict: verdictSchema,
});
export type ExcavationCheck = z.output<typeof excavationCheckSchema>;

/** A permit whose loads share an excavation and an overlapping window with the one checked. */
export const otherPermitSchema = countedPermitSchema.extend({ excavationIds: z.array(int), loads: z.array(placedLoadSchema) });
export type OtherPermit = z.output<typeof otherPermitSchema>;

export const permitCheckSchema = z.object({
  checkedAt: z.string(),
  method: z.enum(surchargeMethods),
  excavations: z.array(excavationCheckSchema),
  /** Worst over the excavations. */
  utilisation: nullableNumber,
  passes: z.boolean(),
  verdict: verdictSchema,
  /** The largest standoff over every load and excavation (m); null when some load has none. */
  computedStandoff: nullableNumber,
  /** Labels of the loads farther than the influence zone of every named excavation. */
  outsideInfluence: z.array(z.string()),
  /** The other permits counted, with their loads as they were: what the check added up. */
  otherPermits: z.array(otherPermitSchema),
  warnings: z.array(z.string()),
  caution: z.string(),
});
export type PermitCheck = z.output<typeof permitCheckSchema>;

/** A stored check as PermitCheck (null when none is stored); throws StoredShapeError naming the path of a field that drifted. */
export function storedCheck(json: Stored<PermitCheck> | null): PermitCheck | null {
  return readStoredOrNull('permit check', permitCheckSchema, json);
}

/**
 * The standoffs of a stored check and nothing else (the phone's exclusion zones need no more): read
 * in SQL from `check_result` without its profiles, figures and loads (server/src/services/field.ts).
 */
export const checkStandoffsSchema = permitCheckSchema
  .pick({ computedStandoff: true })
  .extend({ excavations: z.array(excavationCheckSchema.pick({ excavationId: true, standoff: true })) });
export type CheckStandoffs = z.output<typeof checkStandoffsSchema>;
export const storedCheckStandoffs = (json: Stored<CheckStandoffs> | null): CheckStandoffs | null =>
  readStoredOrNull('permit check', checkStandoffsSchema, json);

/** The verdict of a stored check alone (what a list shows), read without the rest of it. */
export const checkVerdictSchema = permitCheckSchema.pick({ utilisation: true, passes: true });
export type CheckVerdict = z.output<typeof checkVerdictSchema>;
export const storedCheckVerdict = (json: Stored<CheckVerdict> | null): CheckVerdict | null =>
  readStoredOrNull('permit check', checkVerdictSchema, json);

/** A revision's placed loads as stored (permit_revisions.loads). */
export const storedLoads = (json: Stored<PlacedLoad[]>): PlacedLoad[] =>
  readStored('list of placed loads', z.array(placedLoadSchema), json);
/** A dig permit's details as stored (permit_revisions.dig; null on a load permit). */
export const storedDig = (json: Stored<DigDetails> | null): DigDetails | null =>
  readStoredOrNull('dig permit detail', digDetailsSchema, json);
/** A coordinator's decision as stored (permit_revisions.decision; null before one). */
export const storedDecision = (json: Stored<PermitDecision> | null): PermitDecision | null =>
  readStoredOrNull('permit decision', permitDecisionSchema, json);
/** The machines frozen at review (permit_revisions.plant_snapshot; null for a draft or a revision stored before snapshots). */
export const storedPlantSnapshot = (json: Stored<PlantSnapshot> | null): PlantSnapshot | null =>
  readStoredOrNull('plant snapshot', plantSnapshotSchema, json);
/** The excavation inputs of the last stored check (permit_revisions.excavation_snapshot; null before one). */
export const storedExcavationSnapshot = (json: Stored<ExcavationSnapshot> | null): ExcavationSnapshot | null =>
  readStoredOrNull('excavation snapshot', excavationSnapshotSchema, json);

export const permitRevisionAnswer = z.object({
  revision: int,
  description: z.string(),
  windowStart: isoTime,
  windowEnd: isoTime,
  excavationIds: z.array(int),
  method: z.enum(surchargeMethods),
  loads: z.array(placedLoadSchema),
  dig: digDetailsSchema.nullable(),
  operators: z.array(permitOperatorAnswer),
  check: permitCheckSchema.nullable(),
  checkedAt: isoTime.nullable(),
  decision: permitDecisionSchema.nullable(),
  /** The machines its check uses from review on (null for a draft, or a revision stored before snapshots). */
  plantSnapshot: plantSnapshotSchema.nullable(),
  /** The excavation inputs its last stored check used (null before any). */
  excavationSnapshot: excavationSnapshotSchema.nullable(),
  createdAt: isoTime,
});
export type PermitRevision = z.output<typeof permitRevisionAnswer>;

export const permitDetailAnswer = permitSummaryAnswer.extend({
  current: permitRevisionAnswer,
  /** Every revision's number, newest first; GET /api/permits/:id/revisions/:revision shows one. */
  revisions: z.array(z.object({ revision: int, createdAt: isoTime, decision: permitDecisionSchema.shape.action.nullable() })),
  events: z.array(permitEventAnswer),
  attachments: z.array(permitAttachmentAnswer),
  /** What the signed-in person may do now. */
  actions: z.array(z.enum(permitActions)),
  /** Whether the signed-in person is named on the permit and still has to confirm the briefing. */
  briefingDue: z.boolean(),
  caution: z.string(),
});
export type PermitDetail = z.output<typeof permitDetailAnswer>;

/** GET /api/permits: one page, and the cursor of the next (null on the last page). */
export const permitsAnswer = z.object({
  permits: z.array(permitSummaryAnswer),
  next: z.string().nullable(),
  /** How many permits the filters match over all pages: only when the query asked (`total=true`). */
  total: int.optional(),
});
/** One permit as it now is: GET /api/permits/:id and every change (create, PATCH, transitions). */
export const onePermitAnswer = z.object({ permit: permitDetailAnswer });
/** GET /api/permits/:id/revisions/:revision */
export const oneRevisionAnswer = z.object({ revision: permitRevisionAnswer });
/** The check of a permit (with changes not saved) or of a request not saved yet, without pressure profiles. */
export const permitCheckAnswer = z.object({ check: permitCheckSchema });
export type PermitCheckAnswer = z.output<typeof permitCheckAnswer>;

/** GET /api/sites/:siteId/operators: the site's operators, and those named on the caller's latest request there. */
export const siteOperatorsAnswer = z.object({
  operators: z.array(z.object({ id: int, name: z.string(), email: z.string() })),
  lastUsed: z.array(int),
});
export type SiteOperators = z.output<typeof siteOperatorsAnswer>;

/** POST /api/permits/:id/briefing: when the operator confirmed it (the first confirmation stays), and the permit's status. */
export const briefingAnswer = z.object({ briefing: z.object({ briefedAt: isoTime, status: z.enum(permitStatuses) }) });
export type BriefingAnswer = z.output<typeof briefingAnswer>;

/** POST /api/permits/:id/comments */
export const commentAddedAnswer = z.object({ ok: z.literal(true) });

/** POST /api/permits/:id/attachments */
export const attachmentAddedAnswer = z.object({
  attachment: z.object({ id: int, kind: z.enum(attachmentKinds), name: z.string(), mime: z.string(), size: z.number(), url: z.string() }),
});
export type AttachmentAdded = z.output<typeof attachmentAddedAnswer>['attachment'];
