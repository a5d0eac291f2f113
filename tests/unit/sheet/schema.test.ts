import { readFileSync } from 'node:fs';
import { quat } from 'gl-matrix';
import { describe, expect, it } from 'vitest';
import {
  DEFAULT_RUN,
  DEFAULT_SOLVER,
  MAX_FINGERS,
  MAX_NOTES_TEXT,
  MAX_VARIABLES_TEXT,
  SHEET_FORMAT,
  SHEET_VERSION,
  formatIssuePath,
  parseSheet,
  resolvePointer,
  type SheetIssue,
} from '../../../src/lib/sheet/schema';

/** A small hand-written sheet (one finger) using unit strings; mutated copies make the bad cases. */
function minimalSheet(): Record<string, any> {
  return {
    format: 'slipless.sheet',
    version: 1,
    title: 'One finger on a ball',
    object: {
      shape: { kind: 'sphere', radius: '30 mm' },
      pose: { position: [0, 0, '80 mm'] },
      twist: { linear: ['10 mm/s', 0, 0], angular: [0, 0, '10 deg/s'] },
    },
    hand: {
      name: 'test hand',
      fingers: [
        {
          name: 'f0',
          joints: [
            { name: 'b', role: 'base', axis: [0, 2, 0], point: ['50 mm', 0, 0], limits: { min: '-30 deg', max: '30 deg' }, rateLimit: '2 rad/s' },
            { name: 'p', role: 'pivot', axis: [-1, 0, 0], point: [0.04, 0, 0.08], angle: '15 deg' },
            { name: 'r', role: 'roll', axis: [0, 0, 1], point: [0.04, 0, 0.08] },
          ],
          roller: { kind: 'sphere', radius: '10 mm', center: ['40 mm', 0, '80 mm'] },
        },
      ],
    },
    motion: { target: { position: [0, 0, 0.08], orientation: { axis: [0, 0, 1], angle: '90 deg' } } },
  };
}

function issuesOf(input: unknown): SheetIssue[] {
  const result = parseSheet(input);
  if (result.ok) throw new Error('expected the sheet to be rejected');
  return result.issues;
}

function mutated(change: (doc: Record<string, any>) => void): Record<string, any> {
  const doc = minimalSheet();
  change(doc);
  return doc;
}

