import { createHash } from 'node:crypto';
import { Kysely, PostgresDialect, sql, type ColumnType, type Generated } from 'kysely';
import pg from 'pg';
// The names of roles, statuses and states are declared once, in shared/ (types only: db/ loads none
// of our code at run time). server/test/db-checks.test.ts compares the CHECK lists with them.
import type { SiteRole } from '../shared/schemas/common';
import type {
  ExcavationKind,
  ExcavationState as SharedExcavationState,
  StoredGeometry,
  StoredPolygon,
  StoredSoil,
  StoredZone,
  SupportType,
  AuditDetail,
} from '../shared/schemas/excavations';
import type { Checklist, Consequences, InspectionReason, Outcome } from '../shared/schemas/inspections';
import type {
  AttachmentKind,
  CheckVerdict,
  DigDetails,
  ExcavationSnapshot,
  PermitCheck,
  PermitDecision,
  PermitEventDetail,
  PermitKind,
  PermitStatus,
  PlacedLoad,
  PlantSnapshot,
} from '../shared/schemas/permits';
import type { Stored } from '../shared/schemas/stored';
import type { PlantCategory, PlantElement } from '../shared/schemas/plant';
import type { SurchargeMethod } from '../shared/schemas/sites';
import type { UnitSystem } from '../shared/units';

/**
 * The typed shape of Brink's PostgreSQL database. Each migration in db/migrations adds tables here.
 * Timestamps are `timestamptz`; ids are identity integers.
 */
type Timestamp = ColumnType<Date, Date | string, Date | string>;
/** A timestamp the database fills in (defaults to now()). */
export type CreatedAt = ColumnType<Date, Date | string | undefined, Date | string>;

/** An organisation owns its people, sites, invitations and plant library (docs/security.md, "Organisations"). */
interface OrganisationsTable {
  id: Generated<number>;
  name: string;
  created_at: CreatedAt;
}

interface UsersTable {
  id: Generated<number>;
  organisation_id: number;
  email: string;
  name: string;
  password_hash: string | null;
  /** Administrator of the person's own organisation (nothing of another organisation). */
  is_admin: Generated<boolean>;
  active: Generated<boolean>;
  created_at: CreatedAt;
  /** The person's own units, or null to follow each site's (docs/calculation.md, "Units"). */
  units: UnitSystem | null;
}

interface SitesTable {
  id: Generated<number>;
  organisation_id: number;
  name: string;
  latitude: number;
  longitude: number;
  timezone: Generated<string>;
  minimum_clearance: Generated<number>;
  default_method: Generated<string>;
  /** The units the site's people read and type unless they chose their own. */
  units: Generated<UnitSystem>;
  created_at: CreatedAt;
  /** The site plan image pinned to the map, and its corners as { south, west, north, east } in degrees. */
  plan_upload_id: number | null;
  plan_bounds: Json<{ south: number; west: number; north: number; east: number }> | null;
  plan_opacity: Generated<number>;
}

interface SiteMembersTable {
  site_id: number;
  user_id: number;
  role: SiteRole;
  can_inspect: Generated<boolean>;
}

interface InvitationsTable {
  id: Generated<number>;
  /** The organisation the person joins (the inviting administrator's). */
  organisation_id: number;
  email: string;
  name: string;
  is_admin: Generated<boolean>;
  site_id: number | null;
  role: SiteRole | null;
  token_hash: string;
  invited_by: number | null;
  expires_at: Timestamp;
  used_at: Timestamp | null;
  created_at: CreatedAt;
}

interface PasswordResetsTable {
  id: Generated<number>;
  user_id: number;
  token_hash: string;
  expires_at: Timestamp;
  used_at: Timestamp | null;
  created_at: CreatedAt;
}

interface AuditLogTable {
  id: Generated<number>;
  at: CreatedAt;
  actor_id: number | null;
  site_id: number | null;
  entity: string;
  entity_id: string | null;
  action: string;
  /** Free fields by entity and action; the excavation history reads `changes` (`storedAuditDetail`). */
  detail: ColumnType<Stored<AuditDetail>, string | undefined, never>;
}

