/**
 * The organisation-sized data set of `npm run seed:large` (issue 16 §3), invented: one contractor's
 * sites, each with the same mix of excavations on a grid, permits in every status with their
 * revisions and timelines, and the shift-start inspections of the open excavations. Made in batches:
 * sites, people and excavations from here (the outlines drawn by the app's own geometry), permits,
 * revisions, operators, timelines and inspections by INSERT … SELECT in PostgreSQL, one site batch
 * per statement. The stored checks are the app's own: each layout (an excavation template and a load
 * beside it at the same place relative to its edge) is checked once by the server's check on its
 * first permit, and that check is written to every other permit of the layout with their ids,
 * numbers, references and names. The permits on one excavation have windows that never overlap, so
 * no check counts another permit and each copy is what the check would find.
 */
import bcrypt from 'bcryptjs';
import { sql } from 'kysely';
import type { LineString, Polygon } from 'geojson';
import type { Db } from '@db/database';
import type { SupportType } from '@shared/schemas/excavations';
import { DEMO_PASSWORD } from '@db/demo/people';
import { seedPlant } from '@db/demo/plant';
import { projectionOf, shapeColumns, shapesOf } from '@shared/geometry/shapes';
import { checkStoredRevision } from '../services/permits/check';

export interface LargeSeedSize {
  sites: number;
  excavationsPerSite: number;
  permitsPerSite: number;
  inspectionsPerSite: number;
}
/** The size of issue 16 §3: 100 sites, 20,000 excavations, 100,000 permits, 200,000 inspections. */
export const fullSize: LargeSeedSize = { sites: 100, excavationsPerSite: 200, permitsPerSite: 1000, inspectionsPerSite: 2000 };

/** The invented contractor's e-mail domain (`.test`: never delivered). */
export const LARGE_DOMAIN = 'large.brink.test';
export const largeAdminEmail = `admin@${LARGE_DOMAIN}`;
export const largeEmail = (role: 'coordinator' | 'supervisor' | 'operator', site: number, n = 1) =>
  `${role}${n}.site${String(site).padStart(3, '0')}@${LARGE_DOMAIN}`;

const placeWords = ['Alder', 'Birch', 'Cinder', 'Dunlin', 'Elder', 'Fallow', 'Gorse', 'Hazel', 'Ivywell', 'Juniper'];
const workWords = [
  'Lane depot',
  'Brook culvert',
  'Mill sewer renewal',
  'Ridge service reservoir',
  'Ford bridge abutments',
  'Moor substation',
  'Hollow pumping station',
  'Field drainage scheme',
  'Heath road widening',
  'Marsh outfall',
];
const firstNames = ['Ada', 'Bryn', 'Cara', 'Dev', 'Edda', 'Finn', 'Greer', 'Hal', 'Isla', 'Jory', 'Kit', 'Lorne', 'Mira', 'Nye'];
const lastNames = ['Ashby', 'Brandle', 'Corrin', 'Dunmore', 'Esk', 'Fennick', 'Garrow', 'Holm', 'Ingle', 'Jessop', 'Kestle'];
const personName = (i: number) => `${firstNames[i % firstNames.length]} ${lastNames[Math.floor(i / firstNames.length) % lastNames.length]}`;

const clay = [
  { top: 0, unitWeight: 18, saturatedUnitWeight: 19, frictionAngle: 27, cohesion: 0 },
  { top: 0.5, unitWeight: 19.5, saturatedUnitWeight: 20, undrainedShearStrength: 50 },
];
const sand = [
  { top: 0, unitWeight: 18, saturatedUnitWeight: 19, frictionAngle: 28, cohesion: 0 },
  { top: 0.8, unitWeight: 19, saturatedUnitWeight: 21, frictionAngle: 34, cohesion: 0 },
];

type XY = [number, number];
interface ExcavationTemplate {
  prefix: string;
  name: string;
  kind: 'trench' | 'pit';
  /** Centre line (trench) or outline (pit), metres east and north of the grid cell's centre. */
  line: XY[];
  width: number | null;
  depth: number;
  support_type: SupportType;
  rated_pressure: number | null;
  restraint: 'unyielding' | 'yielding';
  soil: object[];
  groundwater_depth: number | null;
  design_reference: string;
  /** A point on the south face, from which loads stand off southwards. */
  face: XY;
}

