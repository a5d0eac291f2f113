import { describe, expect, it } from 'vitest';
import { describeValue } from '../../../src/lib/sheet/document-path';
import { formatInputValue, scalarFirst } from '../../../src/lib/sheet/number-format';

// Sheets write quaternions scalar first, {w, x, y, z} (the Hamilton convention's usual written order; common practice).
describe('quaternions on pages read w, x, y, z', () => {
  const typedLast = { x: 0, y: 0, z: 0.7071, w: 0.7071 };

  it('writes a quaternion typed x, y, z, w in the order w, x, y, z', () => {
    expect(formatInputValue(typedLast)).toBe('{"w": 0.7071, "x": 0, "y": 0, "z": 0.7071}');
    expect(describeValue(typedLast)).toBe('{"w":0.7071,"x":0,"y":0,"z":0.7071}');
  });

  it('reorders a quaternion nested in a pose and leaves other objects as typed', () => {
    expect(formatInputValue({ position: [0, 0, '5 mm'], orientation: typedLast })).toBe('{"position": [0, 0, "5 mm"], "orientation": {"w": 0.7071, "x": 0, "y": 0, "z": 0.7071}}');
    expect(formatInputValue({ axis: [0, 0, 1], angle: '30 deg' })).toBe('{"axis": [0, 0, 1], "angle": "30 deg"}');
    // Three of the four parts is not a quaternion: kept as written.
    expect(JSON.stringify({ z: 1, x: 0, y: 0 }, scalarFirst)).toBe('{"z":1,"x":0,"y":0}');
  });
});