interface CaughtMailTable {
  id: Generated<number>;
  received_at: CreatedAt;
  mail_from: string;
  mail_to: string;
  subject: string;
  text: string;
  html: string | null;
}

interface SessionTable {
  sid: string;
  sess: unknown;
  expire: Timestamp;
}

/** A jsonb column: objects go in as JSON text (Kysely passes strings through) and come out parsed. */
type Json<T> = ColumnType<T, string, string>;
/**
 * A jsonb column whose rows may be older than the code: it comes out as `Stored<T>`, which is read
 * only through its shared schema (`readStored`, shared/schemas/stored.ts), so a drifted shape fails loudly.
 */
export type StoredJson<T> = ColumnType<Stored<T>, string, string>;

interface UploadsTable {
  id: Generated<number>;
  site_id: number | null;
  /** What the file is for: 'drawing', 'site-plan', 'photo', 'attachment', … */
  purpose: string;
  original_name: string;
  /** The type found from the file's content, never from its name. */
  mime: string;
  size: number;
  /** Path relative to UPLOAD_DIR. */
  storage_key: string;
  uploaded_by: number | null;
  created_at: CreatedAt;
}

export type ExcavationState = SharedExcavationState;

export interface ExcavationsTable {
  id: Generated<number>;
  site_id: number;
  reference: string;
  name: string;
  kind: ExcavationKind;
  /** GeoJSON geometry in WGS84: a LineString (trench centre line) or a Polygon (pit outline). */
  geometry: StoredJson<StoredGeometry>;
  /** Trench width in metres (null for a pit). */
  width: number | null;
  depth: number;
  state: Generated<ExcavationState>;
  support_type: SupportType;
  design_surcharge: Generated<number>;
  rated_pressure: number | null;
  restraint: Generated<'unyielding' | 'yielding'>;
  pressure_state: Generated<'active' | 'at-rest'>;
  wall_friction: Generated<number>;
  /** Soil layers, as in the calculation request (`soil`). */
  soil: StoredJson<StoredSoil>;
  groundwater_depth: number | null;
  design_reference: Generated<string>;
  drawing_upload_id: number | null;
  notes: Generated<string>;
  /**
   * The ground outline (GeoJSON Polygon, WGS84) and the influence zone (Polygon or MultiPolygon),
   * drawn when the row is written (shared/geometry/shapes.ts), never on read; null when
   * no outline forms. Whoever writes geometry, width or depth writes these too.
   */
  outline: ColumnType<Stored<StoredPolygon> | null, string | null | undefined, string | null>;
  influence_zone: ColumnType<Stored<StoredZone> | null, string | null | undefined, string | null>;
  /**
   * The row's answer in the excavation list (JSON text) and its key (the answer's format and the
   * version it was written at): server/src/services/excavations.ts, storeAnswers; null until written.
   */
  answer: string | null;
  answer_key: string | null;
  version: Generated<number>;
  created_by: number | null;
  created_at: CreatedAt;
  updated_at: CreatedAt;
}

export interface PlantItemsTable {
  id: Generated<number>;
  /** Each organisation keeps its own library; a permit uses only its site's organisation's machines. */
  organisation_id: number;
  name: string;
  category: PlantCategory;
  /** Operating mass in tonnes. */
  operating_mass: number;
  elements: StoredJson<PlantElement[]>;
  design_factor: Generated<number>;
  notes: Generated<string>;
  version: Generated<number>;
  created_at: CreatedAt;
  updated_at: CreatedAt;
}

interface SiteShiftsTable {
  id: Generated<number>;
  site_id: number;
  name: string;
  /** Wall-clock start in the site's time zone, "HH:MM". */
  start_time: string;
}

