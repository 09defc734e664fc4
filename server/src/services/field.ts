import type { LineString, Polygon } from 'geojson';
import type { Db } from '@db/database';
import { exclusionZone, localProjection, prepareExcavation, type LocalProjection, type PreparedOutline, type XY } from '@shared/geometry';
import { checkExcavationOf, footprintsOf } from '@shared/permits/check';
import { exclusionDistance } from '@shared/permits/exclusion';
import { supportLabels } from '@shared/schemas/excavations';
import type { FieldExcavation, FieldFootprint, FieldPermit } from '@shared/schemas/field';
import { editableStatuses, type PermitStatus } from '@shared/schemas/permits';
import { concernsOf } from './concerns';
import { loadExcavations } from './excavations';
import { plantFor } from './permits/check';
import { CAUTION } from '@shared/caution';
import { loadRevision, loadSummary, withCurrentRevision } from './permits/read';

/** Permits an operator works under (the briefing is due from Approved on). */
export const fieldStatuses: readonly PermitStatus[] = ['approved', 'live', 'suspended'];
/** Closed permits stay in the operator's list this long after their window, so they see that work has stopped. */
export const CLOSED_SHOWN_FOR_MS = 12 * 3600_000;

/** Ids of the permits whose current revision names `userId` as an operator, on sites where they are still a member. */
export async function permitsNaming(db: Db, userId: number, now: Date): Promise<number[]> {
  const rows = await withCurrentRevision(db)
    .innerJoin('permit_operators as o', (j) => j.onRef('o.revision_id', '=', 'r.id').on('o.user_id', '=', userId))
    .innerJoin('site_members as m', (j) => j.onRef('m.site_id', '=', 'p.site_id').on('m.user_id', '=', userId))
    .select(['p.id'])
    .where((eb) =>
      eb.or([
        eb('p.status', 'in', fieldStatuses),
        eb.and([eb('p.status', 'in', ['handed_back', 'lapsed']), eb('r.window_end', '>', new Date(now.getTime() - CLOSED_SHOWN_FOR_MS))]),
      ]),
    )
    .orderBy('r.window_start')
    .orderBy('p.id')
    .execute();
  return rows.map((r) => r.id);
}

function closedRing(ring: XY[], proj: LocalProjection): Polygon {
  const out = ring.map((p) => proj.toWgs84(p));
  return { type: 'Polygon', coordinates: [[...out, out[0]]] };
}

/** Everything the phone shows of one permit, for one reader; null when there is no such permit. */
export async function loadFieldPermit(db: Db, permitId: number, viewerId: number): Promise<FieldPermit | null> {
  const summary = await loadSummary(db, permitId);
  if (!summary) return null;
  const rev = (await loadRevision(db, permitId, summary.revision))!;
  const site = await db
    .selectFrom('sites')
    .select(['latitude', 'longitude', 'minimum_clearance'])
    .where('id', '=', summary.siteId)
    .executeTakeFirstOrThrow();
  const proj = localProjection([site.longitude, site.latitude]);
  // The register's excavations (outline and influence zone as the site map draws them).
  const rows = await loadExcavations(db, summary.siteId, rev.excavationIds);

  const prepared: PreparedOutline[] = [];
  const excavations: FieldExcavation[] = rows.flatMap((r) => {
    if (!r.outline || !r.influenceZone) return [];
    const { shape } = checkExcavationOf(r);
    const outline = prepareExcavation(shape, proj);
    prepared.push(outline);
    const exclusion = exclusionDistance(rev, r.id, site.minimum_clearance, r.depth);
    return [
      {
        id: r.id,
        reference: r.reference,
        name: r.name,
        kind: r.kind,
        state: r.state,
        depth: r.depth,
        supportLabel: supportLabels[r.supportType],
        shape,
        outline: r.outline,
        influenceZone: r.influenceZone,
        exclusionZone: exclusion === null ? null : exclusionZone(outline, exclusion.distance, proj),
        standoff: exclusion?.distance ?? null,
        standoffBasis: exclusion?.basis ?? null,
      },
    ];
  });

  // The machines the permit was approved with (frozen at review), not the library as it is now.
  const plant = await plantFor(db, rev.loads, editableStatuses.includes(summary.status) ? null : rev.plantSnapshot);
  const footprints: FieldFootprint[] = [];
  const centres: XY[] = [];
  for (const load of rev.loads) {
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
  const me = rev.operators.find((o) => o.id === viewerId);

  return {
    id: summary.id,
    number: summary.number,
    siteId: summary.siteId,
    siteName: summary.siteName,
    kind: summary.kind,
    status: summary.status,
    statusLabel: summary.statusLabel,
    version: summary.version,
    revision: summary.revision,
    description: summary.description,
    windowStart: summary.windowStart,
    windowEnd: summary.windowEnd,
    origin: { latitude: site.latitude, longitude: site.longitude },
    centre: { latitude: lat, longitude: lon },
    standoff: standoffs.length ? Math.max(...standoffs) : null,
    minimumClearance: site.minimum_clearance,
    conditions: rev.decision?.action === 'approve' ? rev.decision.conditions : [],
    decidedBy: rev.decision ? { name: rev.decision.by.name, at: rev.decision.at } : null,
    operators: rev.operators.map((o) => ({ id: o.id, name: o.name, briefedAt: o.briefedAt })),
    named: Boolean(me),
    myBriefedAt: me?.briefedAt ?? null,
    briefingDue: Boolean(me && !me.briefedAt && fieldStatuses.includes(summary.status)),
    excavations,
    footprints,
    concerns: await concernsOf(db, permitId),
    caution: CAUTION,
  };
}
