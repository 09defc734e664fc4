/**
 * The excavation register on the server: rows ↔ API objects (with the ground outline and the
 * influence zone from the shared plan geometry), the checks that need the site (every point within
 * SITE_RADIUS of the origin, an outline the geometry can form), and GeoJSON out and in.
 */
import { createHash } from 'node:crypto';
import { sql, type Selectable } from 'kysely';
import { z } from 'zod';
import type { Feature, FeatureCollection } from 'geojson';
import {
  codeOfLabel,
  excavationAnswer,
  excavationInputSchema,
  kindLabels,
  SITE_RADIUS,
  stateLabels,
  supportLabels,
  type Excavation,
  type ExcavationInput,
  type ExcavationValues,
  type ImportReport,
  MAX_IMPORT_POINTS,
  pointCount,
  storedGeometry,
  storedOutline,
  storedSoil,
  storedZone,
} from '@shared/schemas/excavations';
import { GeometryError, SITE_TOLERANCE, type LocalProjection } from '@shared/geometry';
import { outlineOf, shapeColumns, type SiteOrigin } from '@shared/geometry/shapes';
import { GeometryTimeout, type GeometryPool } from './geometry/pool';
import type { Db, ExcavationsTable } from '@db/database';
import { badRequest, JsonText, zodFields } from '../http';
import { decodeCursor, pageOf } from './cursor';

type Row = Selectable<ExcavationsTable>;
export { projectionOf } from '@shared/geometry/shapes';

/**
 * Problems that need the site: a point farther than SITE_RADIUS from the origin, or a geometry that
 * forms no outline (a trench bent back on itself, a pit of no area). Field → reason; empty when fine.
 * Only the outline is formed here (milliseconds); the zone is drawn in a worker (storedShapes).
 */
export function placementProblems(
  v: Pick<ExcavationValues, 'kind' | 'geometry' | 'width' | 'depth'>,
  proj: LocalProjection,
): Record<string, string> {
  const points = v.geometry.type === 'LineString' ? v.geometry.coordinates : v.geometry.coordinates.flat();
  let farthest = 0;
  for (const p of points) {
    const [x, y] = proj.toLocal(p);
    farthest = Math.max(farthest, Math.hypot(x, y));
  }
  if (farthest > SITE_RADIUS) {
    const km = farthest >= 10_000 ? (farthest / 1000).toFixed(0) : (farthest / 1000).toFixed(1);
    return { geometry: `must lie within ${SITE_RADIUS / 1000} km of the site origin (a point is ${km} km from it)` };
  }
  try {
    outlineOf(v, proj);
  } catch (e) {
    if (e instanceof GeometryError) return { geometry: e.message };
    throw e;
  }
  return {};
}

/**
 * The outline and influence zone columns of validated excavations, drawn in the geometry workers
 * (off the request thread). A drawing that runs past the pool's time limit is refused as 400 on
 * `geometry` (naming the excavation's reference).
 */
export async function storedShapes(
  pool: GeometryPool,
  list: ExcavationValues[],
  site: SiteOrigin,
): Promise<ReturnType<typeof shapeColumns>[]> {
  const out = await Promise.all(
    list.map((v) =>
      pool
        .shapes(
          { kind: v.kind, geometry: v.geometry, width: v.width, depth: v.depth },
          { latitude: site.latitude, longitude: site.longitude },
        )
        .catch((e: unknown) => {
          if (e instanceof GeometryTimeout)
            throw badRequest(`${v.reference}: the outline is too intricate to draw (${e.message}); simplify it.`, {
              geometry: `${v.reference} is too intricate to draw; simplify it`,
            });
          throw e;
        }),
    ),
  );
  return out.map(shapeColumns);
}

/** The row's values as an input object (what a PATCH merges into, what an export writes). */
export function rowValues(r: Row): ExcavationValues {
  return {
    reference: r.reference,
    name: r.name,
    kind: r.kind,
    geometry: storedGeometry(r.geometry),
    width: r.width,
    depth: r.depth,
    state: r.state,
    supportType: r.support_type,
    designSurcharge: r.design_surcharge,
    ratedPressure: r.rated_pressure,
    restraint: r.restraint,
    pressureState: r.pressure_state,
    wallFriction: r.wall_friction,
    soil: storedSoil(r.soil),
    groundwaterDepth: r.groundwater_depth,
    designReference: r.design_reference,
    notes: r.notes,
  };
}

