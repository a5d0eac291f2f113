import { createHash } from 'node:crypto';
import islandScript from 'astro/runtime/server/astro-island.prebuilt.js';
import islandScriptDev from 'astro/runtime/server/astro-island.prebuilt-dev.js';
import idleDirective from 'astro/client/idle.prebuilt.js';
import loadDirective from 'astro/client/load.prebuilt.js';
import mediaDirective from 'astro/client/media.prebuilt.js';
import onlyDirective from 'astro/client/only.prebuilt.js';
import visibleDirective from 'astro/client/visible.prebuilt.js';

const STATE_CHANGING = new Set(['POST', 'PUT', 'PATCH', 'DELETE']);

/**
 * False for a state-changing browser request from another site than `origin` (the public
 * origin). Browsers always send Origin (or Sec-Fetch-Site) on such requests; clients that send
 * neither are not browsers and carry no ambient cookie risk.
 */
export function isSameOriginWrite(request: Request, origin: string): boolean {
  if (!STATE_CHANGING.has(request.method)) return true;
  const sent = request.headers.get('origin');
  if (sent) return sent === origin;
  const site = request.headers.get('sec-fetch-site');
  return !site || site === 'same-origin' || site === 'none';
}

/** One year, the common practice for Strict-Transport-Security once a site is served over HTTPS only. */
const HSTS = 'max-age=31536000';

/**
 * Headers every response carries, from the edge server (static files, adapter errors) and from
 * the middleware (everything Astro renders). HSTS only when the browser reached the app over
 * HTTPS: sending it over plain HTTP on a loopback port would pin the host name to HTTPS.
 */
export function securityHeaders(https: boolean): Record<string, string> {
  return {
    'X-Content-Type-Options': 'nosniff',
    'Referrer-Policy': 'same-origin',
    'X-Frame-Options': 'DENY',
    'Permissions-Policy': 'camera=(), microphone=(), geolocation=()',
    'Cross-Origin-Opener-Policy': 'same-origin',
    ...(https ? { 'Strict-Transport-Security': HSTS } : {}),
  };
}

/**
 * The only inline scripts pages may run: Astro's island element (production and development
 * builds) and its client-directive loaders, the same text on every page. Hashing what a page
 * happens to contain would also allow a script injected through user content.
 */
const OWN_INLINE_SCRIPTS = [islandScript, islandScriptDev, idleDirective, loadDirective, mediaDirective, onlyDirective, visibleDirective];

const scriptHash = (text: string) => `'sha256-${createHash('sha256').update(text).digest('base64')}'`;

/**
 * A strict Content-Security-Policy: scripts only from this origin or Astro's own inline scripts,
 * no plugins, no framing. Inline style attributes stay allowed because KaTeX positions formula
 * glyphs with them.
 */
export const CONTENT_SECURITY_POLICY = [
  "default-src 'self'",
  `script-src 'self' ${OWN_INLINE_SCRIPTS.map(scriptHash).join(' ')}`,
  "style-src 'self' 'unsafe-inline'",
  "img-src 'self' data: blob:",
  "font-src 'self'",
  "connect-src 'self'",
  "worker-src 'self' blob:",
  "object-src 'none'",
  "base-uri 'self'",
  "form-action 'self'",
  "frame-ancestors 'none'",
].join('; ');

/**
 * The response with the security headers, the policy for HTML, and `Cache-Control: no-store`
 * when it was made for a signed-in caller (it may hold team data no cache should keep).
 * Always a copy: responses such as Response.redirect have immutable headers.
 */
export function withSecurityHeaders(response: Response, { https, signedIn }: { https: boolean; signedIn: boolean }): Response {
  const headers = new Headers(response.headers);
  for (const [name, value] of Object.entries(securityHeaders(https))) {
    if (!headers.has(name)) headers.set(name, value);
  }
  if (headers.get('content-type')?.includes('text/html')) headers.set('Content-Security-Policy', CONTENT_SECURITY_POLICY);
  if (signedIn) headers.set('Cache-Control', 'no-store');
  return new Response(response.body, { status: response.status, statusText: response.statusText, headers });
}
