import { readFileSync } from 'node:fs';
import { describe, expect, it } from 'vitest';
import { keepGenerators } from '../../../src/lib/sheet/matrix-edit';
import { parseSheet } from '../../../src/lib/sheet/schema';

const pegText = readFileSync(new URL('../../../content/sheets/line4-peg-tilt.json', import.meta.url), 'utf8');
const peg = (): Record<string, unknown> => {
  const raw = JSON.parse(pegText) as Record<string, unknown>;
  delete raw.matrix;
  return raw;
};

describe('keeping panel generators in the sheet', () => {
  it('creates the matrix section on a sheet without one, and the kept spread angle reads as 60 deg = pi/3 rad (common practice)', () => {
    const before = peg();
    const after = keepGenerators(before, [{ kind: 'spread-axes', count: 6, angle: '60 deg' }]);
    expect(before.matrix).toBeUndefined();
    const parsed = parseSheet(after);
    expect(parsed.ok).toBe(true);
    if (!parsed.ok) return;
    expect(parsed.doc.matrix?.generators).toHaveLength(1);
    const [kept] = parsed.doc.matrix!.generators;
    expect(kept.kind).toBe('spread-axes');
    if (kept.kind === 'spread-axes') expect(kept.angle).toBeCloseTo(Math.PI / 3, 12);
    // The sheet format's defaults for what the panel did not set: no listed targets or starts, the geodesic metric.
    expect(parsed.doc.matrix).toMatchObject({ targets: [], starts: [], metric: 'phi6' });
  });

  it('appends after the generators already written, keeping their unit strings and the listed targets', () => {
    const written = {
      ...peg(),
      matrix: { targets: [{ orientation: { axis: [1, 0, 0], angle: '20 deg' }, group: 'tilt' }], generators: [{ kind: 'spread-axes', count: 4, angle: '0.5 rad' }] },
    };
    const after = keepGenerators(written, [{ kind: 'random', count: 3, seed: 7 }]) as typeof written;
    expect(after.matrix.generators).toEqual([{ kind: 'spread-axes', count: 4, angle: '0.5 rad' }, { kind: 'random', count: 3, seed: 7 }]);
    expect(after.matrix.targets).toBe(written.matrix.targets);
    expect(written.matrix.generators).toHaveLength(1);
    const parsed = parseSheet(after);
    expect(parsed.ok && parsed.doc.matrix!.targets.length + parsed.doc.matrix!.generators.reduce((n, g) => n + g.count, 0)).toBe(1 + 4 + 3);
  });

  it('an empty section, as "Add a test matrix" writes it, is refused at the targets table the editor shows the issue at', () => {
    const parsed = parseSheet({ ...peg(), matrix: { targets: [] } });
    expect(parsed.ok).toBe(false);
    if (parsed.ok) return;
    expect(parsed.issues.find((i) => i.path === 'matrix.targets')?.message).toMatch(/at least one target/);
  });
});
