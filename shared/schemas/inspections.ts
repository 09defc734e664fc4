import { z } from 'zod';
import { isoWeekPattern } from '../time/shifts';
import { excavationStates } from './common';
import { readStored, readStoredOrNull, type Stored } from './stored';

/**
 * Excavation inspections: the checklist, the form's schema (shared by the phone form and the API),
 * site shifts and the inspection state of an excavation.
 *
 * The duty to inspect: UK Construction (Design and Management) Regulations 2015, regulation 22 and
 * Schedule 3 (at the start of every shift, after any event likely to have affected strength or
 * stability, after any accidental fall of material); US OSHA 29 CFR 1926.651(k) (daily, before
 * work, after rainstorms and other hazard-increasing occurrences).
 */

export const inspectionReasons = ['shift-start', 'after-event', 'after-fall'] as const;
export type InspectionReason = (typeof inspectionReasons)[number];
export const reasonLabels: Record<InspectionReason, string> = {
  'shift-start': 'Start of shift',
  'after-event': 'After an event that may have weakened it (rain, vibration, a strike, frost)',
  'after-fall': 'After a fall of material',
};

export const checkAnswers = ['pass', 'fail', 'na'] as const;
type CheckAnswer = (typeof checkAnswers)[number];
export const answerLabels: Record<CheckAnswer, string> = { pass: 'Pass', fail: 'Fail', na: 'Not applicable' };

export const outcomes = ['safe', 'not-safe'] as const;
export type Outcome = (typeof outcomes)[number];
export const outcomeLabels: Record<Outcome, string> = { safe: 'Safe to work', 'not-safe': 'Not safe: stop work' };

/** The checklist, in plain site words. Keys are stable (stored and exported); wording may improve. */
export const checklist = [
  {
    key: 'support',
    label: 'Support members',
    prompt:
      'Frames, struts, walings, sheets, boxes and their pins are all in place, straight, tight and undamaged; nothing has been removed or knocked.',
  },
  {
    key: 'faces',
    label: 'Sides and faces',
    prompt: 'No cracks, bulges, slips or undercutting of the sides; battered slopes still at their set angle; no voids behind the support.',
  },
  {
    key: 'water',
    label: 'Water',
    prompt: 'No new seepage, running sand or ponding; formation level not softened; pumps running where they are needed.',
  },
  {
    key: 'edges',
    label: 'Edges and stored material',
    prompt: 'Spoil, pipes and materials kept back from the edge; no tension cracks or settlement in the ground beside it.',
  },
  {
    key: 'access',
    label: 'Access and egress',
    prompt: 'Ladders or stairs secured, reaching above the edge, within easy reach of everyone working below.',
  },
  {
    key: 'barriers',
    label: 'Barriers and covers',
    prompt: 'Edge protection continuous and secure, stop blocks in place for vehicles, covers fixed, signs and lights in place.',
  },
  {
    key: 'loads',
    label: 'Loads nearby',
    prompt:
      'Plant, vehicles, outriggers and stockpiles stand outside their exclusion zones as their permits set; nothing heavy without a permit.',
  },
  {
    key: 'atmosphere',
    label: 'Atmosphere',
    prompt:
      'Where fumes or lack of oxygen may gather (deep pits, near sewers, fuel or exhausts): the air has been tested and is fit to enter.',
  },
] as const;
type ChecklistKey = (typeof checklist)[number]['key'];

const noteSchema = z.string().trim().max(1000, 'must be at most 1000 characters').default('');

export const checkSchema = z
  .object({
    answer: z.enum(checkAnswers, { error: 'choose pass, fail or not applicable' }),
    note: noteSchema,
  })
  .superRefine((v, ctx) => {
    if (v.answer === 'fail' && !v.note)
      ctx.addIssue({ code: 'custom', path: ['note'], message: 'is required for a fail: say what is wrong' });
  });

export const checklistSchema = z.object(
  Object.fromEntries(checklist.map((c) => [c.key, checkSchema])) as Record<ChecklistKey, typeof checkSchema>,
  { error: 'is required' },
);

export type Checklist = z.output<typeof checklistSchema>;

/** At most this many photos with one inspection (PNG or JPEG, 10 MB each). */
export const MAX_PHOTOS = 8;

