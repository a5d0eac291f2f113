/**
 * Test-matrix results stored with a sheet revision. The server runs the revision's matrix itself
 * (what is stored is then what the revision computes, not what a browser sent), one run at a time
 * with a yield to the event loop between runs, and stops at MATRIX_TIME_LIMIT_MS: a stopped matrix
 * is stored as incomplete, with the runs that finished.
 */
import { and, eq } from 'drizzle-orm';
import type { Database } from '../../db';
import { matrixResults, sheetRevisions, users, type Sheet } from '../../db/schema';
import type { MatrixResultRecord } from '../contract/matrix';
import { fail, succeed, type Result } from '../result';
import { evaluateSheet } from '../sheet/evaluate';
import { matrixStepper } from '../sheet/matrix';
import { notFound } from './access';
import { insertAudit } from './audit';
import { getRevision } from './sheets';
import { yieldToEventLoop } from './slices';

/** Longest a matrix computes on the server; past it the finished runs are stored as an incomplete result. */
export const MATRIX_TIME_LIMIT_MS = 20_000;


/** The stored matrix result of revision `number` of the sheet; not found when the revision or its result does not exist. */
export async function getMatrixResult(database: Database, sheetId: string, number: number): Promise<Result<MatrixResultRecord>> {
  const [row] = await database.db
    .select({ stored: matrixResults, createdByName: users.name })
    .from(matrixResults)
    .innerJoin(sheetRevisions, eq(sheetRevisions.id, matrixResults.revisionId))
    .leftJoin(users, eq(users.id, matrixResults.createdBy))
    .where(and(eq(sheetRevisions.sheetId, sheetId), eq(sheetRevisions.number, number)));
  if (!row) return notFound(`Revision ${number} has no matrix result yet.`, 'revision');
  const { result, elapsedMs, createdAt } = row.stored;
  return succeed({ sheetId, revision: number, result, elapsedMs, createdByName: row.createdByName, createdAt });
}

/** Runs the matrix of revision `number` and stores the result in place of an earlier one, with an audit event. */
export async function computeMatrixResult(
  database: Database,
  sheet: Pick<Sheet, 'id' | 'teamId'>,
  number: number,
  actor: { userId: string; address?: string },
  timeLimitMs = MATRIX_TIME_LIMIT_MS,
): Promise<Result<MatrixResultRecord>> {
  const revision = await getRevision(database, sheet.id, number);
  if (!revision) return notFound(`Revision ${number} does not exist.`, 'revision');
  const evaluated = evaluateSheet(revision.inputs);
  if (!evaluated.ok) return fail({ kind: 'unprocessable', message: `Revision ${number} does not evaluate, so its matrix cannot run.`, path: 'revision', issues: evaluated.error.issues });
  const { doc } = evaluated.value;
  if (!doc.matrix) return fail({ kind: 'invalid', message: `Revision ${number} has no matrix; add a "matrix" section to the sheet.`, path: 'matrix' });
  const started = performance.now();
  const overTime = () => performance.now() - started > timeLimitMs;
  const stepper = matrixStepper(doc, doc.matrix, { shouldStop: overTime });
  for (let i = 0; i < stepper.cases.length && !overTime(); i++) {
    if (!stepper.step(i)) break;
    await yieldToEventLoop();
  }
  const result = stepper.finish();
  const elapsedMs = Math.round(performance.now() - started);
  await database.transaction(async (tx) => {
    await tx.delete(matrixResults).where(eq(matrixResults.revisionId, revision.id));
    await tx.insert(matrixResults).values({ id: crypto.randomUUID(), revisionId: revision.id, result, elapsedMs, createdBy: actor.userId });
    await insertAudit(tx, {
      teamId: sheet.teamId,
      actorId: actor.userId,
      action: 'sheet.matrix',
      subject: sheet.id,
      detail: { revision: number, runs: result.runs.length, totalRuns: result.totalRuns, complete: result.complete },
      address: actor.address,
    });
  });
  return getMatrixResult(database, sheet.id, number);
}
