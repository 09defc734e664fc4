import { randomUUID } from 'node:crypto';
import request from 'supertest';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { CAUTION, cautionFor } from '@shared/caution';
import { checklist, type InspectionInput } from '@shared/schemas/inspections';
import { checkOverdueInspections, runReconciliation } from '../src/jobs/inspections';
import { MB } from '../src/services/uploads';
import { addPerson, demo, signedIn, startTestApp, unique, waitForMail, type TestApp, demoOrganisationId } from './helpers';
import { act, createPermit, excavatorAt, makeWorld, newTrench, submitAndApprove, version, type PermitWorld } from './permits-fixtures';
import { binary, pdfPages, pdfText } from './pdf';

// Inspections of open excavations: the record and its checks, who may inspect, photos, the shift
// clock (an injected clock, never waiting), the overdue e-mail, CSV and the weekly PDF.

let t: TestApp;
const people = {
  supervisor: unique('insp-supervisor'),
  coordinator: unique('insp-coordinator'),
  operator: unique('insp-operator'), // no inspection duty
  inspectingOperator: unique('insp-operator-duty'),
  elsewhere: unique('insp-elsewhere'), // coordinator of another site only
};
let siteId: number;
let otherSiteId: number;
const agents: Record<string, request.Agent> = {};

/** 1 × 1 PNG and a tiny JPEG, made by hand for these tests. */
const PNG = Buffer.from('iVBORw0KGgoAAAANSUhEUgAAAAEAAAABCAYAAAAfFcSJAAAADUlEQVR42mNkYPhfDwAChwGA60e6kgAAAABJRU5ErkJggg==', 'base64');
const JPEG = Buffer.concat([
  Buffer.from([0xff, 0xd8, 0xff, 0xe0, 0x00, 0x10]),
  Buffer.from('JFIF\0\x01\x01\0\0\x01\0\x01\0\0', 'latin1'),
  Buffer.from([0xff, 0xd9]),
]);

async function person(email: string, name: string): Promise<number> {
  return (await addPerson(t.deps, { email, name })).id;
}

async function newSite(name: string, timezone = 'Europe/London'): Promise<number> {
  const s = await t.deps.db
    .insertInto('sites')
    .values({ organisation_id: await demoOrganisationId(t.deps), name, latitude: 52.1, longitude: -1.1, timezone })
    .returning('id')
    .executeTakeFirstOrThrow();
  return s.id;
}

let refs = 0;
async function excavation(
  site = siteId,
  state: 'planned' | 'open' | 'backfilled' = 'open',
  created = '2026-01-01T00:00:00Z',
): Promise<{ id: number; reference: string }> {
  const reference = `IT${++refs}`;
  const e = await t.deps.db
    .insertInto('excavations')
    .values({
      site_id: site,
      reference,
      name: `Test trench ${refs}`,
      kind: 'trench',
      geometry: JSON.stringify({
        type: 'LineString',
        coordinates: [
          [-1.1, 52.1],
          [-1.0999, 52.1],
        ],
      }),
      width: 1.2,
      depth: 2.4,
      // No outline or zone stored: these tests read neither.
      state,
      support_type: 'hydraulic-frames',
      soil: JSON.stringify([]),
      created_at: created,
    })
    .returning(['id', 'reference'])
    .executeTakeFirstOrThrow();
  return e;
}

/** A complete form: everything passes, safe to work. */
function form(over: Partial<InspectionInput> = {}): InspectionInput {
  return {
    reason: 'shift-start',
    checklist: Object.fromEntries(
      checklist.map((c) => [c.key, { answer: c.key === 'atmosphere' ? 'na' : 'pass', note: '' }]),
    ) as InspectionInput['checklist'],
    outcome: 'safe',
    ...over,
  };
}

function notSafe(remarks = 'Waling on the north side has dropped; two struts loose.'): InspectionInput {
  const f = form({ outcome: 'not-safe', remarks });
  f.checklist.support = { answer: 'fail', note: 'North waling dropped 150 mm, struts 3 and 4 loose' };
  return f;
}

const at = (iso: string) => {
  t.clock.now = new Date(iso);
};

beforeAll(async () => {
  t = await startTestApp();
  siteId = await newSite('Inspection test site');
  otherSiteId = await newSite('Inspection other site');
  const ids = {
    supervisor: await person(people.supervisor, 'Sam Sideways (test supervisor)'),
    coordinator: await person(people.coordinator, 'Cara Strut (test coordinator)'),
    operator: await person(people.operator, 'Otto Bucket (test operator)'),
    inspectingOperator: await person(people.inspectingOperator, 'Ivy Banks (test operator with duty)'),
    elsewhere: await person(people.elsewhere, 'Eli Farfield (other site coordinator)'),
  };
  await t.deps.db
    .insertInto('site_members')
    .values([
      { site_id: siteId, user_id: ids.supervisor, role: 'supervisor' },
      { site_id: siteId, user_id: ids.coordinator, role: 'coordinator' },
      { site_id: siteId, user_id: ids.operator, role: 'operator', can_inspect: false },
      { site_id: siteId, user_id: ids.inspectingOperator, role: 'operator', can_inspect: true },
      { site_id: otherSiteId, user_id: ids.elsewhere, role: 'coordinator' },
      { site_id: otherSiteId, user_id: ids.operator, role: 'operator', can_inspect: true },
    ])
    .execute();
  for (const [k, email] of Object.entries(people)) agents[k] = await signedIn(t.app, email);
});
afterAll(async () => t.stop());

