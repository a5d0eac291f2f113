import { execFileSync, spawn } from 'node:child_process';
import { existsSync, readdirSync, statSync } from 'node:fs';
import { join } from 'node:path';
import { makeTempDir } from '../helpers/temp';

/** A running copy of the built app. */
export interface AppProcess {
  baseUrl: string;
  /** Stops the app and waits until its process has exited. */
  stop(): Promise<void>;
  /** Everything the app printed so far (stdout and stderr). */
  output(): string;
  /** Sends `signal` without waiting; `exited` tells how the process ended. */
  signal(signal: NodeJS.Signals): void;
  exited: Promise<{ code: number | null; signal: NodeJS.Signals | null }>;
  /** The process id of the app's node process when started with `singleProcess` (the tsx launcher's otherwise). */
  pid: number | undefined;
}

/**
 * Starts the built app the way `npm start` serves it (src/cli/start.ts: migrate, seed, serve) on
 * 127.0.0.1:port with the given database and environment, and waits until /api/health answers.
 */
export async function startApp(options: { port: number; databaseUrl: string; env?: NodeJS.ProcessEnv; singleProcess?: boolean; cwd?: string; nodeArgs?: string[] }): Promise<AppProcess> {
  // `cwd` names another checkout with its own build (a before/after comparison); its relative paths resolve there.
  if (!existsSync(join(options.cwd ?? '.', 'dist/server/entry.mjs'))) throw new Error('Build first: npm run build (npm run test:e2e does it).');
  const baseUrl = `http://127.0.0.1:${options.port}`;
  let output = '';
  // The tsx command runs the app in a child process of its own; a SIGKILL (the crash script's) must reach the app itself, so node loads tsx as a hook instead.
  const [command, args] = options.singleProcess ? [process.execPath, [...(options.nodeArgs ?? []), '--import', 'tsx', 'src/cli/start.ts']] : ['node_modules/.bin/tsx', ['src/cli/start.ts']];
  const child = spawn(command, args, {
    cwd: options.cwd,
    env: {
      // Mail goes to a fresh folder unless the caller names one, so a test run never fills the working copy's data/mail.
      MAILBOX_DIR: makeTempDir('slipless-mailbox-'),
      // Uploaded controller logs likewise, so a test run never fills the working copy's data/uploads.
      LOG_STORAGE_DIR: makeTempDir('slipless-logs-'),
      ...(options.env ?? process.env),
      PORT: String(options.port),
      HOST: '127.0.0.1',
      DATABASE_URL: options.databaseUrl,
    },
    stdio: ['ignore', 'pipe', 'pipe'],
  });
  child.stdout?.on('data', (chunk) => (output += chunk));
  child.stderr?.on('data', (chunk) => (output += chunk));
  const exited = new Promise<{ code: number | null; signal: NodeJS.Signals | null }>((resolve) => child.once('exit', (code, signal) => resolve({ code, signal })));
  const deadline = Date.now() + 60_000;
  for (;;) {
    try {
      if ((await fetch(`${baseUrl}/api/health`)).ok) break;
    } catch {
      // not listening yet
    }
    if (child.exitCode !== null || Date.now() > deadline) {
      child.kill('SIGTERM');
      throw new Error(`The app did not start on ${baseUrl}:\n${output}`);
    }
    await new Promise((r) => setTimeout(r, 200));
  }
  return {
    baseUrl,
    async stop() {
      if (child.exitCode === null && child.signalCode === null) child.kill('SIGTERM');
      await exited;
    },
    output: () => output,
    signal: (signal) => child.kill(signal),
    exited,
    pid: child.pid,
  };
}

/** Newest modification time under a folder, ms. */
function newest(folder: string): number {
  let latest = 0;
  for (const entry of readdirSync(folder, { withFileTypes: true })) {
    const path = join(folder, entry.name);
    latest = Math.max(latest, entry.isDirectory() ? newest(path) : statSync(path).mtimeMs);
  }
  return latest;
}

/** For the measurement scripts run outside `npm test`: builds the app when the build is missing or older than src, and makes sure Chromium is there. */
export function ensureBuiltAppAndBrowser(): void {
  const entry = 'dist/server/entry.mjs';
  if (!existsSync(entry) || statSync(entry).mtimeMs < newest('src')) {
    console.log('Building the app (the build is missing or older than src)...');
    execFileSync('npm', ['run', 'build'], { stdio: 'inherit' });
  }
  execFileSync('node_modules/.bin/tsx', ['tests/e2e/ensure-chromium.ts'], { stdio: 'inherit' });
}
