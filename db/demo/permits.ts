import type { Db } from '../database';
import { lonLat } from './excavations';
import type { DemoContext } from './people';

/**
 * Demo permits (invented), at least one in every status, on the demo excavations. Windows are set
 * relative to the moment of seeding so that "live now" is live. The permits counted in checks
 * (approved, live, suspended) stand beside the wet-well pit PIT-01, leaving the pipe trench TR-01
 * free for a new request. They are stored without a check: the server keeps one for each when it
 * starts (checkUnchecked in server/src/services/permits/check.ts), as db/ cannot run the server's check.
 */
type Status = 'draft' | 'submitted' | 'returned' | 'approved' | 'declined' | 'live' | 'suspended' | 'handed_back' | 'lapsed' | 'withdrawn';
type Step = { action: string; to: Status; by: 'supervisor' | 'coordinator' | 'operator' | 'system'; hoursAgo: number; comment?: string };

interface DemoPermit {
  kind: 'load' | 'dig';
  status: Status;
  description: string;
  /** Window in hours from now. */
  window: [number, number];
  excavation: string;
  loads: Record<string, unknown>[];
  operators: boolean;
  briefed?: boolean;
  decision?: { action: 'approve' | 'return' | 'decline'; reason?: string; standoff?: number | null; conditions?: string[] };
  dig?: Record<string, unknown>;
  steps: Step[];
}

const coordinatorName = 'Colm Ridley (demo coordinator)';