interface InspectionsTable {
  id: Generated<number>;
  excavation_id: number;
  site_id: number;
  inspector_id: number;
  inspected_at: Timestamp;
  recorded_at: Timestamp;
  /** The shift the inspection belongs to (by its time), as the site's shifts stood then. */
  shift_name: string;
  shift_start: Timestamp;
  reason: InspectionReason;
  reason_detail: Generated<string>;
  /** { [checklist key]: { answer: 'pass' | 'fail' | 'na', note } } — see shared/schemas/inspections.ts. */
  checklist: StoredJson<Checklist>;
  outcome: Outcome;
  remarks: Generated<string>;
  client_ref: string | null;
}

/** What a not-safe inspection set in motion (server/src/services/inspections.ts `Consequences`). */
interface InspectionConsequencesTable {
  inspection_id: number;
  consequences: StoredJson<Consequences>;
  updated_at: Generated<Date>;
}

interface InspectionPhotosTable {
  inspection_id: number;
  upload_id: number;
  position: number;
}

interface InspectionSuspensionsTable {
  inspection_id: number;
  permit_id: number;
}

interface InspectionRemindersTable {
  site_id: number;
  shift_start: Timestamp;
  sent_at: Timestamp;
  excavation_ids: Json<number[]>;
}

type PermitStatusValue = PermitStatus;

/** A permit: its number, kind and where it stands. Its content lives in `permit_revisions`. */
interface PermitsTable {
  id: Generated<number>;
  site_id: number;
  /** Running number on the site; `number` is its printed form (e.g. P-0007). */
  seq: number;
  number: string;
  kind: PermitKind;
  status: Generated<PermitStatusValue>;
  /** Goes up by one with every change; a change quoting an older version is refused (409). */
  version: Generated<number>;
  /** The revision in force or being prepared. */
  revision: Generated<number>;
  requested_by: number;
  /** When the "window closes in an hour" reminder went out for the current window. */
  reminder_sent_at: Timestamp | null;
  created_at: CreatedAt;
  updated_at: CreatedAt;
}

/** One revision of a permit's content; from Approved on a change makes a new one. */
interface PermitRevisionsTable {
  id: Generated<number>;
  permit_id: number;
  revision: number;
  description: Generated<string>;
  window_start: Timestamp;
  window_end: Timestamp;
  excavation_ids: ColumnType<number[], number[] | undefined, number[]>;
  method: SurchargeMethod;
  /** Placed loads (shared/schemas/permits.ts `PlacedLoad[]`). */
  loads: StoredJson<PlacedLoad[]>;
  /** Dig permits: depth, support method and the buried-services checks. */
  dig: StoredJson<DigDetails> | null;
  /** The last authoritative cumulative check (`PermitCheck`). */
  check_result: StoredJson<PermitCheck> | null;
  /** The check's verdict (utilisation and passes) alone, kept by PostgreSQL from check_result (migration 0020): what lists show. */
  verdict: ColumnType<Stored<CheckVerdict> | null, never, never>;
  checked_at: Timestamp | null;
  /** The coordinator's decision on this revision (`PermitDecision`). */
  decision: StoredJson<PermitDecision> | null;
  /** The machines the loads name, frozen when the revision was sent for review (`PlantSnapshot`). */
  plant_snapshot: StoredJson<PlantSnapshot> | null;
  /** The check inputs of the excavations the last stored check used (`ExcavationSnapshot`). */
  excavation_snapshot: StoredJson<ExcavationSnapshot> | null;
  created_by: number | null;
  created_at: CreatedAt;
  updated_at: CreatedAt;
}

interface PermitOperatorsTable {
  revision_id: number;
  user_id: number;
  briefed_at: Timestamp | null;
}

/** The permit's timeline: append-only. `actor_id` null for the schedule or an inspection. */
interface PermitEventsTable {
  id: Generated<number>;
  permit_id: number;
  revision: number;
  at: Timestamp;
  actor_id: number | null;
  actor_name: string;
  action: string;
  from_status: PermitStatus | null;
  to_status: PermitStatus | null;
  comment: Generated<string>;
  detail: ColumnType<Stored<PermitEventDetail>, string | undefined, never>;
}

interface PermitAttachmentsTable {
  id: Generated<number>;
  permit_id: number;
  revision: number;
  upload_id: number;
  kind: AttachmentKind;
  added_by: number | null;
  added_at: CreatedAt;
}

