import { and, desc, eq, lt, or } from 'drizzle-orm';
import type { Database, Transaction } from '../../db';
import { auditEvents, users } from '../../db/schema';

export interface AuditEntry {
  teamId: string | null;
  actorId: string | null;
  action: string;
  subject?: string;
  detail?: Record<string, unknown>;
  address?: string | null;
}

function auditRows(entries: AuditEntry | AuditEntry[]) {
  return (Array.isArray(entries) ? entries : [entries]).map((e) => ({
    teamId: e.teamId,
    actorId: e.actorId,
    action: e.action,
    subject: e.subject ?? null,
    detail: e.detail ?? null,
    address: e.address ?? null,
  }));
}

/** Appends audit events (one per team concerned) through the write queue. */
export async function recordAudit(database: Database, entries: AuditEntry | AuditEntry[]): Promise<void> {
  const rows = auditRows(entries);
  if (rows.length) await database.write((db) => db.insert(auditEvents).values(rows));
}

/** Appends audit events inside a caller's transaction, so the event commits (or not) with the change it records. */
export async function insertAudit(tx: Transaction, entries: AuditEntry | AuditEntry[]): Promise<void> {
  const rows = auditRows(entries);
  if (rows.length) await tx.insert(auditEvents).values(rows);
}

/** Audit actions this product records, with the words the audit page shows; unknown actions show as recorded. */
export const AUDIT_ACTIONS = {
  'auth.sign_in': 'Signed in',
  'auth.sign_in_failed': 'Sign-in failed',
  'auth.sign_in_blocked': 'Sign-in blocked (too many attempts)',
  'auth.sign_out': 'Signed out',
  'auth.password_change': 'Changed password',
  'auth.password_reset': 'Reset password by e-mail',
  'team.invite': 'Invited someone',
  'team.invite_accepted': 'Accepted an invitation',
  'team.invite_revoked': 'Withdrew an invitation',
  'token.create': 'Created API token',
  'token.revoke': 'Revoked API token',
  'team.role_change': 'Changed a role',
  'team.member_remove': 'Removed a member',
  'sheet.create': 'Created a sheet',
  'sheet.import': 'Imported a sheet',
  'sheet.save': 'Saved a sheet revision',
  'sheet.fork': 'Forked a sheet',
  'sheet.delete': 'Deleted a sheet',
  'sheet.check': 'Signed a sheet revision as checked',
  'team.rename': 'Renamed the team',
  'sheet.return': 'Returned a sheet revision for correction',
  'sheet.comment': 'Remarked on a sheet revision',
  'sheet.remark_resolve': 'Resolved or reopened a remark',
  'log.upload': 'Uploaded a controller log',
  'log.delete': 'Deleted a controller log',
  'log.compare': 'Compared a controller log with the sheet',
  'sheet.matrix': 'Ran the test matrix of a sheet revision',
  'demo.seed': 'Seeded the demo data',
} as const satisfies Record<string, string>;
export type KnownAuditAction = keyof typeof AUDIT_ACTIONS;

export interface AuditEventView {
  id: string;
  createdAt: Date;
  action: string;
  subject: string | null;
  detail: unknown;
  address: string | null;
  actor: { id: string; name: string | null; email: string | null } | null;
}

export interface AuditPage {
  events: AuditEventView[];
  /** Pass as `before` to get the next (older) page; null on the last page. */
  nextCursor: string | null;
}

const MAX_AUDIT_PAGE = 200;

/** Encodes the position of an event for keyset paging (time, then id, so equal times are not skipped). */
function auditCursor(event: { createdAt: Date; id: string }): string {
  return `${event.createdAt.getTime()}.${event.id}`;
}

function parseAuditCursor(cursor: string | undefined): { time: Date; id: string } | null {
  const match = cursor?.match(/^(\d{1,15})\.([\w-]{1,64})$/);
  return match ? { time: new Date(Number(match[1])), id: match[2] } : null;
}

/** A team's audit events, newest first, `limit` at a time, older than the `before` cursor if given. */
export async function listAuditEvents(
  database: Database,
  teamId: string,
  { limit = 50, before }: { limit?: number; before?: string } = {},
): Promise<AuditPage> {
  const size = Math.min(Math.max(1, Math.floor(limit)), MAX_AUDIT_PAGE);
  const cursor = parseAuditCursor(before);
  const rows = await database.db
    .select({
      id: auditEvents.id,
      createdAt: auditEvents.createdAt,
      action: auditEvents.action,
      subject: auditEvents.subject,
      detail: auditEvents.detail,
      address: auditEvents.address,
      actorId: users.id,
      actorName: users.name,
      actorEmail: users.email,
    })
    .from(auditEvents)
    .leftJoin(users, eq(users.id, auditEvents.actorId))
    .where(
      and(
        eq(auditEvents.teamId, teamId),
        cursor
          ? or(lt(auditEvents.createdAt, cursor.time), and(eq(auditEvents.createdAt, cursor.time), lt(auditEvents.id, cursor.id)))
          : undefined,
      ),
    )
    .orderBy(desc(auditEvents.createdAt), desc(auditEvents.id))
    .limit(size + 1);
  const events = rows.slice(0, size).map(({ actorId, actorName, actorEmail, ...event }) => ({
    ...event,
    actor: actorId ? { id: actorId, name: actorName, email: actorEmail } : null,
  }));
  return { events, nextCursor: rows.length > size ? auditCursor(events[events.length - 1]) : null };
}
