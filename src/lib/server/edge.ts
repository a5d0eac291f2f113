import type { IncomingMessage, RequestListener, ServerResponse } from 'node:http';
import { BlockList, isIP, type Socket } from 'node:net';
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

const MIB = 1024 * 1024;

/**
 * How much of a refused request's unread body is read and discarded before its connection is
 * closed: at most this many bytes, for at most `totalMs`, and no longer than `idleMs` without data.
 * The same idea as a web server's "lingering close" (nginx: lingering_close, lingering_time 30 s,
 * lingering_timeout 5 s).
 */
export const LINGER: LingerLimits = { bytes: 64 * MIB, totalMs: 30_000, idleMs: 5_000 };

export interface LingerLimits {
  readonly bytes: number;
  readonly totalMs: number;
  readonly idleMs: number;
}

/**
 * Closes a connection whose request body was not read to its end (an early 401, 403 or 413 sent
 * with `connection: close`) without losing the answer. Node closes such a socket as soon as the
 * answer is written; with the client's unsent body still arriving, the kernel then resets the
 * connection, and a client that sends its whole body before reading (many do) gets EPIPE or a
 * reset instead of the answer. Here the answer is written and the sending side shut, then what the
 * client still sends is read and discarded, within LINGER, before the socket is destroyed.
 */
function lingeringClose(req: IncomingMessage, socket: Socket, limits: LingerLimits): void {
  if (socket.writable) socket.end();
  let drained = 0;
  const started = Date.now();
  let idle: NodeJS.Timeout | undefined;
  const close = () => {
    clearTimeout(idle);
    clearTimeout(total);
    socket.destroy();
  };
  const total = setTimeout(close, limits.totalMs);
  const waitIdle = () => {
    clearTimeout(idle);
    idle = setTimeout(close, Math.min(limits.idleMs, Math.max(0, limits.totalMs - (Date.now() - started))));
  };
  // The app stopped reading mid-body; whatever still listens for it is detached so the rest flows here and is dropped.
  req.removeAllListeners('data');
  req.removeAllListeners('readable');
  req.on('data', (chunk: Buffer) => {
    drained += chunk.byteLength;
    if (drained > limits.bytes) close();
    else waitIdle();
  });
  req.once('end', close);
  req.once('error', close);
  socket.once('close', () => {
    clearTimeout(idle);
    clearTimeout(total);
  });
  waitIdle();
  req.resume();
}

/** Makes the server's close after a `connection: close` answer linger while the request's body is still arriving. */
function lingerOnClose(req: IncomingMessage, limits: LingerLimits): void {
  const socket = req.socket;
  // node:http ends a connection after an answer marked `connection: close` through destroySoon(), which destroys the socket once the answer is flushed.
  socket.destroySoon = function destroySoon(this: Socket) {
    if (req.complete || this.destroyed) return Object.getPrototypeOf(this).destroySoon.call(this);
    lingeringClose(req, this, limits);
  };
}

/**
 * The node:http listener in front of Astro. It decides which forwarding headers to believe
 * before Astro reads them (Astro takes X-Forwarded-For as clientAddress and X-Forwarded-Proto as
 * the URL's scheme from anyone): the client address goes on as the only X-Forwarded-For value,
 * the scheme only from a trusted proxy, and the host never (PUBLIC_ORIGIN names it). It also puts
 * the security headers on every response, including static files that never reach the middleware,
 * and lets a refused request's body drain (within LINGER) before its connection closes.
 */
export function edgeListener(handler: NodeHandler, { trustedProxies, publicOrigin }: EdgeSettings, linger: LingerLimits = LINGER): RequestListener {
  return (req, res) => {
    lingerOnClose(req, linger);
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