function demoPermits(site: { latitude: number; longitude: number }, plant: Record<string, number>): DemoPermit[] {
  const at = (east: number, north: number) => lonLat(site, east, north);
  const rect = (e0: number, n0: number, e1: number, n1: number) => ({
    type: 'Polygon',
    coordinates: [[at(e0, n0), at(e1, n0), at(e1, n1), at(e0, n1), at(e0, n0)]],
  });
  const machine = (id: string, name: string, east: number, north: number, rotation: number) => ({
    id,
    kind: 'plant',
    label: name,
    plantItemId: plant[name],
    position: at(east, north),
    rotation,
  });
  const submitted: Step = { action: 'submit', to: 'submitted', by: 'supervisor', hoursAgo: 20 };
  const approved: Step = { action: 'approve', to: 'approved', by: 'coordinator', hoursAgo: 18 };
  return [
    {
      kind: 'load',
      status: 'draft',
      description: 'Excavator 21 t loading pipe bedding into the rising main trench from the south side',
      window: [24, 34],
      excavation: 'TR-01',
      loads: [machine('exc', 'Excavator 21 t', -18, -26.5, 90)],
      operators: true,
      steps: [],
    },
    {
      kind: 'load',
      status: 'submitted',
      description: 'Stockpile of pipe bedding gravel beside the second leg of the rising main trench',
      window: [26, 50],
      excavation: 'TR-01',
      loads: [{ id: 'gravel', kind: 'stockpile', label: 'Bedding gravel', outline: rect(9, -19, 13, -16), unitWeight: 20, height: 1.2 }],
      operators: false,
      steps: [submitted],
    },
    {
      kind: 'load',
      status: 'returned',
      description: 'Concrete wagon discharging to the thrust block at the pump house end',
      window: [30, 34],
      excavation: 'TR-01',
      loads: [machine('wagon', 'Concrete wagon, 4 axles, laden 32 t', -30, -27, 90)],
      operators: true,
      decision: { action: 'return', reason: 'Please add the chute length and where the wagon turns; the method statement is missing.' },
      steps: [
        submitted,
        {
          action: 'return',
          to: 'returned',
          by: 'coordinator',
          hoursAgo: 19,
          comment: 'Please add the chute length and where the wagon turns; the method statement is missing.',
        },
      ],
    },
    {
      kind: 'load',
      status: 'approved',
      description: 'Mobile crane lifting the wet-well pumps in from the east side',
      window: [22, 30],
      excavation: 'PIT-01',
      loads: [machine('crane', 'Mobile crane 45 t on outriggers', 36, 35, 0)],
      operators: true,
      decision: {
        action: 'approve',
        standoff: 2.5,
        conditions: [
          'Outriggers and pads stand on mats of the agreed size, never on bare ground.',
          'A banksman is present whenever the machine moves or slews inside the influence zone.',
        ],
      },
      steps: [submitted, approved],
    },
    {
      kind: 'load',
      status: 'live',
      description: 'Tracked carrier bringing shuttering ply to the west edge of the wet well',
      window: [-2, 6],
      excavation: 'PIT-01',
      loads: [machine('carrier', 'Tracked carrier 3 t, laden', 15, 35, 0)],
      operators: true,
      briefed: true,
      decision: { action: 'approve', standoff: 3, conditions: ['No tracking, parking or stacking inside the exclusion zone.'] },
      steps: [submitted, approved, { action: 'start', to: 'live', by: 'system', hoursAgo: 2 }],
    },
    {
      kind: 'load',
      status: 'suspended',
      description: 'Dumper tipping blinding concrete at the north side of the wet well',
      window: [-3, 5],
      excavation: 'PIT-01',
      loads: [machine('dumper', 'Forward-tip dumper 6 t, laden', 25, 44, 180)],
      operators: true,
      briefed: true,
      decision: {
        action: 'approve',
        standoff: 3.5,
        conditions: ['Stop and tell the coordinator if water appears in the excavation or cracks open at the edge.'],
      },
      steps: [
        submitted,
        approved,
        { action: 'start', to: 'live', by: 'system', hoursAgo: 3 },
        {
          action: 'suspend',
          to: 'suspended',
          by: 'coordinator',
          hoursAgo: 1,
          comment: 'Water rising on the north side: wellpoint pump down. Resume after the pump is back and the pit inspected.',
        },
      ],
    },
    {
      kind: 'load',
      status: 'declined',
      description: 'Spoil heap along the rising main trench for backfill',
      window: [-10, 40],
      excavation: 'TR-01',
      loads: [{ id: 'spoil', kind: 'stockpile', label: 'Spoil heap', outline: rect(-30, -21, -10, -18), unitWeight: 19, height: 2 }],
      operators: false,
      decision: { action: 'decline', reason: 'The frames are not designed for a heap this size this close. Keep spoil in the compound.' },
      steps: [
        submitted,
        {
          action: 'decline',
          to: 'declined',
          by: 'coordinator',
          hoursAgo: 19,
          comment: 'The frames are not designed for a heap this size this close. Keep spoil in the compound.',
        },
      ],
    },
    {
      kind: 'load',
      status: 'handed_back',
      description: 'Roller compacting the haul road beside the rising main trench',
      window: [-30, -22],
      excavation: 'TR-01',
      loads: [machine('roller', 'Single-drum roller 7 t', -20, -28, 90)],
      operators: true,
      briefed: true,
      decision: {
        action: 'approve',
        standoff: 3,
        conditions: ['A banksman is present whenever the machine moves or slews inside the influence zone.'],
      },
      steps: [
        { ...submitted, hoursAgo: 40 },
        { ...approved, hoursAgo: 36 },
        { action: 'start', to: 'live', by: 'system', hoursAgo: 30 },
        { action: 'hand_back', to: 'handed_back', by: 'supervisor', hoursAgo: 23, comment: 'Done; roller back in the compound.' },
      ],
    },
    {
      kind: 'load',
      status: 'lapsed',
      description: 'Telehandler setting out pipes along the rising main trench',
      window: [-170, -160],
      excavation: 'TR-01',
      loads: [machine('telehandler', 'Telehandler 14 m, 3.5 t rated', 16, -14, 45)],
      operators: true,
      briefed: true,
      decision: { action: 'approve', standoff: 2.5, conditions: [] },
      steps: [
        { ...submitted, hoursAgo: 190 },
        { ...approved, hoursAgo: 180 },
        { action: 'start', to: 'live', by: 'system', hoursAgo: 170 },
        { action: 'lapse', to: 'lapsed', by: 'system', hoursAgo: 160 },
      ],
    },
    {
      kind: 'load',
      status: 'withdrawn',
      description: 'Midi excavator trimming the trench sides (no longer needed)',
      window: [10, 14],
      excavation: 'TR-01',
      loads: [machine('midi', 'Midi excavator 5 t', -5, -25.5, 90)],
      operators: false,
      steps: [{ action: 'withdraw', to: 'withdrawn', by: 'supervisor', hoursAgo: 5, comment: '' }],
    },
    {
      kind: 'dig',
      status: 'submitted',
      description: 'Open the kiosk cable duct trench',
      window: [48, 56],
      excavation: 'TR-02',
      loads: [],
      operators: true,
      dig: {
        depth: 1.2,
        supportMethod: 'Sides battered back at 1:1 (drawing TW-115); no one in the trench deeper than 1.2 m',
        servicesChecks: {
          drawings: { state: 'done', by: 'Sana Whitlock', at: 'HOURS:-26', notes: 'Utility record drawings of the farm supply checked' },
          locatorScan: { state: 'done', by: 'Sana Whitlock', at: 'HOURS:-25', notes: 'One live cable found, marked with paint' },
          trialHoles: { state: 'done', by: 'Owen Petts', at: 'HOURS:-24', notes: 'Cable found at 0.55 m in both trial holes' },
        },
      },
      steps: [submitted],
    },
  ];
}

