import type { IncomingMessage, ServerResponse } from 'node:http';
import { readdirSync } from 'node:fs';
import { resolve } from 'node:path';
import send from 'send';
import type { NodeHandler } from './edge';

/** Astro names its bundles after their content, so a browser may keep them for a year (common practice for hashed assets). */
const ONE_YEAR_MS = 365 * 24 * 60 * 60 * 1000;

/** A path segment that means the same file name decoded or not, and is no dotfile, `.` or `..`. */
const PLAIN_NAME = /^[A-Za-z0-9_-][A-Za-z0-9._-]*$/;

/**
 * Astro's built handler (`mode: 'middleware'`, which starts no server of its own) behind the
 * files of the build's client folder, served by `send` as the adapter's standalone mode does: a
 * GET or HEAD for an existing file is answered from `clientDir` (with ETag, ranges and
 * conditional requests), anything else goes to the app.
 */
export function withStaticFiles(app: NodeHandler, clientDir: string): NodeHandler {
  const root = resolve(clientDir);
  // The build's files do not change while it runs. A path whose first segment is a plain name none
  // of them has (every API route) goes straight to the app, without send's file lookup; names that
  // send would decode or normalise (percent signs, dots) still take the lookup.
  const topLevel = new Set(readdirSync(root));
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
    const first = pathname.split('/', 2)[1];
    if (PLAIN_NAME.test(first) && !topLevel.has(first)) return app(req, res);
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