/** Columns of a validated excavation. */
export function columnsOf(v: ExcavationValues) {
  return {
    reference: v.reference,
    name: v.name,
    kind: v.kind,
    geometry: JSON.stringify(v.geometry),
    width: v.kind === 'trench' ? v.width : null,
    depth: v.depth,
    state: v.state,
    support_type: v.supportType,
    design_surcharge: v.designSurcharge,
    rated_pressure: v.ratedPressure,
    restraint: v.restraint,
    pressure_state: v.pressureState,
    wall_friction: v.wallFriction,
    soil: JSON.stringify(v.soil),
    groundwater_depth: v.groundwaterDepth,
    design_reference: v.designReference,
    notes: v.notes,
  };
}

function excavationOut(r: Row, drawing: Excavation['drawing']): Excavation {
  const values = rowValues(r);
  // Drawn when written (never here); null when no outline forms.
  const shapes = {
    outline: storedOutline(r.outline),
    influenceZone: storedZone(r.influence_zone),
  };
  return {
    id: r.id,
    siteId: r.site_id,
    ...values,
    version: r.version,
    drawing,
    ...shapes,
    createdAt: new Date(r.created_at).toISOString(),
    updatedAt: new Date(r.updated_at).toISOString(),
  };
}

/** Excavations with their drawing's name and size. */
function withDrawing(db: Db) {
  return db
    .selectFrom('excavations')
    .leftJoin('uploads', 'uploads.id', 'excavations.drawing_upload_id')
    .selectAll('excavations')
    .select(['uploads.original_name as drawing_name', 'uploads.size as drawing_size']);
}
type DrawingRow = Row & { drawing_name: string | null; drawing_size: number | null };

/** A site's excavations with their drawing's name and size, by reference. */
function siteExcavations(db: Db, siteId: number) {
  return withDrawing(db).where('excavations.site_id', '=', siteId).orderBy('excavations.reference');
}

/**
 * The excavations of a site (all, or those with the given ids), ordered by reference, each with the
 * support and soil fields named as in the calculation request, its ground outline and influence
 * zone. Ids of other sites are left out.
 */
export async function loadExcavations(db: Db, siteId: number, ids?: number[]): Promise<Excavation[]> {
  if (ids && ids.length === 0) return [];
  let q = siteExcavations(db, siteId);
  if (ids) q = q.where('excavations.id', 'in', ids);
  return (await q.execute()).map(rowOut);
}

function rowOut(r: DrawingRow): Excavation {
  return excavationOut(
    r,
    r.drawing_upload_id ? { id: r.drawing_upload_id, name: r.drawing_name ?? 'drawing.pdf', size: r.drawing_size ?? 0 } : null,
  );
}

/**
 * The format of the stored answers (excavations.answer, migration 0015): a digest of the answer's
 * schema, so that a Brink whose answer has other fields or types does not use answers an older one
 * stored. A change of what a field holds with the same schema (units, rounding) must change
 * ANSWER_EDITION.
 */
const ANSWER_EDITION = 1;
const ANSWER_FORMAT = `${ANSWER_EDITION}.${createHash('sha256')
  .update(JSON.stringify(z.toJSONSchema(excavationAnswer, { unrepresentable: 'any' })))
  .digest('hex')
  .slice(0, 16)}`;

/** Writes the answers of these rows (read in the same transaction as their change), each at its version. */
async function storeAnswersOf(db: Db, rows: { row: DrawingRow; answer: string }[]): Promise<void> {
  if (rows.length === 0) return;
  const values = rows.map(
    ({ row, answer }) => sql`(${row.id}::int, ${row.version}::int, ${answer}::text, ${`${ANSWER_FORMAT}:${row.version}`}::text)`,
  );
  await sql`update excavations e set answer = v.answer, answer_key = v.key
    from (values ${sql.join(values)}) as v(id, version, answer, key)
    where e.id = v.id and e.version = v.version`.execute(db);
}