const templates: ExcavationTemplate[] = [
  {
    prefix: 'TR',
    name: 'Surface water drain trench',
    kind: 'trench',
    line: [
      [-15, 0],
      [15, 0],
    ],
    width: 1.2,
    depth: 2.4,
    support_type: 'hydraulic-frames',
    rated_pressure: 40,
    restraint: 'unyielding',
    soil: clay,
    groundwater_depth: null,
    design_reference: 'TW-201 rev A (frames at 2.5 m)',
    face: [-6, -0.6],
  },
  {
    prefix: 'TR',
    name: 'Foul sewer connection trench',
    kind: 'trench',
    line: [
      [-12, 0],
      [4, 0],
      [12, 8],
    ],
    width: 0.9,
    depth: 1.8,
    support_type: 'trench-box',
    rated_pressure: null,
    restraint: 'unyielding',
    soil: sand,
    groundwater_depth: null,
    design_reference: 'TW-214 rev B (box 3.5 m × 2.4 m)',
    face: [-4, -0.45],
  },
  {
    prefix: 'PIT',
    name: 'Manhole pit',
    kind: 'pit',
    line: [
      [-4, -3],
      [4, -3],
      [4, 3],
      [-4, 3],
    ],
    width: null,
    depth: 4.5,
    support_type: 'sheet-piles',
    rated_pressure: null,
    restraint: 'unyielding',
    soil: sand,
    groundwater_depth: 2.2,
    design_reference: 'TW-230 rev C (one frame of walings at 1.5 m)',
    face: [0, -3],
  },
  {
    prefix: 'PIT',
    name: 'Valve chamber pit',
    kind: 'pit',
    line: [
      [-2.5, -2.5],
      [2.5, -2.5],
      [2.5, 2.5],
      [-2.5, 2.5],
    ],
    width: null,
    depth: 3,
    support_type: 'trench-box',
    rated_pressure: null,
    restraint: 'unyielding',
    soil: clay,
    groundwater_depth: null,
    design_reference: 'TW-236 rev A (manhole box)',
    face: [0, -2.5],
  },
  {
    prefix: 'TR',
    name: 'Cable duct trench',
    kind: 'trench',
    line: [
      [-10, 0],
      [10, 0],
    ],
    width: 0.6,
    depth: 1.2,
    support_type: 'battered',
    rated_pressure: null,
    restraint: 'yielding',
    soil: clay,
    groundwater_depth: null,
    design_reference: 'Sides battered at 1:1 (TW-240)',
    face: [0, -0.3],
  },
  {
    prefix: 'TR',
    name: 'Box culvert trench',
    kind: 'trench',
    line: [
      [-14, 0],
      [14, 0],
    ],
    width: 2,
    depth: 3.2,
    support_type: 'timbering',
    rated_pressure: null,
    restraint: 'unyielding',
    soil: clay,
    groundwater_depth: null,
    design_reference: 'TW-252 rev B (close timbering, struts at 1.2 m)',
    face: [-5, -1],
  },
];

/** Loads beside the south face: a machine (centre `back` m south of the face, tracks along it) or a stockpile. */
const loadTemplates = [
  { kind: 'plant' as const, id: 'excavator', machine: 'Excavator 21 t', back: 6.5 },
  { kind: 'plant' as const, id: 'carrier', machine: 'Tracked carrier 3 t, laden', back: 4 },
  { kind: 'plant' as const, id: 'roller', machine: 'Single-drum roller 7 t', back: 5 },
  { kind: 'stockpile' as const, id: 'stockpile', label: 'Pipe bedding stockpile', back: 4, unitWeight: 19, height: 1.2 },
];
const work = [
  'Excavator loading pipes into the trench from the south side',
  'Tracked carrier bringing shuttering beside the excavation',
  'Roller compacting the haul road beside the excavation',
  'Stockpile of pipe bedding beside the excavation',
];

const GRID_COLUMNS = 20;
const GRID_SPACING = 60;

/** How a permit on an excavation in this state and slot (0…4: past to future) stands; cycled by the excavation's index. */
const statusBySlot: Record<'open' | 'backfilled' | 'planned', string[][]> = {
  open: [
    ['handed_back', 'lapsed', 'handed_back', 'declined', 'withdrawn'],
    ['lapsed', 'handed_back', 'handed_back', 'handed_back'],
    ['live', 'live', 'live', 'suspended', 'live', 'submitted', 'returned'],
    ['approved', 'submitted', 'returned', 'draft', 'approved'],
    ['draft', 'submitted', 'withdrawn', 'approved', 'declined', 'draft'],
  ],
  backfilled: [['handed_back'], ['lapsed'], ['handed_back'], ['handed_back', 'lapsed'], ['handed_back']],
  planned: [['withdrawn'], ['declined'], ['submitted'], ['draft', 'submitted'], ['approved', 'draft']],
};

