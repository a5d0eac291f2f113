import type { Database } from '../../db';
import { auditEvents } from '../../db/schema';

export interface AuditEntry {
  teamId: string | null;
  actorId: string | null;
  action: string;
  subject?: string;
  detail?: Record<string, unknown>;
  address?: string | null;
}

/** Appends audit events (one per team concerned) through the write queue. */
export async function recordAudit(database: Database, entries: AuditEntry | AuditEntry[]): Promise<void> {
  const rows = (Array.isArray(entries) ? entries : [entries]).map((e) => ({
    teamId: e.teamId,
    actorId: e.actorId,
    action: e.action,
    subject: e.subject ?? null,
    detail: e.detail ?? null,
    address: e.address ?? null,
  }));
  if (rows.length) await database.write((db) => db.insert(auditEvents).values(rows));
}
