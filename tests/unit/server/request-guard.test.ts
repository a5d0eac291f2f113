import { describe, expect, it } from 'vitest';
import { contentSecurityPolicy, inlineScriptHashes, isSameOriginWrite, withSecurityHeaders } from '../../../src/lib/server/request-guard';

const post = (headers: Record<string, string>) => new Request('http://127.0.0.1:4321/api/x', { method: 'POST', headers });

describe('isSameOriginWrite', () => {
  it('refuses a cross-site POST and allows same-origin, safe methods and non-browser clients', () => {
    expect(isSameOriginWrite(post({ origin: 'http://evil.example' }))).toBe(false);
    expect(isSameOriginWrite(post({ 'sec-fetch-site': 'cross-site' }))).toBe(false);
    expect(isSameOriginWrite(post({ origin: 'http://127.0.0.1:4321' }))).toBe(true);
    expect(isSameOriginWrite(post({}))).toBe(true);
    expect(isSameOriginWrite(new Request('http://127.0.0.1:4321/', { headers: { origin: 'http://evil.example' } }))).toBe(true);
  });
});

describe('inlineScriptHashes', () => {
  it('hashes inline scripts as CSP Level 3 source expressions and skips external ones', async () => {
    const body = 'customElements.define("x-y", class extends HTMLElement {});';
    // Independent digest through WebCrypto; CSP3 §8.2: 'sha256-' + base64 of the UTF-8 script text.
    const digest = Buffer.from(await crypto.subtle.digest('SHA-256', new TextEncoder().encode(body))).toString('base64');
    const html = `<head><script type="module" src="/a.js"></script><script>${body}</script></head>`;
    expect(inlineScriptHashes(html)).toEqual([`'sha256-${digest}'`]);
  });
});

describe('withSecurityHeaders', () => {
  it('adds a policy without unsafe-inline scripts to HTML and leaves JSON alone', async () => {
    const html = await withSecurityHeaders(new Response('<script>1</script>', { headers: { 'content-type': 'text/html' } }));
    const policy = html.headers.get('content-security-policy') ?? '';
    expect(policy).toMatch(/script-src 'self' 'sha256-[A-Za-z0-9+/=]+'/);
    expect(policy).not.toMatch(/script-src[^;]*unsafe-inline/);
    expect(policy).toContain("frame-ancestors 'none'");
    const json = await withSecurityHeaders(Response.json({ a: 1 }));
    expect(json.headers.get('content-security-policy')).toBeNull();
    expect(json.headers.get('x-content-type-options')).toBe('nosniff');
    expect(contentSecurityPolicy([])).toContain("object-src 'none'");
  });

  it('copies responses whose headers are immutable, such as redirects', async () => {
    const redirect = await withSecurityHeaders(Response.redirect('http://127.0.0.1/sign-in', 302));
    expect(redirect.status).toBe(302);
    expect(redirect.headers.get('location')).toBe('http://127.0.0.1/sign-in');
    expect(redirect.headers.get('x-frame-options')).toBe('DENY');
  });
});
