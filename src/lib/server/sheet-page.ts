import { and, desc, eq } from 'drizzle-orm';
import type { Database } from '../../db';
import { reviews, users } from '../../db/schema';
import { stringifyKeepingNonFinite, type SheetPageData } from '../contract';
import { fail, succeed, type Result } from '../result';
import { can } from '../roles';
import type { Identity } from './access';
import { findSheet, getRevision, listForks } from './sheets';
import { sheetQuery } from '../validation/sheet-exchange';
import { computeSheet } from '../../workers/compute-protocol';


type SheetRow = NonNullable<Awaited<ReturnType<typeof findSheet>>>;

/** Who signed one revision as checked, and when: only while that revision's latest signature is a check. */
export async function findChecker(database: Database, sheetId: string, revision: number): Promise<{ name: string; at: string } | null> {
  const [row] = await database.db
    .select({ verdict: reviews.verdict, createdAt: reviews.createdAt, name: users.name, email: users.email })
    .from(reviews)
    .leftJoin(users, eq(users.id, reviews.reviewerId))
    .where(and(eq(reviews.sheetId, sheetId), eq(reviews.revision, revision)))
    .orderBy(desc(reviews.createdAt))
    .limit(1);
  return row?.verdict === 'checked' ? { name: row.name ?? row.email ?? 'checker', at: new Date(row.createdAt).toISOString() } : null;
}

/**
 * Loads a sheet the identity may read for its page: the revision asked for (the latest when
 * none), its title block, where it was forked from and its forks, as far as the identity may read them.
 */
export async function loadSheetPage(database: Database, identity: Identity, sheet: SheetRow, revisionParam: string | null): Promise<Result<SheetPageData>> {
  const membership = identity.memberships.find((m) => m.teamId === sheet.teamId);
  const query = sheetQuery.safeParse({ revision: revisionParam ?? undefined });
  const revision = query.success ? await getRevision(database, sheet.id, query.data.revision ?? sheet.latestRevision) : null;
  if (!revision) return fail({ kind: 'not-found', message: `Revision ${revisionParam} of this sheet does not exist.`, path: 'revision' });
  const readable = identity.memberships.filter((m) => can(m.role, 'sheet.read')).map((m) => m.teamId);
  const origin = sheet.forkedFromSheetId ? await findSheet(database, sheet.forkedFromSheetId) : null;
  const forks = await listForks(database, sheet.id, readable);
  const checker = await findChecker(database, sheet.id, revision.number);
  return succeed({
      sheet: { id: sheet.id, teamId: sheet.teamId, title: sheet.title, reviewState: sheet.reviewState, lastCheckedRevision: sheet.lastCheckedRevision, latestRevision: sheet.latestRevision },
      revision: {
        number: revision.number,
        authorName: revision.authorName,
        createdAt: new Date(revision.createdAt).toISOString(),
        message: revision.message,
        inputs: revision.inputs,
      },
      checkedBy: checker?.name ?? null,
      checkedAt: checker?.at ?? null,
      forkedFrom:
        origin && readable.includes(origin.teamId)
          ? { id: origin.id, title: origin.title, revision: sheet.forkedFromRevision ?? 1 }
          : null,
      forks: forks.map((f) => ({ id: f.id, title: f.title, revision: f.forkedFromRevision ?? 1 })),
      canEdit: membership !== undefined && can(membership.role, 'sheet.write'),
      forkTargets: identity.memberships
        .filter((m) => can(m.role, 'sheet.write'))
        .sort((a, b) => Number(b.teamId === sheet.teamId) - Number(a.teamId === sheet.teamId))
        .map((m) => ({ teamId: m.teamId, name: m.name })),
  });
}

/**
 * The sheet page's first evaluation, as the compute worker would answer it (without the derivation),
 * as text for the editor island: results show as soon as the page is drawn, before any worker starts.
 */
export function evaluateForPage(inputs: unknown): string {
  return stringifyKeepingNonFinite(computeSheet({ type: 'compute', id: 0, document: inputs, derive: false }));
}