/** One step of a timeline: action, from, to, who (role), hours after the window start. */
type Step = [string, string, string, string, number];
const submit: Step = ['submit', 'draft', 'submitted', 'supervisor', -30];
const approve: Step = ['approve', 'submitted', 'approved', 'coordinator', -26];
const start: Step = ['start', 'approved', 'live', 'system', 0];
/** Each status's timeline after "create". */
const paths: Record<string, Step[]> = {
  draft: [],
  submitted: [submit],
  returned: [submit, ['return', 'submitted', 'returned', 'coordinator', -26]],
  declined: [submit, ['decline', 'submitted', 'declined', 'coordinator', -26]],
  approved: [submit, approve],
  live: [submit, approve, start],
  suspended: [submit, approve, start, ['suspend', 'live', 'suspended', 'coordinator', 1]],
  handed_back: [submit, approve, start, ['hand_back', 'live', 'handed_back', 'supervisor', 6]],
  lapsed: [submit, approve, start, ['lapse', 'live', 'lapsed', 'system', 8]],
  withdrawn: [['withdraw', 'draft', 'withdrawn', 'supervisor', -40]],
};
const comments: Record<string, string> = {
  return: 'Please add the method statement and where the machine turns.',
  decline: 'The support is not designed for this load this close. Keep it in the compound.',
  suspend: 'Water rising in the excavation: stop until the pump is back and it has been inspected.',
  hand_back: 'Done; plant back in the compound.',
};
const conditions = ['A banksman is present whenever the machine moves or slews inside the influence zone.'];

export interface LargeSeedReport {
  sites: number;
  excavations: number;
  permits: number;
  revisions: number;
  events: number;
  inspections: number;
  layoutsChecked: number;
  seconds: number;
}

