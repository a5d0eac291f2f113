import { createHash } from 'node:crypto';

const STATE_CHANGING = new Set(['POST', 'PUT', 'PATCH', 'DELETE']);

/**
 * False for a state-changing browser request from another site. Browsers always send Origin
 * (or Sec-Fetch-Site) on such requests; clients that send neither are not browsers and carry
 * no ambient cookie risk.
 */
export function isSameOriginWrite(request: Request): boolean {
  if (!STATE_CHANGING.has(request.method)) return true;
  const origin = request.headers.get('origin');
  if (origin) return origin === new URL(request.url).origin;
  const site = request.headers.get('sec-fetch-site');
  return !site || site === 'same-origin' || site === 'none';
}

/** Headers added to every response. */
export const SECURITY_HEADERS: Record<string, string> = {
  'X-Content-Type-Options': 'nosniff',
  'Referrer-Policy': 'same-origin',
  'X-Frame-Options': 'DENY',
  'Permissions-Policy': 'camera=(), microphone=(), geolocation=()',
  'Cross-Origin-Opener-Policy': 'same-origin',
};

/**
 * A strict Content-Security-Policy: scripts only from this origin or inline scripts whose exact
 * SHA-256 is listed (Astro's island bootstrap), no plugins, no framing. Inline style attributes
 * stay allowed because KaTeX positions formula glyphs with them.
 */
export function contentSecurityPolicy(inlineScriptHashes: string[]): string {
  return [
    "default-src 'self'",
    `script-src 'self' ${inlineScriptHashes.join(' ')}`.trim(),
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
}

/** SHA-256 source expressions of every inline script in an HTML page. */
export function inlineScriptHashes(html: string): string[] {
  const hashes = new Set<string>();
  for (const match of html.matchAll(/<script(?![^>]*\ssrc=)[^>]*>([\s\S]*?)<\/script>/gi)) {
    if (match[1].trim()) hashes.add(`'sha256-${createHash('sha256').update(match[1]).digest('base64')}'`);
  }
  return [...hashes];
}

/**
 * The response with the security headers, plus the policy for HTML (hashing its inline scripts).
 * Always a copy: responses such as Response.redirect have immutable headers.
 */
export async function withSecurityHeaders(response: Response): Promise<Response> {
  const headers = new Headers(response.headers);
  for (const [name, value] of Object.entries(SECURITY_HEADERS)) {
    if (!headers.has(name)) headers.set(name, value);
  }
  const init = { status: response.status, statusText: response.statusText, headers };
  if (!headers.get('content-type')?.includes('text/html')) return new Response(response.body, init);
  const html = await response.text();
  headers.set('Content-Security-Policy', contentSecurityPolicy(inlineScriptHashes(html)));
  return new Response(html, init);
}
