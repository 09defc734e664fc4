import { z } from 'zod';
import { idSchema } from '@shared/schemas/common';
import { mayInspect } from '@shared/inspectionDuty';
import {
  MAX_PHOTOS,
  answerLabels,
  checklist,
  excavationInspectionsAnswer,
  inspectionInputSchema,
  inspectionListQuerySchema,
  inspectionStatesAnswer,
  outcomeLabels,
  reasonLabels,
  recordedInspectionAnswer,
  shiftsAnswer as shiftsAnswerSchema,
  shiftsInputSchema,
  weekQuerySchema,
} from '@shared/schemas/inspections';
import { isoWeekAt, isoWeekRange, siteTimestamp } from '@shared/time/shifts';
import { toCsv } from '@shared/csv';
import { Api, badRequest, parseOr400, siteFromParam, siteOfRow } from '../http';
import { filesOf, limits, receiveFiles } from '../services/uploads';
import {
  inspectionStates,
  loadExcavation,
  loadInspectionPage,
  loadInspections,
  needingInspection,
  recordInspection,
  setSiteShifts,
  shiftOut,
  siteClock,
  type SiteClock,
} from '../services/inspections';
import { weeklyReportPdf } from '../services/inspection-report';

const excavationParams = z.object({ id: idSchema });
const siteParams = z.object({ siteId: idSchema });