describe('parseSheet', () => {
  it('reads a valid sheet, converting unit strings to SI and filling defaults', () => {
    const result = parseSheet(minimalSheet());
    expect(result.ok).toBe(true);
    if (!result.ok) return;
    const { doc } = result;
    expect(doc.format).toBe(SHEET_FORMAT);
    expect(doc.version).toBe(SHEET_VERSION);
    expect(doc.description).toBe('');
    expect(doc.tags).toEqual([]);
    expect(doc.object.shape).toEqual({ kind: 'sphere', radius: 0.03 });
    expect(doc.object.pose).toEqual({ position: [0, 0, 0.08], orientation: { w: 1, x: 0, y: 0, z: 0 } });
    // 10 deg/s = 10 * pi/180 rad/s (SI Brochure, 9th ed., Table 8: 1 deg = pi/180 rad).
    expect(doc.object.twist.angular[2]).toBeCloseTo((10 * Math.PI) / 180, 15);
    expect(doc.object.twist.linear).toEqual([0.01, 0, 0]);
    const [base, pivot, roll] = doc.hand.fingers[0].joints;
    expect(base.axis).toEqual([0, 1, 0]);
    expect(base.limits?.min).toBeCloseTo(-Math.PI / 6, 15);
    expect(base.rateLimit).toBe(2);
    expect(base.angle).toBe(0);
    expect(pivot.angle).toBeCloseTo(Math.PI / 12, 15);
    expect(roll.limits).toBeUndefined();
    expect('rateLimit' in roll).toBe(false);
    expect(doc.solver).toEqual(DEFAULT_SOLVER);
    expect(doc.motion.run).toEqual(DEFAULT_RUN);
    expect(doc.sweep).toBeUndefined();
  });

  it('applies the stated defaults: damping 0.1 mm, singular ratio 1e-3, axis distance 1 mm, 1e-5 m/s, 0.2 mm; gain 2/s, 5 ms ticks', () => {
    expect(DEFAULT_SOLVER).toEqual({
      damping: 1e-4,
      singularRatio: 1e-3,
      axisDistance: 1e-3,
      minTangentialSpeed: 1e-5,
      contactTolerance: 2e-4,
      softFinger: false,
    });
    expect(DEFAULT_RUN).toEqual({ gain: 2, dt: 0.005, maxTicks: 2000, positionTolerance: 1e-4, angleTolerance: 1e-3, stopOnSingular: true });
  });

  it('turns an axis-angle orientation into the same unit quaternion as gl-matrix setAxisAngle', () => {
    const result = parseSheet(minimalSheet());
    if (!result.ok) throw new Error('valid sheet rejected');
    // A plain array as `out` keeps gl-matrix in double precision (its default storage is Float32Array).
    const reference = quat.setAxisAngle([0, 0, 0, 0] as unknown as quat, [0, 0, 1], Math.PI / 2);
    const q = result.doc.motion.target.orientation;
    // gl-matrix stores [x, y, z, w]; the sheet writes {w, x, y, z}.
    expect([q.x, q.y, q.z, q.w].map((c, i) => c - reference[i]).every((d) => Math.abs(d) < 1e-15)).toBe(true);
  });

  it('accepts its own output again unchanged (SI numbers are valid input)', () => {
    const first = parseSheet(minimalSheet());
    if (!first.ok) throw new Error('valid sheet rejected');
    const second = parseSheet(JSON.parse(JSON.stringify(first.doc)));
    expect(second.ok).toBe(true);
    if (second.ok) expect(second.doc).toEqual(first.doc);
  });

  it('scales non-unit joint and roller axes silently', () => {
    const doc = mutated((d) => {
      d.hand.fingers[0].joints[0].axis = [3, 0, 4];
    });
    const result = parseSheet(doc);
    expect(result.ok && result.doc.hand.fingers[0].joints[0].axis).toEqual([0.6, 0, 0.8]);
  });

  it('reports a wrong type at its location', () => {
    expect(issuesOf(mutated((d) => (d.hand.fingers[0].roller.radius = true)))).toEqual([
      { path: 'hand.fingers[0].roller.radius', message: 'expected a length: a number in m or a string with a unit such as "12 mm"' },
    ]);
    expect(issuesOf(mutated((d) => (d.hand.fingers[0].joints[0].axis = 'x')))).toEqual([
      { path: 'hand.fingers[0].joints[0].axis', message: 'expected a direction: an array of three components [x, y, z]' },
    ]);
  });

  it('reports a missing field at its location', () => {
    expect(issuesOf(mutated((d) => delete d.hand.fingers[0].roller.radius))).toEqual([
      { path: 'hand.fingers[0].roller.radius', message: 'required field is missing' },
    ]);
    expect(issuesOf(mutated((d) => delete d.motion.target.orientation.angle))).toEqual([
      { path: 'motion.target.orientation.angle', message: 'required field is missing' },
    ]);
    expect(issuesOf(mutated((d) => delete d.format))).toEqual([{ path: 'format', message: 'required field is missing' }]);
  });

  it('rejects a non-unit quaternion unless the pose asks for normalisation', () => {
    const skewed = { w: 1, x: 0.1, y: 0, z: 0 };
    const issues = issuesOf(mutated((d) => (d.object.pose.orientation = skewed)));
    expect(issues).toHaveLength(1);
    expect(issues[0].path).toBe('object.pose.orientation');
    expect(issues[0].message).toContain('not a unit quaternion');
    expect(issues[0].message).toContain('"normalize": true');
    expect(issuesOf(mutated((d) => (d.motion.target.orientation = skewed)))[0].path).toBe('motion.target.orientation');

    const normalised = parseSheet(mutated((d) => (d.object.pose = { ...d.object.pose, orientation: skewed, normalize: true })));
    expect(normalised.ok).toBe(true);
    if (normalised.ok) {
      const q = normalised.doc.object.pose.orientation;
      expect(Math.hypot(q.w, q.x, q.y, q.z)).toBeCloseTo(1, 15);
      expect(q.x / q.w).toBeCloseTo(0.1, 15);
      expect('normalize' in normalised.doc.object.pose).toBe(false);
    }
  });

  it('accepts a quaternion within 1e-6 of unit length without the flag', () => {
    const nearlyUnit = { w: 1 + 5e-7, x: 0, y: 0, z: 0 };
    expect(parseSheet(mutated((d) => (d.object.pose.orientation = nearlyUnit))).ok).toBe(true);
    const justOutside = { w: 1 + 2e-6, x: 0, y: 0, z: 0 };
    expect(parseSheet(mutated((d) => (d.object.pose.orientation = justOutside))).ok).toBe(false);
  });

  it('rejects a unit of the wrong dimension with a located message', () => {
    expect(issuesOf(mutated((d) => (d.hand.fingers[0].joints[0].point[0] = '30 deg')))).toEqual([
      { path: 'hand.fingers[0].joints[0].point[0]', message: 'expected a length, got 30 deg' },
    ]);
    expect(issuesOf(mutated((d) => (d.object.twist.angular[2] = '3 mm/s')))).toEqual([
      { path: 'object.twist.angular[2]', message: 'expected an angular speed, got 3 mm/s' },
    ]);
  });

  it('rejects more than eight fingers and a finger without joints', () => {
    const tooMany = mutated((d) => {
      d.hand.fingers = Array.from({ length: MAX_FINGERS + 1 }, (_, i) => ({ ...d.hand.fingers[0], name: `f${i}` }));
    });
    expect(issuesOf(tooMany)).toEqual([{ path: 'hand.fingers', message: 'a hand has at most 8 fingers' }]);
    expect(issuesOf(mutated((d) => (d.hand.fingers = [])))).toEqual([{ path: 'hand.fingers', message: 'a hand needs at least one finger' }]);
    expect(issuesOf(mutated((d) => (d.hand.fingers[0].joints = [])))).toEqual([
      { path: 'hand.fingers[0].joints', message: 'a finger needs at least one joint' },
    ]);
  });

  it('rejects reversed joint limits', () => {
    const issues = issuesOf(mutated((d) => (d.hand.fingers[0].joints[1].limits = { min: '20 deg', max: '-20 deg' })));
    expect(issues).toHaveLength(1);
    expect(issues[0].path).toBe('hand.fingers[0].joints[1].limits');
    expect(issues[0].message).toMatch(/^limits are reversed/);
  });

  it('rejects zero axes, non-positive sizes and rate limits, and duplicate names', () => {
    expect(issuesOf(mutated((d) => (d.hand.fingers[0].joints[2].axis = [0, 0, 0])))).toEqual([
      { path: 'hand.fingers[0].joints[2].axis', message: 'axis must not be the zero vector' },
    ]);
    expect(issuesOf(mutated((d) => (d.object.shape.radius = '-3 mm')))).toEqual([
      { path: 'object.shape.radius', message: 'must be greater than 0 m' },
    ]);
    expect(issuesOf(mutated((d) => (d.hand.fingers[0].joints[0].rateLimit = 0)))[0].path).toBe('hand.fingers[0].joints[0].rateLimit');
    expect(issuesOf(mutated((d) => (d.hand.fingers[0].joints[1].name = 'b')))).toEqual([
      { path: 'hand.fingers[0].joints[1].name', message: 'joint name "b" is already used at index 0' },
    ]);
  });

  it('checks shape-specific rules: known kinds only, fillet no larger than the box', () => {
    expect(issuesOf(mutated((d) => (d.object.shape = { kind: 'torus', radius: 1 })))[0].path).toBe('object.shape.kind');
    const box = parseSheet(mutated((d) => (d.object.shape = { kind: 'box', halfExtents: ['20 mm', '20 mm', '20 mm'] })));
    expect(box.ok && box.doc.object.shape).toEqual({ kind: 'box', halfExtents: [0.02, 0.02, 0.02], filletRadius: 0 });
    expect(
      issuesOf(mutated((d) => (d.object.shape = { kind: 'box', halfExtents: [0.01, 0.02, 0.02], filletRadius: '15 mm' })))[0].path,
    ).toBe('object.shape.filletRadius');
  });

  it('rejects unknown fields, a wrong format name and other versions', () => {
    const issues = issuesOf(mutated((d) => {
      d.version = 2;
      d.hand.fingers[0].roller.raduis = 1;
    }));
    expect(issues).toContainEqual({ path: 'version', message: 'unsupported version; this reader understands version 1' });
    expect(issues).toContainEqual({ path: 'hand.fingers[0].roller.raduis', message: 'unknown field "raduis"' });
    expect(issuesOf(mutated((d) => (d.format = 'other')))[0].path).toBe('format');
    expect(issuesOf(null)).toEqual([{ path: '(document)', message: expect.stringContaining('expected an object') }]);
  });

  it('checks that a sweep path points to a number in the sheet', () => {
    const good = parseSheet(mutated((d) => (d.sweep = { path: '/hand/fingers/0/roller/radius', from: '5 mm', to: '15 mm', steps: 5 })));
    expect(good.ok && good.doc.sweep).toEqual({ path: '/hand/fingers/0/roller/radius', from: 0.005, to: 0.015, steps: 5 });
    expect(issuesOf(mutated((d) => (d.sweep = { path: '/hand/name', from: 0, to: 1, steps: 5 })))).toEqual([
      { path: 'sweep.path', message: 'sweep path "/hand/name" does not point to a number in this sheet' },
    ]);
    expect(issuesOf(mutated((d) => (d.sweep = { path: '/hand/fingers/0/roller/radius', from: 0, to: 1, steps: 1 })))[0].path).toBe(
      'sweep.steps',
    );
  });

  it('validates run settings', () => {
    const issues = issuesOf(mutated((d) => (d.motion.run = { dt: '-1 ms', maxTicks: 2.5 })));
    expect(issues).toEqual([
      { path: 'motion.run.dt', message: 'must be greater than 0 s' },
      { path: 'motion.run.maxTicks', message: 'expected a whole number of ticks' },
    ]);
  });
});