describe('recording an inspection', () => {
  it('records a safe inspection by the signed-in person and lists it in the history', async () => {
    at('2026-06-10T06:20:00Z'); // 07:20 BST
    const e = await excavation();
    const r = await agents.supervisor.post(`/api/excavations/${e.id}/inspections`).send(form({ remarks: 'All good.' }));
    expect(r.status).toBe(201);
    expect(r.body.inspection).toMatchObject({
      excavationId: e.id,
      inspector: { name: 'Sam Sideways (test supervisor)' },
      inspectedAt: '2026-06-10T06:20:00.000Z',
      shift: { name: 'Day shift', start: '2026-06-10T06:00:00.000Z' },
      outcome: 'safe',
      remarks: 'All good.',
    });
    const h = await agents.coordinator.get(`/api/excavations/${e.id}/inspections`);
    expect(h.status).toBe(200);
    expect(h.body.inspectionState).toBe('ok');
    expect(h.body.inspections.map((i: { id: number }) => i.id)).toEqual([r.body.inspection.id]);
  });

  it('names each bad field and stores nothing', async () => {
    at('2026-06-10T06:30:00Z');
    const e = await excavation();
    const bad = form({ reason: 'after-event', outcome: 'not-safe' });
    bad.checklist.support = { answer: 'fail', note: '' };
    delete (bad.checklist as Record<string, unknown>).water;
    (bad.checklist as Record<string, unknown>).barriers = { answer: 'maybe' };
    const r = await agents.supervisor.post(`/api/excavations/${e.id}/inspections`).send(bad);
    expect(r.status).toBe(400);
    expect(Object.keys(r.body.error.fields).sort()).toEqual([
      'checklist.barriers.answer',
      'checklist.support.note',
      'checklist.water',
      'reasonDetail',
      'remarks',
    ]);
    expect(r.body.error.message).toContain('checklist.support.note');
    const n = await t.deps.db
      .selectFrom('inspections')
      .select((eb) => eb.fn.countAll<number>().as('n'))
      .where('excavation_id', '=', e.id)
      .executeTakeFirstOrThrow();
    expect(Number(n.n)).toBe(0);
  });

  it('asks why work is safe when an item failed but the outcome is safe', async () => {
    const e = await excavation();
    const f = form();
    f.checklist.barriers = { answer: 'fail', note: 'One barrier panel down at the east end' };
    const r = await agents.supervisor.post(`/api/excavations/${e.id}/inspections`).send(f);
    expect(r.status).toBe(400);
    expect(r.body.error.fields).toEqual({ remarks: expect.stringContaining('say why') });
    const ok = await agents.supervisor.post(`/api/excavations/${e.id}/inspections`).send({ ...f, remarks: 'Panel put back before work.' });
    expect(ok.status).toBe(201);
  });

  it('refuses excavations that are not open, and times in the future or before the latest inspection', async () => {
    at('2026-06-10T08:00:00Z');
    const planned = await excavation(siteId, 'planned');
    const r = await agents.supervisor.post(`/api/excavations/${planned.id}/inspections`).send(form());
    expect(r.status).toBe(409);
    const e = await excavation();
    const future = await agents.supervisor.post(`/api/excavations/${e.id}/inspections`).send(form({ inspectedAt: '2026-06-10T09:00:00Z' }));
    expect(future.status).toBe(400);
    expect(future.body.error.fields).toHaveProperty('inspectedAt');
    await agents.supervisor
      .post(`/api/excavations/${e.id}/inspections`)
      .send(form({ inspectedAt: '2026-06-10T07:30:00Z' }))
      .expect(201);
    const earlier = await agents.supervisor
      .post(`/api/excavations/${e.id}/inspections`)
      .send(form({ inspectedAt: '2026-06-10T07:00:00Z' }));
    expect(earlier.status).toBe(400);
    expect(earlier.body.error.fields.inspectedAt).toMatch(/before the latest/);
  });

  it('records a form sent twice (same clientRef) once', async () => {
    at('2026-06-10T08:10:00Z');
    const e = await excavation();
    const f = form({ clientRef: randomUUID() });
    const first = await agents.supervisor.post(`/api/excavations/${e.id}/inspections`).send(f);
    const again = await agents.supervisor.post(`/api/excavations/${e.id}/inspections`).send(f);
    expect(first.status).toBe(201);
    expect(again.status).toBe(200);
    expect(again.body.inspection.id).toBe(first.body.inspection.id);
    const rows = await t.deps.db.selectFrom('inspections').select('id').where('excavation_id', '=', e.id).execute();
    expect(rows).toHaveLength(1);
    // the same form sent twice together (a phone retrying) is recorded once too; the lock in
    // recordInspection covers the case where both reach the insert at once
    const other = await excavation();
    const g = form({ clientRef: randomUUID() });
    const both = await Promise.all([0, 1].map(() => agents.supervisor.post(`/api/excavations/${other.id}/inspections`).send(g)));
    expect(both.map((r) => r.status).sort()).toEqual([200, 201]);
    expect(await t.deps.db.selectFrom('inspections').select('id').where('excavation_id', '=', other.id).execute()).toHaveLength(1);
  });

  it('keeps inspections as records: the database refuses to change or remove one', async () => {
    const row = await t.deps.db.selectFrom('inspections').select('id').where('site_id', '=', siteId).executeTakeFirstOrThrow();
    await expect(t.deps.db.updateTable('inspections').set({ outcome: 'safe' }).where('id', '=', row.id).execute()).rejects.toThrow(
      /never changed/,
    );
    await expect(t.deps.db.deleteFrom('inspections').where('id', '=', row.id).execute()).rejects.toThrow(/never changed/);
  });
});

