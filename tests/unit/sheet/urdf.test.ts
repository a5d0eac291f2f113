import { readFileSync } from 'node:fs';
import { glMatrix, mat4, vec3 as glVec3 } from 'gl-matrix';
import { create, all, type Matrix } from 'mathjs';
import { describe, expect, it } from 'vitest';
import { parseSheet } from '../../../src/lib/sheet/schema';
import { createSheetFromTemplate } from '../../../src/lib/sheet/templates';
import {
  chainInPalmFrame,
  handFromUrdf,
  listUrdfChains,
  parseUrdf,
  rotationFromRpy,
  suggestedPalm,
  suggestedRoles,
  type UrdfIssue,
  type UrdfRobot,
} from '../../../src/lib/sheet/urdf';
import { quat } from '../../../src/lib/kinematics';

const math = create(all);
// gl-matrix stores Float32Array by default; doubles keep its products comparable to 1e-14.
glMatrix.setMatrixArrayType(Array);
const EXAMPLE = readFileSync(new URL('../../../content/urdf/tri-roller-hand.urdf', import.meta.url), 'utf8');

function robotOf(text: string): UrdfRobot {
  const read = parseUrdf(text);
  if (!read.ok) throw new Error(JSON.stringify(read.issues));
  return read.robot;
}

function issuesOf(text: string): UrdfIssue[] {
  const read = parseUrdf(text);
  expect(read.ok).toBe(false);
  return read.ok ? [] : read.issues;
}

/** gl-matrix transform of a URDF origin: translate, then yaw about z, pitch about y, roll about x (each post-multiplied), i.e. T Rz Ry Rx. */
function glOrigin(xyz: number[], rpy: number[]): mat4 {
  const m = mat4.fromTranslation(mat4.create(), xyz as [number, number, number]);
  mat4.rotateZ(m, m, rpy[2]);
  mat4.rotateY(m, m, rpy[1]);
  mat4.rotateX(m, m, rpy[0]);
  return m;
}

describe('rotationFromRpy', () => {
  it('turns x onto y for yaw = pi/2 (URDF spec, ROS wiki urdf/XML/joint: rpy are fixed-axis roll, pitch, yaw about x, y, z)', () => {
    expect(quat.rotate(rotationFromRpy(0, 0, Math.PI / 2), [1, 0, 0])).toBeNear([0, 1, 0], { abs: 1e-15 });
    // Pitch +pi/2 about y takes z onto x (right-hand rule, common practice).
    expect(quat.rotate(rotationFromRpy(0, Math.PI / 2, 0), [0, 0, 1])).toBeNear([1, 0, 0], { abs: 1e-15 });
  });

  it.each([
    [0.3, -0.7, 1.9],
    [-2.5, 0.4, -0.2],
    [1.2, 1.4, 3.0],
  ])('agrees with gl-matrix rotateZ·rotateY·rotateX for rpy = (%f, %f, %f) (R = Rz(y) Ry(p) Rx(r), REP 103 / URDF spec)', (r, p, y) => {
    const reference = glOrigin([0, 0, 0], [r, p, y]);
    const q = rotationFromRpy(r, p, y);
    for (const v of [[1, 0, 0], [0, 1, 0], [0, 0, 1], [0.3, -0.2, 0.9]]) {
      const expected = glVec3.transformMat4(glVec3.create(), v as [number, number, number], reference);
      expect(quat.rotate(q, v)).toBeNear([...expected], { abs: 1e-14 });
    }
  });
});

/** A two-finger robot from a table of joints, so the test composes the same numbers independently. */
const SPECS = [
  { name: 'mount-a', type: 'fixed', parent: 'palm', child: 'a0', xyz: [0.04, -0.01, 0.012], rpy: [0.1, -0.2, 0.7], axis: [1, 0, 0] },
  { name: 'a-base', type: 'revolute', parent: 'a0', child: 'a1', xyz: [0.005, 0, 0.002], rpy: [0, 0.3, 0], axis: [0, 1, 0] },
  { name: 'a-pivot', type: 'revolute', parent: 'a1', child: 'a2', xyz: [-0.01, 0.002, 0.07], rpy: [0.4, -1.1, 0.25], axis: [0, 0, 1] },
  { name: 'a-roll', type: 'continuous', parent: 'a2', child: 'a-tip', xyz: [0, 0, 0.003], rpy: [-0.6, 0.2, 1.3], axis: [0.6, 0, 0.8] },
  { name: 'b-base', type: 'revolute', parent: 'palm', child: 'b1', xyz: [-0.04, 0.01, 0.01], rpy: [0, 0, 3.0], axis: [0, 1, 1] },
  { name: 'b-roll', type: 'continuous', parent: 'b1', child: 'b-tip', xyz: [0.01, 0.0, 0.08], rpy: [0.2, 0.2, 0.2], axis: [0, 0, 1] },
] as const;

