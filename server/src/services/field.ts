import { sql } from 'kysely';
import { jsonArrayFrom } from 'kysely/helpers/postgres';
import type { LineString, Polygon } from 'geojson';
import type { Db } from '@db/database';
import { CAUTION } from '@shared/caution';
import {
  exclusionZone,
  localProjection,
  prepareExcavation,
  SITE_TOLERANCE,
  type LocalProjection,
  type PreparedOutline,
  type XY,
} from '@shared/geometry';
import { excavationShapeOf, footprintsOf } from '@shared/permits/check';
import { exclusionDistance } from '@shared/permits/exclusion';
import { storedGeometry, storedOutline, storedZone, supportLabels } from '@shared/schemas/excavations';
import type { FieldExcavation, FieldFootprint, FieldPermit } from '@shared/schemas/field';
import {
  editableStatuses,
  statusLabels,
  storedCheckStandoffs,
  storedDecision,
  storedLoads,
  storedPlantSnapshot,
  type CheckStandoffs,
  type PermitStatus,
} from '@shared/schemas/permits';
import type { Stored } from '@shared/schemas/stored';
import { concernOut, concernQuery } from './concerns';
import { machinesOf, plantOf } from './permits/check';
import { withCurrentRevision } from './permits/read';

const iso = (d: Date | string) => new Date(d).toISOString();

/** Permits an operator works under (the briefing is due from Approved on). */
const fieldStatuses: readonly PermitStatus[] = ['approved', 'live', 'suspended'];
/** Closed permits stay in the operator's list this long after their window, so they see that work has stopped. */
const CLOSED_SHOWN_FOR_MS = 12 * 3600_000;

/**
 * Everything the phone shows of permits, in one statement (one round trip, however many permits):
 * each permit with its current revision, its site, its operators, its named excavations (stored
 * outline and influence zone), the library's machines its loads name, its concerns, and of the
 * stored check only the standoffs.
 */
function fieldQuery(db: Db) {
  return withCurrentRevision(db)
    .innerJoin('sites as s', 's.id', 'p.site_id')
    .select((eb) => [
      'p.id',
      'p.number',
      'p.site_id',
      's.name as site_name',
      's.latitude',
      's.longitude',
      's.minimum_clearance',
      'p.kind',
      'p.status',
      'p.version',
      'p.revision',
      'r.description',
      'r.window_start',
      'r.window_end',
      'r.loads',
      'r.decision',
      'r.plant_snapshot',
      sql<Stored<CheckStandoffs> | null>`case when r.check_result is null then null else jsonb_build_object(
        'computedStandoff', r.check_result->'computedStandoff',
        'excavations', coalesce((select jsonb_agg(jsonb_build_object('excavationId', x->'excavationId', 'standoff', x->'standoff'))
          from jsonb_array_elements(r.check_result->'excavations') x), '[]'::jsonb)) end`.as('check_standoffs'),
      jsonArrayFrom(
        eb
          .selectFrom('permit_operators as o')
          .innerJoin('users as u', 'u.id', 'o.user_id')
          .select(['u.id', 'u.name', 'o.briefed_at'])
          .whereRef('o.revision_id', '=', 'r.id')
          .orderBy('u.name'),
      ).as('operators'),
      jsonArrayFrom(
        eb
          .selectFrom('excavations as e')
          .select(['e.id', 'e.reference', 'e.name', 'e.kind', 'e.state', 'e.depth', 'e.support_type', 'e.geometry', 'e.width', 'e.outline'])
          .select('e.influence_zone')
          .whereRef('e.site_id', '=', 'p.site_id')
          .where(sql<boolean>`e.id = any(r.excavation_ids)`)
          .orderBy('e.reference'),
      ).as('excavations'),
      jsonArrayFrom(
        eb
          .selectFrom('plant_items as m')
          .select(['m.id', 'm.name', 'm.operating_mass', 'm.design_factor', 'm.elements'])
          .where(sql<boolean>`m.id in (select (l->>'plantItemId')::int from jsonb_array_elements(r.loads) l where l->>'kind' = 'plant')`),
      ).as('plant'),
      jsonArrayFrom(
        concernQuery(db)
          .where(sql<boolean>`c.permit_id = p.id`)
          .orderBy('c.id'),
      ).as('concerns'),
    ]);
}
type FieldRow = Awaited<ReturnType<ReturnType<typeof fieldQuery>['execute']>>[number];

/** The permits whose current revision names `userId` as an operator, on sites where they are still a member, for them. */
export async function loadMyFieldPermits(db: Db, userId: number, now: Date): Promise<FieldPermit[]> {
  const rows = await fieldQuery(db)
    .innerJoin('permit_operators as mine', (j) => j.onRef('mine.revision_id', '=', 'r.id').on('mine.user_id', '=', userId))
    .innerJoin('site_members as sm', (j) => j.onRef('sm.site_id', '=', 'p.site_id').on('sm.user_id', '=', userId))
    .where((eb) =>
      eb.or([
        eb('p.status', 'in', fieldStatuses),
        eb.and([eb('p.status', 'in', ['handed_back', 'lapsed']), eb('r.window_end', '>', new Date(now.getTime() - CLOSED_SHOWN_FOR_MS))]),
      ]),
    )
    .orderBy('r.window_start')
    .orderBy('p.id')
    .execute();
  return rows.map((r) => fieldPermitOf(r, userId));
}

