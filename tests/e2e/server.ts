import type { TestProject } from 'vitest/node';
import { freePort, tempDatabaseUrl } from '../helpers/temp';
import { startApp } from './app-process';

/** Vitest global setup for browser tests: starts the built app on a free loopback port with a fresh database. */
export default async function setup(project: TestProject): Promise<() => Promise<void>> {
  const app = await startApp({ port: await freePort(), databaseUrl: tempDatabaseUrl() });
  project.provide('baseUrl', app.baseUrl);
  return () => app.stop();
}