describe('who may inspect', () => {
  it('lets an operator record inspections only where the site gives the duty, otherwise 403', async () => {
    at('2026-06-10T09:00:00Z');
    const e = await excavation();
    const without = await agents.operator.post(`/api/excavations/${e.id}/inspections`).send(form());
    expect(without.status).toBe(403);
    const withDuty = await agents.inspectingOperator.post(`/api/excavations/${e.id}/inspections`).send(form());
    expect(withDuty.status).toBe(201);
    // the same operator has the duty on the other site, which does not carry over here
    const there = await excavation(otherSiteId);
    await agents.operator.post(`/api/excavations/${there.id}/inspections`).send(form()).expect(201);
    // members of another site are refused whatever their role
    expect((await agents.elsewhere.post(`/api/excavations/${e.id}/inspections`).send(form())).status).toBe(403);
    expect((await agents.elsewhere.get(`/api/excavations/${e.id}/inspections`)).status).toBe(403);
    // a forbidden call is refused before its body or photos are read
    const multipart = await agents.operator
      .post(`/api/excavations/${e.id}/inspections`)
      .field('inspection', 'not json')
      .attach('photos', PNG, 'a.png');
    expect(multipart.status).toBe(403);
  });
});

describe('photos', () => {
  it('takes PNG and JPEG photos with the form as multipart and serves them to site members', async () => {
    at('2026-06-10T09:10:00Z');
    const e = await excavation();
    const r = await agents.supervisor
      .post(`/api/excavations/${e.id}/inspections`)
      .field('inspection', JSON.stringify(form()))
      .attach('photos', PNG, 'north-face.png')
      .attach('photos', JPEG, 'ladder.jpg');
    expect(r.status).toBe(201);
    expect(r.body.inspection.photos.map((p: { name: string }) => p.name)).toEqual(['north-face.png', 'ladder.jpg']);
    const photo = await agents.coordinator.get(r.body.inspection.photos[0].url);
    expect(photo.status).toBe(200);
    expect(photo.headers['content-type']).toBe('image/png');
    expect((await agents.elsewhere.get(r.body.inspection.photos[0].url)).status).toBe(403);
  });

  it('judges the type from the content: a text file named .png is refused, naming it, and nothing is stored', async () => {
    const e = await excavation();
    const uploadsBefore = await t.deps.db
      .selectFrom('uploads')
      .select((eb) => eb.fn.countAll<number>().as('n'))
      .executeTakeFirstOrThrow();
    const r = await agents.supervisor
      .post(`/api/excavations/${e.id}/inspections`)
      .field('inspection', JSON.stringify(form()))
      .attach('photos', PNG, 'good.png')
      .attach('photos', Buffer.from('just some words, not a picture'), 'fake.png');
    expect(r.status).toBe(400);
    expect(r.body.error.fields).toEqual({ 'photos[1]': 'must be a PNG or JPEG image' });
    expect(await t.deps.db.selectFrom('inspections').select('id').where('excavation_id', '=', e.id).execute()).toHaveLength(0);
    const uploadsAfter = await t.deps.db
      .selectFrom('uploads')
      .select((eb) => eb.fn.countAll<number>().as('n'))
      .executeTakeFirstOrThrow();
    expect(Number(uploadsAfter.n)).toBe(Number(uploadsBefore.n));
  });

  it('refuses a photo over 10 MB (413) and more than 8 photos (400)', async () => {
    const e = await excavation();
    const big = Buffer.concat([PNG, Buffer.alloc(10 * MB)]);
    const r = await agents.supervisor
      .post(`/api/excavations/${e.id}/inspections`)
      .field('inspection', JSON.stringify(form()))
      .attach('photos', big, 'big.png');
    expect(r.status).toBe(413);
    expect(r.body.error.fields).toEqual({ photos: 'is too large' });
    let many = agents.supervisor.post(`/api/excavations/${e.id}/inspections`).field('inspection', JSON.stringify(form()));
    for (let i = 0; i < 9; i++) many = many.attach('photos', PNG, `p${i}.png`);
    expect((await many).status).toBe(400);
    expect(await t.deps.db.selectFrom('inspections').select('id').where('excavation_id', '=', e.id).execute()).toHaveLength(0);
  });

  it('names a missing or broken form field in a multipart request', async () => {
    const e = await excavation();
    const missing = await agents.supervisor.post(`/api/excavations/${e.id}/inspections`).attach('photos', PNG, 'a.png');
    expect(missing.status).toBe(400);
    expect(missing.body.error.fields).toEqual({ inspection: 'is required' });
    const broken = await agents.supervisor
      .post(`/api/excavations/${e.id}/inspections`)
      .field('inspection', '{"reason":')
      .attach('photos', PNG, 'a.png');
    expect(broken.body.error.fields).toEqual({ inspection: 'is not valid JSON' });
  });
});

