/**
 * PUBLIC_ORIGIN, read at run time: the scheme, host and port browsers use to reach the app (for
 * example https://slipless.example.org), or null when unset. Throws, naming the setting, when it
 * is not a bare http(s) origin.
 */
export function configuredPublicOrigin(env: NodeJS.ProcessEnv = process.env): string | null {
  const raw = env.PUBLIC_ORIGIN?.trim();
  if (!raw) return null;
  const url = URL.canParse(raw) ? new URL(raw) : null;
  if (!url || !['http:', 'https:'].includes(url.protocol) || url.username || url.password || url.pathname !== '/' || url.search || url.hash) {
    throw new Error(`PUBLIC_ORIGIN must be a bare origin such as https://slipless.example.org (no path), not "${raw}".`);
  }
  return url.origin;
}

/**
 * The origin the browser is on: PUBLIC_ORIGIN when set, otherwise the request's own (which Astro
 * builds only from loopback host names; see security.allowedDomains in astro.config.mjs). Origin
 * checks, mailed links and cookie flags all use this.
 */
export function publicOrigin(requestUrl: URL | string): string {
  return configuredPublicOrigin() ?? new URL(requestUrl).origin;
}

/** The request's URL moved onto the public origin (what Auth.js must see to build its links and cookie names). */
export function publicUrl(requestUrl: URL | string): URL {
  const url = new URL(requestUrl);
  return new URL(`${url.pathname}${url.search}`, publicOrigin(url));
}
