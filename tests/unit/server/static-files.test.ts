import { mkdirSync, writeFileSync } from 'node:fs';
import { createServer, get, type Server } from 'node:http';
import type { AddressInfo } from 'node:net';
import { join } from 'node:path';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { withStaticFiles } from '../../../src/lib/server/static-files';
import { makeTempDir } from '../../helpers/temp';

let server: Server;
let base: string;

beforeAll(async () => {
  const clientDir = makeTempDir('slipless-client-');
  mkdirSync(join(clientDir, '_astro'));
  writeFileSync(join(clientDir, '_astro', 'page.Ab12Cd.js'), 'export {};\n');
  writeFileSync(join(clientDir, 'favicon.svg'), '<svg xmlns="http://www.w3.org/2000/svg"/>');
  const app = withStaticFiles((req, res) => res.end(`app ${req.method} ${req.url}`), clientDir);
  server = createServer(app);
  await new Promise<void>((resolve) => server.listen(0, '127.0.0.1', resolve));
  base = `http://127.0.0.1:${(server.address() as AddressInfo).port}`;
});

afterAll(() => new Promise<void>((resolve) => server.close(() => resolve())));

describe('withStaticFiles', () => {
  it('serves a hashed bundle for a year and other files for revalidation', async () => {
    const bundle = await fetch(`${base}/_astro/page.Ab12Cd.js`);
    expect(bundle.status).toBe(200);
    expect(bundle.headers.get('cache-control')).toBe('public, max-age=31536000, immutable');
    expect(bundle.headers.get('content-type')).toMatch(/^text\/javascript/);
    expect(await bundle.text()).toBe('export {};\n');
    const icon = await fetch(`${base}/favicon.svg`);
    expect(icon.headers.get('cache-control')).toBe('public, max-age=0');
    expect(icon.headers.get('content-type')).toBe('image/svg+xml');
  });

  it('answers a repeated request for an unchanged file with 304', async () => {
    const etag = (await fetch(`${base}/favicon.svg`)).headers.get('etag') ?? '';
    // node:http, not fetch: fetch turns a request with If-None-Match into one that must not be answered from cache.
    const status = await new Promise<number | undefined>((resolve, reject) => {
      get(`${base}/favicon.svg`, { headers: { 'If-None-Match': etag } }, (res) => resolve(res.resume().statusCode)).on('error', reject);
    });
    expect(status).toBe(304);
  });

  it('hands missing files, folders, paths out of the folder and other methods to the app', async () => {
    for (const path of ['/sign-in', '/', '/_astro', '/_astro/', '/_astro/missing.js', '/..%2f..%2fpackage.json', '/api/sheets', '/api/sheets?team=x', '/.hidden', '/favicon.svg/x']) {
      expect(await (await fetch(`${base}${path}`)).text()).toBe(`app GET ${path}`);
    }
    expect(await (await fetch(`${base}/favicon.svg`, { method: 'POST' })).text()).toBe('app POST /favicon.svg');
  });

  it('serves files under names send decodes or normalises, which skip no lookup', async () => {
    for (const path of ['/favicon%2Esvg', '/./favicon.svg', '/_astro/../favicon.svg', '/%5Fastro/page.Ab12Cd.js']) {
      expect((await fetch(`${base}${path}`)).headers.get('content-type'), path).toMatch(/^image\/svg\+xml|^text\/javascript/);
    }
  });

  it('refuses a path that cannot be decoded', async () => {
    expect((await fetch(`${base}/%E0%A4%A`)).status).toBe(400);
  });
});
