import type { IncomingMessage, ServerResponse } from 'node:http';
import { resolve } from 'node:path';
import send from 'send';
import type { NodeHandler } from './edge';

/** Astro names its bundles after their content, so a browser may keep them for a year (common practice for hashed assets). */
const ONE_YEAR_MS = 365 * 24 * 60 * 60 * 1000;

/**
 * Astro's built handler (`mode: 'middleware'`, which starts no server of its own) behind the
 * files of the build's client folder, served by `send` as the adapter's standalone mode does: a
 * GET or HEAD for an existing file is answered from `clientDir` (with ETag, ranges and
 * conditional requests), anything else goes to the app.
 */
export function withStaticFiles(app: NodeHandler, clientDir: string): NodeHandler {
  const root = resolve(clientDir);
  return (req: IncomingMessage, res: ServerResponse) => {
    const url = req.url ?? '/';
    try {
      decodeURI(url);
    } catch {
      res.writeHead(400);
      res.end('Bad request.');
      return;
    }
    if (req.method !== 'GET' && req.method !== 'HEAD') return app(req, res);
    const pathname = url.split(/[?#]/, 1)[0];
    const hashed = pathname.startsWith('/_astro/');
    let fileFound = false;
    // Before a file is found, an error means no such file (or a path outside root, a dotfile):
    // like a directory, the app answers it.
    send(req, pathname, { root, index: false, maxAge: hashed ? ONE_YEAR_MS : 0, immutable: hashed })
      .on('file', () => (fileFound = true))
      .on('directory', () => app(req, res))
      .on('error', (error) => {
        if (!fileFound) return app(req, res);
        if (res.headersSent) return res.destroy();
        res.writeHead(error.status ?? 500);
        res.end();
      })
      .pipe(res);
  };
}
