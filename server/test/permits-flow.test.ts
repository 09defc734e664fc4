import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { CAUTION } from '@shared/engineering';
import { cautionFor } from '@shared/caution';
import { unitsOf } from '../src/services/units';
import { runPermitSchedule } from '../src/jobs/permits';
import { inspectionActor } from '../src/services/permits/actors';
import { transition } from '../src/services/permits/machine';
import { permitPdf } from '../src/services/permits/pdf';
import { localProjection } from '@shared/geometry';
import { exclusionReason } from '@shared/permits/exclusion';
import type { ExclusionBasis } from '@shared/schemas/field';
import type { PlacedLoad } from '@shared/schemas/permits';
import { addPerson, demo, DEMO_PASSWORD, signedIn, startTestApp, unique, waitForMail, type TestApp, demoOrganisationId } from './helpers';
import {
  act,
  createPermit,
  excavatorAt,
  hoursFrom,
  makeWorld,
  newTrench,
  submitAndApprove,
  version,
  type PermitWorld,
} from './permits-fixtures';
import { binary, pdfText } from './pdf';

let t: TestApp;
let w: PermitWorld;
beforeAll(async () => {
  t = await startTestApp({ SIGNIN_LIMIT_PER_IP: '1000' });
  w = await makeWorld(t);
});
afterAll(async () => t.stop());

/** Every message to `to` about permit `number` since the test began, by subject. */
async function subjectsTo(to: string, number: string): Promise<string[]> {
  const rows = await t.deps.db
    .selectFrom('caught_mail')
    .select(['subject'])
    .where('mail_to', 'ilike', `%${to}%`)
    .where('subject', 'like', `Permit ${number} %`)
    .execute();
  return rows.map((r) => r.subject);
}