/** Excavation inspections: the record, the shift clock, overdue lists, CSV and the weekly PDF. */
export function registerInspectionRoutes(api: Api): void {
  const { db } = api.deps;
  const excavationSite = siteOfRow('excavations');
  /** Any member of the site (and administrators) may read the record. */
  const readSite = { kind: 'site', roles: 'any', admin: true, siteId: siteFromParam } as const;
  const readExcavation = { ...readSite, siteId: excavationSite };

  api.route(
    {
      method: 'post',
      path: '/api/excavations/:id/inspections',
      response: recordedInspectionAnswer,
      summary:
        'Record an inspection of an open excavation. Send multipart/form-data with a field `inspection` holding the JSON of the form ' +
        `(see InspectionInput) and up to ${MAX_PHOTOS} files in \`photos\` (PNG or JPEG, 10 MB each), or send the JSON alone as application/json. ` +
        'The inspector is the signed-in person: supervisors and coordinators of the site, and operators the site has given the inspection duty. ' +
        'A "not-safe" outcome suspends every live permit on the excavation and e-mails the site\u2019s supervisors and coordinators. ' +
        'Sending the same clientRef again answers 200 with the inspection already recorded.',
      tag: 'Inspections',
      access: {
        kind: 'site',
        roles: ['supervisor', 'coordinator', 'operator'],
        siteId: excavationSite,
        allow: mayInspect,
      },
      params: excavationParams,
      before: [receiveFiles(['photos'], limits.image, MAX_PHOTOS)],
      files: ['photos'],
      formJson: { field: 'inspection', schema: inspectionInputSchema },
      responses: {
        201: 'Recorded',
        200: 'Already recorded (same clientRef)',
        409: 'The excavation is not open',
        413: 'A photo is larger than 10 MB',
      },
    },
    async ({ req, res, params, user, deps }) => {
      const data = parseOr400(inspectionInputSchema, readInspectionBody(req), 'inspection');
      const { inspection, created, consequences } = await recordInspection(deps, {
        excavationId: params.id,
        inspectorId: user.id,
        data,
        photos: filesOf(req, 'photos'),
      });
      res.status(created ? 201 : 200).json({ inspection, consequences });
    },
  );

  api.route(
    {
      method: 'get',
      path: '/api/excavations/:id/inspections',
      response: excavationInspectionsAnswer,
      summary:
        'An excavation\u2019s inspections, newest first, a page at a time (`next` is the cursor of the next page), with where it stands this shift',
      tag: 'Inspections',
      access: readExcavation,
      params: excavationParams,
      query: inspectionListQuerySchema,
    },
    async ({ params, query, deps }) => {
      const exc = await loadExcavation(db, params.id);
      const states = await inspectionStates(db, exc.site_id, deps.now(), { excavationIds: [exc.id] });
      return {
        excavation: { id: exc.id, siteId: exc.site_id, reference: exc.reference, name: exc.name, state: exc.state },
        shift: states.shift,
        timeZone: states.clock.timeZone,
        inspectionState: states.excavations[0]?.state ?? null,
        ...(await loadInspectionPage(db, exc.id, query)),
      };
    },
  );

  api.route(
    {
      method: 'get',
      path: '/api/excavations/:id/inspections.csv',
      summary: 'An excavation\u2019s inspections as CSV (times on the site\u2019s clock)',
      tag: 'Inspections',
      access: readExcavation,
      params: excavationParams,
      produces: 'text/csv',
    },
    async ({ params, res }) => {
      const exc = await loadExcavation(db, params.id);
      const { timeZone } = await siteClock(db, exc.site_id, api.deps.now());
      const list = await loadInspections(db, { excavationId: exc.id });
      const header = [
        'inspection',
        'excavation',
        'shift',
        'shift start',
        'inspected at',
        'time zone',
        'inspector',
        'reason',
        'what happened',
        ...checklist.flatMap((c) => [c.label, `${c.label} note`]),
        'outcome',
        'remarks',
        'photos',
        'permits suspended',
      ];
      const rows = list.map((i) => [
        i.id,
        exc.reference,
        i.shift.name,
        siteTimestamp(new Date(i.shift.start), timeZone),
        siteTimestamp(new Date(i.inspectedAt), timeZone),
        timeZone,
        i.inspector.name,
        reasonLabels[i.reason],
        i.reasonDetail,
        ...checklist.flatMap((c) => [answerLabels[i.checklist[c.key]?.answer] ?? '', i.checklist[c.key]?.note ?? '']),
        outcomeLabels[i.outcome],
        i.remarks,
        i.photos.length,
        i.suspendedPermits.map((p) => p.reference).join(' '),
      ]);
      res.setHeader('Content-Type', 'text/csv; charset=utf-8');
      res.setHeader('Content-Disposition', `attachment; filename="inspections-${exc.reference.replace(/[^A-Za-z0-9_-]+/g, '_')}.csv"`);
      res.send('\uFEFF' + toCsv([header, ...rows]));
    },
  );

  api.route(
    {
      method: 'get',
      path: '/api/sites/:siteId/inspections/states',
      response: inspectionStatesAnswer,
      summary:
        'Where every open excavation of the site stands this shift: ok, due, overdue or unsafe (for the map, register and dashboards)',
      tag: 'Inspections',
      access: readSite,
      params: siteParams,
    },
    async ({ params, deps }) => {
      const { clock: _c, ...answer } = await inspectionStates(db, params.siteId, deps.now());
      return answer;
    },
  );

  api.route(
    {
      method: 'get',
      path: '/api/sites/:siteId/inspections/overdue',
      response: inspectionStatesAnswer,
      summary: 'The open excavations still without a safe inspection this shift (due, overdue, or found not safe)',
      tag: 'Inspections',
      access: readSite,
      params: siteParams,
    },
    async ({ params, deps }) => {
      const { clock: _c, shift, excavations } = await inspectionStates(db, params.siteId, deps.now());
      return { shift, excavations: needingInspection(excavations) };
    },
  );

  api.route(
    {
      method: 'get',
      path: '/api/sites/:siteId/inspections/report.pdf',
      summary:
        'The weekly inspection report of a site as a PDF in the reader\u2019s units (week: ISO week such as 2026-W14; default this week on the site\u2019s clock)',
      tag: 'Inspections',
      access: readSite,
      params: siteParams,
      query: weekQuerySchema,
      produces: 'application/pdf',
    },
    async ({ params, query, res, deps, user }) => {
      const clock = await siteClock(db, params.siteId, deps.now());
      const week = query.week ?? isoWeekAt(deps.now(), clock.timeZone);
      if (!isoWeekRange(week, clock.timeZone)) throw badRequest(`There is no week ${week}.`, { week: 'is not a week of that year' });
      const pdf = await weeklyReportPdf(deps, params.siteId, week, user.id);
      res.setHeader('Content-Type', 'application/pdf');
      res.setHeader('Content-Disposition', `inline; filename="inspections-${week}.pdf"`);
      res.send(pdf);
    },
  );

  api.route(
    {
      method: 'get',
      path: '/api/sites/:siteId/shifts',
      response: shiftsAnswerSchema,
      summary: 'The site\u2019s shift start times (one day shift at 07:00 until set), its time zone and the current shift',
      tag: 'Inspections',
      access: readSite,
      params: siteParams,
    },
    async ({ params, deps }) => {
      const clock = await siteClock(db, params.siteId, deps.now());
      return shiftsAnswer(clock);
    },
  );

  api.route(
    {
      method: 'put',
      path: '/api/sites/:siteId/shifts',
      response: shiftsAnswerSchema,
      summary: 'Set the site\u2019s shift start times (coordinators and administrators)',
      tag: 'Inspections',
      access: { kind: 'site', roles: ['coordinator'], admin: true, siteId: siteFromParam },
      params: siteParams,
      body: shiftsInputSchema,
    },
    async ({ params, body, user, deps }) => {
      await setSiteShifts(db, params.siteId, body.shifts, user.id);
      return shiftsAnswer(await siteClock(db, params.siteId, deps.now()));
    },
  );
}

function shiftsAnswer(clock: SiteClock) {
  return { timeZone: clock.timeZone, shifts: clock.shifts, current: shiftOut(clock) };
}

/** The form's JSON: the `inspection` field of a multipart body, or the JSON body itself. */
function readInspectionBody(req: { is(type: string): string | false | null; body?: unknown }): unknown {
  if (!req.is('multipart/form-data')) return req.body ?? {};
  const raw = (req.body as Record<string, unknown> | undefined)?.inspection;
  if (typeof raw !== 'string')
    throw badRequest('The form is missing: send it as JSON in the field `inspection`.', { inspection: 'is required' });
  try {
    return JSON.parse(raw);
  } catch {
    throw badRequest('The field `inspection` is not valid JSON.', { inspection: 'is not valid JSON' });
  }
}