/** Makes the data set in `db` (which must hold no people). Logs each step with `log`. */
export async function seedLarge(db: Db, size: LargeSeedSize, now: Date, log: (line: string) => void = () => {}): Promise<LargeSeedReport> {
  const t0 = Date.now();
  const step = (what: string) => log(`${what} (${((Date.now() - t0) / 1000).toFixed(1)} s)`);
  const hash = await bcrypt.hash(DEMO_PASSWORD, 10);
  // One invented organisation owns the whole data set, with the demo machines as its library.
  const org = await db
    .insertInto('organisations')
    .values({ name: 'Kestle Groundworks (large data set)' })
    .returning('id')
    .executeTakeFirstOrThrow();
  const organisation_id = org.id;
  await seedPlant(db, { organisationId: organisation_id });
  const plant = Object.fromEntries(
    (await db.selectFrom('plant_items').select(['id', 'name']).where('organisation_id', '=', organisation_id).execute()).map((p) => [
      p.name,
      p.id,
    ]),
  );
  await db
    .insertInto('users')
    .values({ organisation_id, email: largeAdminEmail, name: 'Rhea Kestle (administrator)', password_hash: hash, is_admin: true })
    .execute();

  // Sites and their people: one coordinator, two supervisors, two operators each.
  const siteRows = Array.from({ length: size.sites }, (_, i) => ({
    organisation_id,
    name: `${placeWords[i % 10]} ${workWords[Math.floor(i / 10) % 10]}${i >= 100 ? ` ${Math.floor(i / 100) + 1}` : ''}`,
    latitude: Number((51.2 + (i % 10) * 0.15).toFixed(5)),
    longitude: Number((-2.8 + (Math.floor(i / 10) % 10) * 0.2).toFixed(5)),
    timezone: 'Europe/London',
  }));
  const sites = await db.insertInto('sites').values(siteRows).returning(['id', 'latitude', 'longitude']).execute();
  const roles = [
    ['coordinator', 1],
    ['supervisor', 1],
    ['supervisor', 2],
    ['operator', 1],
    ['operator', 2],
  ] as const;
  const people = await db
    .insertInto('users')
    .values(
      sites.flatMap((_, s) =>
        roles.map(([role, n], k) => ({
          organisation_id,
          email: largeEmail(role, s + 1, n),
          name: personName(s * roles.length + k),
          password_hash: hash,
        })),
      ),
    )
    .returning(['id', 'email'])
    .execute();
  const idOf = new Map(people.map((p) => [p.email, p.id]));
  await db
    .insertInto('site_members')
    .values(
      sites.flatMap((site, s) =>
        roles.map(([role, n]) => ({
          site_id: site.id,
          user_id: idOf.get(largeEmail(role, s + 1, n))!,
          role,
          can_inspect: role !== 'operator',
        })),
      ),
    )
    .execute();
  await db
    .insertInto('site_shifts')
    .values(sites.map((s) => ({ site_id: s.id, name: 'Day shift', start_time: '07:00' })))
    .execute();
  step(`${sites.length} sites and ${people.length + 1} people`);

  // Excavations: a grid per site, 60 m apart, the templates in turn; 1 in 10 planned, 1 in 20 backfilled.
  const stateOf = (i: number): 'planned' | 'backfilled' | 'open' => (i % 10 === 0 ? 'planned' : i % 20 === 5 ? 'backfilled' : 'open');
  let excavationCount = 0;
  for (const [s, site] of sites.entries()) {
    const proj = projectionOf(site);
    const coordinator = idOf.get(largeEmail('coordinator', s + 1))!;
    const rows = [];
    for (let i = 0; i < size.excavationsPerSite; i++) {
      const t = templates[i % templates.length];
      const east = (i % GRID_COLUMNS) * GRID_SPACING;
      const north = Math.floor(i / GRID_COLUMNS) * GRID_SPACING;
      const points = t.line.map(([x, y]) => proj.toWgs84([east + x, north + y]) as XY);
      const geometry =
        t.kind === 'trench'
          ? ({ type: 'LineString', coordinates: points } as LineString)
          : ({ type: 'Polygon', coordinates: [[...points, points[0]]] } as Polygon);
      rows.push({
        site_id: site.id,
        reference: `${t.prefix}-${String(i + 1).padStart(3, '0')}`,
        name: `${t.name} ${Math.floor(i / templates.length) + 1}`,
        kind: t.kind,
        geometry: JSON.stringify(geometry),
        ...shapeColumns(shapesOf({ kind: t.kind, geometry, width: t.width, depth: t.depth }, site)),
        width: t.width,
        depth: t.depth,
        state: stateOf(i),
        support_type: t.support_type,
        design_surcharge: 10,
        rated_pressure: t.rated_pressure,
        restraint: t.restraint,
        soil: JSON.stringify(t.soil),
        groundwater_depth: t.groundwater_depth,
        design_reference: t.design_reference,
        notes: '',
        created_by: coordinator,
      });
    }
    for (let k = 0; k < rows.length; k += 500)
      await db
        .insertInto('excavations')
        .values(rows.slice(k, k + 500))
        .execute();
    excavationCount += rows.length;
  }
  step(`${excavationCount} excavations`);

  // What each permit is: site, number, excavation, slot, status, kind, layout, window. Built in
  // SQL from the excavations' order on their site; kept in a temporary table for the inserts below.
  const E = size.excavationsPerSite;
  const statusCase = (['open', 'backfilled', 'planned'] as const)
    .map((state) =>
      statusBySlot[state]
        .map(
          (list, slot) =>
            `when x.state = '${state}' and g.slot = ${slot} then (array[${list.map((v) => `'${v}'`).join(',')}])[1 + (x.idx % ${list.length})]`,
        )
        .join(' '),
    )
    .join(' ');
  await sql`drop table if exists large_plan`.execute(db);
  await sql`
    create temporary table large_plan as
    with x as (
      select e.id, e.site_id, e.state, e.reference, e.name, e.depth,
             (row_number() over (partition by e.site_id order by e.id) - 1)::int as idx
      from excavations e
    ), g as (select n, n % ${sql.lit(E)} as idx, n / ${sql.lit(E)} % 5 as slot from generate_series(0, ${sql.lit(size.permitsPerSite - 1)}) n)
    select x.site_id, g.n + 1 as seq, 'P-' || lpad((g.n + 1)::text, 5, '0') as number,
           x.id as excavation_id, x.idx, x.state, x.reference, x.name as excavation_name, x.depth, g.slot,
           (case ${sql.raw(statusCase)} end) as status,
           case when x.state = 'planned' then 'dig' else 'load' end as kind,
           x.idx % ${sql.lit(templates.length)} as template, (x.idx / ${sql.lit(templates.length)} + g.slot) % ${sql.lit(loadTemplates.length)} as load_template,
           ${now}::timestamptz + make_interval(days => (g.slot - 2) * 10) - interval '2 hours' - make_interval(hours => x.idx % 5) as window_start
    from x join g on g.idx = x.idx`.execute(db);
  await sql`alter table large_plan add column window_end timestamptz, add column supervisor int, add column coordinator int, add column operator int`.execute(
    db,
  );
  await sql`update large_plan set window_end = window_start + make_interval(hours => case when status in ('live','suspended') then 48 + (idx % 4) * 24 else 8 + idx % 3 * 2 end)`.execute(
    db,
  );
  await sql`
    update large_plan l set
      supervisor = (select m.user_id from site_members m where m.site_id = l.site_id and m.role = 'supervisor' order by m.user_id offset (l.seq % 2) limit 1),
      coordinator = (select m.user_id from site_members m where m.site_id = l.site_id and m.role = 'coordinator' limit 1),
      operator = (select m.user_id from site_members m where m.site_id = l.site_id and m.role = 'operator' order by m.user_id offset (l.seq % 2) limit 1)`.execute(
    db,
  );
  await sql`create index on large_plan (site_id, seq)`.execute(db);
  await sql`analyze large_plan`.execute(db);

  // The loads of each layout, per excavation (positions in degrees, from the site's projection).
  await sql`create temporary table large_loads (excavation_id int, load_template int, loads jsonb, primary key (excavation_id, load_template))`.execute(
    db,
  );
  const excavations = await db
    .selectFrom('excavations as e')
    .innerJoin('sites as s', 's.id', 'e.site_id')
    .select(['e.id', 'e.site_id', 'e.reference', 's.latitude', 's.longitude'])
    .where('e.state', '!=', 'planned')
    .orderBy('e.id')
    .execute();
  const firstOfSite = new Map<number, number>();
  for (const e of await db
    .selectFrom('excavations')
    .select(['site_id', (eb) => eb.fn.min('id').as('first')])
    .groupBy('site_id')
    .execute())
    firstOfSite.set(e.site_id, e.first);
  let batch: { excavation_id: number; load_template: number; loads: unknown[] }[] = [];
  for (const e of excavations) {
    // The excavations of a site were inserted in order, in one batch: its index is the id less its site's first's.
    const i = e.id - firstOfSite.get(e.site_id)!;
    const t = templates[i % templates.length];
    const east = (i % GRID_COLUMNS) * GRID_SPACING + t.face[0];
    const north = Math.floor(i / GRID_COLUMNS) * GRID_SPACING + t.face[1];
    const proj = projectionOf(e);
    const at = (x: number, y: number) => proj.toWgs84([east + x, north + y]) as XY;
    for (const [k, l] of loadTemplates.entries()) {
      const load =
        l.kind === 'plant'
          ? { id: l.id, kind: 'plant', label: l.machine, plantItemId: plant[l.machine], position: at(0, -l.back), rotation: 90 }
          : {
              id: l.id,
              kind: 'stockpile',
              label: l.label,
              outline: {
                type: 'Polygon',
                coordinates: [[at(-2, -l.back), at(2, -l.back), at(2, -l.back - 3), at(-2, -l.back - 3), at(-2, -l.back)]],
              },
              unitWeight: l.unitWeight,
              height: l.height,
            };
      batch.push({ excavation_id: e.id, load_template: k, loads: [load] });
    }
    if (batch.length >= 2000) {
      await insertLoads(db, batch);
      batch = [];
    }
  }
  await insertLoads(db, batch);
  step('permit plan and loads');

  // Permits, their first revision, operators and timelines: one statement per table and batch of sites.
  const siteIds = sites.map((s) => s.id);
  for (let k = 0; k < siteIds.length; k += 10) {
    const ids = siteIds.slice(k, k + 10);
    await sql`
      insert into permits (site_id, seq, number, kind, status, version, revision, requested_by, created_at, updated_at)
      select l.site_id, l.seq, l.number, l.kind, l.status, 1 + coalesce(array_length(${pathArray()}, 1), 0), 1, l.supervisor,
             l.window_start - interval '48 hours', l.window_start - interval '48 hours'
      from large_plan l where l.site_id = any(${ids})`.execute(db);
    await sql`
      insert into permit_revisions (permit_id, revision, description, window_start, window_end, excavation_ids, method, loads, dig,
                                    decision, created_by, created_at, updated_at)
      select p.id, 1,
             case when l.kind = 'dig' then 'Open ' || lower(l.excavation_name) else (${sql.val(work)}::text[])[1 + l.load_template] end,
             l.window_start, l.window_end, array[l.excavation_id], 'dispersion-45',
             coalesce(ll.loads, '[]'::jsonb),
             case when l.kind = 'dig' then jsonb_build_object(
               'depth', l.depth,
               'supportMethod', 'As designed for ' || l.reference || ' (see the register)',
               'servicesChecks', jsonb_build_object(
                 'drawings', jsonb_build_object('state', 'done', 'by', 'Site supervisor', 'at', to_char((l.window_start - interval '50 hours') at time zone 'UTC', 'YYYY-MM-DD"T"HH24:MI:SS.MS"Z"'), 'notes', 'Record drawings checked'),
                 'locatorScan', jsonb_build_object('state', 'done', 'by', 'Site supervisor', 'at', to_char((l.window_start - interval '49 hours') at time zone 'UTC', 'YYYY-MM-DD"T"HH24:MI:SS.MS"Z"'), 'notes', 'Nothing found'),
                 'trialHoles', jsonb_build_object('state', 'pending', 'by', '', 'at', null, 'notes', ''))) end,
             null, l.supervisor, l.window_start - interval '48 hours', l.window_start - interval '48 hours'
      from large_plan l join permits p on p.site_id = l.site_id and p.seq = l.seq
      left join large_loads ll on ll.excavation_id = l.excavation_id and ll.load_template = l.load_template and l.kind = 'load'
      where l.site_id = any(${ids})`.execute(db);
    // Decisions: on the revision and on the decision's timeline line.
    await sql`
      update permit_revisions r set decision = d.decision
      from (
        select p.id, jsonb_build_object(
          'action', a.action, 'by', jsonb_build_object('id', l.coordinator, 'name', u.name),
          'at', to_char((l.window_start - interval '26 hours') at time zone 'UTC', 'YYYY-MM-DD"T"HH24:MI:SS.MS"Z"'),
          'reason', case a.action when 'approve' then '' else ${comments.return} end,
          'standoff', null, 'conditions', case a.action when 'approve' then ${JSON.stringify(conditions)}::jsonb else '[]'::jsonb end,
          'signature', 'Signed by ' || u.name || ' with their password at ' || to_char((l.window_start - interval '26 hours') at time zone 'UTC', 'YYYY-MM-DD HH24:MI:SS') || ' UTC') as decision
        from large_plan l join permits p on p.site_id = l.site_id and p.seq = l.seq
        join users u on u.id = l.coordinator
        join (values ('returned','return'), ('declined','decline'), ('approved','approve'), ('live','approve'), ('suspended','approve'),
                     ('handed_back','approve'), ('lapsed','approve')) a(status, action) on a.status = l.status
        where l.site_id = any(${ids})) d
      where r.permit_id = d.id`.execute(db);
    await sql`update permit_revisions r set decision = jsonb_set(decision, '{reason}', to_jsonb(${comments.decline}::text))
      from permits p where p.id = r.permit_id and p.status = 'declined' and p.site_id = any(${ids})`.execute(db);
    await sql`
      insert into permit_operators (revision_id, user_id, briefed_at)
      select r.id, l.operator, case when l.status in ('live','suspended','handed_back','lapsed') then l.window_start - interval '30 minutes' end
      from large_plan l join permits p on p.site_id = l.site_id and p.seq = l.seq join permit_revisions r on r.permit_id = p.id
      where l.site_id = any(${ids}) and l.kind = 'load' and l.status not in ('withdrawn', 'declined')`.execute(db);
    await sql`
      insert into permit_events (permit_id, revision, at, actor_id, actor_name, action, from_status, to_status, comment, detail)
      select p.id, 1, e.at, e.actor, coalesce(u.name, 'Brink schedule'), e.action, e.from_status, e.to_status, e.comment, e.detail
      from large_plan l join permits p on p.site_id = l.site_id and p.seq = l.seq
      join permit_revisions r on r.permit_id = p.id
      cross join lateral (
        select l.window_start - interval '48 hours' as at, l.supervisor as actor, 'create' as action, null::text as from_status,
               'draft'::text as to_status, '' as comment, '{}'::jsonb as detail, 0 as ord
        union all
        select l.window_start + make_interval(hours => s.hours), case s.who when 'supervisor' then l.supervisor when 'coordinator' then l.coordinator end,
               s.action, s.from_status, s.to_status, coalesce(c.comment, ''),
               case when s.action in ('approve','return','decline') then jsonb_build_object('decision', r.decision) else '{}'::jsonb end, s.ord
        from ${pathValues()}
        left join ${commentValues()} on c.action = s.action
        where s.status = l.status
        union all
        select l.window_start - interval '30 minutes', l.operator, 'briefed', null, null, '', '{}'::jsonb, 2.5
        where l.kind = 'load' and l.status in ('live','suspended','handed_back','lapsed')
      ) e
      left join users u on u.id = e.actor
      where l.site_id = any(${ids})
      order by p.id, e.ord`.execute(db);
    step(`permits of sites ${k + 1}–${k + ids.length}`);
  }

  // The checks: each layout once through the server's check, then copied to its other permits.
  const layouts = await sql<{ template: number; load_template: number; id: number; number: string; excavation_id: number }>`
    select distinct on (l.template, l.load_template) l.template, l.load_template, p.id, p.number, l.excavation_id
    from large_plan l join permits p on p.site_id = l.site_id and p.seq = l.seq
    where l.kind = 'load' order by l.template, l.load_template, p.id`.execute(db);
  for (const lay of layouts.rows) {
    await checkStoredRevision(db, lay.id, now, { freeze: true });
    const ex = await db
      .selectFrom('excavations')
      .select(['reference', 'name'])
      .where('id', '=', lay.excavation_id)
      .executeTakeFirstOrThrow();
    const r = await db
      .selectFrom('permit_revisions')
      .select(['check_result', 'excavation_snapshot', 'plant_snapshot'])
      .where('permit_id', '=', lay.id)
      .executeTakeFirstOrThrow();
    const placeholders = (v: unknown) =>
      JSON.stringify(
        templateOf(v, {
          ids: { permitId: lay.id, excavationId: lay.excavation_id },
          strings: [
            [lay.number, '@@NUMBER@@'],
            [ex.reference, '@@REFERENCE@@'],
            [ex.name, '@@NAME@@'],
          ],
        }),
      );
    await sql`
      update permit_revisions r set
        check_result = ${fill('t.check_result')}::jsonb,
        excavation_snapshot = ${fill('t.excavation_snapshot')}::jsonb,
        plant_snapshot = case when p.status <> 'draft' then ${fill('t.plant_snapshot')}::jsonb end,
        checked_at = ${now}
      from (select ${placeholders(r.check_result)}::text as check_result, ${placeholders(r.excavation_snapshot)}::text as excavation_snapshot,
                   ${placeholders(r.plant_snapshot)}::text as plant_snapshot) t,
           permits p, large_plan l, excavations e
      where p.id = r.permit_id and l.site_id = p.site_id and l.seq = p.seq and e.id = l.excavation_id
        and l.kind = 'load' and l.template = ${lay.template} and l.load_template = ${lay.load_template} and p.id <> ${lay.id}`.execute(db);
    await db
      .updateTable('permit_revisions')
      .set({ plant_snapshot: null })
      .where('permit_id', '=', lay.id)
      .where(({ exists, selectFrom }) => exists(selectFrom('permits').select('id').where('id', '=', lay.id).where('status', '=', 'draft')))
      .execute();
  }
  step(`${layouts.rows.length} layouts checked and their checks copied`);

  // Inspections: the open excavations of each site inspected in turn at the start of each day shift
  // (07:00 on the site's clock), oldest first, up to today's (or the last one, before 07:00), which
  // only the first ones have had: the others are due or overdue. Now and then one found not safe,
  // never in the last two shifts (the next shift's safe inspection clears it).
  const openPerSite = Array.from({ length: E }, (_, i) => i).filter((i) => stateOf(i) === 'open').length;
  const lastDay = Math.floor((size.inspectionsPerSite - 1) / openPerSite);
  await sql`
    insert into inspections (excavation_id, site_id, inspector_id, inspected_at, recorded_at, shift_name, shift_start, reason, checklist, outcome, remarks)
    select o.id, o.site_id, o.inspector, least(sh.start + make_interval(mins => 10 + o.k % 40), ${now}::timestamptz - interval '1 minute'),
           least(sh.start + make_interval(mins => 12 + o.k % 40), ${now}::timestamptz), 'Day shift', sh.start, 'shift-start',
           case when sh.bad then ${checklistJson(true)}::jsonb else ${checklistJson(false)}::jsonb end,
           case when sh.bad then 'not-safe' else 'safe' end,
           case when sh.bad then 'Pump out and check the faces before anyone goes in.' else '' end
    from (
      select e.id, e.site_id, (row_number() over (partition by e.site_id order by e.id) - 1)::int as k,
             (select m.user_id from site_members m where m.site_id = e.site_id and m.role = 'supervisor' order by m.user_id limit 1) as inspector
      from excavations e where e.state = 'open'
    ) o
    cross join lateral generate_series(o.k, ${sql.lit(size.inspectionsPerSite - 1)}, ${sql.lit(openPerSite)}) i
    cross join lateral (
      select (date_trunc('day', ${now}::timestamptz at time zone 'Europe/London') + interval '7 hours'
               - case when ${now}::timestamptz at time zone 'Europe/London' < date_trunc('day', ${now}::timestamptz at time zone 'Europe/London') + interval '7 hours'
                      then interval '1 day' else interval '0 days' end
               - make_interval(days => ${sql.lit(lastDay)} - i / ${sql.lit(openPerSite)})) at time zone 'Europe/London' as start,
             i / ${sql.lit(openPerSite)} <= ${sql.lit(lastDay - 2)} and o.k % 37 = 0 and (i / ${sql.lit(openPerSite)}) % 3 = 0 as bad
    ) sh`.execute(db);
  step('inspections');
  await sql`drop table large_plan`.execute(db);
  await sql`drop table large_loads`.execute(db);
  await sql`analyze`.execute(db);

  const count = async (table: 'permits' | 'permit_revisions' | 'permit_events' | 'inspections' | 'excavations') =>
    Number(
      (
        await db
          .selectFrom(table)
          .select((eb) => eb.fn.countAll().as('n'))
          .executeTakeFirstOrThrow()
      ).n,
    );
  return {
    sites: sites.length,
    excavations: await count('excavations'),
    permits: await count('permits'),
    revisions: await count('permit_revisions'),
    events: await count('permit_events'),
    inspections: await count('inspections'),
    layoutsChecked: layouts.rows.length,
    seconds: (Date.now() - t0) / 1000,
  };
}