export async function seedPermits(db: Db, ctx: DemoContext): Promise<void> {
  const site = await db
    .selectFrom('sites')
    .select(['latitude', 'longitude', 'default_method'])
    .where('id', '=', ctx.siteId)
    .executeTakeFirstOrThrow();
  const plantRows = await db.selectFrom('plant_items').select(['id', 'name']).where('organisation_id', '=', ctx.organisationId).execute();
  const plant = Object.fromEntries(plantRows.map((p) => [p.name, p.id]));
  const excavations = await db.selectFrom('excavations').select(['id', 'reference']).where('site_id', '=', ctx.siteId).execute();
  const now = Date.now();
  const hours = (h: number) => new Date(now + h * 3600_000);
  const names = await db.selectFrom('users').select(['id', 'name']).execute();
  const nameOf = (id: number) => names.find((n) => n.id === id)!.name;
  let seq = 0;
  for (const p of demoPermits(site, plant)) {
    seq += 1;
    const number = `P-${String(seq).padStart(4, '0')}`;
    const excavationId = excavations.find((e) => e.reference === p.excavation)!.id;
    const last = p.steps.at(-1);
    const updated = last ? hours(-last.hoursAgo) : hours(-24);
    const permit = await db
      .insertInto('permits')
      .values({
        site_id: ctx.siteId,
        seq,
        number,
        kind: p.kind,
        status: p.status,
        version: p.steps.length + 1,
        requested_by: ctx.people.supervisor,
        created_at: hours(-24 - p.steps.length),
        updated_at: updated,
      })
      .returning('id')
      .executeTakeFirstOrThrow();
    const decisionStep = p.steps.find((s) => ['approve', 'return', 'decline'].includes(s.action));
    const decisionAt = decisionStep ? hours(-decisionStep.hoursAgo).toISOString() : null;
    const decision = p.decision
      ? {
          action: p.decision.action,
          by: { id: ctx.people.coordinator, name: coordinatorName },
          at: decisionAt,
          reason: p.decision.reason ?? '',
          standoff: p.decision.standoff ?? null,
          conditions: p.decision.conditions ?? [],
          signature: `Signed by ${coordinatorName} with their password at ${decisionAt!.replace('T', ' ').slice(0, 19)} UTC`,
        }
      : null;
    const dig = p.dig
      ? JSON.parse(JSON.stringify(p.dig).replace(/"HOURS:(-?\d+)"/g, (_m, h) => JSON.stringify(hours(Number(h)).toISOString())))
      : null;
    const rev = await db
      .insertInto('permit_revisions')
      .values({
        permit_id: permit.id,
        revision: 1,
        description: p.description,
        window_start: hours(p.window[0]),
        window_end: hours(p.window[1]),
        excavation_ids: [excavationId],
        method: site.default_method as 'dispersion-45' | 'elastic',
        loads: JSON.stringify(p.loads),
        dig: dig ? JSON.stringify(dig) : null,
        decision: decision ? JSON.stringify(decision) : null,
        created_by: ctx.people.supervisor,
        created_at: hours(-24 - p.steps.length),
        updated_at: updated,
      })
      .returning('id')
      .executeTakeFirstOrThrow();
    if (p.operators) {
      await db
        .insertInto('permit_operators')
        .values({
          revision_id: rev.id,
          user_id: ctx.people.operator,
          briefed_at: p.briefed ? hours(-(p.steps.find((s) => s.action === 'start')?.hoursAgo ?? 1) - 0.5) : null,
        })
        .execute();
    }
    const events = [
      {
        action: 'create',
        from: null as Status | null,
        to: 'draft' as Status | null,
        by: 'supervisor' as Step['by'],
        at: hours(-24 - p.steps.length),
        comment: '',
      },
      ...p.steps.map((s, i) => ({
        action: s.action,
        from: (i === 0 ? 'draft' : p.steps[i - 1].to) as Status,
        to: s.to,
        by: s.by,
        at: hours(-s.hoursAgo),
        comment: s.comment ?? '',
      })),
    ];
    if (p.briefed)
      events.push({
        action: 'briefed',
        from: null,
        to: null,
        by: 'operator',
        at: hours(-(p.steps.find((s) => s.action === 'start')?.hoursAgo ?? 1) - 0.5),
        comment: '',
      });
    events.sort((a, b) => a.at.getTime() - b.at.getTime());
    for (const e of events) {
      const actorId = e.by === 'system' ? null : ctx.people[e.by];
      await db
        .insertInto('permit_events')
        .values({
          permit_id: permit.id,
          revision: 1,
          at: e.at,
          actor_id: actorId,
          actor_name: actorId ? nameOf(actorId) : 'Brink schedule',
          action: e.action,
          from_status: e.to ? e.from : null,
          to_status: e.to,
          comment: e.comment,
          detail: JSON.stringify(decisionStep && e.action === decisionStep.action ? { decision } : {}),
        })
        .execute();
    }
  }
}