describe('e-mails of each transition reach the people who act next', () => {
  it('from request to hand-back', async () => {
    const p = await createPermit(w, { loads: [excavatorAt(w, 1.5)] });
    const n = p.number;
    const sub = await act(w.agents.supervisor, p.id, { action: 'submit', version: p.version });
    expect(sub.status).toBe(200);
    const toCoordinator = await waitForMail(t.deps, demo.coordinator, new RegExp(`Permit ${n} .* awaits your review`));
    expect(toCoordinator.text).toContain(`http://brink.test/permits/${p.id}`);
    await waitForMail(t.deps, w.coordinator2Email, new RegExp(`Permit ${n} .* awaits your review`));

    const ret = await act(w.agents.coordinator, p.id, {
      action: 'return',
      version: sub.body.permit.version,
      password: DEMO_PASSWORD,
      reason: 'Add the banksman to the method statement',
    });
    expect(ret.status).toBe(200);
    const returned = await waitForMail(t.deps, demo.supervisor, new RegExp(`Permit ${n} .* is returned for changes`));
    expect(returned.text).toContain('Comments: Add the banksman to the method statement');

    const again = await act(w.agents.supervisor, p.id, { action: 'submit', version: ret.body.permit.version });
    const ok = await act(w.agents.coordinator, p.id, {
      action: 'approve',
      version: again.body.permit.version,
      password: DEMO_PASSWORD,
      standoff: 3,
      conditions: ['A banksman is present'],
    });
    expect(ok.status).toBe(200);
    const approvedToSupervisor = await waitForMail(t.deps, demo.supervisor, new RegExp(`Permit ${n} .* is approved`));
    expect(approvedToSupervisor.text).toContain('Standoff: keep every load at least 3.00 m from the excavation edge.');
    expect(approvedToSupervisor.text).toContain('(1) A banksman is present');
    const approvedToOperator = await waitForMail(t.deps, demo.operator, new RegExp(`Permit ${n} .* is approved`));
    expect(approvedToOperator.text).toContain(`http://brink.test/field/permits/${p.id}`);
    expect(approvedToOperator.text).toMatch(/confirm that you have been briefed/);

    // The operator confirms the briefing inside the window: live at once; twice is the same.
    const b1 = await w.agents.operator.post(`/api/permits/${p.id}/briefing`);
    expect(b1.status).toBe(200);
    expect(b1.body.briefing.status).toBe('live');
    const b2 = await w.agents.operator.post(`/api/permits/${p.id}/briefing`);
    expect(b2.body.briefing.briefedAt).toBe(b1.body.briefing.briefedAt);
    await waitForMail(t.deps, demo.operator, new RegExp(`Permit ${n} .* is live`));
    await waitForMail(t.deps, demo.supervisor, new RegExp(`Permit ${n} .* is live`));

    const susp = await act(w.agents.coordinator, p.id, {
      action: 'suspend',
      version: await version(w, p.id),
      reason: 'Water in the trench',
    });
    expect(susp.status).toBe(200);
    for (const to of [demo.supervisor, demo.operator, w.coordinator2Email])
      await waitForMail(t.deps, to, new RegExp(`Permit ${n} .* is suspended`));
    const res = await act(w.agents.coordinator, p.id, {
      action: 'resume',
      version: susp.body.permit.version,
      reason: 'Pumped out and inspected',
    });
    expect(res.status).toBe(200);
    for (const to of [demo.supervisor, demo.operator]) await waitForMail(t.deps, to, new RegExp(`Permit ${n} .* is live again`));

    const back = await act(w.agents.supervisor, p.id, { action: 'hand_back', version: res.body.permit.version });
    expect(back.status).toBe(200);
    for (const to of [demo.coordinator, demo.operator]) await waitForMail(t.deps, to, new RegExp(`Permit ${n} .* is handed back`));

    // Nobody is told of their own action, and the operator never hears of the review itself.
    expect(await subjectsTo(demo.coordinator, n)).not.toContainEqual(expect.stringMatching(/is suspended|is returned|is approved/));
    expect(await subjectsTo(demo.supervisor, n)).not.toContainEqual(expect.stringMatching(/awaits your review|handed back/));
    expect(await subjectsTo(demo.operator, n)).not.toContainEqual(expect.stringMatching(/awaits your review|returned/));

    // The timeline tells the whole story, with the comments.
    const detail = await w.agents.coordinator.get(`/api/permits/${p.id}`);
    expect(detail.body.permit.events.map((e: { action: string }) => e.action)).toEqual([
      'create',
      'submit',
      'return',
      'submit',
      'approve',
      'briefed',
      'start',
      'suspend',
      'resume',
      'hand_back',
    ]);
    const start = detail.body.permit.events.find((e: { action: string }) => e.action === 'start');
    expect(start.actor.name).toBe('Brink schedule');
    // The operator's briefing came after the window opened: that is what let it go live.
    expect(start.detail.startedBy).toBe('briefing');
  });

  it('tells the requester of a decline with its reason', async () => {
    const p = await createPermit(w);
    const s = await act(w.agents.supervisor, p.id, { action: 'submit', version: p.version });
    await act(w.agents.coordinator, p.id, {
      action: 'decline',
      version: s.body.permit.version,
      password: DEMO_PASSWORD,
      reason: 'Use the far side of the trench',
    }).expect(200);
    const m = await waitForMail(t.deps, demo.supervisor, new RegExp(`Permit ${p.number} .* is declined`));
    expect(m.text).toContain('Reason: Use the far side of the trench');
  });

  it('lets an inspection suspend a live permit with a reason, telling everyone', async () => {
    const p = await createPermit(w, { operatorIds: [] });
    const approved = await submitAndApprove(w, p.id);
    expect(approved.status).toBe('live');
    await expect(transition(t.deps, p.id, 'suspend', inspectionActor('Shift inspection failed'), {})).rejects.toMatchObject({
      status: 400,
    });
    const out = await transition(t.deps, p.id, 'suspend', inspectionActor('Shift inspection failed'), {
      reason: 'Frame strut missing at chainage 12 m',
    });
    expect(out.to).toBe('suspended');
    expect(out.notified).toEqual(expect.arrayContaining([demo.supervisor, demo.coordinator]));
    const m = await waitForMail(t.deps, demo.coordinator, new RegExp(`Permit ${p.number} .* is suspended`));
    expect(m.text).toContain('Reason: Frame strut missing at chainage 12 m');
    const e = (await w.agents.coordinator.get(`/api/permits/${p.id}`)).body.permit.events.at(-1);
    expect(e).toMatchObject({ action: 'suspend', actor: { id: null, name: 'Shift inspection failed' } });
  });
});

