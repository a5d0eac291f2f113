import { readdirSync, readFileSync, statSync } from 'node:fs';
import { dirname, join, relative, resolve } from 'node:path';
import { fileURLToPath } from 'node:url';
import { describe, expect, it } from 'vitest';

const root = resolve(dirname(fileURLToPath(import.meta.url)), '../../..');
const source = join(root, 'src');
const core = join(source, 'lib', 'kinematics');

/** Module specifiers in static imports and re-exports, dynamic imports and worker URLs. */
const SPECIFIER = /\bfrom\s*['"]([^'"]+)['"]|\bimport\s*\(\s*['"]([^'"]+)['"]|\bimport\s+['"]([^'"]+)['"]|new URL\(\s*['"]([^'"]+)['"]/g;

function sourceFiles(dir: string): string[] {
  return readdirSync(dir).flatMap((name) => {
    const path = join(dir, name);
    if (statSync(path).isDirectory()) return path === core ? [] : sourceFiles(path);
    return /\.(ts|tsx|astro|mjs|js)$/.test(name) ? [path] : [];
  });
}

/** Imports of core modules other than its index, as "file: specifier". */
function deepImports(file: string, text = readFileSync(file, 'utf8')): string[] {
  const found: string[] = [];
  for (const match of text.matchAll(SPECIFIER)) {
    const specifier = match[1] ?? match[2] ?? match[3] ?? match[4]!;
    if (!specifier.startsWith('.')) continue;
    const target = relative(core, resolve(dirname(file), specifier));
    if (target.startsWith('..') || target === '' || /^index(\.ts)?$/.test(target)) continue;
    found.push(`${relative(root, file)}: ${specifier}`);
  }
  return found;
}

describe('the kinematics core API', () => {
  it('is imported from outside the core only through src/lib/kinematics/index.ts', () => {
    const files = sourceFiles(source);
    expect(files.length).toBeGreaterThan(50);
    expect(files.flatMap((file) => deepImports(file))).toEqual([]);
  });

  it('tells a deep import from an import of the index', () => {
    const file = join(source, 'lib', 'view', 'example.ts');
    const text = [
      "import { runSheet } from '../kinematics/run';",
      "import { vec3 } from '../kinematics';",
      "import type { Scene } from '../kinematics/index';",
      "export { ROTATION_METRICS } from '../kinematics/metrics';",
      "const worker = new URL('../kinematics/scene.ts', import.meta.url);",
    ].join('\n');
    expect(deepImports(file, text)).toEqual([
      'src/lib/view/example.ts: ../kinematics/run',
      'src/lib/view/example.ts: ../kinematics/metrics',
      'src/lib/view/example.ts: ../kinematics/scene.ts',
    ]);
  });
});
