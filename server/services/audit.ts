import type { Kysely, Transaction } from 'kysely'
import type { Database } from '../database/schema'

export interface AuditEntry {
  action: string
  actorUserId?: number | null
  subjectUserId?: number | null
  ip?: string | null
  detail?: Record<string, unknown>
}

/** Appends one audit-log row (inside the caller's transaction when given one). */
export async function audit(db: Kysely<Database> | Transaction<Database>, e: AuditEntry): Promise<void> {
  await db.insertInto('audit_log').values(auditValues(e)).execute()
}

/** The audit-log row for an entry (for a caller that writes it as part of a larger statement). */
export function auditValues(e: AuditEntry) {
  return {
    action: e.action,
    actor_user_id: e.actorUserId ?? null,
    subject_user_id: e.subjectUserId ?? null,
    ip: e.ip ?? null,
    detail: e.detail ? JSON.stringify(e.detail) : null,
  }
}