describe('the schedule, on an injected clock', () => {
  it('waits for the briefing, goes live, reminds an hour before the end once, and lapses at the end', async () => {
    const base = new Date('2031-03-03T07:00:00Z');
    t.clock.now = base;
    try {
      const p = await createPermit(w, { windowStart: hoursFrom(base, 1), windowEnd: hoursFrom(base, 9) });
      await submitAndApprove(w, p.id);
      expect((await runPermitSchedule(t.deps, { permitIds: [p.id] })).started).not.toContain(p.id); // window not open
      t.clock.now = new Date(base.getTime() + 2 * 3600_000);
      expect((await runPermitSchedule(t.deps, { permitIds: [p.id] })).started).not.toContain(p.id); // operator not briefed
      const b = await w.agents.operator.post(`/api/permits/${p.id}/briefing`);
      expect(b.body.briefing.status).toBe('live');

      t.clock.now = new Date(base.getTime() + 8.25 * 3600_000);
      expect((await runPermitSchedule(t.deps, { permitIds: [p.id] })).reminded).toContain(p.id);
      expect((await runPermitSchedule(t.deps, { permitIds: [p.id] })).reminded).not.toContain(p.id);
      const reminder = await waitForMail(t.deps, demo.supervisor, new RegExp(`Permit ${p.number} .* closes in an hour`));
      expect(reminder.text).toMatch(/hand it back/);
      await waitForMail(t.deps, demo.operator, new RegExp(`Permit ${p.number} .* closes in an hour`));

      t.clock.now = new Date(base.getTime() + 9 * 3600_000 + 60_000);
      expect((await runPermitSchedule(t.deps, { permitIds: [p.id] })).lapsed).toContain(p.id);
      const after = await w.agents.supervisor.get(`/api/permits/${p.id}`);
      expect(after.body.permit.status).toBe('lapsed');
      await waitForMail(t.deps, demo.coordinator, new RegExp(`Permit ${p.number} .* has lapsed`));
    } finally {
      t.clock.now = null;
    }
  });

  it('goes live at the window start when the operators were briefed before it', async () => {
    const base = new Date('2031-04-04T07:00:00Z');
    t.clock.now = base;
    try {
      const p = await createPermit(w, { windowStart: hoursFrom(base, 1), windowEnd: hoursFrom(base, 3) });
      await submitAndApprove(w, p.id);
      const b = await w.agents.operator.post(`/api/permits/${p.id}/briefing`);
      expect(b.body.briefing.status).toBe('approved');
      t.clock.now = new Date(base.getTime() + 3600_000);
      expect((await runPermitSchedule(t.deps, { permitIds: [p.id] })).started).toContain(p.id);
    } finally {
      t.clock.now = null;
    }
  });

  it('refuses a briefing from someone the permit does not name', async () => {
    const p = await createPermit(w, { operatorIds: [] });
    await submitAndApprove(w, p.id);
    expect((await w.agents.operator.post(`/api/permits/${p.id}/briefing`)).status).toBe(403);
  });
});