/** Everything the phone shows of one permit, for one reader; null when there is no such permit. */
export async function loadFieldPermit(db: Db, permitId: number, viewerId: number): Promise<FieldPermit | null> {
  const row = await fieldQuery(db).where('p.id', '=', permitId).executeTakeFirst();
  return row ? fieldPermitOf(row, viewerId) : null;
}

function closedRing(ring: XY[], proj: LocalProjection): Polygon {
  const out = ring.map((p) => proj.toWgs84(p));
  return { type: 'Polygon', coordinates: [[...out, out[0]]] };
}

/** One row of fieldQuery as the phone reads it. */
function fieldPermitOf(row: FieldRow, viewerId: number): FieldPermit {
  const proj = localProjection([row.longitude, row.latitude]);
  const loads = storedLoads(row.loads);
  const decision = storedDecision(row.decision);
  const rev = { decision, check: storedCheckStandoffs(row.check_standoffs) };

  const prepared: PreparedOutline[] = [];
  const excavations: FieldExcavation[] = row.excavations.flatMap((r) => {
    // The register's outline and influence zone, as the site map draws them (stored when written).
    const outline = storedOutline(r.outline);
    const influence = storedZone(r.influence_zone);
    if (!outline || !influence) return [];
    const shape = excavationShapeOf({ ...r, geometry: storedGeometry(r.geometry) });
    const ring = prepareExcavation(shape, proj);
    prepared.push(ring);
    const exclusion = exclusionDistance(rev, r.id, row.minimum_clearance, r.depth);
    return [
      {
        id: r.id,
        reference: r.reference,
        name: r.name,
        kind: r.kind,
        state: r.state,
        depth: r.depth,
        supportLabel: supportLabels[r.support_type],
        shape,
        outline,
        influenceZone: influence,
        // Drawn to the site's tolerance, never inside the zone (where I stand is measured from `shape` and `standoff`).
        exclusionZone: exclusion === null ? null : exclusionZone(ring, exclusion.distance, proj, SITE_TOLERANCE),
        standoff: exclusion?.distance ?? null,
        standoffBasis: exclusion?.basis ?? null,
      },
    ];
  });

  // The machines the permit was approved with (frozen at review), not the library as it is now;
  // the library's own for a draft, or for a machine a snapshot lacks.
  const library = plantOf(row.plant);
  const snapshot = editableStatuses.includes(row.status) ? null : storedPlantSnapshot(row.plant_snapshot);
  const plant = snapshot ? new Map([...library, ...machinesOf(snapshot)]) : library;
  const footprints: FieldFootprint[] = [];
  const centres: XY[] = [];
  for (const load of loads) {
    for (const f of footprintsOf(load, plant, proj)) {
      const geometry: Polygon | LineString =
        f.kind === 'line' ? { type: 'LineString', coordinates: f.local.map((p) => proj.toWgs84(p)) } : closedRing(f.local, proj);
      footprints.push({ label: f.element ? `${f.label}: ${f.element}` : f.label, geometry });
      centres.push(...f.local);
    }
  }
  if (!centres.length) for (const o of prepared) centres.push(...o.ring);
  const mid: XY = centres.length
    ? [centres.reduce((s, p) => s + p[0], 0) / centres.length, centres.reduce((s, p) => s + p[1], 0) / centres.length]
    : [0, 0];
  const [lon, lat] = proj.toWgs84(mid);
  const standoffs = excavations.flatMap((e) => (e.standoff === null ? [] : [e.standoff]));
  const operators = row.operators.map((o) => ({ id: o.id, name: o.name, briefedAt: o.briefed_at ? iso(o.briefed_at) : null }));
  const me = operators.find((o) => o.id === viewerId);

  return {
    id: row.id,
    number: row.number,
    siteId: row.site_id,
    siteName: row.site_name,
    kind: row.kind,
    status: row.status,
    statusLabel: statusLabels[row.status],
    version: row.version,
    revision: row.revision,
    description: row.description,
    windowStart: iso(row.window_start),
    windowEnd: iso(row.window_end),
    origin: { latitude: row.latitude, longitude: row.longitude },
    centre: { latitude: lat, longitude: lon },
    standoff: standoffs.length ? Math.max(...standoffs) : null,
    minimumClearance: row.minimum_clearance,
    conditions: decision?.action === 'approve' ? decision.conditions : [],
    decidedBy: decision ? { name: decision.by.name, at: decision.at } : null,
    operators,
    named: Boolean(me),
    myBriefedAt: me?.briefedAt ?? null,
    briefingDue: Boolean(me && !me.briefedAt && fieldStatuses.includes(row.status)),
    excavations,
    footprints,
    concerns: row.concerns.map(concernOut),
    caution: CAUTION,
  };
}
