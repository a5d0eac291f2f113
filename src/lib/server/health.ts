import type { Database } from '../../db';
import { getMigrationLevel, type MigrationLevel } from './migrations';

export type Health =
  | { status: 'ok'; database: { reachable: true; kind: 'file' | 'server' }; migrations: MigrationLevel }
  | { status: 'degraded'; database: { reachable: boolean; kind: 'file' | 'server'; error?: string }; migrations?: MigrationLevel };

/** Checks that the database answers and that every shipped migration is applied. */
export async function checkHealth(database: Database): Promise<Health> {
  const kind = database.isFile ? 'file' : 'server';
  try {
    await database.client.execute('SELECT 1');
  } catch (error) {
    return { status: 'degraded', database: { reachable: false, kind, error: (error as Error).message } };
  }
  const migrations = await getMigrationLevel(database);
  if (!migrations.upToDate) return { status: 'degraded', database: { reachable: true, kind }, migrations };
  return { status: 'ok', database: { reachable: true, kind }, migrations };
}