describe('a failed inspection', () => {
  it('turns the excavation red and e-mails the site\u2019s supervisors and coordinators, not operators or other sites', async () => {
    at('2026-06-11T06:15:00Z');
    const e = await excavation();
    const r = await agents.inspectingOperator.post(`/api/excavations/${e.id}/inspections`).send(notSafe());
    expect(r.status).toBe(201);
    expect(r.body.consequences.notified.sort()).toEqual([people.coordinator, people.supervisor].sort());
    const mail = await waitForMail(t.deps, people.coordinator, new RegExp(`Not safe: ${e.reference}`));
    expect(mail.text).toContain('Ivy Banks');
    expect(mail.text).toContain('North waling dropped 150 mm');
    expect(mail.text).toContain(`/sites/${siteId}/excavations/${e.id}/inspections`);
    await waitForMail(t.deps, people.supervisor, new RegExp(`Not safe: ${e.reference}`));
    const stray = await t.deps.db
      .selectFrom('caught_mail')
      .select('mail_to')
      .where('subject', 'like', `Not safe: ${e.reference} %`)
      .execute();
    expect(stray.map((m) => m.mail_to).join(' ')).not.toMatch(
      new RegExp(`${people.operator}|${people.inspectingOperator}|${people.elsewhere}`),
    );

    const states = await agents.supervisor.get(`/api/sites/${siteId}/inspections/states`);
    expect(states.body.excavations.find((x: { excavationId: number }) => x.excavationId === e.id).state).toBe('unsafe');
    // a later safe inspection clears the red state
    at('2026-06-11T07:40:00Z');
    await agents.supervisor
      .post(`/api/excavations/${e.id}/inspections`)
      .send(form({ reason: 'after-event', reasonDetail: 'Waling re-fixed and struts re-pinned' }))
      .expect(201);
    const after = await agents.supervisor.get(`/api/sites/${siteId}/inspections/states`);
    expect(after.body.excavations.find((x: { excavationId: number }) => x.excavationId === e.id).state).toBe('ok');
  });
});

describe('a failed inspection, e-mailed in each lead’s units', () => {
  it('one message to each supervisor and coordinator: OSHA named for a US reader, not for a metric one', async () => {
    at('2026-06-12T06:15:00Z');
    // A US site: its supervisor chose nothing and reads in the site's units; its coordinator chose metric.
    const s = await newSite('US units site', 'America/Chicago');
    await t.deps.db.updateTable('sites').set({ units: 'us' }).where('id', '=', s).execute();
    const sup = unique('us-supervisor');
    const coord = unique('metric-coordinator');
    await addPerson(t.deps, { email: sup, name: 'Sue Feet', member: { siteId: s, role: 'supervisor' } });
    await addPerson(t.deps, { email: coord, name: 'Mo Metre', units: 'metric', member: { siteId: s, role: 'coordinator' } });
    const e = await excavation(s);
    const r = await (await signedIn(t.app, sup)).post(`/api/excavations/${e.id}/inspections`).send(notSafe());
    expect(r.status).toBe(201);
    expect(r.body.consequences.notified.sort()).toEqual([coord, sup].sort());
    const toUs = await waitForMail(t.deps, sup, new RegExp(`Not safe: ${e.reference}`));
    expect(toUs.mail_to).toBe(sup);
    expect(toUs.text).toContain(cautionFor('us'));
    expect(toUs.html).toContain('OSHA 29 CFR 1926 Subpart P');
    const toMetric = await waitForMail(t.deps, coord, new RegExp(`Not safe: ${e.reference}`));
    expect(toMetric.mail_to).toBe(coord);
    expect(toMetric.text).toContain(CAUTION);
    expect(toMetric.text).not.toContain('OSHA');
    // The inspector's own words stay as typed (150 mm) in both.
    for (const m of [toUs, toMetric]) expect(m.text).toContain('North waling dropped 150 mm');
  });
});

