import { readdirSync, readFileSync } from 'node:fs';
import { join, relative } from 'node:path';
import { describe, expect, it } from 'vitest';

/** Every TypeScript, Astro and JavaScript file under `dir`. */
function sourceFiles(dir: string): string[] {
  return readdirSync(dir, { withFileTypes: true }).flatMap((entry) => {
    const path = join(dir, entry.name);
    if (entry.isDirectory()) return sourceFiles(path);
    return /\.(ts|tsx|astro|mjs|js)$/.test(entry.name) ? [path] : [];
  });
}

// An assignment, compound assignment, delete or Object.assign on process.env (dotted or indexed).
const ENV_WRITE = /(\bdelete\s+process\.env\b|\bprocess\.env(\.\w+|\[[^\]]+\])\s*(=(?!=)|\?\?=|\|\|=|&&=)|Object\.assign\(\s*process\.env\b)/;

describe('settings', () => {
  it('are never written into process.env by the app or its start command: astro.config.mjs declares them, code only reads them', () => {
    const writers = sourceFiles('src')
      .filter((file) => ENV_WRITE.test(readFileSync(file, 'utf8')))
      .map((file) => relative('src', file).replaceAll('\\', '/'));
    expect(writers).toEqual([]);
  });

  it('the check recognises each form of write', () => {
    for (const line of ['process.env.X = "1"', 'process.env["X"] = y', 'process.env.X ??= y', 'delete process.env.X', 'Object.assign(process.env, y)']) {
      expect(ENV_WRITE.test(line), line).toBe(true);
    }
    expect(ENV_WRITE.test('if (process.env.X === "1") read()')).toBe(false);
  });

  it('are each declared in the typed environment schema', () => {
    const config = readFileSync('astro.config.mjs', 'utf8');
    const read = new Set(sourceFiles('src').flatMap((file) => [...readFileSync(file, 'utf8').matchAll(/process\.env\.([A-Z_]+)/g)].map((m) => m[1])));
    // Read by a command that calls the server as a client (src/cli/check-log.ts), never by the server: not a server setting.
    for (const clientOnly of ['SLIPLESS_TOKEN']) read.delete(clientOnly);
    for (const name of ['DATABASE_URL', 'AUTH_SECRET', 'PUBLIC_ORIGIN', 'TRUSTED_PROXIES', 'HOST', 'PORT', 'MAILBOX_DIR', 'SMTP_HOST', 'SMTP_PORT', 'SMTP_SECURE', 'SMTP_USER', 'SMTP_PASSWORD', 'SMTP_FROM', ...read]) {
      expect(config, name).toMatch(new RegExp(`\\b${name}: envField\\.`));
    }
  });
});
