import { readFileSync } from 'node:fs';
import { describe, expect, it } from 'vitest';
import { withVariables } from '../../../src/lib/examples/variables';
import { computeExample } from '../../../src/workers/example-protocol';

const sheet = JSON.parse(readFileSync(new URL('../../../content/examples/sheets/cell4-trunnion-ball-spin.json', import.meta.url), 'utf8')) as Record<string, unknown>;
const outputs = [
  { of: 'steer.rollRate', finger: 'left', label: 'roll rate' },
  { of: 'contact.tangentialSpeed', finger: 'left', label: 'speed', unit: 'm/s' },
  { of: 'steer.rollRate', finger: 'thumb', label: 'no such finger' },
];

describe('computeExample', () => {
  it('answers the chosen outputs as text: roll rate ωR/ρ and surface speed ωR (rolling without slipping, common practice)', () => {
    // ω = 1.5 rad/s, R = 20 mm, ρ = 12 mm: ωR = 0.03 m/s, ωR/ρ = 2.5 rad/s (worked by hand).
    const reply = computeExample({ type: 'compute', id: 7, document: withVariables(sheet, { spinRate: '1.5 rad/s' }), outputs });
    expect(reply).toMatchObject({ type: 'computed', id: 7, ok: true, outputs: ['-2.5 rad/s', '0.03 m/s', '—'] });
    if (reply.type !== 'computed' || !reply.ok) throw new Error('expected a solved reply');
    expect(reply.warnings.map((w) => w.code)).toContain('GRASP_RANK_DEFICIENT');
    expect(reply.scene.rollers).toHaveLength(2);
  });

  it('reports where a document is wrong, and refuses a message that is not a request', () => {
    const reply = computeExample({ type: 'compute', id: 1, document: withVariables(sheet, { rollerRadius: '12 parsecs and more' }), outputs });
    expect(reply).toMatchObject({ type: 'computed', ok: false });
    expect(computeExample({ type: 'compute', id: 1, document: sheet })).toMatchObject({ type: 'refused' });
  });
});
