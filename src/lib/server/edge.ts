import type { IncomingMessage, RequestListener, ServerResponse } from 'node:http';
import { BlockList, isIP } from 'node:net';
import type { TLSSocket } from 'node:tls';
import { securityHeaders } from './request-guard';

/** Astro's built request handler (static files from dist/client, then the app). */
export type NodeHandler = (req: IncomingMessage, res: ServerResponse) => unknown;

export interface EdgeSettings {
  /** TRUSTED_PROXIES: the only peers whose forwarding headers are believed. */
  trustedProxies: BlockList;
  /** PUBLIC_ORIGIN, or null. */
  publicOrigin: string | null;
}

/** Headers that describe an earlier hop; only a trusted proxy's are kept, and Astro reads some of them. */
const FORWARDING_HEADERS = ['forwarded', 'x-forwarded-for', 'x-forwarded-proto', 'x-forwarded-host', 'x-forwarded-port', 'x-real-ip'];

/**
 * TRUSTED_PROXIES: comma-separated IP addresses or CIDR ranges (IPv4 or IPv6) of the reverse
 * proxies in front of the app. Throws, naming the setting, on anything else.
 */
export function parseTrustedProxies(value: string | undefined): BlockList {
  const list = new BlockList();
  for (const entry of (value ?? '').split(',').map((part) => part.trim()).filter(Boolean)) {
    const [address, bits, ...rest] = entry.split('/');
    const family = isIP(address);
    const widest = family === 6 ? 128 : 32;
    const prefix = bits === undefined ? widest : /^\d+$/.test(bits) ? Number(bits) : NaN;
    if (!family || rest.length || !(prefix >= 0 && prefix <= widest)) {
      throw new Error(`TRUSTED_PROXIES: "${entry}" is not an IP address or CIDR range (such as 10.0.0.0/8 or ::1).`);
    }
    list.addSubnet(address, prefix, family === 6 ? 'ipv6' : 'ipv4');
  }
  return list;
}

/** An IPv4 peer reported in IPv4-mapped IPv6 form (dual-stack sockets) as plain IPv4. */
function plainAddress(address: string): string {
  return /^::ffff:\d+\.\d+\.\d+\.\d+$/i.test(address) ? address.slice(7) : address;
}

function isTrusted(trusted: BlockList, address: string): boolean {
  const family = isIP(address);
  return family !== 0 && trusted.check(address, family === 6 ? 'ipv6' : 'ipv4');
}

function firstValue(header: string | string[] | undefined): string | undefined {
  return (Array.isArray(header) ? header[0] : header)?.split(',')[0].trim().toLowerCase();
}

/**
 * The client's address: the socket's peer unless that is a trusted proxy. Each proxy appends the
 * address it received from to X-Forwarded-For, so the list is walked from the right past trusted
 * hops; the first address that is not trusted is the client (entries left of it are whatever the
 * client chose to send).
 */
export function clientAddress(peer: string, forwardedFor: string | string[] | undefined, trusted: BlockList): string {
  let address = plainAddress(peer);
  const hops = [forwardedFor ?? []].flat().join(',').split(',').map((hop) => plainAddress(hop.trim())).filter(Boolean);
  while (isTrusted(trusted, address) && hops.length) {
    const next = hops.pop()!;
    if (!isIP(next)) break;
    address = next;
  }
  return address;
}

/**
 * The node:http listener in front of Astro. It decides which forwarding headers to believe
 * before Astro reads them (Astro takes X-Forwarded-For as clientAddress and X-Forwarded-Proto as
 * the URL's scheme from anyone): the client address goes on as the only X-Forwarded-For value,
 * the scheme only from a trusted proxy, and the host never (PUBLIC_ORIGIN names it). It also puts
 * the security headers on every response, including static files that never reach the middleware.
 */
export function edgeListener(handler: NodeHandler, { trustedProxies, publicOrigin }: EdgeSettings): RequestListener {
  return (req, res) => {
    const peer = req.socket.remoteAddress ?? '';
    const viaProxy = isTrusted(trustedProxies, plainAddress(peer));
    const scheme = viaProxy ? firstValue(req.headers['x-forwarded-proto']) : undefined;
    const client = clientAddress(peer, viaProxy ? req.headers['x-forwarded-for'] : undefined, trustedProxies);
    for (const name of FORWARDING_HEADERS) delete req.headers[name];
    req.headers['x-forwarded-for'] = client;
    if (scheme === 'https' || scheme === 'http') req.headers['x-forwarded-proto'] = scheme;

    const https = publicOrigin?.startsWith('https:') || scheme === 'https' || (req.socket as TLSSocket).encrypted === true;
    for (const [name, value] of Object.entries(securityHeaders(https))) res.setHeader(name, value);
    handler(req, res);
  };
}
