import { describe, expect, it } from 'vitest';
import { runLogHeader, runLogMapping } from '../../../src/lib/logs/generate';
import { parseLogMapping } from '../../../src/lib/logs/mapping';
import { DEFAULT_TOLERANCES, guessMapping, sheetJointNames } from '../../../src/lib/view/log-mapping-draft';
import { createSheetFromTemplate } from '../../../src/lib/sheet/templates';

const doc = createSheetFromTemplate('tri-radial', { kind: 'sphere', radius: 0.03 });

describe('the mapping form\'s first guess from column names', () => {
  it('maps a log written by the log generator exactly as the generator\'s own mapping does (second route: generate.ts)', () => {
    const names = sheetJointNames(doc);
    expect(names).toEqual(doc.hand.fingers.flatMap((f) => f.joints.map((j) => j.name)));
    const guess = guessMapping(runLogHeader(doc), names);
    expect(guess).toEqual(runLogMapping(doc, DEFAULT_TOLERANCES));
    expect(parseLogMapping(guess).ok).toBe(true);
  });

  it('recognises common spellings (time, x/y/z, quat_w, _cmd, _meas) and leaves unknown columns for the user', () => {
    const guess = guessMapping(['Time', 'x', 'y', 'z', 'quat_w', 'quat_x', 'quat_y', 'quat_z', 'j1_cmd', 'j1_meas', 'temperature'], ['j1', 'j2']);
    expect(guess.time.column).toBe('Time');
    expect(guess.pose.position.columns).toEqual(['x', 'y', 'z']);
    expect(guess.pose.orientation.quaternion).toEqual({ w: 'quat_w', x: 'quat_x', y: 'quat_y', z: 'quat_z' });
    expect(guess.joints).toEqual([{ joint: 'j1', commandedRate: { column: 'j1_cmd', unit: 'rad/s' }, measuredRate: { column: 'j1_meas', unit: 'rad/s' } }]);
  });

  it('reads no joint names from a document without a hand', () => {
    expect(sheetJointNames({ title: 'no hand' })).toEqual([]);
    expect(sheetJointNames(null)).toEqual([]);
  });
});