/**
 * Stores the list answer of these excavations as they now are: every write of an excavation calls
 * it in its transaction, after the row is written. (A row without a current answer is still
 * answered right, from its columns, and its answer written then: loadExcavationPage.)
 */
export async function storeAnswers(db: Db, ids: number[]): Promise<void> {
  if (ids.length === 0) return;
  const rows = await withDrawing(db).where('excavations.id', 'in', ids).execute();
  await storeAnswersOf(
    db,
    rows.map((row) => ({ row, answer: JSON.stringify(rowOut(row)) })),
  );
}

/**
 * What a site's excavations are now, in one short value: a digest of each row's id, row version
 * (`xmin`, new with every write of the row, whatever wrote it) and stored answer's key, in reference
 * order. Any insert, change, move or removal of an excavation of the site changes it. With the count,
 * so that a page of `limit` rows is known to hold them all.
 */
const siteStateOf = (siteId: number) => sql<string>`(select count(*) || ':' || encode(sha256(convert_to(coalesce(string_agg(
    id || ':' || xmin || ':' || coalesce(answer_key, '-'), ',' order by reference), ''), 'UTF8')), 'hex')
  from excavations where site_id = ${siteId})`;

/** A whole site's list answer as it was sent, with the state it was read at (`siteStateOf`) and its gzip once asked for. */
interface SiteAnswer {
  state: string;
  rows: number;
  answer: JsonText;
}
/** The whole-site answers of one database's sites, most recently used last; bounded by their bytes. */
const siteAnswers = new WeakMap<Db, Map<number, SiteAnswer>>();
const SITE_ANSWERS_BYTES = 48 * 1024 * 1024;
/** How often a whole-site answer was reused (tests show that the reuse happens, and that it is never stale). */
export const siteAnswerReuse = { count: 0 };

function keepSiteAnswer(db: Db, siteId: number, entry: SiteAnswer): void {
  let kept = siteAnswers.get(db);
  if (!kept) siteAnswers.set(db, (kept = new Map()));
  kept.delete(siteId);
  kept.set(siteId, entry);
  // Text counted at two bytes a character; its gzip or brotli, once made, is a fraction of that.
  let bytes = 0;
  for (const e of kept.values()) bytes += e.answer.text.length * 2;
  for (const [id, e] of kept) {
    if (bytes <= SITE_ANSWERS_BYTES || e === entry) break;
    kept.delete(id);
    bytes -= e.answer.text.length * 2;
  }
}

/**
 * A page of a site's excavations by reference (the map and the register follow `next`), as JSON
 * text: the stored answers of the rows, joined. A row whose answer is missing or stale (its key is
 * not this format at its version) is read from its columns and checked as any read is (rowOut),
 * and its answer is stored for the next read.
 *
 * A first page that holds the whole site is kept (per database, in this process) with the site's
 * state read in the same statement (`siteStateOf`), and sent again, with its gzip, while a fresh
 * read of that state (one short query) finds it unchanged; the caller has checked access first.
 * Readers who come while such a read is under way wait for it and take its answer when they found
 * the site in the state it read (many people opening one site at a shift's start: one read).
 */
export async function loadExcavationPage(db: Db, siteId: number, q: { limit: number; cursor?: string }): Promise<JsonText> {
  if (q.cursor) return (await readExcavationPage(db, siteId, q)).answer;
  let reads = siteReads.get(db);
  if (!reads) siteReads.set(db, (reads = new Map()));
  const under = reads.get(siteId);
  if (under) {
    // The site as it is now, and the answer of the read under way: that answer is this read's when
    // it is of this same state.
    const [state, whole] = await Promise.all([siteStateNow(db, siteId), under.catch(() => null)]);
    if (whole && whole.state === state && whole.rows <= q.limit) {
      siteAnswerReuse.count += 1;
      return whole.answer;
    }
  }
  const read = (async () => {
    const kept = siteAnswers.get(db)?.get(siteId);
    if (kept && kept.rows <= q.limit && kept.state === (await siteStateNow(db, siteId))) {
      siteAnswerReuse.count += 1;
      keepSiteAnswer(db, siteId, kept);
      return { answer: kept.answer, whole: kept };
    }
    return readExcavationPage(db, siteId, q);
  })();
  const whole = read.then((r) => r.whole);
  reads.set(siteId, whole);
  try {
    return (await read).answer;
  } finally {
    if (reads.get(siteId) === whole) reads.delete(siteId);
  }
}