describe('formatIssuePath', () => {
  it('joins keys with dots and puts indices in brackets', () => {
    expect(formatIssuePath(['hand', 'fingers', 1, 'joints', 0, 'axis'])).toBe('hand.fingers[1].joints[0].axis');
    expect(formatIssuePath([])).toBe('(document)');
  });
});

describe('resolvePointer', () => {
  // RFC 6901, section 5 examples: "~1" stands for "/" and "~0" for "~".
  it('follows JSON pointers with RFC 6901 escapes', () => {
    const doc = { foo: ['bar', 'baz'], 'a/b': 1, 'm~n': 8 };
    expect(resolvePointer(doc, '')).toBe(doc);
    expect(resolvePointer(doc, '/foo/0')).toBe('bar');
    expect(resolvePointer(doc, '/a~1b')).toBe(1);
    expect(resolvePointer(doc, '/m~0n')).toBe(8);
    expect(resolvePointer(doc, '/missing')).toBeUndefined();
  });
});

describe('parseSheet messages for over-long and missing values', () => {
  const base = JSON.parse(readFileSync('content/sheets/line4-peg-tilt.json', 'utf8'));
  const firstIssue = (changes: Record<string, unknown>) => {
    const result = parseSheet({ ...structuredClone(base), ...changes });
    return result.ok ? undefined : result.issues[0];
  };

  it.each([
    ['variables', 'x'.repeat(MAX_VARIABLES_TEXT + 1), `at most ${MAX_VARIABLES_TEXT} characters`],
    ['notes', 'x'.repeat(MAX_NOTES_TEXT + 1), `at most ${MAX_NOTES_TEXT} characters`],
    ['title', 'x'.repeat(121), 'at most 120 characters'],
    ['description', 'x'.repeat(20_001), 'at most 20000 characters'],
    ['tags', Array(51).fill('t'), 'at most 50 items'],
  ])('states the limit of %s', (field, value, message) => {
    expect(firstIssue({ [field]: value })).toEqual({ path: field, message });
  });

  it('states the limit of a tag and of a quantity text, and still names a wrong type', () => {
    expect(firstIssue({ tags: ['x'.repeat(61)] })).toEqual({ path: 'tags[0]', message: 'at most 60 characters' });
    const doc = structuredClone(base);
    doc.hand.fingers[0].roller.radius = `1 mm${' + 1 mm'.repeat(100)}`;
    expect(parseSheet(doc)).toMatchObject({ ok: false, issues: [{ path: 'hand.fingers[0].roller.radius', message: expect.stringContaining('at most 500 characters') }] });
    expect(firstIssue({ variables: 5 })).toEqual({ path: 'variables', message: 'expected the variables as text, one "name = value" per line' });
    expect(firstIssue({ title: undefined })).toEqual({ path: 'title', message: 'required field is missing' });
  });
});

describe('parseSheet with numbers whose length overflows', () => {
  it('refuses an axis or a quaternion too large to scale to unit length instead of turning it into zeros', () => {
    const huge = 1.7e308;
    expect(issuesOf(mutated((d) => (d.hand.fingers[0].joints[0].axis = [huge, huge, huge])))).toContainEqual({
      path: 'hand.fingers[0].joints[0].axis',
      message: expect.stringContaining('too large'),
    });
    const orientation = { w: huge, x: huge, y: 0, z: 0 };
    expect(issuesOf(mutated((d) => (d.object.pose = { ...d.object.pose, orientation, normalize: true })))).toContainEqual({
      path: 'object.pose.orientation',
      message: expect.stringContaining('too large'),
    });
  });
});