describe('attachments', () => {
  const pdf = Buffer.from('%PDF-1.4\n1 0 obj <<>> endobj\ntrailer <<>>\n%%EOF\n');
  // The first bytes of a Windows executable (an "MZ" header with a PE signature).
  const exe = Buffer.concat([
    Buffer.from('MZ'),
    Buffer.alloc(58),
    Buffer.from([0x80, 0, 0, 0]),
    Buffer.alloc(64),
    Buffer.from('PE\0\0'),
    Buffer.alloc(400),
  ]);

  it('keeps a method statement PDF, served only to members of the site', async () => {
    const p = await createPermit(w);
    const r = await w.agents.supervisor
      .post(`/api/permits/${p.id}/attachments`)
      .field('kind', 'method-statement')
      .attach('file', pdf, 'method.pdf');
    expect(r.status).toBe(201);
    expect(r.body.attachment).toMatchObject({ kind: 'method-statement', mime: 'application/pdf', name: 'method.pdf' });
    const got = await w.agents.operator.get(r.body.attachment.url);
    expect(got.status).toBe(200);
    expect(got.headers['content-type']).toBe('application/pdf');
    expect((await w.agents.outsider.get(r.body.attachment.url)).status).toBe(403);
    const listed = await w.agents.coordinator.get(`/api/permits/${p.id}`);
    expect(listed.body.permit.attachments.map((a: { name: string }) => a.name)).toEqual(['method.pdf']);
  });

  it('refuses an executable renamed .pdf', async () => {
    const p = await createPermit(w);
    const r = await w.agents.supervisor
      .post(`/api/permits/${p.id}/attachments`)
      .field('kind', 'method-statement')
      .attach('file', exe, 'method.pdf');
    expect(r.status).toBe(400);
    expect(r.body.error.fields.file).toBe('must be a PDF');
    expect((await w.agents.supervisor.get(`/api/permits/${p.id}`)).body.permit.attachments).toEqual([]);
  });

  it('keeps what was reviewed: after submission a document is refused (409), a photo still accepted', async () => {
    const p = await createPermit(w);
    await act(w.agents.supervisor, p.id, { action: 'submit', version: p.version }).expect(200);
    const doc = await w.agents.supervisor
      .post(`/api/permits/${p.id}/attachments`)
      .field('kind', 'method-statement')
      .attach('file', pdf, 'late.pdf');
    expect(doc.status).toBe(409);
    const png = Buffer.from(
      '89504e470d0a1a0a0000000d49484452000000010000000108060000001f15c4890000000d4944415478da63f8cfc0f01f0005000201a5d4cb3b0000000049454e44ae426082',
      'hex',
    );
    const photo = await w.agents.supervisor.post(`/api/permits/${p.id}/attachments`).field('kind', 'photo').attach('file', png, 'edge.png');
    expect(photo.status).toBe(201);
    const names = (await w.agents.supervisor.get(`/api/permits/${p.id}`)).body.permit.attachments.map((a: { name: string }) => a.name);
    expect(names).toEqual(['edge.png']);
  });

  it('refuses an oversize file', async () => {
    const p = await createPermit(w);
    const big = Buffer.concat([Buffer.from([0xff, 0xd8, 0xff, 0xe0]), Buffer.alloc(10 * 1024 * 1024 + 16)]);
    const r = await w.agents.supervisor.post(`/api/permits/${p.id}/attachments`).field('kind', 'photo').attach('file', big, 'photo.jpg');
    expect(r.status).toBe(413);
    expect(r.body.error.fields.file).toMatch(/too large/);
  });
});