describe('a failed inspection stops the work beside it', () => {
  let w: PermitWorld;
  beforeAll(async () => {
    t.clock.now = null; // the permits' windows are set around the real time
    w = await makeWorld(t);
  });

  /** A permit on the trench that goes live at once (window open, no operators to brief). */
  async function livePermit(trenchId: number, clear: number) {
    const p = await createPermit(w, { excavationIds: [trenchId], loads: [excavatorAt(w, clear)], operatorIds: [] });
    const approved = await submitAndApprove(w, p.id);
    expect(approved.status).toBe('live');
    return p;
  }
  const statusOf = async (id: number) =>
    (await t.deps.db.selectFrom('permits').select('status').where('id', '=', id).executeTakeFirstOrThrow()).status;

  it('suspends every live permit on that excavation and only those, and e-mails the right people; a later safe one clears the red state and leaves them suspended', async () => {
    t.clock.now = null;
    const trench = { id: w.trenchId, reference: w.trenchRef };
    const first = await livePermit(trench.id, 6);
    const second = await livePermit(trench.id, 8);
    // approved but waiting for its operator's briefing: not live, so not suspended
    const waiting = await createPermit(w, { excavationIds: [trench.id], loads: [excavatorAt(w, 10)] });
    await submitAndApprove(w, waiting.id);
    expect(await statusOf(waiting.id)).toBe('approved');
    // live beside another excavation: untouched
    await newTrench(w);
    const elsewhere = await livePermit(w.trenchId, 6);

    const r = await w.agents.supervisor
      .post(`/api/excavations/${trench.id}/inspections`)
      .send(notSafe('Two frames have slipped on the north side'));
    expect(r.status).toBe(201);
    expect(r.body.consequences.suspended.map((p: { id: number }) => p.id).sort()).toEqual([first.id, second.id].sort());
    expect(r.body.consequences.notSuspended).toEqual([]);
    expect(r.body.inspection.suspendedPermits.map((p: { reference: string }) => p.reference).sort()).toEqual(
      [first.number, second.number].sort(),
    );
    expect(await statusOf(first.id)).toBe('suspended');
    expect(await statusOf(second.id)).toBe('suspended');
    expect(await statusOf(waiting.id)).toBe('approved');
    expect(await statusOf(elsewhere.id)).toBe('live');

    // the permits' own suspension, with the inspection as the reason, on their timeline
    const event = await t.deps.db
      .selectFrom('permit_events')
      .select(['actor_id', 'actor_name', 'comment', 'to_status', 'detail'])
      .where('permit_id', '=', first.id)
      .where('action', '=', 'suspend')
      .executeTakeFirstOrThrow();
    expect(event).toMatchObject({
      actor_id: null,
      to_status: 'suspended',
      detail: { inspection: { id: r.body.inspection.id, excavationReference: trench.reference } },
    });
    expect(event.actor_name).toContain(`Inspection ${r.body.inspection.id} of ${trench.reference}`);
    expect(event.comment).toContain('Two frames have slipped on the north side');

    // e-mails: the permits' suspension notice to its requester and the coordinators, and the failed
    // inspection to the site's supervisors and coordinators, never to operators
    const notified: string[] = r.body.consequences.notified;
    expect(notified).toEqual(expect.arrayContaining([demo.supervisor, demo.coordinator, w.coordinator2Email]));
    expect(notified).not.toContain(demo.operator);
    await waitForMail(t.deps, demo.supervisor, new RegExp(`Permit ${first.number} at .* is suspended`));
    await waitForMail(t.deps, demo.coordinator, new RegExp(`Permit ${second.number} at .* is suspended`));
    const failed = await waitForMail(t.deps, w.coordinator2Email, new RegExp(`Not safe: ${trench.reference}`));
    expect(failed.text).toContain(first.number);
    expect(failed.text).toContain(second.number);
    const toOperator = await t.deps.db
      .selectFrom('caught_mail')
      .select('subject')
      .where('mail_to', 'ilike', `%${demo.operator}%`)
      .where('subject', 'like', `Not safe: ${trench.reference}%`)
      .execute();
    expect(toOperator).toEqual([]);

    const state = async () => (await w.agents.coordinator.get(`/api/excavations/${trench.id}/inspections`)).body.inspectionState;
    expect(await state()).toBe('unsafe');
    // While the excavation stands not safe, nothing beside it goes live: not a resume, and not an
    // approved permit whose last operator confirms the briefing.
    const early = await act(w.agents.coordinator, first.id, {
      action: 'resume',
      version: await version(w, first.id),
      reason: 'Frames look fine now',
    });
    expect(early.status).toBe(409);
    expect(early.body.error.message).toContain(`${trench.reference} was found not safe`);
    expect((await w.agents.operator.post(`/api/permits/${waiting.id}/briefing`).send({})).status).toBeLessThan(300);
    expect(await statusOf(waiting.id)).toBe('approved');
    const later = await w.agents.coordinator
      .post(`/api/excavations/${trench.id}/inspections`)
      .send(form({ reason: 'after-event', reasonDetail: 'Frames re-set and re-pinned', remarks: 'Re-inspected after repair.' }));
    expect(later.status).toBe(201);
    // nothing resumes by itself: the answer names the permits that stay suspended, for the page to link
    expect(later.body.consequences).toEqual({
      suspended: [],
      notSuspended: [],
      notified: [],
      stillSuspended: [first, second].sort((a, b) => a.id - b.id).map((p) => ({ id: p.id, reference: p.number })),
    });
    expect(await state()).toBe('ok');
    // resuming stays the coordinator's decision, and is allowed again once the excavation is safe
    expect(await statusOf(first.id)).toBe('suspended');
    expect(await statusOf(second.id)).toBe('suspended');
    const resumed = await act(w.agents.coordinator, first.id, {
      action: 'resume',
      version: await version(w, first.id),
      reason: 'Re-inspected safe after repair',
    });
    expect(resumed.status).toBe(200);
    expect(await statusOf(first.id)).toBe('live');
  });

  it('answers a resent not-safe form with the consequences it caused, and causes none again', async () => {
    t.clock.now = null;
    await newTrench(w);
    const p = await livePermit(w.trenchId, 6);
    const clientRef = randomUUID();
    const body = { ...notSafe('Sheet piles have moved at the corner'), clientRef };
    const first = await w.agents.supervisor.post(`/api/excavations/${w.trenchId}/inspections`).send(body);
    expect(first.status).toBe(201);
    expect(first.body.consequences.suspended).toEqual([{ id: p.id, reference: p.number }]);
    const again = await w.agents.supervisor.post(`/api/excavations/${w.trenchId}/inspections`).send(body);
    expect(again.status).toBe(200);
    expect(again.body.inspection.id).toBe(first.body.inspection.id);
    expect(again.body.consequences).toEqual(first.body.consequences);
    const suspensions = await t.deps.db
      .selectFrom('permit_events')
      .select('id')
      .where('permit_id', '=', p.id)
      .where('action', '=', 'suspend')
      .execute();
    expect(suspensions).toHaveLength(1);
  });

  it('heals a not-safe inspection whose suspensions were lost: the reconciliation suspends, tells people, and then finds nothing', async () => {
    t.clock.now = null;
    await newTrench(w);
    const p = await livePermit(w.trenchId, 6);
    // As if the server died after the inspection committed and before its consequences did (the
    // way an older release could lose them): the row alone, written directly.
    const now = new Date();
    const row = await t.deps.db
      .insertInto('inspections')
      .values({
        excavation_id: w.trenchId,
        site_id: w.siteId,
        inspector_id: w.supervisorId,
        inspected_at: now,
        recorded_at: now,
        shift_name: 'Day shift',
        shift_start: now,
        reason: 'after-fall',
        checklist: JSON.stringify(notSafe().checklist),
        outcome: 'not-safe',
        remarks: 'Face collapsed behind the box',
      })
      .returning('id')
      .executeTakeFirstOrThrow();
    expect(await statusOf(p.id)).toBe('live');

    const found = await runReconciliation(t.deps, { siteIds: [w.siteId] });
    const mine = found.filter((f) => f.inspectionId === row.id);
    expect(mine).toEqual([{ inspectionId: row.id, excavation: w.trenchRef, suspended: [p.number], notSuspended: [] }]);
    expect(await statusOf(p.id)).toBe('suspended');
    const event = await t.deps.db
      .selectFrom('permit_events')
      .select('comment')
      .where('permit_id', '=', p.id)
      .where('action', '=', 'suspend')
      .executeTakeFirstOrThrow();
    expect(event.comment).toContain(`Inspection ${row.id} of ${w.trenchRef}`);
    await waitForMail(t.deps, demo.supervisor, new RegExp(`Not safe: ${w.trenchRef} `));
    // the inspection now answers with what the reconciliation did
    const listed = await w.agents.coordinator.get(`/api/excavations/${w.trenchId}/inspections`);
    expect(listed.body.inspections[0].suspendedPermits).toEqual([{ id: p.id, reference: p.number }]);
    // healed: a second pass finds nothing to do for it
    expect((await runReconciliation(t.deps, { siteIds: [w.siteId] })).filter((f) => f.inspectionId === row.id)).toEqual([]);
  });
});

