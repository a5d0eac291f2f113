import { prepareDatabase } from '../../src/lib/server/bootstrap';

/** Vitest global setup: migrates and seeds this run's fresh database before any test file. */
export default async function setup(): Promise<void> {
  const url = process.env.DATABASE_URL;
  if (!url) throw new Error('vitest.config.ts must set DATABASE_URL');
  (await prepareDatabase(url)).database.close();
}
