import { createServer, type IncomingHttpHeaders, type IncomingMessage, type Server, type ServerResponse } from 'node:http';
import { connect, type AddressInfo } from 'node:net';
import { afterEach, describe, expect, it } from 'vitest';
import { clientAddress, edgeListener, LINGER, parseTrustedProxies } from '../../../src/lib/server/edge';
import { respond } from '../../../src/lib/server/http';
import { readBody } from '../../../src/lib/server/request-body';

describe('parseTrustedProxies', () => {
  it('takes addresses and CIDR ranges of both families and names the setting on anything else', () => {
    const list = parseTrustedProxies(' 10.0.0.0/8, 192.168.1.7 ,fd00::/8');
    expect(list.check('10.200.3.4', 'ipv4')).toBe(true);
    expect(list.check('192.168.1.7', 'ipv4')).toBe(true);
    expect(list.check('192.168.1.8', 'ipv4')).toBe(false);
    expect(list.check('fd12::1', 'ipv6')).toBe(true);
    expect(parseTrustedProxies(undefined).check('127.0.0.1', 'ipv4')).toBe(false);
    for (const bad of ['proxy.internal', '10.0.0.0/33', '10.0.0.0/8/1', '10.0.0.0/x']) expect(() => parseTrustedProxies(bad)).toThrow(/TRUSTED_PROXIES/);
  });
});

describe('clientAddress', () => {
  const trusted = parseTrustedProxies('10.0.0.0/8, ::1');

  it('is the socket peer when that is not a trusted proxy, whatever X-Forwarded-For says', () => {
    expect(clientAddress('203.0.113.9', '198.51.100.1', trusted)).toBe('203.0.113.9');
    expect(clientAddress('::ffff:203.0.113.9', undefined, trusted)).toBe('203.0.113.9');
  });

  it('walks X-Forwarded-For from the right past trusted hops', () => {
    expect(clientAddress('10.0.0.2', '198.51.100.1, 203.0.113.9, 10.0.0.5', trusted)).toBe('203.0.113.9');
    expect(clientAddress('::1', ['198.51.100.1', '10.0.0.5'], trusted)).toBe('198.51.100.1');
    expect(clientAddress('10.0.0.2', '10.0.0.3', trusted)).toBe('10.0.0.3');
    expect(clientAddress('10.0.0.2', 'not-an-address', trusted)).toBe('10.0.0.2');
  });
});

describe('edgeListener', () => {
  let server: Server | undefined;

  afterEach(async () => {
    await new Promise((resolve) => server?.close(resolve));
    server = undefined;
  });

  /** Serves through the edge on loopback; returns what the app handler saw and the response. */
  async function through(settings: { trustedProxies?: string; publicOrigin?: string | null }, headers: Record<string, string>) {
    let seen: IncomingHttpHeaders = {};
    server = createServer(
      edgeListener(
        (req, res) => {
          seen = { ...req.headers };
          res.end('ok');
        },
        { trustedProxies: parseTrustedProxies(settings.trustedProxies), publicOrigin: settings.publicOrigin ?? null },
      ),
    );
    await new Promise<void>((resolve) => server!.listen(0, '127.0.0.1', resolve));
    const { port } = server.address() as AddressInfo;
    const response = await fetch(`http://127.0.0.1:${port}/`, { headers });
    await response.text();
    return { seen, response };
  }

  const forged = { 'x-forwarded-for': '203.0.113.9', 'x-forwarded-proto': 'https', 'x-forwarded-host': 'evil.example', forwarded: 'for=203.0.113.9' };

  it('replaces forwarding headers from an untrusted peer with the socket address', async () => {
    const { seen, response } = await through({}, forged);
    expect(seen['x-forwarded-for']).toBe('127.0.0.1');
    expect(seen['x-forwarded-proto']).toBeUndefined();
    expect(seen['x-forwarded-host']).toBeUndefined();
    expect(seen.forwarded).toBeUndefined();
    expect(response.headers.get('x-content-type-options')).toBe('nosniff');
    expect(response.headers.get('strict-transport-security')).toBeNull();
  });

  it("keeps a trusted proxy's client address and scheme, and then sends HSTS", async () => {
    const { seen, response } = await through({ trustedProxies: '127.0.0.1' }, forged);
    expect(seen['x-forwarded-for']).toBe('203.0.113.9');
    expect(seen['x-forwarded-proto']).toBe('https');
    expect(seen['x-forwarded-host']).toBeUndefined();
    expect(response.headers.get('strict-transport-security')).toMatch(/^max-age=/);
  });

  it('sends HSTS on every response when the public origin is https', async () => {
    const { response } = await through({ publicOrigin: 'https://slipless.example.org' }, {});
    expect(response.headers.get('strict-transport-security')).toMatch(/^max-age=/);
  });
});

