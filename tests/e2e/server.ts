import { spawn, type ChildProcess } from 'node:child_process';
import { existsSync } from 'node:fs';
import type { TestProject } from 'vitest/node';
import { freePort, tempDatabaseUrl } from '../helpers/temp';

let server: ChildProcess | undefined;

/** Vitest global setup for browser tests: starts the built app on a free loopback port with a fresh database. */
export default async function setup(project: TestProject): Promise<() => Promise<void>> {
  if (!existsSync('dist/server/entry.mjs')) throw new Error('Build first: npm run build (npm run test:e2e does it).');
  const port = await freePort();
  const baseUrl = `http://127.0.0.1:${port}`;
  let output = '';
  server = spawn('node_modules/.bin/tsx', ['src/cli/start.ts'], {
    env: { ...process.env, PORT: String(port), HOST: '127.0.0.1', DATABASE_URL: tempDatabaseUrl() },
    stdio: ['ignore', 'pipe', 'pipe'],
  });
  server.stdout?.on('data', (chunk) => (output += chunk));
  server.stderr?.on('data', (chunk) => (output += chunk));
  const deadline = Date.now() + 60_000;
  for (;;) {
    try {
      if ((await fetch(`${baseUrl}/api/health`)).ok) break;
    } catch {
      // not listening yet
    }
    if (server.exitCode !== null || Date.now() > deadline) throw new Error(`The app did not start on ${baseUrl}:\n${output}`);
    await new Promise((r) => setTimeout(r, 200));
  }
  project.provide('baseUrl', baseUrl);
  return async () => {
    server?.kill('SIGTERM');
  };
}