/**
 * The inspection as the form sends it. The inspector is the signed-in person; the time defaults
 * to now and may be given up to 12 hours back (an inspection recorded after a signal blackspot).
 */
export const inspectionInputSchema = z
  .object({
    /** A random id made by the phone when the form opens: sending the same form twice records it once. */
    clientRef: z.uuid('must be a UUID').optional(),
    inspectedAt: z.iso.datetime({ offset: true, error: 'must be a date and time' }).optional(),
    reason: z.enum(inspectionReasons, { error: 'choose why the excavation is being inspected' }),
    reasonDetail: noteSchema,
    checklist: checklistSchema,
    outcome: z.enum(outcomes, { error: 'choose safe to work or not safe' }),
    remarks: z.string().trim().max(2000, 'must be at most 2000 characters').default(''),
  })
  .superRefine(
    (v, ctx) => {
      // Runs even when other fields are wrong, so that one answer names every field to correct.
      const reasonDetail = typeof v.reasonDetail === 'string' ? v.reasonDetail.trim() : '';
      const remarks = typeof v.remarks === 'string' ? v.remarks.trim() : '';
      if (v.reason && v.reason !== 'shift-start' && !reasonDetail) {
        ctx.addIssue({ code: 'custom', path: ['reasonDetail'], message: 'is required: say what happened' });
      }
      const failed = Object.values(v.checklist ?? {}).some((c) => c?.answer === 'fail');
      if (v.outcome === 'not-safe' && !remarks) {
        ctx.addIssue({ code: 'custom', path: ['remarks'], message: 'is required when not safe: say what must be put right' });
      } else if (v.outcome === 'safe' && failed && !remarks) {
        ctx.addIssue({ code: 'custom', path: ['remarks'], message: 'is required when an item failed but work is safe: say why' });
      }
    },
    { when: (payload) => typeof payload.value === 'object' && payload.value !== null },
  );
export type InspectionInput = z.input<typeof inspectionInputSchema>;
export type InspectionData = z.output<typeof inspectionInputSchema>;

const inspectionPhotoAnswer = z.object({ id: z.number().int(), url: z.string(), name: z.string() });

export const inspectionAnswer = z.object({
  id: z.number().int(),
  excavationId: z.number().int(),
  siteId: z.number().int(),
  inspector: z.object({ id: z.number().int(), name: z.string() }),
  inspectedAt: z.iso.datetime(),
  recordedAt: z.iso.datetime(),
  shift: z.object({ name: z.string(), start: z.string() }),
  reason: z.enum(inspectionReasons),
  reasonDetail: z.string(),
  checklist: checklistSchema,
  outcome: z.enum(outcomes),
  remarks: z.string(),
  photos: z.array(inspectionPhotoAnswer),
  /** Permits this inspection suspended (a "not safe" outcome). */
  suspendedPermits: z.array(z.object({ id: z.number().int(), reference: z.string() })),
});
export type Inspection = z.output<typeof inspectionAnswer>;

/** What a recorded inspection did: permits suspended, those Brink could not suspend (the leads are told), who was told. */
export const consequencesAnswer = z.object({
  suspended: z.array(z.object({ id: z.number().int(), reference: z.string() })),
  /** Live permits Brink could not suspend (e.g. changed at the same moment); the leads are told to act. */
  notSuspended: z.array(z.object({ id: z.number().int(), reference: z.string(), why: z.string() })),
  notified: z.array(z.string()),
  /** After a safe inspection: the permits on the excavation still suspended (a coordinator resumes them; nothing resumes by itself). */
  stillSuspended: z.array(z.object({ id: z.number().int(), reference: z.string() })).optional(),
});
export type Consequences = z.output<typeof consequencesAnswer>;
/** inspections.checklist as stored (the form's answers, as checked when recorded). */
export const storedChecklist = (json: Stored<Checklist>): Checklist => readStored('inspection checklist', checklistSchema, json);
/** inspection_consequences.consequences as stored (null: a safe inspection, none recorded). */
export const storedConsequences = (json: Stored<Consequences> | null): Consequences | null =>
  readStoredOrNull('inspection consequences', consequencesAnswer, json);