async function insertLoads(db: Db, rows: { excavation_id: number; load_template: number; loads: unknown[] }[]): Promise<void> {
  if (!rows.length) return;
  await sql`insert into large_loads (excavation_id, load_template, loads)
    select * from jsonb_to_recordset(${JSON.stringify(rows)}::jsonb) as t(excavation_id int, load_template int, loads jsonb)`.execute(db);
}

/** The timelines of `paths` as a VALUES list: status, action, from, to, who, hours after the window start, order. */
function pathValues() {
  const rows = Object.entries(paths).flatMap(([status, steps]) =>
    steps.map(([action, from, to, who, hours], i) => sql`(${status}, ${action}, ${from}, ${to}, ${who}, ${hours}::int, ${i + 1}::int)`),
  );
  return sql`(values ${sql.join(rows)}) as s(status, action, from_status, to_status, who, hours, ord)`;
}

/** The number of steps after "create" for each status, as an SQL expression on `l.status`. */
function pathArray() {
  return sql`(case l.status ${sql.join(
    Object.entries(paths).map(([status, steps]) => sql`when ${status} then array_fill(0, array[${steps.length}::int])`),
    sql` `,
  )} end)`;
}

function commentValues() {
  return sql`(values ${sql.join(Object.entries(comments).map(([a, c]) => sql`(${a}, ${c})`))}) as c(action, comment)`;
}