function tableRobot(): string {
  const links = ['palm', 'a0', 'a1', 'a2', 'a-tip', 'b1'].map((name) => `  <link name="${name}"/>`);
  links.push('  <link name="b-tip"><collision><origin xyz="0 0 0.002" rpy="1.5707963267948966 0 0"/><geometry><cylinder radius="0.011" length="0.008"/></geometry></collision></link>');
  const joints = SPECS.map(
    (j) =>
      `  <joint name="${j.name}" type="${j.type}">\n    <parent link="${j.parent}"/>\n    <child link="${j.child}"/>\n` +
      `    <origin xyz="${j.xyz.join(' ')}" rpy="${j.rpy.join(' ')}"/>\n    <axis xyz="${j.axis.join(' ')}"/>\n  </joint>`,
  );
  return `<?xml version="1.0"?>\n<robot name="table hand">\n${links.join('\n')}\n${joints.join('\n')}\n</robot>\n`;
}

describe('chainInPalmFrame on a good file', () => {
  it('composes every origin from the palm and turns each axis into the palm frame, as gl-matrix mat4 products do (URDF spec: child frame = parent frame · origin)', () => {
    const robot = robotOf(tableRobot());
    const chains = listUrdfChains(robot, 'palm');
    expect(chains.map((c) => c.tip)).toEqual(['a-tip', 'b-tip']);
    for (const chain of chains) {
      const placed = chainInPalmFrame(robot, chain);
      if (!placed.ok) throw new Error(placed.issue.message);
      let frame = mat4.create();
      const expected: { axis: number[]; point: number[] }[] = [];
      for (const name of chain.joints.map((j) => j.name)) {
        const spec = SPECS.find((s) => s.name === name)!;
        frame = mat4.multiply(mat4.create(), frame, glOrigin([...spec.xyz], [...spec.rpy]));
        if (spec.type === 'fixed') continue;
        const axis = glVec3.normalize(glVec3.create(), spec.axis as unknown as [number, number, number]);
        const turned = glVec3.transformMat4(glVec3.create(), axis, mat4.fromValues(frame[0], frame[1], frame[2], 0, frame[4], frame[5], frame[6], 0, frame[8], frame[9], frame[10], 0, 0, 0, 0, 1));
        expected.push({ axis: [...turned], point: [frame[12], frame[13], frame[14]] });
      }
      expect(placed.chain.joints.map((j) => j.name)).toEqual(chain.joints.filter((j) => j.type !== 'fixed').map((j) => j.name));
      placed.chain.joints.forEach((joint, i) => {
        expect(joint.axis).toBeNear(expected[i].axis, { abs: 1e-11 });
        expect(joint.point).toBeNear(expected[i].point, { abs: 1e-11 });
      });
    }
  });

  it('places a cylinder tip as a cylinder roller: centre and axis (the cylinder z axis, URDF spec link/geometry) through the collision origin, by mathjs', () => {
    const robot = robotOf(tableRobot());
    const placed = chainInPalmFrame(robot, listUrdfChains(robot, 'palm')[1]);
    if (!placed.ok) throw new Error(placed.issue.message);
    // Independent composition with mathjs rotation matrices: R = Rz(y) Ry(p) Rx(r).
    const rotation = (rpy: readonly number[]) =>
      math.multiply(math.multiply(math.rotationMatrix(rpy[2], [0, 0, 1]), math.rotationMatrix(rpy[1], [0, 1, 0])), math.rotationMatrix(rpy[0], [1, 0, 0])) as unknown as number[][];
    const frames = [SPECS[4], SPECS[5], { xyz: [0, 0, 0.002], rpy: [Math.PI / 2, 0, 0] }];
    let r: number[][] = math.identity(3).valueOf() as number[][];
    let p = [0, 0, 0];
    for (const f of frames) {
      p = math.add(p, math.multiply(r, [...f.xyz])) as number[];
      r = math.multiply(r, rotation(f.rpy));
    }
    const axis = (math.multiply(r, [0, 0, 1]) as unknown as Matrix | number[]).valueOf() as number[];
    expect(placed.chain.roller).toMatchObject({ kind: 'cylinder', radius: 0.011, halfWidth: 0.004 });
    const roller = placed.chain.roller as { center: number[]; axis: number[] };
    expect(roller.center).toBeNear(p, { abs: 1e-11 });
    expect(roller.axis).toBeNear(axis, { abs: 1e-11 });
  });

  it('reads the shipped example: palm found below the bench mount, three ball-roller fingers whose pivots aim at the palm axis (values from the file’s design: 55 mm mount radius, roller 37 mm out at 90 mm)', () => {
    const robot = robotOf(EXAMPLE);
    expect(robot.name).toBe('Tri roller hand TR-3');
    expect(robot.roots).toEqual(['bench']);
    const palm = suggestedPalm(robot);
    expect(palm).toBe('palm');
    const chains = listUrdfChains(robot, palm);
    expect(chains.map((c) => [c.tip, c.refused === undefined])).toEqual([
      ['palm-camera', false],
      ['north-roller', true],
      ['southwest-roller', true],
      ['southeast-roller', true],
    ]);
    const choices = chains.filter((c) => !c.refused).map((c) => ({ tip: c.tip, name: c.tip.replace('-roller', ''), roles: suggestedRoles(3) }));
    const built = handFromUrdf(robot, palm, choices);
    if (!built.ok) throw new Error(built.issue.message);
    const azimuths = { north: 90, southwest: 210, southeast: 330 } as const;
    for (const finger of built.hand.fingers) {
      const a = (azimuths[finger.name as keyof typeof azimuths] * Math.PI) / 180;
      const outward = [Math.cos(a), Math.sin(a), 0];
      const [base, pivot, roll] = finger.joints;
      expect(base.point).toBeNear([0.055 * outward[0], 0.055 * outward[1], 0.01], { abs: 1e-11 });
      // The base swings the finger in its radial plane: its axis is the finger's tangent.
      expect(Math.abs(base.axis[0] * outward[0] + base.axis[1] * outward[1])).toBeLessThan(1e-11);
      expect(pivot.point).toBeNear([0.037 * outward[0], 0.037 * outward[1], 0.09], { abs: 1e-11 });
      expect(pivot.axis).toBeNear([-outward[0], -outward[1], 0], { abs: 1e-11 });
      expect(roll.axis).toBeNear([0, 0, 1], { abs: 1e-11 });
      expect(finger.roller).toEqual({ kind: 'sphere', radius: 0.012, center: pivot.point });
      expect([base.limits, base.rateLimit, pivot.rateLimit, roll.limits, roll.rateLimit]).toEqual([{ min: -0.6109, max: 0.6109 }, 2.5, 6, undefined, 25]);
      expect(finger.joints.map((j) => j.role)).toEqual(['base', 'pivot', 'roll']);
    }
    // The imported hand reads as a sheet's hand and solves against a 25 mm ball held 90 mm above the palm.
    const sheet = createSheetFromTemplate('tri-radial', { kind: 'sphere', radius: 0.025 });
    const read = parseSheet({ ...sheet, object: { ...sheet.object, pose: { ...sheet.object.pose, position: [0, 0, 0.09] } }, hand: built.hand });
    expect(read.ok).toBe(true);
  });

  it('gives a tip without a shape the chosen radius at the tip frame, and asks for it when missing', () => {
    const robot = robotOf(tableRobot());
    const noRadius = handFromUrdf(robot, 'palm', [{ tip: 'a-tip', name: 'a', roles: ['base', 'pivot', 'roll'] }]);
    expect(noRadius).toMatchObject({ ok: false, issue: { message: expect.stringMatching(/no sphere or cylinder; enter the roller radius/) } });
    const withRadius = handFromUrdf(robot, 'palm', [{ tip: 'a-tip', name: 'a', roles: ['base', 'pivot', 'roll'], rollerRadius: 0.01 }]);
    if (!withRadius.ok) throw new Error(withRadius.issue.message);
    const tip = chainInPalmFrame(robot, listUrdfChains(robot, 'palm')[0]);
    if (!tip.ok) throw new Error(tip.issue.message);
    expect(withRadius.hand.fingers[0].roller).toEqual({ kind: 'sphere', radius: 0.01, center: expect.any(Array) });
    expect(withRadius.hand.fingers[0].roller.center).toBeNear(tip.chain.tipFrame.position, { abs: 1e-11 });
  });
});