/** A concern reported from the field view (photo, note, excavation); shown on the permit's timeline. */
interface ConcernsTable {
  id: Generated<number>;
  site_id: number;
  permit_id: number;
  excavation_id: number | null;
  /** The excavation's reference when reported (kept if the excavation is later removed). */
  excavation_reference: string;
  note: string;
  photo_upload_ids: ColumnType<number[], number[] | undefined, number[]>;
  reporter_id: number;
  created_at: CreatedAt;
  /** Made by the phone; a repeated key is the same request. */
  idempotency_key: string;
}

/** E-mail the SMTP server accepted, by the message's idempotency key (db/migrations/0008_outbox.ts). */
interface MailDeliveriesTable {
  key: string;
  delivered_at: Generated<Date>;
  recipients: string;
  subject: string;
}

interface PushSubscriptionsTable {
  id: Generated<number>;
  user_id: number;
  endpoint: string;
  p256dh: string;
  auth: string;
  created_at: Generated<Date>;
}

interface PushDeliveriesTable {
  key: string;
  delivered_at: Generated<Date>;
  subscription_id: number;
  /** 'sent', or 'gone' when the push service said the subscription no longer exists. */
  outcome: string;
}

export interface Database {
  organisations: OrganisationsTable;
  users: UsersTable;
  sites: SitesTable;
  site_members: SiteMembersTable;
  invitations: InvitationsTable;
  password_resets: PasswordResetsTable;
  audit_log: AuditLogTable;
  caught_mail: CaughtMailTable;
  session: SessionTable;
  uploads: UploadsTable;
  excavations: ExcavationsTable;
  plant_items: PlantItemsTable;
  permits: PermitsTable;
  permit_revisions: PermitRevisionsTable;
  permit_operators: PermitOperatorsTable;
  permit_events: PermitEventsTable;
  permit_attachments: PermitAttachmentsTable;
  site_shifts: SiteShiftsTable;
  inspections: InspectionsTable;
  inspection_photos: InspectionPhotosTable;
  inspection_suspensions: InspectionSuspensionsTable;
  inspection_reminders: InspectionRemindersTable;
  concerns: ConcernsTable;
  mail_deliveries: MailDeliveriesTable;
  inspection_consequences: InspectionConsequencesTable;
  push_subscriptions: PushSubscriptionsTable;
  push_deliveries: PushDeliveriesTable;
  attempt_counts: AttemptCountsTable;
}

/** Attempt limits shared by every server (server/src/services/throttle.ts). */
interface AttemptCountsTable {
  scope: string;
  key: string;
  count: number;
  reset_at: Date;
}

export type Db = Kysely<Database>;

// Return numeric and bigint columns as JS numbers (our figures fit comfortably).
pg.types.setTypeParser(pg.types.builtins.NUMERIC, (v) => Number(v));
pg.types.setTypeParser(pg.types.builtins.INT8, (v) => Number(v));

/**
 * A connection pool that outlives its database. PostgreSQL going away makes idle pooled clients
 * (and a client held between two queries of a transaction) emit 'error'; unhandled, that event ends
 * the process. Here each is logged once per outage and the broken client is dropped; queries fail
 * with a connection error (`isDatabaseUnavailable`, answered 503 by the API) until PostgreSQL is
 * back, when new connections are made as usual. Connecting waits at most `connectTimeoutMs`.
 */
export function createPool(connectionString: string, max = 10, opts: { name?: string; connectTimeoutMs?: number } = {}): pg.Pool {
  const pool = new pg.Pool({ connectionString, max, connectionTimeoutMillis: opts.connectTimeoutMs ?? 5000 });
  handlePoolErrors(pool, opts.name ?? 'db');
  pool.on('connect', runMarkedPrepared);
  return pool;
}