describe('the printed permit', () => {
  it('is a valid PDF holding the permit number, the standoff and the caution', async () => {
    const p = await createPermit(w, { loads: [excavatorAt(w, 1.5)] });
    await submitAndApprove(w, p.id, { standoff: 3, conditions: ['No tracking inside the exclusion zone'] });
    const r = await w.agents.supervisor.get(`/api/permits/${p.id}/pdf`).buffer(true).parse(binary);
    expect(r.status).toBe(200);
    expect(r.headers['content-type']).toBe('application/pdf');
    const buf = r.body as Buffer;
    expect(buf.subarray(0, 5).toString()).toBe('%PDF-');
    expect(buf.subarray(-6).toString()).toMatch(/%%EOF/);
    const text = await pdfText(buf);
    expect(text).toContain(`Permit ${p.number}`);
    expect(text).toContain('Keep every load at least 3.00 m from the excavation edge.');
    expect(text).toContain('No tracking inside the exclusion zone');
    expect(text).toContain(CAUTION);
    expect(text).toContain('Signed by Colm Ridley');
    expect(text).toMatch(/Scale 1:\d+/);
    expect(text).toContain('pressure (kPa)');
    expect(text).toContain('depth (m)');
  });

  it('sets apart the warnings a signatory must not miss: the 5 kPa/m minimum and a failing band beyond a passing offset (docs/calculation.md, example 4)', async () => {
    // A 3 m trench in sand with c′ 5 kPa (the minimum governs: example 3's reasoning) and an elastic
    // line load of 15.2 kN/m 1 m from the edge: it passes there, fails at 1.21–1.23 m, standoff 1.24 m.
    await newTrench(w);
    await t.deps.db
      .updateTable('excavations')
      .set({ depth: 3, soil: JSON.stringify([{ top: 0, unitWeight: 19, frictionAngle: 30, cohesion: 5 }]) })
      .where('id', '=', w.trenchId)
      .execute();
    const proj = localProjection(w.origin);
    const [cx, cy] = w.trenchCentre;
    const y = cy + 0.5 + 1.0;
    const wall: PlacedLoad = {
      id: 'wall',
      kind: 'line',
      label: 'Hoarding footing',
      path: { type: 'LineString', coordinates: [proj.toWgs84([cx - 10, y]), proj.toWgs84([cx + 10, y])] },
      force: 15.2,
    };
    const p = await createPermit(w, { loads: [wall], method: 'elastic' });
    const text = await pdfText((await permitPdf(t.deps, p.id, { compress: false })).buffer);
    expect(text).toContain('Read before signing');
    expect(text).toContain('the minimum equivalent fluid pressure governs');
    expect(text).toContain('moving it farther away is not always safer');
    expect(text).toMatch(/Hoarding footing fails at [^;]*1\.23 m from the edge \(passing in between\); its standoff is 1\.24 m/);
  });

  it('draws and states each excavation’s exclusion zone by the figure the phone and the permit page show (approved as placed)', async () => {
    const p = await createPermit(w, { loads: [excavatorAt(w, 1.5)] });
    await submitAndApprove(w, p.id); // no standoff set: approved as placed
    const phone = await w.agents.supervisor.get(`/api/field/permits/${p.id}`);
    expect(phone.status).toBe(200);
    const onPhone = phone.body.permit.excavations.find((x: { id: number }) => x.id === w.trenchId) as {
      standoff: number;
      standoffBasis: string;
    };
    expect(onPhone.standoff).toBeGreaterThan(0);
    const text = await pdfText((await permitPdf(t.deps, p.id, { compress: false })).buffer);
    const figure = `${onPhone.standoff.toFixed(2)} m`;
    expect(text).toContain('Loads as placed on the plan (no standoff set).');
    // The one sentence of shared/permits/exclusion.ts, as the permit page writes it.
    expect(text.replace(/\s+/g, ' ')).toContain(
      `Keep every part of the load at least ${figure} from the edge of ${w.trenchRef}. Why ${figure}: ${exclusionReason(onPhone.standoffBasis as ExclusionBasis)}.`,
    );
    expect(text.replace(/\s+/g, ' ')).toContain(`Red band: exclusion zone, from the edge: ${w.trenchRef} ${figure}.`);
  });

  it('says the window on the site’s clock in the e-mail and on the printed permit, not in UTC (London keeps summer time in July: UTC+1)', async () => {
    // 05:30 to 14:15 UTC on 1 July 2031 is 06:30 to 15:15 on the demo site's clock (Europe/London, BST).
    const p = await createPermit(w, { windowStart: '2031-07-01T05:30:00.000Z', windowEnd: '2031-07-01T14:15:00.000Z' });
    const sub = await act(w.agents.supervisor, p.id, { action: 'submit', version: p.version });
    expect(sub.status).toBe(200);
    const mail = await waitForMail(t.deps, demo.coordinator, new RegExp(`Permit ${p.number} .* awaits your review`));
    expect(mail.text).toContain('Window: Tue, 1 Jul 2031, 06:30 to Tue, 1 Jul 2031, 15:15 (Europe/London).');
    expect(mail.text).not.toContain('05:30');
    const r = await w.agents.supervisor.get(`/api/permits/${p.id}/pdf`).buffer(true).parse(binary);
    const text = await pdfText(r.body as Buffer);
    expect(text).toContain('Tue, 1 Jul 2031, 06:30 to Tue, 1 Jul 2031, 15:15 (Europe/London time)');
    expect(text).not.toContain('05:30');
  });

  it('reads the same uncompressed', async () => {
    const p = await createPermit(w);
    const { buffer, number } = await permitPdf(t.deps, p.id, { compress: false });
    expect(number).toBe(p.number);
    const text = await pdfText(buffer);
    expect(text).toContain(`Permit ${p.number}`);
    expect(text).toContain('No decision yet');
  });
});