/** siteStateOf, read now. */
async function siteStateNow(db: Db, siteId: number): Promise<string | undefined> {
  const { rows } = await sql<{ state: string }>`select ${siteStateOf(siteId)} as state`.execute(db);
  return rows[0]?.state;
}

/** Whole-site reads under way, per database and site (loadExcavationPage). */
const siteReads = new WeakMap<Db, Map<number, Promise<SiteAnswer | null>>>();

/** One read of a page from the database; `whole` is the answer kept when the page holds the whole site. */
async function readExcavationPage(
  db: Db,
  siteId: number,
  q: { limit: number; cursor?: string },
): Promise<{ answer: JsonText; whole: SiteAnswer | null }> {
  let query = db
    .selectFrom('excavations')
    .select(['id', 'reference', sql<string | null>`case when answer_key = ${ANSWER_FORMAT} || ':' || version then answer end`.as('answer')])
    .where('site_id', '=', siteId)
    .orderBy('reference');
  const scope = `excavations:${siteId}`;
  if (q.cursor) query = query.where('reference', '>', decodeCursor(q.cursor, scope, 'text')[0]);
  // The site's state in the same statement (one snapshot) as the answers it describes.
  const read = await query
    .select(siteStateOf(siteId).as('site_state'))
    .limit(q.limit + 1)
    .execute();
  const { page, next } = pageOf(read, q.limit, (r) => r.reference, scope);
  const stale = page.filter((r) => r.answer === null).map((r) => r.id);
  const fresh = new Map<number, string>();
  if (stale.length) {
    const rows = (await withDrawing(db).where('excavations.id', 'in', stale).execute()).map((row) => ({
      row,
      answer: JSON.stringify(rowOut(row)),
    }));
    for (const { row, answer } of rows) fresh.set(row.id, answer);
    await storeAnswersOf(db, rows);
  }
  // A stale row removed between the two reads is left out.
  const answers = page.map((r) => r.answer ?? fresh.get(r.id)).filter((a): a is string => a !== undefined);
  const answer = new JsonText(`{"excavations":[${answers.join(',')}],"next":${JSON.stringify(next)}}`);
  // Kept only when it is the whole site, read from stored answers alone (writing answers changes the
  // state); not for a site without excavations, whose empty read carried no state.
  if (q.cursor || next !== null || stale.length > 0 || page.length === 0) return { answer, whole: null };
  const whole = { state: page[0].site_state, rows: page.length, answer };
  keepSiteAnswer(db, siteId, whole);
  return { answer, whole };
}

/** Properties written for each excavation in a GeoJSON export (and read back on import). */
type ExportProperties = Omit<ExcavationValues, 'geometry'>;

/** The site's excavations as a GeoJSON FeatureCollection (RFC 7946), one Feature each with its properties. */
export function toFeatureCollection(list: Excavation[]): FeatureCollection {
  return {
    type: 'FeatureCollection',
    features: list.map((e): Feature => {
      const { geometry, ...properties } = pickValues(e);
      return { type: 'Feature', id: e.reference, geometry, properties: properties satisfies ExportProperties };
    }),
  };
}

function pickValues(e: Excavation): ExcavationValues {
  const { id: _i, siteId: _s, version: _v, drawing: _d, outline: _o, influenceZone: _z, createdAt: _c, updatedAt: _u, ...values } = e;
  return values;
}

/** Reasons a whole import file is refused before its features are read; `null` when it is a FeatureCollection. */
function fileProblem(doc: unknown): string | null {
  if (typeof doc !== 'object' || doc === null || Array.isArray(doc)) return 'must be a GeoJSON FeatureCollection';
  const d = doc as { type?: unknown; features?: unknown };
  if (d.type !== 'FeatureCollection') return `must be a GeoJSON FeatureCollection, not ${JSON.stringify(d.type ?? null)}`;
  if (!Array.isArray(d.features)) return 'has no list of features';
  if (d.features.length === 0) return 'has no features';
  if (d.features.length > 1000) return 'has more than 1000 features; split it';
  return null;
}

