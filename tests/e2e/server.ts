import type { TestProject } from 'vitest/node';
import { freePort, makeTempDir, tempDatabaseUrl } from '../helpers/temp';
import { startApp } from './app-process';

/**
 * Vitest global setup for browser tests: starts the built app on a free loopback port with a
 * fresh database (tests may add bulk data to it directly) and its own mailbox folder, where the
 * tests read the mail the app sends.
 */
export default async function setup(project: TestProject): Promise<() => Promise<void>> {
  const mailboxDir = makeTempDir('slipless-e2e-mailbox-');
  const databaseUrl = tempDatabaseUrl();
  const app = await startApp({ port: await freePort(), databaseUrl, env: { ...process.env, MAILBOX_DIR: mailboxDir } });
  project.provide('baseUrl', app.baseUrl);
  project.provide('mailboxDir', mailboxDir);
  project.provide('databaseUrl', databaseUrl);
  return () => app.stop();
}