describe('what permits name stays', () => {
  it('refuses to remove an excavation or a machine that a permit names (409), and removes them once nothing does', async () => {
    await newTrench(w);
    const p = await createPermit(w);
    const ex = await w.agents.coordinator.delete(`/api/sites/${w.siteId}/excavations/${w.trenchId}`);
    expect(ex.status).toBe(409);
    expect(ex.body.error.message).toContain(p.number);
    const machine = await w.agents.admin.delete(`/api/plant/${w.excavatorId}`);
    expect(machine.status).toBe(409);
    expect(machine.body.error.message).toMatch(/placed on permit P-\d{4}/); // the library's excavator is on many
    expect(await t.deps.db.selectFrom('plant_items').select('id').where('id', '=', w.excavatorId).executeTakeFirst()).toBeDefined();
    // A trench no permit names goes.
    await newTrench(w);
    expect((await w.agents.coordinator.delete(`/api/sites/${w.siteId}/excavations/${w.trenchId}`)).status).toBe(204);
  });
});

// What the server writes follows the reader's units (docs/calculation.md, "Units"): the e-mails of a
// permit (each recipient's own), the printed permit (whoever downloads it) and the approval refusal
// (whoever acts). Check values are converted by hand with the exact NIST SP 811 (2008, Appendix B.8)
// factors: 1 ft = 0.3048 m; 1 psf = 0.047880259 kPa; 1 pcf = 0.15708746 kN/m³.

/** A person of the world's (metric) site who chose US customary units. */
async function usMember(role: 'operator' | 'coordinator', name: string): Promise<{ id: number; email: string }> {
  const email = unique(`us-${role}`);
  return addPerson(t.deps, { email, name, units: 'us', member: { siteId: w.siteId, role } });
}

