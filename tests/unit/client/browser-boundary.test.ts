import { existsSync, readdirSync, readFileSync, statSync } from 'node:fs';
import { dirname, join, relative, resolve, sep } from 'node:path';
import { describe, expect, it } from 'vitest';

const ROOT = process.cwd();

/** The code that runs in the browser (or is shared with it): it may not import the server or the database, not even types. */
const BROWSER_FOLDERS = ['src/components', 'src/lib/client', 'src/lib/contract', 'src/lib/validation', 'src/lib/view', 'src/workers'];
const SERVER_ONLY = ['src/lib/server', 'src/db'];

const SOURCE = /\.(ts|tsx)$/;
// import/export ... from '…', side-effect imports, dynamic import('…') and import type alike.
const SPECIFIER = /(?:\bfrom\s*|\bimport\s*\(?\s*)['"]([^'"]+)['"]/g;

function sourceFiles(dir: string): string[] {
  return readdirSync(dir, { withFileTypes: true }).flatMap((entry) => {
    const path = join(dir, entry.name);
    if (entry.isDirectory()) return sourceFiles(path);
    return SOURCE.test(entry.name) ? [path] : [];
  });
}

/** The file a relative specifier names (with or without extension, or a folder's index), or null for packages. */
function resolveImport(from: string, specifier: string): string | null {
  if (!specifier.startsWith('.')) return null;
  const base = resolve(dirname(from), specifier);
  const candidates = [base, `${base}.ts`, `${base}.tsx`, join(base, 'index.ts'), join(base, 'index.tsx')];
  return candidates.find((path) => existsSync(path) && statSync(path).isFile()) ?? base;
}

const inServerOnly = (path: string) => SERVER_ONLY.some((folder) => `${relative(ROOT, path).split(sep).join('/')}/`.startsWith(`${folder}/`));

/** Every server-only module reachable from `start` through relative imports, as "importer -> imported" chains. */
function serverImportsReachableFrom(start: string): string[] {
  const seen = new Set<string>();
  const found: string[] = [];
  const queue: { file: string; chain: string[] }[] = [{ file: start, chain: [] }];
  while (queue.length > 0) {
    const { file, chain } = queue.shift()!;
    if (seen.has(file)) continue;
    seen.add(file);
    const text = readFileSync(file, 'utf8');
    for (const [, specifier] of text.matchAll(SPECIFIER)) {
      const target = resolveImport(file, specifier);
      if (!target) continue;
      const link = [...chain, `${relative(ROOT, file)} -> ${specifier}`];
      if (inServerOnly(target)) found.push(link.join(' | '));
      else if (SOURCE.test(target) && existsSync(target)) queue.push({ file: target, chain: link });
    }
  }
  return found;
}

describe('the browser boundary', () => {
  const files = BROWSER_FOLDERS.flatMap((folder) => sourceFiles(join(ROOT, folder)));

  it('scans the browser folders', () => {
    expect(files.length).toBeGreaterThan(50);
  });

  it('finds a forbidden import where there is one', () => {
    expect(inServerOnly(join(ROOT, 'src/lib/server/sheet-page.ts'))).toBe(true);
    expect(inServerOnly(join(ROOT, 'src/db/index.ts'))).toBe(true);
    expect(inServerOnly(join(ROOT, 'src/lib/serverless.ts'))).toBe(false);
    expect(serverImportsReachableFrom(join(ROOT, 'src/lib/server/sheet-page.ts')).length).toBeGreaterThan(0);
  });

  it('imports nothing from src/lib/server or src/db, directly or through other modules, not even types', () => {
    expect(files.flatMap(serverImportsReachableFrom)).toEqual([]);
  });
});