describe('edgeListener closing a connection after an early refusal', () => {
  const KIB = 1024;
  const MIB = 1024 * KIB;
  const LIMIT = 64 * KIB;
  let server: Server | undefined;

  afterEach(async () => {
    server?.closeAllConnections();
    await new Promise((resolve) => server?.close(resolve));
    server = undefined;
  });

  /**
   * Reads the body as the app does (the Node request as a fetch Request body, counted by readBody)
   * and answers through respond(): past LIMIT that is 413 with `connection: close`, the rest unread.
   */
  async function appLike(req: IncomingMessage, res: ServerResponse) {
    const request = new Request('http://127.0.0.1/api/sheets', { method: 'POST', headers: { 'content-type': 'application/json' }, body: req as unknown as BodyInit, duplex: 'half' } as RequestInit);
    const response = respond(await readBody(request, LIMIT));
    res.writeHead(response.status, Object.fromEntries(response.headers));
    res.end(await response.text());
  }

  async function serve(linger = LINGER): Promise<number> {
    server = createServer(edgeListener((req, res) => void appLike(req, res), { trustedProxies: parseTrustedProxies(undefined), publicOrigin: null }, linger));
    await new Promise<void>((resolve) => server!.listen(0, '127.0.0.1', resolve));
    return (server.address() as AddressInfo).port;
  }

  /**
   * A client that writes its whole body before reading anything, as many simple HTTP clients do
   * (common practice: HTTP/1.1, RFC 9112 section 9.6, lets a server close after a response while
   * the client still sends, which is when a reset can destroy the unread response).
   * Resolves to what it read once the server closed, and the write error if any.
   */
  function writeFirst(port: number, bytes: number): Promise<{ text: string; writeError: string | null }> {
    return new Promise((resolve) => {
      const socket = connect(port, '127.0.0.1');
      socket.pause();
      let writeError: string | null = null;
      socket.on('error', (error: NodeJS.ErrnoException) => (writeError ??= error.code ?? error.message));
      const closed = new Promise((done) => socket.once('close', done));
      socket.on('connect', async () => {
        // Chunked, as a streaming client sends a body of unknown length: the server reads up to the limit, then refuses.
        socket.write(`POST /api/sheets HTTP/1.1\r\nhost: 127.0.0.1\r\ncontent-type: application/json\r\ntransfer-encoding: chunked\r\n\r\n`);
        const chunk = `${(64 * KIB).toString(16)}\r\n${' '.repeat(64 * KIB)}\r\n`;
        for (let sent = 0; sent < bytes && !writeError && !socket.destroyed; sent += 64 * KIB) {
          if (!socket.write(chunk)) await new Promise((next) => (socket.once('drain', next), socket.once('close', next)));
        }
        if (!writeError && !socket.destroyed) socket.write('0\r\n\r\n');
        let text = '';
        socket.on('data', (data) => (text += data));
        socket.resume();
        await closed;
        resolve({ text, writeError });
      });
    });
  }

  it('still delivers the 413 to a client that sends its whole over-size body before reading', async () => {
    const port = await serve();
    // 8 MiB, 128 times the limit: far more than the socket buffers hold, so the client is still sending when the 413 is written.
    const outcomes = await Promise.all(Array.from({ length: 4 }, () => writeFirst(port, 8 * MIB)));
    for (const { text, writeError } of outcomes) {
      expect(writeError).toBeNull();
      expect(text).toMatch(/^HTTP\/1\.1 413 /);
      expect(text.toLowerCase()).toContain('connection: close');
      expect(text).toContain('larger than the 64 KiB this endpoint accepts');
    }
  });

  it('stops reading a refused body after the bounded amount and closes the connection', async () => {
    const port = await serve({ ...LINGER, bytes: 1 * MIB });
    const started = Date.now();
    const { writeError } = await writeFirst(port, 64 * MIB);
    // The server hung up long before 64 MiB went through: the client's write failed.
    expect(writeError).toMatch(/EPIPE|ECONNRESET/);
    expect(Date.now() - started).toBeLessThan(LINGER.totalMs);
  });

  it('closes a refused connection whose client goes quiet, after the idle time', async () => {
    const port = await serve({ ...LINGER, idleMs: 200 });
    const connections = () => new Promise<number>((resolve, reject) => server!.getConnections((error, count) => (error ? reject(error) : resolve(count))));
    // Half-open allowed, so the client neither sends nor closes after the server shuts its side.
    const socket = connect({ port, host: '127.0.0.1', allowHalfOpen: true });
    let text = '';
    socket.on('data', (data) => (text += data));
    socket.on('error', () => {});
    await new Promise((ready) => socket.on('connect', ready));
    // Chunked, so the server reads past the limit before refusing; then the client sends nothing more.
    socket.write(`POST /api/sheets HTTP/1.1\r\nhost: 127.0.0.1\r\ntransfer-encoding: chunked\r\n\r\n${(LIMIT + KIB).toString(16)}\r\n`);
    socket.write(' '.repeat(LIMIT + KIB));
    await new Promise((answered) => socket.once('end', answered));
    const answeredAt = Date.now();
    expect(text).toMatch(/^HTTP\/1\.1 413 /);
    expect(await connections()).toBe(1);
    await expect.poll(connections, { timeout: LINGER.idleMs, interval: 20 }).toBe(0);
    expect(Date.now() - answeredAt).toBeGreaterThanOrEqual(150);
    socket.destroy();
  });
});
