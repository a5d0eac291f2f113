import { createServer, type Server } from 'node:http';
import type { AddressInfo } from 'node:net';
import { Writable } from 'node:stream';
import { afterEach, describe, expect, it } from 'vitest';
import { edgeListener, parseTrustedProxies, type NodeHandler } from '../../../src/lib/server/edge';
import { appMetrics, createLogger, localsOf, observeRequests } from '../../../src/lib/server/observability';
import { shutDown } from '../../../src/lib/server/shutdown';

const SECRET_PASSWORD = 'correct-horse-battery-staple-42';
const DOCUMENT_MARKER = 'fingertip-document-body-marker';

/** A pino destination that keeps every line. */
function captured() {
  const lines: string[] = [];
  const stream = new Writable({
    write(chunk, _encoding, done) {
      lines.push(...String(chunk).split('\n').filter(Boolean));
      done();
    },
  });
  return { lines, stream };
}

/** Stands in for the built app: reads the whole body, records what the middleware would, answers. */
const app: NodeHandler = (req, res) => {
  let body = '';
  req.on('data', (chunk) => (body += chunk));
  req.on('end', () => {
    const facts = localsOf(req);
    facts.route = '/api/sheets/[sheetId]/revisions';
    facts.identity = { user: { id: 'user-7f3a' } };
    facts.team = { teamId: 'team-19c2' };
    res.writeHead(body.includes('stale') ? 409 : 201, { 'content-type': 'application/json' });
    res.end(JSON.stringify({ echoed: body.length }));
  });
};

let server: Server | undefined;

async function listen(handler: NodeHandler, trustedProxies = ''): Promise<string> {
  server = createServer(edgeListener(handler, { trustedProxies: parseTrustedProxies(trustedProxies), publicOrigin: null }));
  await new Promise<void>((resolve) => server!.listen(0, '127.0.0.1', resolve));
  return `http://127.0.0.1:${(server.address() as AddressInfo).port}`;
}

afterEach(async () => {
  if (server?.listening) await new Promise((resolve) => server!.close(resolve));
});

describe('observeRequests', () => {
  it('answers a request id and logs route, status, duration, user and team ids, never the body or a password', async () => {
    const log = captured();
    const base = await listen(observeRequests(app, { logger: createLogger(log.stream), metrics: appMetrics(), metricsToken: null }));
    const response = await fetch(`${base}/api/sheets/s-1/revisions?token=slp_secret_in_query`, {
      method: 'POST',
      headers: { authorization: `Bearer ${SECRET_PASSWORD}`, cookie: `session=${SECRET_PASSWORD}` },
      body: JSON.stringify({ password: SECRET_PASSWORD, document: { title: DOCUMENT_MARKER } }),
    });
    expect(response.status).toBe(201);
    const requestId = response.headers.get('x-request-id');
    // RFC 9562 (UUID version 4 layout).
    expect(requestId).toMatch(/^[0-9a-f]{8}-[0-9a-f]{4}-4[0-9a-f]{3}-[89ab][0-9a-f]{3}-[0-9a-f]{12}$/);
    await new Promise((r) => setTimeout(r, 50));
    const entry = log.lines.map((line) => JSON.parse(line)).find((e) => e.requestId === requestId);
    expect(entry).toMatchObject({
      msg: 'request',
      method: 'POST',
      path: '/api/sheets/s-1/revisions',
      route: '/api/sheets/[sheetId]/revisions',
      status: 201,
      userId: 'user-7f3a',
      teamId: 'team-19c2',
    });
    expect(entry.durationMs).toBeGreaterThanOrEqual(0);
    const all = log.lines.join('\n');
    for (const secret of [SECRET_PASSWORD, DOCUMENT_MARKER, 'slp_secret_in_query']) expect(all).not.toContain(secret);
  });

  it('gives each request its own id', async () => {
    const base = await listen(observeRequests(app, { logger: createLogger(captured().stream), metrics: appMetrics(), metricsToken: null }));
    const ids = await Promise.all([1, 2, 3].map(async () => (await fetch(`${base}/x`, { method: 'POST', body: '{}' })).headers.get('x-request-id')));
    expect(new Set(ids).size).toBe(3);
  });
});

