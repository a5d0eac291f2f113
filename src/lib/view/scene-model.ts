/**
 * What the sheet's 3D view and its 2D fallback draw, computed once from the document and its
 * solved result: the object at its pose, each roller at its current centre and axis, the finger
 * chains through the joint axis points, and per contact the point, the outward normal, the object
 * velocity there and the direction in which the roll joint moves the roller surface.
 * World (palm) frame, SI units; quaternions [x, y, z, w].
 */
import { quat, shapeFromInput, support, vec3, type ContactState, type PlainSheetResult } from '../kinematics';
import type { ObjectShape, SheetDocument, Vec3Tuple } from '../sheet/types';

export interface ViewRoller {
  finger: string;
  kind: 'sphere' | 'cylinder';
  center: Vec3Tuple;
  /** Unit roller axis (for a sphere roller only used to orient its meridian lines). */
  axis: Vec3Tuple;
  radius: number;
  /** Half the wheel width along the axis, m (0 for a sphere). */
  halfWidth: number;
}

export interface ViewContact {
  finger: string;
  point: Vec3Tuple;
  /** Outward unit normal of the object at the contact. */
  normal: Vec3Tuple;
  /** Object material velocity at the contact, m/s. */
  velocity: Vec3Tuple;
  /** Unit direction in which the roll joint moves the roller surface at the contact (null without a roll joint or on the roll axis). */
  rollDirection: Vec3Tuple | null;
  state: ContactState;
  gap: number;
}

export interface SceneModel {
  object: { shape: ObjectShape; position: Vec3Tuple; orientation: [number, number, number, number] };
  rollers: ViewRoller[];
  /** Per finger: joint axis points from the palm outwards, then the roller centre. */
  chains: Vec3Tuple[][];
  contacts: ViewContact[];
  /** Centre and radius of a sphere holding everything drawn, m. */
  bounds: { center: Vec3Tuple; radius: number };
  /** Drawn length of normals and roll directions, m, and of velocity arrows per m/s. */
  arrows: { unitLength: number; lengthPerSpeed: number; maxSpeed: number };
}

const tuple = (v: ArrayLike<number>): Vec3Tuple => [v[0]!, v[1]!, v[2]!];

/** Support point of the posed object in world direction d (m). */
export function objectSupport(model: SceneModel['object'], d: Vec3Tuple): Vec3Tuple {
  const local = quat.rotateInverse(model.orientation, d);
  const s = support(shapeFromInput(model.shape), local);
  const world = quat.rotate(model.orientation, s);
  return [world[0]! + model.position[0], world[1]! + model.position[1], world[2]! + model.position[2]];
}

/** Support point of a roller (ball, or wheel as a solid cylinder along its axis) in world direction d (m). */
export function rollerSupport(roller: ViewRoller, d: Vec3Tuple): Vec3Tuple {
  const c = roller.center;
  if (roller.kind === 'sphere') {
    const u = vec3.normalize(d);
    return [c[0] + roller.radius * u[0]!, c[1] + roller.radius * u[1]!, c[2] + roller.radius * u[2]!];
  }
  const a = roller.axis;
  const along = vec3.dot(d, a);
  const side = along > 0 ? roller.halfWidth : along < 0 ? -roller.halfWidth : 0;
  const radial: Vec3Tuple = [d[0] - along * a[0], d[1] - along * a[1], d[2] - along * a[2]];
  const radialLength = vec3.norm(radial);
  const r = radialLength > 1e-12 ? roller.radius / radialLength : 0;
  return [c[0] + side * a[0] + r * radial[0], c[1] + side * a[1] + r * radial[1], c[2] + side * a[2] + r * radial[2]];
}

function rollersFrom(doc: SheetDocument, result: PlainSheetResult | null): ViewRoller[] {
  return doc.hand.fingers.map((finger, i) => {
    const solved = result?.fingers[i];
    const roller = finger.roller;
    const homeAxis: Vec3Tuple = roller.kind === 'cylinder' ? roller.axis : [0, 0, 1];
    const axis = solved && vec3.norm(solved.rollerAxis) > 0 ? tuple(solved.rollerAxis) : homeAxis;
    return {
      finger: finger.name,
      kind: roller.kind,
      center: solved ? tuple(solved.rollerCenter) : roller.center,
      axis,
      radius: roller.radius,
      halfWidth: roller.kind === 'cylinder' ? roller.halfWidth : 0,
    };
  });
}

function chainsFrom(doc: SheetDocument, result: PlainSheetResult | null, rollers: ViewRoller[]): Vec3Tuple[][] {
  return doc.hand.fingers.map((finger, i) => {
    const solved = result?.fingers[i];
    const points = finger.joints.map((joint, k) => (solved ? tuple(solved.jointPoints.slice(3 * k, 3 * k + 3)) : joint.point));
    return [...points, rollers[i]!.center];
  });
}

