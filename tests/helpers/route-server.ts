import { createServer, type IncomingMessage, type ServerResponse } from 'node:http';
import type { AddressInfo } from 'node:net';
import { Readable } from 'node:stream';
import type { ReadableStream as NodeReadableStream } from 'node:stream/web';
import { callThroughMiddleware, type Handler } from './api-context';

/** An API route file's exports and the Astro pattern it answers, e.g. `/api/sheets/[sheetId]/logs`. */
export interface ServedRoute {
  pattern: string;
  module: Partial<Record<string, Handler>>;
}

/** Hop-by-hop and framing headers, which belong to each connection rather than to the request. */
const CONNECTION_HEADERS = new Set(['host', 'connection', 'keep-alive', 'transfer-encoding']);

function matchRoute(routes: readonly ServedRoute[], pathname: string): { route: ServedRoute; params: Record<string, string> } | null {
  const parts = pathname.split('/');
  for (const route of routes) {
    const pattern = route.pattern.split('/');
    if (pattern.length !== parts.length) continue;
    const params: Record<string, string> = {};
    const matches = pattern.every((segment, i) => {
      const name = /^\[(\w+)\]$/.exec(segment)?.[1];
      if (name) params[name] = decodeURIComponent(parts[i]!);
      return name !== undefined || segment === parts[i];
    });
    if (matches) return { route, params };
  }
  return null;
}

async function serve(routes: readonly ServedRoute[], req: IncomingMessage, res: ServerResponse): Promise<void> {
  const url = new URL(req.url ?? '/', 'http://127.0.0.1');
  const found = matchRoute(routes, url.pathname);
  const handler = found?.route.module[req.method ?? 'GET'];
  if (!found || !handler) {
    res.writeHead(found ? 405 : 404).end();
    return;
  }
  const headers: Record<string, string> = {};
  for (const [name, value] of Object.entries(req.headers)) if (value !== undefined && !CONNECTION_HEADERS.has(name)) headers[name] = String(value);
  const hasBody = req.method !== 'GET' && req.method !== 'HEAD';
  const response = await callThroughMiddleware(handler, {
    method: req.method,
    path: `${url.pathname}${url.search}`,
    routePattern: found.route.pattern,
    params: found.params,
    headers,
    ...(hasBody ? { body: Readable.toWeb(req) as ReadableStream<Uint8Array> } : {}),
  });
  res.writeHead(response.status, Object.fromEntries(response.headers));
  if (response.body) await new Promise<void>((resolve, reject) => Readable.fromWeb(response.body as NodeReadableStream<Uint8Array>).pipe(res).on('finish', resolve).on('error', reject));
  else res.end();
}

/**
 * Serves the given API routes over real HTTP on a loopback port, each request through the real
 * middleware (bearer tokens, origin check) and then the route, the way the app does; for testing
 * clients that speak HTTP, such as the command-line tools.
 */
export async function startRouteServer(routes: readonly ServedRoute[]): Promise<{ origin: string; close: () => Promise<void> }> {
  const server = createServer((req, res) => {
    serve(routes, req, res).catch((error: unknown) => {
      if (!res.headersSent) res.writeHead(500, { 'content-type': 'text/plain' });
      res.end(String(error));
    });
  });
  await new Promise<void>((resolve) => server.listen(0, '127.0.0.1', resolve));
  const { port } = server.address() as AddressInfo;
  return {
    origin: `http://127.0.0.1:${port}`,
    close: () =>
      new Promise<void>((resolve) => {
        server.closeAllConnections();
        server.close(() => resolve());
      }),
  };
}
