import { createReadStream } from 'node:fs';
import { stat } from 'node:fs/promises';
import type { IncomingMessage, ServerResponse } from 'node:http';
import { extname, resolve, sep } from 'node:path';
import type { NodeHandler } from './edge';

/** The types of the files a build puts in dist/client (Astro's bundles, fonts, the favicon, the sheet JSON Schema). */
const CONTENT_TYPES: Record<string, string> = {
  '.js': 'text/javascript; charset=utf-8',
  '.mjs': 'text/javascript; charset=utf-8',
  '.css': 'text/css; charset=utf-8',
  '.json': 'application/json; charset=utf-8',
  '.map': 'application/json; charset=utf-8',
  '.svg': 'image/svg+xml',
  '.png': 'image/png',
  '.jpg': 'image/jpeg',
  '.ico': 'image/x-icon',
  '.webp': 'image/webp',
  '.woff': 'font/woff',
  '.woff2': 'font/woff2',
  '.ttf': 'font/ttf',
  '.txt': 'text/plain; charset=utf-8',
  '.wasm': 'application/wasm',
};

/** Astro names its bundles after their content, so a browser may keep them for a year (common practice for hashed assets). */
const IMMUTABLE = 'public, max-age=31536000, immutable';

/** The file under `root` that `pathname` names, or null for a path that leaves it or cannot be decoded. */
function fileFor(root: string, pathname: string): string | null {
  let decoded: string;
  try {
    decoded = decodeURIComponent(pathname);
  } catch {
    return null;
  }
  if (decoded.includes('\0')) return null;
  const file = resolve(root, `.${decoded}`);
  return file.startsWith(root + sep) ? file : null;
}

/**
 * Astro's built handler (`mode: 'middleware'`, which starts no server of its own) behind the
 * files of the build's client folder: a GET or HEAD for an existing file is answered from
 * `clientDir`, anything else goes to the app.
 */
export function withStaticFiles(app: NodeHandler, clientDir: string): NodeHandler {
  const root = resolve(clientDir);
  return async (req: IncomingMessage, res: ServerResponse) => {
    const url = req.url ?? '/';
    try {
      decodeURI(url);
    } catch {
      res.writeHead(400);
      res.end('Bad request.');
      return;
    }
    const pathname = url.split(/[?#]/, 1)[0];
    const file = req.method === 'GET' || req.method === 'HEAD' ? fileFor(root, pathname) : null;
    const found = file ? await stat(file).catch(() => null) : null;
    if (!file || !found?.isFile()) return app(req, res);
    res.writeHead(200, {
      'Content-Type': CONTENT_TYPES[extname(file).toLowerCase()] ?? 'application/octet-stream',
      'Content-Length': found.size,
      'Last-Modified': found.mtime.toUTCString(),
      'Cache-Control': pathname.startsWith('/_astro/') ? IMMUTABLE : 'public, max-age=0',
    });
    if (req.method === 'HEAD') return res.end();
    createReadStream(file).on('error', () => res.destroy()).pipe(res);
  };
}