/**
 * The mark of a statement that runs prepared: `select /* prepared *\/ …`, from `.modifyFront(PREPARED)`
 * on a Kysely select or written so in `sql`. PostgreSQL then parses and plans it once per connection
 * (after five runs it keeps one generic plan when that is no worse) instead of on every call: the
 * check's one read took 1.7 ms a call planned afresh and 0.5 ms prepared (demo site, one connection,
 * 300 calls). Mark only a statement whose text does not vary with its values (a list as
 * `= any($n)`, never `in (…)`): each connection keeps every text it has prepared.
 */
export const PREPARED = sql.raw('/* prepared */');
const PREPARED_TEXT = 'select /* prepared */ ';
/** The texts this process has named; past the bound a marked statement runs unnamed, as any other. */
const preparedNames = new Map<string, string>();
const PREPARED_TEXTS_MAX = 64;
export const preparedTextCount = () => preparedNames.size;

function preparedName(text: string): string | undefined {
  let name = preparedNames.get(text);
  if (name === undefined && preparedNames.size < PREPARED_TEXTS_MAX) {
    name = `brink_${createHash('sha1').update(text).digest('hex').slice(0, 20)}`;
    preparedNames.set(text, name);
  }
  return name;
}

/** Runs a client's marked statements as named (prepared) ones; every other call is left as it was. */
function runMarkedPrepared(client: pg.PoolClient): void {
  const query = client.query.bind(client) as (...args: unknown[]) => unknown;
  client.query = ((text: unknown, values?: unknown, ...rest: unknown[]) => {
    const name = typeof text === 'string' && text.startsWith(PREPARED_TEXT) ? preparedName(text) : undefined;
    return name ? query({ name, text, values }, ...rest) : query(text, values, ...rest);
  }) as typeof client.query;
}

let connectionLosses = 0;
/** How many pooled connections have been lost so far (any pool of this process): a cached ping is stale once it grows. */
export const connectionLossCount = () => connectionLosses;

/** Logs the 'error' events of a pool and of every client it hands out, instead of crashing on them. */
function handlePoolErrors(pool: pg.Pool, name: string): void {
  let lastLogged = 0;
  const log = (err: Error) => {
    connectionLosses++;
    // One line per burst: an outage breaks every pooled connection at once.
    if (Date.now() - lastLogged < 5000) return;
    lastLogged = Date.now();
    console.error(`[${name}] database connection lost: ${err.message}`);
  };
  pool.on('error', log);
  pool.on('connect', (client) => client.on('error', log));
}

const unavailableCodes = new Set([
  'ECONNREFUSED',
  'ECONNRESET',
  'EPIPE',
  'ETIMEDOUT',
  'EHOSTUNREACH',
  'ENETUNREACH',
  'ENOTFOUND',
  'EAI_AGAIN',
  '57P01', // admin_shutdown (pg_ctl stop)
  '57P02', // crash_shutdown
  '57P03', // cannot_connect_now (starting up or shutting down)
  '08000',
  '08001',
  '08003',
  '08004',
  '08006', // connection exceptions
]);
const unavailableMessages =
  /Connection terminated|connection error and is not queryable|timeout exceeded when trying to connect|terminating connection due to administrator command|the database system is (starting up|shutting down|in recovery mode)|Client was closed and is not queryable/i;

/** Whether an error means PostgreSQL cannot be reached (down, restarting, connection cut), not that a query was wrong. */
export function isDatabaseUnavailable(err: unknown, depth = 0): boolean {
  if (!err || typeof err !== 'object' || depth > 3) return false;
  const e = err as { code?: unknown; message?: unknown; errors?: unknown; cause?: unknown };
  if (typeof e.code === 'string' && unavailableCodes.has(e.code)) return true;
  if (typeof e.message === 'string' && unavailableMessages.test(e.message)) return true;
  if (Array.isArray(e.errors) && e.errors.some((x) => isDatabaseUnavailable(x, depth + 1))) return true;
  return e.cause !== undefined && isDatabaseUnavailable(e.cause, depth + 1);
}

export function createDb(pool: pg.Pool): Db {
  return new Kysely<Database>({ dialect: new PostgresDialect({ pool }) });
}
