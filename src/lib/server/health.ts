import type { Database } from '../../db';
import { getMigrationLevel, type MigrationLevel } from './migrations';

export type Health =
  | { status: 'ok'; database: { reachable: true; kind: 'file' | 'server'; latencyMs: number }; migrations: MigrationLevel }
  | { status: 'degraded'; database: { reachable: boolean; kind: 'file' | 'server'; latencyMs?: number; error?: string }; migrations?: MigrationLevel };

/**
 * Checks that the database answers and that every shipped migration is applied; `latencyMs` is
 * one round trip of a trivial query (ms, rounded to 0.1), which on a libSQL server includes the network.
 */
export async function checkHealth(database: Database): Promise<Health> {
  const kind = database.isFile ? 'file' : 'server';
  const started = performance.now();
  try {
    await database.client.execute('SELECT 1');
  } catch (error) {
    return { status: 'degraded', database: { reachable: false, kind, error: (error as Error).message } };
  }
  const latencyMs = Math.round((performance.now() - started) * 10) / 10;
  const migrations = await getMigrationLevel(database);
  if (!migrations.upToDate) return { status: 'degraded', database: { reachable: true, kind, latencyMs }, migrations };
  return { status: 'ok', database: { reachable: true, kind, latencyMs }, migrations };
}
