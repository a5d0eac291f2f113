/**
 * `npx tsx tests/ops/save-stages.ts`: where one save's time goes, stage by stage, on a fresh
 * seeded SQLite file in this process (no HTTP): the JSON parse and zod check of the body, the
 * evaluation and summary (checkDocument), the stored transaction alone (the write queue's
 * `transaction` call inside saveRevision: statements and commit), and a whole saveRevision. Prints
 * the median CPU and wall time of each over SAVE_STAGE_RUNS saves (default 300), after a warm-up.
 */
import { cpuUsage } from 'node:process';
import { performance } from 'node:perf_hooks';
import { eq } from 'drizzle-orm';
import { sheetRevisions, sheets, users } from '../../src/db/schema';
import { prepareDatabase } from '../../src/lib/server/bootstrap';
import { checkDocument, createSheet, saveRevision } from '../../src/lib/server/sheets';
import { saveRevisionBody } from '../../src/lib/validation/sheets';
import { tempDatabaseUrl } from '../helpers/temp';

const RUNS = Number(process.env.SAVE_STAGE_RUNS ?? 300);

interface Sample {
  wallMs: number;
  cpuMs: number;
}

async function timed(work: () => unknown): Promise<Sample> {
  const cpu = cpuUsage();
  const start = performance.now();
  await work();
  const wallMs = performance.now() - start;
  const used = cpuUsage(cpu);
  return { wallMs, cpuMs: (used.user + used.system) / 1000 };
}

const median = (values: number[]) => [...values].sort((a, b) => a - b)[Math.floor(values.length / 2)];

const { database } = await prepareDatabase(process.env.DATABASE_URL ?? tempDatabaseUrl());
const [sheet] = await database.db.select({ id: sheets.id, teamId: sheets.teamId, latest: sheets.latestRevision }).from(sheets).limit(1);
const [revision] = await database.db.select({ inputs: sheetRevisions.inputs }).from(sheetRevisions).where(eq(sheetRevisions.sheetId, sheet.id)).limit(1);
const [user] = await database.db.select({ id: users.id }).from(users).limit(1);
const created = await createSheet(database, { teamId: sheet.teamId, document: revision.inputs, actor: { userId: user.id } });
if (!created.ok) throw new Error(created.error.message);
const sheetId = created.value.sheetId;
let base = 1;
// The queue's transaction, timed from outside: saves run one at a time here, so the process's CPU time in between is the transaction's.
let storeSample: Sample | undefined;
const transaction = database.transaction;
database.transaction = async (work) => {
  let result: Awaited<ReturnType<typeof work>> | undefined;
  storeSample = await timed(async () => (result = await transaction(work)));
  return result!;
};
const text = () => JSON.stringify({ baseRevision: base, document: revision.inputs, message: `stage save on ${base}` });

const stages: Record<string, Sample[]> = { 'body parse + zod': [], 'checkDocument (evaluate + summary)': [], 'store (queue + transaction + commit)': [], 'saveRevision (whole)': [] };
for (let i = 0; i < RUNS + 20; i++) {
  const body = text();
  let parsed: ReturnType<typeof saveRevisionBody.parse> | undefined;
  const parse = await timed(() => (parsed = saveRevisionBody.parse(JSON.parse(body))));
  const check = await timed(() => checkDocument(parsed!.document));
  const save = await timed(async () => {
    const saved = await saveRevision(database, { sheetId, ...parsed!, actor: { userId: user.id, address: '127.0.0.1' } });
    if (!saved.ok) throw new Error(saved.error.message);
  });
  base++;
  if (i < 20) continue;
  stages['body parse + zod'].push(parse);
  stages['checkDocument (evaluate + summary)'].push(check);
  stages['store (queue + transaction + commit)'].push(storeSample!);
  stages['saveRevision (whole)'].push(save);
}
const rows = Object.entries(stages).map(([stage, samples]) => ({
  stage,
  'median wall ms': Number(median(samples.map((s) => s.wallMs)).toFixed(2)),
  'median CPU ms': Number(median(samples.map((s) => s.cpuMs)).toFixed(2)),
}));
console.log(`${RUNS} saves of one sheet in one process, on ${database.url}`);
console.table(rows);
database.close();
