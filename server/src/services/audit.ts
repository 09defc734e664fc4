import type { Db } from '@db/database';

interface AuditEntry {
  actorId: number | null;
  siteId?: number | null;
  entity: string;
  entityId?: string | number | null;
  action: string;
  detail?: Record<string, unknown>;
}

/** Appends to the audit log (the database refuses any change to what is written). */
export async function audit(db: Db, e: AuditEntry): Promise<void> {
  await db
    .insertInto('audit_log')
    .values({
      actor_id: e.actorId,
      site_id: e.siteId ?? null,
      entity: e.entity,
      entity_id: e.entityId == null ? null : String(e.entityId),
      action: e.action,
      detail: JSON.stringify(e.detail ?? {}),
    })
    .execute();
}
