import type { Database } from '../../db';
import type { Result } from '../result';
import { notFound, requirePermission, signInFirst, type Identity, type TeamMembership } from './access';
import { getDatabase } from './database';
import { findSheet } from './sheets';

type SheetRow = NonNullable<Awaited<ReturnType<typeof findSheet>>>;

export type SheetAccess = Result<{ database: Database; sheet: SheetRow; identity: Identity; membership: TeamMembership }>;

/**
 * The one check for sheet routes and pages: unauthenticated without an identity, not-found for a
 * missing sheet or one of another team, forbidden when the role lacks the permission.
 */
export async function requireSheet(identity: Identity | null, sheetId: string | undefined, permission: Parameters<typeof requirePermission>[2]): Promise<SheetAccess> {
  if (!identity) return signInFirst();
  const database = await getDatabase();
  const sheet = await findSheet(database, sheetId ?? '');
  // One answer for a missing sheet and another team's, so other teams' sheets do not reveal that they exist.
  if (!sheet || !identity.memberships.some((m) => m.teamId === sheet.teamId)) return notFound('No sheet with this id in your team.', 'sheetId');
  const access = requirePermission(identity, sheet.teamId, permission);
  return access.ok ? { ok: true, value: { database, sheet, ...access.value } } : access;
}
