import { createServer, type IncomingHttpHeaders, type Server } from 'node:http';
import type { AddressInfo } from 'node:net';
import { afterEach, describe, expect, it } from 'vitest';
import { clientAddress, edgeListener, parseTrustedProxies } from '../../../src/lib/server/edge';

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