/** The shift-start checklist: every item passed (atmosphere not applicable), or water and faces failed. */
function checklistJson(bad: boolean): string {
  const keys = ['support', 'faces', 'water', 'edges', 'access', 'barriers', 'loads', 'atmosphere'];
  const all = Object.fromEntries(keys.map((k) => [k, { answer: k === 'atmosphere' ? 'na' : 'pass', note: '' }]));
  if (bad) {
    all.water = { answer: 'fail', note: 'Standing water at formation after rain; the pump had tripped' };
    all.faces = { answer: 'fail', note: 'Soft ground slumping below the bottom support' };
  }
  return JSON.stringify(all);
}

/**
 * A stored check (or snapshot) of one permit as a template for the others of its layout: its permit
 * and excavation ids and its strings naming them become placeholders, filled in by `fill`.
 */
function templateOf(v: unknown, p: { ids: { permitId: number; excavationId: number }; strings: [string, string][] }): unknown {
  const walk = (x: unknown, key: string | null, parent: string | null): unknown => {
    if (typeof x === 'number') {
      if (x === p.ids.permitId && key === 'permitId') return '@@PERMIT_ID@@';
      if (x === p.ids.excavationId && (key === 'excavationId' || (key === 'id' && parent === 'excavations'))) return '@@EXCAVATION_ID@@';
      return x;
    }
    if (typeof x === 'string') {
      return p.strings.reduce((s, [from, to]) => s.split(from).join(to), x);
    }
    if (Array.isArray(x)) return x.map((y) => walk(y, null, key));
    if (x && typeof x === 'object') return Object.fromEntries(Object.entries(x).map(([k, y]) => [k, walk(y, k, parent)]));
    return x;
  };
  return v === null ? null : walk(v, null, null);
}

/** The SQL that fills a template's placeholders for the permit `p` (`e`: its excavation; the name escaped for JSON). */
function fill(column: string) {
  return sql`replace(replace(replace(replace(replace(${sql.raw(column)},
    '"@@PERMIT_ID@@"', p.id::text), '"@@EXCAVATION_ID@@"', e.id::text), '@@NUMBER@@', p.number),
    '@@REFERENCE@@', e.reference), '@@NAME@@', replace(replace(e.name, '\\', '\\\\'), '"', '\\"'))`;
}
