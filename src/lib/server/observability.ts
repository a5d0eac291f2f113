/**
 * Request logs (pino) and Prometheus metrics (prom-client) for the node:http edge. Free of
 * astro:env: the start command serves it outside Astro, while the built app (a separate module
 * graph) reports solve times and write-queue depth into the same process-wide metrics.
 */
import { createHash, randomUUID, timingSafeEqual } from 'node:crypto';
import type { IncomingMessage, ServerResponse } from 'node:http';
import { isIP } from 'node:net';
import { pino, type DestinationStream, type Logger } from 'pino';
import { Counter, Gauge, Histogram, Registry, collectDefaultMetrics } from 'prom-client';
import type { NodeHandler } from './edge';

export interface AppMetrics {
  registry: Registry;
  requests: Counter<'method' | 'route' | 'status'>;
  duration: Histogram<'method' | 'route'>;
  solveSeconds: Histogram;
  /** Sources of the write-queue depth: each open database's count of writes queued or running. */
  writeQueues: Set<() => number>;
}

function createMetrics(): AppMetrics {
  const registry = new Registry();
  collectDefaultMetrics({ register: registry });
  const writeQueues = new Set<() => number>();
  new Gauge({
    name: 'slipless_write_queue_depth',
    help: 'Database writes queued or running in this process (every write passes one queue).',
    registers: [registry],
    collect() {
      this.set([...writeQueues].reduce((sum, depth) => sum + depth(), 0));
    },
  });
  return {
    registry,
    writeQueues,
    requests: new Counter({ name: 'slipless_http_requests_total', help: 'HTTP requests answered, by route pattern and status.', labelNames: ['method', 'route', 'status'], registers: [registry] }),
    duration: new Histogram({
      name: 'slipless_http_request_duration_seconds',
      help: 'Time from request to the end of the answer, by route pattern.',
      labelNames: ['method', 'route'],
      buckets: [0.005, 0.01, 0.025, 0.05, 0.1, 0.25, 0.5, 1, 2.5, 5, 10],
      registers: [registry],
    }),
    solveSeconds: new Histogram({
      name: 'slipless_sheet_evaluation_seconds',
      help: 'Time to validate, solve and summarise one sheet document on the server.',
      buckets: [0.001, 0.005, 0.01, 0.025, 0.05, 0.1, 0.25, 0.5, 1, 2.5],
      registers: [registry],
    }),
  };
}

const METRICS_KEY = Symbol.for('slipless.metrics');

/** The process's one metrics set, shared by the edge and the built app through a global symbol (they are separate module graphs). */
export function appMetrics(): AppMetrics {
  const holder = globalThis as { [METRICS_KEY]?: AppMetrics };
  holder[METRICS_KEY] ??= createMetrics();
  return holder[METRICS_KEY];
}

/** What the app's middleware records about a request for its log line (`locals` of the Node adapter). */
export interface RequestFacts {
  route?: string;
  identity?: { user?: { id?: string } } | null;
  team?: { teamId?: string } | null;
}

export interface ObserveSettings {
  logger: Logger;
  metrics: AppMetrics;
  /** METRICS_TOKEN: when set, /metrics asks for `Authorization: Bearer <token>`; when not, it answers loopback peers only. */
  metricsToken: string | null;
}

/** A pino logger writing one JSON line per event; never given request bodies or headers, so none can leak into it. */
export function createLogger(destination?: DestinationStream): Logger {
  return pino({ base: undefined, timestamp: pino.stdTimeFunctions.isoTime }, destination);
}

const locals = new WeakMap<IncomingMessage, RequestFacts>();

/** The locals object the edge made for `req`, for the Node adapter's handler to fill in. */
export function localsOf(req: IncomingMessage): RequestFacts {
  let facts = locals.get(req);
  if (!facts) locals.set(req, (facts = {}));
  return facts;
}

function isLoopback(address: string): boolean {
  const plain = address.replace(/^::ffff:/i, '');
  return isIP(plain) !== 0 && (plain === '::1' || plain.startsWith('127.'));
}

/** Compares digests of equal length in constant time, so the answer time tells nothing about the token. */
function tokenMatches(header: string | undefined, token: string): boolean {
  const digest = (text: string) => new Uint8Array(createHash('sha256').update(text).digest());
  return timingSafeEqual(digest(/^Bearer (.+)$/i.exec(header ?? '')?.[1] ?? ''), digest(token));
}

async function answerMetrics(req: IncomingMessage, res: ServerResponse, { metrics, metricsToken }: ObserveSettings): Promise<void> {
  // Without a token only this machine may read the figures. The edge listener has put the client's
  // address (past trusted proxies only) in X-Forwarded-For, so a public client behind a local proxy is not loopback.
  const client = String(req.headers['x-forwarded-for'] ?? req.socket.remoteAddress ?? '');
  const allowed = metricsToken ? tokenMatches(req.headers.authorization, metricsToken) : isLoopback(client);
  if (!allowed) {
    res.writeHead(metricsToken ? 401 : 403, { 'content-type': 'text/plain; charset=utf-8' });
    res.end(metricsToken ? 'metrics: send Authorization: Bearer <METRICS_TOKEN>.\n' : 'metrics: only answered on loopback unless METRICS_TOKEN is set.\n');
    return;
  }
  res.writeHead(200, { 'content-type': metrics.registry.contentType, 'cache-control': 'no-store' });
  res.end(await metrics.registry.metrics());
}

/**
 * Wraps the app's handler: gives every request an id (answered in `x-request-id`), serves
 * `/metrics`, and when the answer is finished logs one line (request id, method, route pattern,
 * status, duration, user and team ids) and counts it. Paths are logged without their query, which
 * may carry tokens; bodies and headers are never logged.
 */
export function observeRequests(handler: NodeHandler, settings: ObserveSettings): NodeHandler {
  const { logger, metrics } = settings;
  return (req, res) => {
    const started = process.hrtime.bigint();
    const requestId = randomUUID();
    res.setHeader('x-request-id', requestId);
    const path = (req.url ?? '/').split(/[?#]/, 1)[0];
    if (path === '/metrics') return answerMetrics(req, res, settings);
    const facts = localsOf(req);
    res.once('finish', () => {
      const seconds = Number(process.hrtime.bigint() - started) / 1e9;
      // The Astro route pattern keeps the label set small; static files never reach the app and share one label.
      const route = facts.route ?? 'static';
      const method = req.method ?? 'GET';
      metrics.requests.inc({ method, route, status: String(res.statusCode) });
      metrics.duration.observe({ method, route }, seconds);
      logger.info(
        {
          requestId,
          method,
          path,
          route,
          status: res.statusCode,
          durationMs: Math.round(seconds * 1e4) / 10,
          userId: facts.identity?.user?.id ?? null,
          teamId: facts.team?.teamId ?? null,
        },
        'request',
      );
    });
    return handler(req, res);
  };
}