describe('figures the server writes, in the reader’s units', () => {
  it('e-mails, the approval refusal and the printed permit: feet and psf for a US person, metres and kPa for a metric one', async () => {
    const usOperator = await usMember('operator', 'Ulla Feet (test operator)');
    const usCoordinator = await usMember('coordinator', 'Cy Feet (test coordinator)');
    await newTrench(w); // the test before removes the world's trench
    const p = await createPermit(w, { loads: [excavatorAt(w, 1.5)], operatorIds: [w.operatorId, usOperator.id] });
    const sent = await act(w.agents.supervisor, p.id, { action: 'submit', version: p.version });
    expect(sent.status).toBe(200);

    // The refusal of a standoff short of the computed one, to a metric and to a US coordinator.
    const metricNo = await act(w.agents.coordinator, p.id, {
      action: 'approve',
      version: await version(w, p.id),
      password: DEMO_PASSWORD,
      standoff: 0.5,
    });
    expect(metricNo.status).toBe(400);
    const least = /must be at least (\d+\.\d\d) m, or give a reason/.exec(metricNo.body.error.fields.standoff);
    expect(least).not.toBeNull();
    const computed = Number(least![1]);
    expect(metricNo.body.error.message).toContain(`the standoff 0.50 m is less than the computed ${least![1]} m`);
    const usAgent = await signedIn(t.app, usCoordinator.email);
    const usNo = await act(usAgent, p.id, { action: 'approve', version: await version(w, p.id), password: DEMO_PASSWORD, standoff: 0.5 });
    expect(usNo.status).toBe(400);
    // The computed standoff in feet, rounded up to 0.1 ft (never on the unsafe side); 1 ft = 0.3048 m.
    const leastFt = (Math.ceil((computed / 0.3048) * 10 - 1e-9) / 10).toFixed(1);
    expect(usNo.body.error.fields.standoff).toBe(`must be at least ${leastFt} ft, or give a reason`);
    // 0.5 m = 1.6404 ft, shown rounded down as it falls short: 1.6 ft (NIST SP 811: 1 ft = 0.3048 m).
    expect(usNo.body.error.message).toContain(`the standoff 1.6 ft is less than the computed ${leastFt} ft`);

    // Approved at 3 m by the US coordinator: each operator's e-mail in their own units.
    const ok = await act(usAgent, p.id, { action: 'approve', version: await version(w, p.id), password: DEMO_PASSWORD, standoff: 3 });
    expect(ok.status).toBe(200);
    const toUs = await waitForMail(t.deps, usOperator.email, new RegExp(`Permit ${p.number} .* is approved`));
    // 3 m = 9.8425 ft (1 ft = 0.3048 m, NIST SP 811), rounded up: 9.9 ft.
    expect(toUs.text).toContain('Standoff: keep every load at least 9.9 ft from the excavation edge.');
    expect(toUs.text).toContain(cautionFor('us'));
    expect(toUs.html).toContain('OSHA 29 CFR 1926 Subpart P');
    const toMetric = await waitForMail(t.deps, demo.operator, new RegExp(`Permit ${p.number} .* is approved`));
    expect(toMetric.text).toContain('Standoff: keep every load at least 3.00 m from the excavation edge.');
    expect(toMetric.text).toContain(CAUTION);
    expect(toMetric.text).not.toContain('OSHA');

    // The printed permit, downloaded by each operator.
    const usPdf = await pdfText(
      (await (await signedIn(t.app, usOperator.email)).get(`/api/permits/${p.id}/pdf`).buffer(true).parse(binary)).body,
    );
    expect(usPdf).toContain('Keep every load at least 9.9 ft from the excavation edge.');
    expect(usPdf).toContain(`Computed standoff: ${leastFt} ft`);
    // The trench is 2.4 m deep = 7.874 ft; its design surcharge 10 kPa = 208.85 psf (1 psf = 0.047880259 kPa);
    // its soil 19 kN/m³ = 120.95 pcf (1 pcf = 0.15708746 kN/m³): all NIST SP 811, B.8.
    expect(usPdf).toContain(`${w.trenchRef} Test pipe trench (7.9 ft deep)`);
    expect(usPdf).toContain('depth 7.9 ft; design surcharge 209 psf;');
    expect(usPdf).toContain('from 0.0 ft: 121 pcf');
    expect(usPdf).toContain('pressure (psf)');
    expect(usPdf).toContain('depth (ft)');
    expect(usPdf).toContain('formation 7.9 ft');
    expect(usPdf).toMatch(/0 \d+ ft Scale 1:\d+/);
    expect(usPdf).toContain(cautionFor('us'));
    expect(usPdf).not.toMatch(/\d (m|kPa|kN\/m)\b/);
    const metricPdf = await pdfText((await w.agents.operator.get(`/api/permits/${p.id}/pdf`).buffer(true).parse(binary)).body);
    expect(metricPdf).toContain('Keep every load at least 3.00 m from the excavation edge.');
    expect(metricPdf).toContain(`Computed standoff: ${least![1]} m`);
    expect(metricPdf).toContain(`${w.trenchRef} Test pipe trench (2.40 m deep)`);
    expect(metricPdf).toContain('depth 2.40 m; design surcharge 10.0 kPa;');
    expect(metricPdf).toContain('pressure (kPa)');
    expect(metricPdf).not.toContain('OSHA');
    expect(metricPdf).not.toMatch(/\d (ft|psf)\b/);
  });

  it('a person who chose nothing reads in the site’s units', async () => {
    const site = await t.deps.db
      .insertInto('sites')
      .values({
        organisation_id: await demoOrganisationId(t.deps),
        name: `Ohio test yard ${Date.now()}`,
        latitude: 40,
        longitude: -83,
        units: 'us',
      })
      .returning('id')
      .executeTakeFirstOrThrow();
    const person = await addPerson(t.deps, { email: unique('follows-site'), name: 'Sid Site', password: null });
    expect(await unitsOf(t.deps.db, person.id, site.id)).toBe('us');
    expect(await unitsOf(t.deps.db, person.id, w.siteId)).toBe('metric');
    expect(await unitsOf(t.deps.db, null, site.id)).toBe('us');
  });
});