const wrap = (body: string) => `<?xml version="1.0"?>\n<robot name="r">\n${body}\n</robot>\n`;
const LINKS = '  <link name="palm"/>\n  <link name="f1"/>\n  <link name="f2"/>';

describe('bad files get located errors', () => {
  it('text that is not XML: line and column of the first bad character', () => {
    expect(issuesOf('hand: three fingers')).toEqual([expect.objectContaining({ path: '(file)', line: 1, column: 1, message: expect.stringMatching(/not well-formed XML/) })]);
  });

  it('an element left open: the line and column where the parser found the wrong closing tag', () => {
    const [issue] = issuesOf('<robot name="r">\n  <link name="palm">\n</robot>\n');
    expect(issue).toMatchObject({ line: 3, column: 1, message: expect.stringMatching(/closing tag 'link'/) });
  });

  it('a root element other than <robot>', () => {
    expect(issuesOf('<hand name="h"/>')[0].message).toMatch(/root element must be <robot>/);
  });

  it('a missing attribute: the element path and the line and column of the element (of the enclosing one for an element with no attributes at all)', () => {
    const issues = issuesOf(wrap(`${LINKS}\n  <joint name="j1" type="revolute">\n    <parent/>\n    <child link="f1"/>\n  </joint>`));
    expect(issues).toEqual([{ path: 'robot/joint "j1"/parent', line: 6, column: 3, message: 'attribute "link" is missing' }]);
    const misspelt = issuesOf(wrap(`${LINKS}\n  <joint name="j1" type="revolute">\n    <parent lnk="palm"/>\n    <child link="f1"/>\n  </joint>`));
    expect(misspelt).toEqual([{ path: 'robot/joint "j1"/parent', line: 7, column: 5, message: 'attribute "link" is missing' }]);
  });

  it('a joint without a name or type is found by its position', () => {
    const issues = issuesOf(wrap(`${LINKS}\n  <joint>\n    <parent link="palm"/>\n    <child link="f1"/>\n  </joint>`));
    expect(issues.map((i) => [i.path, i.line, i.message])).toEqual([
      ['robot/joint[1]', 6, 'attribute "name" is missing'],
      ['robot/joint[1]', 6, 'attribute "type" is missing'],
    ]);
  });

  it('a non-numeric value names the attribute and what it holds', () => {
    const [issue] = issuesOf(wrap(`${LINKS}\n  <joint name="j1" type="revolute">\n    <parent link="palm"/>\n    <child link="f1"/>\n    <origin xyz="0 0.01 ten" rpy="0 0 0"/>\n  </joint>`));
    expect(issue).toEqual({ path: 'robot/joint "j1"/origin', line: 9, column: 5, message: 'attribute xyz="0 0.01 ten" must be 3 numbers separated by spaces' });
  });

  it('a hexadecimal or two-number origin is refused (URDF values are decimal numbers)', () => {
    expect(issuesOf(wrap(`${LINKS}\n  <joint name="j1" type="fixed">\n    <parent link="palm"/>\n    <child link="f1"/>\n    <origin xyz="0x10 0 0"/>\n  </joint>`))[0].message).toMatch(/must be 3 numbers/);
    expect(issuesOf(wrap(`${LINKS}\n  <joint name="j1" type="fixed">\n    <parent link="palm"/>\n    <child link="f1"/>\n    <origin rpy="0 0"/>\n  </joint>`))[0].message).toMatch(/rpy="0 0" must be 3 numbers/);
  });

  it('an unknown parent link', () => {
    const [issue] = issuesOf(wrap(`${LINKS}\n  <joint name="j1" type="revolute">\n    <parent link="wrist"/>\n    <child link="f1"/>\n  </joint>`));
    expect(issue).toMatchObject({ path: 'robot/joint "j1"/parent', line: 6, message: 'parent link "wrist" is not a link of this robot' });
  });

  it('a cycle of links', () => {
    const body = `${LINKS}\n  <joint name="j1" type="revolute"><parent link="f1"/><child link="f2"/></joint>\n  <joint name="j2" type="revolute"><parent link="f2"/><child link="f1"/></joint>`;
    const [issue] = issuesOf(wrap(body));
    expect(issue).toMatchObject({ path: 'robot/joint "j1"', line: 6, message: expect.stringMatching(/closes a cycle of links/) });
  });

  it('a link with two parent joints', () => {
    const body = `${LINKS}\n  <joint name="j1" type="revolute"><parent link="palm"/><child link="f1"/></joint>\n  <joint name="j2" type="revolute"><parent link="f2"/><child link="f1"/></joint>`;
    expect(issuesOf(wrap(body))[0]).toMatchObject({ path: 'robot/joint "j2"', line: 7, message: 'link "f1" is already the child of joint "j1"; a link has one parent joint' });
  });

  it('an unknown joint type, a zero axis and reversed limits', () => {
    const body =
      `${LINKS}\n  <joint name="j1" type="hinge"><parent link="palm"/><child link="f1"/></joint>\n` +
      `  <joint name="j2" type="revolute"><parent link="palm"/><child link="f2"/>\n    <axis xyz="0 0 0"/>\n    <limit lower="1" upper="-1" velocity="2"/>\n  </joint>`;
    expect(issuesOf(wrap(body)).map((i) => [i.path, i.line, i.message])).toEqual([
      ['robot/joint "j1"', 6, expect.stringMatching(/joint type "hinge" is not a URDF joint type/)],
      ['robot/joint "j2"/axis', 8, 'axis xyz="0 0 0" must be a non-zero direction'],
      ['robot/joint "j2"/limit', 9, 'limit lower="1" is greater than upper="-1"'],
    ]);
  });

  it('a prismatic joint in a chain: the chain is refused at that joint', () => {
    const robot = robotOf(wrap(`${LINKS}\n  <joint name="slide" type="prismatic"><parent link="palm"/><child link="f1"/><limit lower="0" upper="0.02" velocity="0.1"/></joint>\n  <joint name="hinge" type="revolute"><parent link="f1"/><child link="f2"/></joint>`));
    const [chain] = listUrdfChains(robot, 'palm');
    expect(chain.refused).toMatchObject({ path: 'robot/joint "slide"', line: 6, message: expect.stringMatching(/"slide" is prismatic; a sheet's fingers have revolute joints only/) });
    expect(handFromUrdf(robot, 'palm', [{ tip: 'f2', name: 'f', roles: ['roll'], rollerRadius: 0.01 }])).toMatchObject({ ok: false, issue: { line: 6 } });
  });

  it('lengths written in millimetres: a joint metres away from the palm is refused at its origin', () => {
    const robot = robotOf(wrap(`${LINKS}\n  <joint name="j1" type="revolute"><parent link="palm"/><child link="f1"/>\n    <origin xyz="55 0 10"/>\n  </joint>`));
    const placed = chainInPalmFrame(robot, listUrdfChains(robot, 'palm')[0]);
    expect(placed).toMatchObject({ ok: false, issue: { path: 'robot/joint "j1"/origin', line: 6, message: expect.stringMatching(/lies 55\.0 m from the palm; .*\(URDF lengths are in metres\)/) } });
  });

  it('too many chains for a hand, and roles that do not match the joints', () => {
    const robot = robotOf(tableRobot());
    expect(handFromUrdf(robot, 'palm', [])).toMatchObject({ ok: false, issue: { message: 'pick at least one chain' } });
    expect(handFromUrdf(robot, 'palm', [{ tip: 'b-tip', name: 'b', roles: ['roll'] }])).toMatchObject({ ok: false, issue: { message: '1 roles given for 2 revolute joints' } });
  });
});

describe('content/docs/urdf-import.md', () => {
  it('shows the north finger of the example as the import reads it', () => {
    const text = readFileSync(new URL('../../../content/docs/urdf-import.md', import.meta.url), 'utf8');
    const robot = robotOf(EXAMPLE);
    const built = handFromUrdf(robot, 'palm', [{ tip: 'north-roller', name: 'north', roles: suggestedRoles(3) }]);
    if (!built.ok) throw new Error(built.issue.message);
    for (const joint of built.hand.fingers[0].joints) {
      const row = text.split('\n').find((line) => line.startsWith(`| ${joint.name} `));
      expect(row, joint.name).toBeDefined();
      const cells = row!.split('|').map((cell) => cell.trim());
      expect(cells[2]).toBe(joint.role);
      expect(cells[3].split(',').map(Number)).toBeNear(joint.axis, { abs: 1e-12 });
      expect(cells[4].split(',').map((v) => Number(v) / 1000)).toBeNear(joint.point, { abs: 1e-12 });
      expect(cells[5]).toBe(joint.limits ? `${joint.limits.min} … ${joint.limits.max}` : 'none');
      expect(Number(cells[6])).toBe(joint.rateLimit);
    }
  });
});