describe('the shift clock', () => {
  it('reads and sets the site\u2019s shifts (coordinators and administrators only), naming bad fields', async () => {
    const s = await newSite('Shift set-up site');
    await t.deps.db
      .insertInto('site_members')
      .values([
        {
          site_id: s,
          user_id: (await t.deps.db.selectFrom('users').select('id').where('email', '=', people.coordinator).executeTakeFirstOrThrow()).id,
          role: 'coordinator',
        },
        {
          site_id: s,
          user_id: (await t.deps.db.selectFrom('users').select('id').where('email', '=', people.supervisor).executeTakeFirstOrThrow()).id,
          role: 'supervisor',
        },
      ])
      .execute();
    at('2026-01-14T12:00:00Z');
    const d = await agents.supervisor.get(`/api/sites/${s}/shifts`);
    expect(d.body).toMatchObject({
      timeZone: 'Europe/London',
      shifts: [{ name: 'Day shift', start: '07:00' }],
      current: { start: '2026-01-14T07:00:00.000Z', overdueFrom: '2026-01-14T07:30:00.000Z' },
    });
    expect((await agents.supervisor.put(`/api/sites/${s}/shifts`).send({ shifts: [{ name: 'Early', start: '06:00' }] })).status).toBe(403);
    const bad = await agents.coordinator.put(`/api/sites/${s}/shifts`).send({
      shifts: [
        { name: 'Early', start: '06:00' },
        { name: '', start: '06:00' },
        { name: 'Late', start: '25:00' },
      ],
    });
    expect(bad.status).toBe(400);
    expect(Object.keys(bad.body.error.fields).sort()).toEqual(['shifts[1].name', 'shifts[1].start', 'shifts[2].start']);
    const ok = await agents.coordinator.put(`/api/sites/${s}/shifts`).send({
      shifts: [
        { name: 'Late shift', start: '14:00' },
        { name: 'Early shift', start: '06:00' },
      ],
    });
    expect(ok.status).toBe(200);
    expect(ok.body.shifts.map((x: { start: string }) => x.start)).toEqual(['06:00', '14:00']);
    expect(ok.body.current).toMatchObject({ name: 'Early shift', start: '2026-01-14T06:00:00.000Z' });
  });

  it('lists an excavation as due, then overdue, as the shift clock moves, and clears it when inspected safe', async () => {
    const s = await newSite('Overdue clock site');
    const supervisorId = (await t.deps.db.selectFrom('users').select('id').where('email', '=', people.supervisor).executeTakeFirstOrThrow())
      .id;
    await t.deps.db.insertInto('site_members').values({ site_id: s, user_id: supervisorId, role: 'supervisor' }).execute();
    const e = await excavation(s);
    const overdue = async () => (await agents.supervisor.get(`/api/sites/${s}/inspections/overdue`)).body;
    // Sunday 29 March 2026, the day the UK clocks go forward: the 07:00 shift starts at 06:00 UTC.
    at('2026-03-28T07:05:00Z');
    await agents.supervisor.post(`/api/excavations/${e.id}/inspections`).send(form()).expect(201);
    at('2026-03-29T05:50:00Z'); // 06:50 BST: still Saturday's shift
    expect((await overdue()).excavations).toEqual([]);
    at('2026-03-29T06:10:00Z'); // 07:10 BST: the new shift has started
    let o = await overdue();
    expect(o.shift).toMatchObject({ name: 'Day shift', start: '2026-03-29T06:00:00.000Z', overdueFrom: '2026-03-29T06:30:00.000Z' });
    expect(o.excavations).toEqual([expect.objectContaining({ excavationId: e.id, state: 'due', lastSafeAt: '2026-03-28T07:05:00.000Z' })]);
    at('2026-03-29T06:31:00Z');
    o = await overdue();
    expect(o.excavations.map((x: { state: string }) => x.state)).toEqual(['overdue']);
    await agents.supervisor.post(`/api/excavations/${e.id}/inspections`).send(form()).expect(201);
    expect((await overdue()).excavations).toEqual([]);
    // planned and backfilled excavations are not inspected
    await excavation(s, 'planned');
    await excavation(s, 'backfilled');
    expect((await agents.supervisor.get(`/api/sites/${s}/inspections/states`)).body.excavations).toHaveLength(1);
  });
});