interface ImportPlan {
  /** Set when the file as a whole is unusable (not JSON, not a FeatureCollection). */
  fileError: string | null;
  features: { index: number; values: ExcavationValues }[];
  refused: ImportReport['refused'];
}

/**
 * Reads an import file: every feature is checked as a new excavation would be (the kind follows
 * from the geometry when not given). Nothing is written here; the route writes all or nothing.
 * Each feature's checks are bounded by the vertex limits (milliseconds); the reader yields to the
 * event loop between features so that other requests are answered meanwhile.
 */
export async function readImport(text: string, proj: LocalProjection): Promise<ImportPlan> {
  let doc: unknown;
  try {
    doc = JSON.parse(text.replace(/^\uFEFF/, ''));
  } catch {
    return { fileError: 'is not JSON (expected a GeoJSON FeatureCollection)', features: [], refused: [] };
  }
  const problem = fileProblem(doc);
  if (problem) return { fileError: problem, features: [], refused: [] };
  const plan: ImportPlan = { fileError: null, features: [], refused: [] };
  const seen = new Map<string, number>();
  let points = 0;
  const features = (doc as { features: unknown[] }).features;
  for (const [index, f] of features.entries()) {
    if (index > 0) await new Promise((resolve) => setImmediate(resolve));
    readFeature(f, index);
  }
  return plan;

  function readFeature(f: unknown, index: number): void {
    const feature = (typeof f === 'object' && f !== null ? f : {}) as {
      type?: unknown;
      geometry?: { type?: unknown } | null;
      properties?: unknown;
    };
    const props = (typeof feature.properties === 'object' && feature.properties !== null ? feature.properties : {}) as Record<
      string,
      unknown
    >;
    const reference = typeof props.reference === 'string' ? props.reference.trim() : null;
    if (feature.type !== 'Feature') {
      plan.refused.push({ index, reference, reasons: { type: 'must be "Feature"' } });
      return;
    }
    const gtype = feature.geometry?.type;
    const input: Record<string, unknown> = {
      ...props,
      // A file may give a choice by the word the register shows ("Trench box") or by its code.
      ...('supportType' in props ? { supportType: codeOfLabel(props.supportType, supportLabels) } : {}),
      ...('state' in props ? { state: codeOfLabel(props.state, stateLabels) } : {}),
      ...('kind' in props ? { kind: codeOfLabel(props.kind, kindLabels) } : {}),
      geometry: feature.geometry as ExcavationInput['geometry'],
      kind:
        (codeOfLabel(props.kind, kindLabels) as ExcavationInput['kind']) ??
        (gtype === 'LineString' ? 'trench' : gtype === 'Polygon' ? 'pit' : undefined),
    };
    const parsed = excavationInputSchema.safeParse(input);
    if (!parsed.success) {
      const reasons = zodFields(parsed.error);
      // The kind follows from the geometry when not given: a wrong geometry is the one reason then.
      if (props.kind === undefined && Object.keys(reasons).some((k) => k.startsWith('geometry'))) delete reasons.kind;
      plan.refused.push({ index, reference, reasons });
      return;
    }
    points += pointCount(parsed.data.geometry);
    if (points > MAX_IMPORT_POINTS) {
      // Bound the work of one import: the feature that passes the limit, and every later one, is refused.
      plan.refused.push({
        index,
        reference: parsed.data.reference,
        reasons: {
          geometry: `brings the file to ${points} points (after simplifying to ${SITE_TOLERANCE} m); an import may hold at most ${MAX_IMPORT_POINTS}: split the file`,
        },
      });
      return;
    }
    const reasons = placementProblems(parsed.data, proj);
    const key = parsed.data.reference;
    if (seen.has(key)) reasons.reference = `repeats the reference of feature ${seen.get(key)! + 1}`;
    seen.set(key, index);
    if (Object.keys(reasons).length) plan.refused.push({ index, reference: parsed.data.reference, reasons });
    else plan.features.push({ index, values: parsed.data });
  }
}