describe('/metrics', () => {
  it('is Prometheus text with request counts and latency histograms per route, write-queue depth and evaluation times', async () => {
    const metrics = appMetrics();
    const base = await listen(observeRequests(app, { logger: createLogger(captured().stream), metrics, metricsToken: null }));
    await fetch(`${base}/api/sheets/s-2/revisions`, { method: 'POST', body: 'stale' });
    metrics.writeQueues.add(() => 3);
    const response = await fetch(`${base}/metrics`);
    expect(response.status).toBe(200);
    // Prometheus exposition format, text version 0.0.4 (prometheus.io, "Exposition formats").
    expect(response.headers.get('content-type')).toMatch(/^text\/plain; version=0\.0\.4/);
    const text = await response.text();
    expect(text).toMatch(/^# TYPE slipless_http_requests_total counter$/m);
    expect(text).toMatch(/^slipless_http_requests_total\{method="POST",route="\/api\/sheets\/\[sheetId\]\/revisions",status="409"\} [1-9]\d*$/m);
    expect(text).toMatch(/^# TYPE slipless_http_request_duration_seconds histogram$/m);
    expect(text).toMatch(/^slipless_http_request_duration_seconds_bucket\{le="\+Inf",method="POST",route="\/api\/sheets\/\[sheetId\]\/revisions"\} [1-9]\d*$/m);
    expect(text).toMatch(/^slipless_write_queue_depth [3-9]\d*$/m);
    expect(text).toMatch(/^# TYPE slipless_sheet_evaluation_seconds histogram$/m);
  });

  it('answers only loopback clients without a token: a client behind a trusted proxy is refused', async () => {
    const base = await listen(observeRequests(app, { logger: createLogger(captured().stream), metrics: appMetrics(), metricsToken: null }), '127.0.0.1');
    expect((await fetch(`${base}/metrics`)).status).toBe(200);
    expect((await fetch(`${base}/metrics`, { headers: { 'x-forwarded-for': '203.0.113.9' } })).status).toBe(403);
  });

  it('asks for the bearer token when METRICS_TOKEN is set', async () => {
    const base = await listen(observeRequests(app, { logger: createLogger(captured().stream), metrics: appMetrics(), metricsToken: 'metrics-token-5b1e' }));
    expect((await fetch(`${base}/metrics`)).status).toBe(401);
    expect((await fetch(`${base}/metrics`, { headers: { authorization: 'Bearer wrong-token-5b1e' } })).status).toBe(401);
    expect((await fetch(`${base}/metrics`, { headers: { authorization: 'Bearer metrics-token-5b1e' } })).status).toBe(200);
  });
});

describe('shutDown', () => {
  it('finishes a request in progress and the queued writes, refuses new connections, then closes', async () => {
    let pending = 0;
    const events: string[] = [];
    const slow: NodeHandler = (_req, res) => {
      pending++;
      setTimeout(() => {
        res.end('done');
        events.push('answered');
        // A write that outlives its answer (as a queued audit or mail row could) must still finish before close.
        setTimeout(() => {
          pending--;
          events.push('write settled');
        }, 150);
      }, 300);
    };
    const base = await listen(slow);
    const inFlight = fetch(`${base}/slow`).then(async (r) => ({ status: r.status, text: await r.text() }));
    await new Promise((r) => setTimeout(r, 100));
    const stopped = shutDown({ server: server!, pendingWrites: () => pending, close: () => events.push('closed'), logger: createLogger(captured().stream), graceMs: 5_000 });
    await new Promise((r) => setTimeout(r, 20));
    await expect(fetch(`${base}/late`)).rejects.toThrow();
    expect(await inFlight).toEqual({ status: 200, text: 'done' });
    await stopped;
    expect(events).toEqual(['answered', 'write settled', 'closed']);
  });
});