/** Unit direction w_roll x (y - r_roll) of the roller surface at its contact point y under the roll joint, or null. */
function rollDirectionOf(doc: SheetDocument, result: PlainSheetResult, fingerIndex: number): Vec3Tuple | null {
  const rollJoint = doc.hand.fingers[fingerIndex]!.joints.findIndex((joint) => joint.role === 'roll');
  if (rollJoint < 0) return null;
  const solved = result.fingers[fingerIndex]!;
  const axis = solved.jointAxes.slice(3 * rollJoint, 3 * rollJoint + 3);
  const point = solved.jointPoints.slice(3 * rollJoint, 3 * rollJoint + 3);
  const y = solved.contact.rollerPoint;
  const direction = vec3.cross(axis, [y[0]! - point[0]!, y[1]! - point[1]!, y[2]! - point[2]!]);
  return vec3.norm(direction) > 1e-9 ? tuple(vec3.normalize(direction)) : null;
}

function contactsFrom(doc: SheetDocument, result: PlainSheetResult | null): ViewContact[] {
  if (!result) return [];
  return result.fingers.map((finger, i) => ({
    finger: finger.name,
    point: tuple(finger.contact.objectPoint),
    normal: tuple(finger.contact.normal),
    velocity: tuple(finger.contact.objectVelocity),
    rollDirection: rollDirectionOf(doc, result, i),
    state: finger.contact.state,
    gap: finger.contact.gap,
  }));
}

/** Six axis directions: their support points bound the object. */
const AXES: Vec3Tuple[] = [[1, 0, 0], [-1, 0, 0], [0, 1, 0], [0, -1, 0], [0, 0, 1], [0, 0, -1]];

function boundsOf(points: Vec3Tuple[]): SceneModel['bounds'] {
  const min: Vec3Tuple = [Infinity, Infinity, Infinity];
  const max: Vec3Tuple = [-Infinity, -Infinity, -Infinity];
  for (const p of points) {
    for (let k = 0; k < 3; k++) {
      min[k] = Math.min(min[k]!, p[k]!);
      max[k] = Math.max(max[k]!, p[k]!);
    }
  }
  const center: Vec3Tuple = [0.5 * (min[0] + max[0]), 0.5 * (min[1] + max[1]), 0.5 * (min[2] + max[2])];
  const radius = Math.max(1e-3, ...points.map((p) => vec3.norm([p[0] - center[0], p[1] - center[1], p[2] - center[2]])));
  return { center, radius };
}

/** The drawable scene: from the solved result where there is one, else the document's home configuration. */
export function buildSceneModel(doc: SheetDocument, result: PlainSheetResult | null): SceneModel {
  const object: SceneModel['object'] = {
    shape: doc.object.shape,
    position: result ? tuple(result.object.position) : doc.object.pose.position,
    orientation: result
      ? [result.object.orientation[0]!, result.object.orientation[1]!, result.object.orientation[2]!, result.object.orientation[3]!]
      : (quat.fromSheet(doc.object.pose.orientation) as [number, number, number, number]),
  };
  const rollers = rollersFrom(doc, result);
  const chains = chainsFrom(doc, result, rollers);
  const contacts = contactsFrom(doc, result);
  const hull: Vec3Tuple[] = [
    ...AXES.map((d) => objectSupport(object, d)),
    ...rollers.flatMap((roller) => AXES.map((d) => rollerSupport(roller, d))),
    ...chains.flat(),
  ];
  const bounds = boundsOf(hull);
  const objectSize = Math.max(...AXES.map((d) => vec3.dot(objectSupport(object, d), d) - vec3.dot(object.position, d)));
  // Normals start at the contact and point into the roller, so they must outreach it to be seen.
  const unitLength = Math.max(0.6 * objectSize, ...rollers.map((roller) => 2.4 * roller.radius));
  const maxSpeed = Math.max(0, ...contacts.map((c) => vec3.norm(c.velocity)));
  return {
    object,
    rollers,
    chains,
    contacts,
    bounds,
    arrows: { unitLength, lengthPerSpeed: maxSpeed > 0 ? unitLength / maxSpeed : 0, maxSpeed },
  };
}

/** End point of an arrow from start along direction scaled by length (m). */
export function arrowEnd(start: Vec3Tuple, direction: Vec3Tuple, length: number): Vec3Tuple {
  const d = vec3.scale(direction, length);
  return [start[0] + d[0]!, start[1] + d[1]!, start[2] + d[2]!];
}
