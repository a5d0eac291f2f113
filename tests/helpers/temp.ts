import { mkdtempSync } from 'node:fs';
import { createServer } from 'node:net';
import { tmpdir } from 'node:os';
import { join } from 'node:path';

/** A fresh folder under the system temp folder. */
export function makeTempDir(prefix = 'slipless-test-'): string {
  return mkdtempSync(join(tmpdir(), prefix));
}

/** A file: URL for a new, empty SQLite database in its own temp folder. */
export function tempDatabaseUrl(): string {
  return `file:${join(makeTempDir(), 'test.db')}`;
}

/** A TCP port on 127.0.0.1 that was free a moment ago. */
export function freePort(): Promise<number> {
  return new Promise((resolvePort, reject) => {
    const server = createServer();
    server.unref();
    server.on('error', reject);
    server.listen(0, '127.0.0.1', () => {
      const address = server.address();
      server.close(() => (typeof address === 'object' && address ? resolvePort(address.port) : reject(new Error('no port'))));
    });
  });
}
