import type { Database } from '../../db';
import { errorResponse, requirePermission, type Identity, type TeamMembership } from './access';
import { getDatabase } from './database';
import { findSheet } from './sheets';

type SheetRow = NonNullable<Awaited<ReturnType<typeof findSheet>>>;

export type SheetAccess =
  | { ok: true; database: Database; sheet: SheetRow; identity: Identity; membership: TeamMembership }
  | { ok: false; response: Response };

/**
 * The one check for routes under /api/sheets/{id}: 401 without an identity, 404 for a missing
 * sheet or one of another team, 403 when the role lacks the permission.
 */
export async function requireSheet(identity: Identity | null, sheetId: string | undefined, permission: Parameters<typeof requirePermission>[2]): Promise<SheetAccess> {
  if (!identity) return { ok: false, response: errorResponse(401, 'Sign in first.') };
  const database = await getDatabase();
  const sheet = await findSheet(database, sheetId ?? '');
  if (!sheet) return { ok: false, response: errorResponse(404, 'Not found.') };
  const access = requirePermission(identity, sheet.teamId, permission);
  return access.ok ? { ok: true, database, sheet, identity: access.identity, membership: access.membership } : access;
}