export const recordedInspectionAnswer = z.object({ inspection: inspectionAnswer, consequences: consequencesAnswer.nullable() });

/**
 * Where an open excavation stands this shift:
 * - `ok`: a safe inspection in the current shift;
 * - `due`: none yet, and the shift began less than the grace time ago;
 * - `overdue`: none, and the grace time has passed;
 * - `unsafe`: the latest inspection found it not safe (until a later one is safe).
 * Planned and backfilled excavations have no inspection state (`null`).
 */
export const inspectionStates = ['ok', 'due', 'overdue', 'unsafe'] as const;
export type InspectionState = (typeof inspectionStates)[number];
export const stateLabels: Record<InspectionState, string> = {
  ok: 'Inspected this shift',
  due: 'Inspection due',
  overdue: 'Inspection overdue',
  unsafe: 'Not safe: work stopped',
};
/** Minutes after a shift starts before an uninspected excavation counts as overdue (and the e-mail goes). */
export const GRACE_MINUTES = 30;

export const excavationInspectionStateAnswer = z.object({
  excavationId: z.number().int(),
  reference: z.string(),
  name: z.string(),
  state: z.enum(inspectionStates),
  lastInspection: z.object({ id: z.number().int(), at: z.iso.datetime(), outcome: z.enum(outcomes), inspector: z.string() }).nullable(),
  lastSafeAt: z.iso.datetime().nullable(),
});
export type ExcavationInspectionState = z.output<typeof excavationInspectionStateAnswer>;

const shiftNowAnswer = z.object({ name: z.string(), start: z.iso.datetime(), end: z.iso.datetime(), overdueFrom: z.iso.datetime() });

export const inspectionStatesAnswer = z.object({ shift: shiftNowAnswer, excavations: z.array(excavationInspectionStateAnswer) });
export type InspectionStatesAnswer = z.output<typeof inspectionStatesAnswer>;

/** An excavation's inspections, newest first, with where it stands this shift. */
export const excavationInspectionsAnswer = z.object({
  excavation: z.object({
    id: z.number().int(),
    siteId: z.number().int(),
    reference: z.string(),
    name: z.string(),
    state: z.enum(excavationStates),
  }),
  shift: shiftNowAnswer,
  timeZone: z.string(),
  inspectionState: z.enum(inspectionStates).nullable(),
  inspections: z.array(inspectionAnswer),
  /** The cursor of the next page of older inspections (null on the last). */
  next: z.string().nullable(),
});
export const inspectionListQuerySchema = z.object({
  limit: z.coerce.number().int().min(1).max(500).default(50),
  /** The `next` of the page before. */
  cursor: z.string().max(300, 'must be at most 300 characters').optional(),
});
export type ExcavationInspections = z.output<typeof excavationInspectionsAnswer>;

const timeOfDay = z.string().regex(/^([01]\d|2[0-3]):[0-5]\d$/, 'must be a time of day as HH:MM (24-hour)');
export const shiftSchema = z.object({
  name: z.string().trim().min(1, 'is required').max(60, 'must be at most 60 characters'),
  start: timeOfDay,
});
export const shiftsInputSchema = z.object({
  shifts: z
    .array(shiftSchema)
    .min(1, 'needs at least one shift')
    .max(4, 'may have at most 4 shifts a day')
    .superRefine((list, ctx) => {
      const seen = new Map<string, number>();
      list.forEach((s, i) => {
        if (seen.has(s.start))
          ctx.addIssue({ code: 'custom', path: [i, 'start'], message: `is the same as shift ${seen.get(s.start)! + 1}` });
        else seen.set(s.start, i);
      });
    }),
});
export type ShiftsInput = z.input<typeof shiftsInputSchema>;

export const weekQuerySchema = z.object({
  week: z.string().regex(isoWeekPattern, 'must be an ISO week such as 2026-W14').optional(),
});

/** A site's shifts, its time zone and the shift now. */
export const shiftsAnswer = z.object({
  timeZone: z.string(),
  shifts: z.array(z.object({ name: z.string(), start: timeOfDay })),
  current: shiftNowAnswer,
});
export type ShiftsAnswer = z.output<typeof shiftsAnswer>;
