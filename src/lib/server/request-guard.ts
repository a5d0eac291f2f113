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