describe('the overdue e-mail (scheduled job, run here with an injected clock)', () => {
  it('e-mails the supervisors and coordinators once per shift, 30 minutes after the shift starts', async () => {
    const s = await newSite('Reminder site', 'America/New_York');
    const sup = unique('rem-supervisor');
    const coord = unique('rem-coordinator');
    const op = unique('rem-operator');
    await t.deps.db
      .insertInto('site_members')
      .values([
        { site_id: s, user_id: await person(sup, 'Rita Shore'), role: 'supervisor' },
        { site_id: s, user_id: (await addPerson(t.deps, { email: coord, name: 'Cole Brace', units: 'us' })).id, role: 'coordinator' },
        { site_id: s, user_id: await person(op, 'Opal Track'), role: 'operator', can_inspect: true },
      ])
      .execute();
    const a = await excavation(s);
    const b = await excavation(s);
    const run = async () => (await checkOverdueInspections(t.deps, { siteIds: [s] }))[0];

    at('2026-07-01T11:20:00Z'); // 07:20 EDT, 20 minutes into the shift
    expect(await run()).toBeUndefined();
    await (await signedIn(t.app, sup)).post(`/api/excavations/${b.id}/inspections`).send(form()).expect(201);
    at('2026-07-01T11:31:00Z'); // 07:31 EDT
    const first = await run();
    expect(first).toMatchObject({ shiftStart: '2026-07-01T11:00:00.000Z', excavations: [a.reference] });
    expect(first.sentTo.sort()).toEqual([coord, sup].sort());
    const mail = await waitForMail(t.deps, coord, /Inspections overdue at Reminder site/);
    expect(mail.text).toContain(`${a.reference} Test trench`);
    expect(mail.text).not.toContain(`${b.reference} Test trench`);
    // One message each, in the reader's units: the coordinator works in US units and reads OSHA's rule.
    expect(mail.mail_to).toBe(coord);
    expect(mail.text).toContain(cautionFor('us'));
    const toSup = await waitForMail(t.deps, sup, /Inspections overdue at Reminder site/);
    expect(toSup.mail_to).toBe(sup);
    expect(toSup.text).toContain(CAUTION);
    expect(toSup.text).not.toContain('OSHA');
    at('2026-07-01T11:45:00Z');
    expect((await run()).sentTo).toEqual([]); // once per shift
    at('2026-07-02T11:10:00Z'); // next day, inside the grace time
    expect(await run()).toBeUndefined();
    at('2026-07-02T11:32:00Z');
    expect((await run()).sentTo).toHaveLength(2);
    const rows = await t.deps.db
      .selectFrom('inspection_reminders')
      .select('shift_start')
      .where('site_id', '=', s)
      .orderBy('shift_start')
      .execute();
    expect(rows.map((r) => new Date(r.shift_start).toISOString())).toEqual(['2026-07-01T11:00:00.000Z', '2026-07-02T11:00:00.000Z']);
  });

  it('sends nothing when every open excavation was inspected safe this shift', async () => {
    const s = await newSite('Quiet site');
    const sup = unique('quiet-supervisor');
    await t.deps.db
      .insertInto('site_members')
      .values({ site_id: s, user_id: await person(sup, 'Quinn Level'), role: 'supervisor' })
      .execute();
    const e = await excavation(s);
    at('2026-07-01T06:10:00Z');
    await (await signedIn(t.app, sup)).post(`/api/excavations/${e.id}/inspections`).send(form()).expect(201);
    at('2026-07-01T06:45:00Z');
    expect(await run(s)).toEqual({ siteId: s, shiftStart: '2026-07-01T06:00:00.000Z', excavations: [], sentTo: [] });
  });
});

async function run(s: number) {
  return (await checkOverdueInspections(t.deps, { siteIds: [s] }))[0];
}

describe('records', () => {
  it('exports an excavation\u2019s inspections as CSV with times on the site\u2019s clock', async () => {
    at('2026-06-12T06:05:00Z');
    const e = await excavation();
    await agents.supervisor.post(`/api/excavations/${e.id}/inspections`).send(notSafe('=cmd|calc; stop work')).expect(201);
    at('2026-06-12T09:00:00Z');
    await agents.supervisor
      .post(`/api/excavations/${e.id}/inspections`)
      .send(form({ reason: 'after-fall', reasonDetail: 'Small fall from the west face, cleared' }))
      .expect(201);
    const r = await agents.coordinator.get(`/api/excavations/${e.id}/inspections.csv`);
    expect(r.status).toBe(200);
    expect(r.headers['content-type']).toMatch(/text\/csv/);
    const lines = r.text
      .replace(/^\uFEFF/, '')
      .trim()
      .split('\r\n');
    expect(lines).toHaveLength(3);
    expect(lines[0]).toMatch(/^inspection,excavation,shift,shift start,inspected at,time zone,inspector,reason/);
    expect(lines[1]).toContain(`${e.reference},Day shift,2026-06-12 07:00,2026-06-12 10:00,Europe/London`);
    expect(lines[1]).toContain('After a fall of material');
    expect(lines[2]).toContain('Not safe: stop work');
    expect(lines[2]).toContain("'=cmd|calc; stop work"); // a formula is shown as text
  });

  it('prints the weekly report as a PDF with each excavation, shift, inspector, outcome and photo', async () => {
    const s = await newSite('Report site');
    const sup = unique('report-supervisor');
    await t.deps.db
      .insertInto('site_members')
      .values({ site_id: s, user_id: await person(sup, 'Rory Plumb'), role: 'supervisor' })
      .execute();
    const agent = await signedIn(t.app, sup);
    const a = await excavation(s, 'open', '2026-06-01T00:00:00Z');
    const b = await excavation(s, 'open', '2026-06-01T00:00:00Z');
    at('2026-06-16T06:10:00Z'); // Tuesday of 2026-W25
    await agent
      .post(`/api/excavations/${a.id}/inspections`)
      .field('inspection', JSON.stringify(notSafe()))
      .attach('photos', PNG, 'waling.png')
      .expect(201);
    at('2026-06-16T11:00:00Z');
    await agent
      .post(`/api/excavations/${a.id}/inspections`)
      .send(form({ reason: 'after-event', reasonDetail: 'Waling re-fixed' }))
      .expect(201);
    at('2026-06-17T06:10:00Z');
    await agent.post(`/api/excavations/${b.id}/inspections`).send(form()).expect(201);
    at('2026-06-18T12:00:00Z');

    const r = await agent.get(`/api/sites/${s}/inspections/report.pdf?week=2026-W25`).buffer(true).parse(binary);
    expect(r.status).toBe(200);
    expect(r.headers['content-type']).toBe('application/pdf');
    const pdf = r.body as Buffer;
    expect(pdf.subarray(0, 5).toString('latin1')).toBe('%PDF-');
    expect(pdf.subarray(-6).toString('latin1')).toMatch(/%%EOF/);
    const text = await pdfText(pdf);
    for (const words of [
      `${a.reference} Test trench`,
      `${b.reference} Test trench`,
      'Rory Plumb',
      'Not safe: stop work',
      'Safe to work',
      'No inspection recorded',
      'week 2026-W25',
      'licensed practice prevail',
    ]) {
      expect(text).toContain(words);
    }
    expect(pdf.toString('latin1')).toMatch(/\/Subtype\s*\/Image/);
    expect(text).toContain('open, 2.40 m deep, support: hydraulic frames');
    expect(text).not.toContain('OSHA 29 CFR 1926 Subpart P');

    // Read by the same person in US customary units: 2.4 m = 7.874 ft (NIST SP 811, B.8: 1 ft = 0.3048 m).
    await t.deps.db.updateTable('users').set({ units: 'us' }).where('email', '=', sup).execute();
    const inFeet = await pdfText((await agent.get(`/api/sites/${s}/inspections/report.pdf?week=2026-W25`).buffer(true).parse(binary)).body);
    expect(inFeet).toContain('open, 7.9 ft deep, support: hydraulic frames');
    expect(inFeet).not.toMatch(/\d m deep/);
    expect(inFeet).toContain('OSHA 29 CFR 1926 Subpart P (Excavations) applies');
    await t.deps.db.updateTable('users').set({ units: null }).where('email', '=', sup).execute();

    // A longer report runs over several pages, each with its footer, and no page of footer alone.
    for (let i = 0; i < 14; i++) await excavation(s, 'open', '2026-06-01T00:00:00Z');
    const long = (await agent.get(`/api/sites/${s}/inspections/report.pdf?week=2026-W25`).buffer(true).parse(binary)).body as Buffer;
    const pages = await pdfPages(long);
    expect(pages).toBeGreaterThan(1);
    const longText = await pdfText(long);
    for (let n = 1; n <= pages; n++) expect(longText).toContain(`Page ${n} of ${pages}.`);
    expect(longText).not.toContain(`Page ${pages + 1} of`);

    const bad = await agent.get(`/api/sites/${s}/inspections/report.pdf?week=2026-W60`);
    expect(bad.status).toBe(400);
    expect(bad.body.error.fields).toHaveProperty('week');
  });
});
