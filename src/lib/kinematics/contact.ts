/**
 * Contact geometry and velocity between one roller and the object (world frame unless named
 * otherwise): closest object point x, outward normal n, gap, roller contact point y = c - rho n,
 * and the object's material velocity at x, v_o(x) = v + w x (x - p).
 */
import type { SheetDocument, SolverSettings } from '../sheet/types';
import { createGjkResult, createGjkWorkspace, gjkDistance, type GjkResult, type GjkWorkspace, type PosedShape } from './gjk';
import type { Finger } from './hand';
import { fromSheet, toMatrix3 } from './quat';
import { closestSurfacePoint, createSurfaceQuery, cylinderShape, shapeFromInput, type ConvexShape, type SurfaceQuery } from './shapes';
import { perpendicular, type Vec3, type Vec3Like } from './vec3';

/** The object as a rigid body: shape in its own frame, pose and twist in the world frame (SI). */
export interface RigidObject {
  shape: ConvexShape;
  /** Object origin, m. */
  position: Float64Array;
  /** Orientation quaternion [x, y, z, w], object to world. */
  orientation: Float64Array;
  /** Rotation matrix of the orientation, row-major; refreshed by updateObjectRotation. */
  rotation: Float64Array;
  /** Velocity of the object origin, m/s. */
  linearVelocity: Float64Array;
  /** Angular velocity, rad/s. */
  angularVelocity: Float64Array;
}

export type ContactState = 'touching' | 'separated' | 'penetrating';

/** Contact between one roller and the object (world frame unless named otherwise). */
export interface Contact {
  /** Closest object surface point x, m, in the world and object frames. */
  objectPoint: Float64Array;
  objectPointLocal: Float64Array;
  /** Outward unit normal of the object at x, world and object frames. */
  normal: Float64Array;
  normalLocal: Float64Array;
  /** Roller contact point y = c - rho n, m, world frame and roller frame (origin at the roller centre, axes of the last link). */
  rollerPoint: Float64Array;
  rollerPointLocal: Float64Array;
  /** Contact direction on the roller relative to its axis: latitude from the equator and longitude from a fixed meridian, rad (NaN without an axis). */
  latitude: number;
  longitude: number;
  /** |c - x| - rho, m: positive separated, negative penetrating. */
  gap: number;
  state: ContactState;
  /** Object material velocity at x, m/s, and its normal and tangential parts. */
  objectVelocity: Float64Array;
  normalSpeed: number;
  tangentialVelocity: Float64Array;
  tangentialSpeed: number;
  /** Distance from y to the roll and pivot axes, m (NaN when the finger has no such joint). */
  rollAxisDistance: number;
  pivotAxisDistance: number;
  /** Distance from the roller centre to the pivot axis, m (NaN without a pivot). */
  pivotCenterDistance: number;
}

/** Scratch for computeContact; one per scene. */
export interface ContactWorkspace {
  query: SurfaceQuery;
  gjk: GjkWorkspace;
  gjkResult: GjkResult;
  objectPosed: PosedShape;
  rollerPosed: PosedShape;
  corePosed: PosedShape;
  centerLocal: Float64Array;
  axisLocal: Float64Array;
  axisPoint: Float64Array;
  frameX: Float64Array;
  frameY: Float64Array;
}

/** Rigid object from a sheet's object section (world frame, SI). */
export function createObject(input: SheetDocument['object']): RigidObject {
  const object: RigidObject = {
    shape: shapeFromInput(input.shape),
    position: Float64Array.from(input.pose.position),
    orientation: fromSheet(input.pose.orientation, new Float64Array(4)),
    rotation: new Float64Array(9),
    linearVelocity: Float64Array.from(input.twist.linear),
    angularVelocity: Float64Array.from(input.twist.angular),
  };
  return updateObjectRotation(object);
}

/** Recomputes the object's rotation matrix from its orientation quaternion (dimensionless). */
export function updateObjectRotation(object: RigidObject): RigidObject {
  toMatrix3(object.orientation, object.rotation);
  return object;
}

/** Empty contact to reuse as `out`. */
export function createContact(): Contact {
  return {
    objectPoint: new Float64Array(3),
    objectPointLocal: new Float64Array(3),
    normal: new Float64Array(3),
    normalLocal: new Float64Array(3),
    rollerPoint: new Float64Array(3),
    rollerPointLocal: new Float64Array(3),
    latitude: Number.NaN,
    longitude: Number.NaN,
    gap: 0,
    state: 'touching',
    objectVelocity: new Float64Array(3),
    normalSpeed: 0,
    tangentialVelocity: new Float64Array(3),
    tangentialSpeed: 0,
    rollAxisDistance: Number.NaN,
    pivotAxisDistance: Number.NaN,
    pivotCenterDistance: Number.NaN,
  };
}

/** New scratch space for computeContact. */
export function createContactWorkspace(): ContactWorkspace {
  const identity = [1, 0, 0, 0, 1, 0, 0, 0, 1];
  return {
    query: createSurfaceQuery(),
    gjk: createGjkWorkspace(),
    gjkResult: createGjkResult(),
    objectPosed: { shape: cylinderShape(0, 0), position: new Float64Array(3), rotation: Float64Array.from(identity) },
    rollerPosed: { shape: cylinderShape(0, 0), position: new Float64Array(3), rotation: new Float64Array(9) },
    corePosed: { shape: cylinderShape(0, 0), position: new Float64Array(3), rotation: new Float64Array(9) },
    centerLocal: new Float64Array(3),
    axisLocal: new Float64Array(3),
    axisPoint: new Float64Array(3),
    frameX: new Float64Array(3),
    frameY: new Float64Array(3),
  };
}

/** Velocity of the object's material point at x, v + w x (x - p) (world frame, m/s). */
export function objectPointVelocity<T extends Vec3 = number[]>(linear: Vec3Like, angular: Vec3Like, origin: Vec3Like, x: Vec3Like, out?: T): T {
  const o = out ?? ([0, 0, 0] as T);
  const rx = x[0] - origin[0], ry = x[1] - origin[1], rz = x[2] - origin[2];
  const wx = angular[0], wy = angular[1], wz = angular[2];
  const vx = linear[0] + wy * rz - wz * ry;
  const vy = linear[1] + wz * rx - wx * rz;
  const vz = linear[2] + wx * ry - wy * rx;
  o[0] = vx; o[1] = vy; o[2] = vz;
  return o;
}

/** Distance from point y to the line through r along the unit axis w (m); arrays read at offset. */
export function distanceToAxis(axis: ArrayLike<number>, point: ArrayLike<number>, offset: number, y: Vec3Like): number {
  const dx = y[0] - point[offset], dy = y[1] - point[offset + 1], dz = y[2] - point[offset + 2];
  const wx = axis[offset], wy = axis[offset + 1], wz = axis[offset + 2];
  const cx = wy * dz - wz * dy, cy = wz * dx - wx * dz, cz = wx * dy - wy * dx;
  return Math.sqrt(cx * cx + cy * cy + cz * cz);
}

/**
 * Contact of the finger's roller with the object after forwardKinematics (world frame, SI); settings.contactTolerance is the touching band on
 * the gap, m, read from the settings object because a number passed to a call that is not inlined is boxed on the heap.
 * Without rollerCoordinates the roller-frame point, latitude and longitude keep their previous values (runs do not record them).
 */
export function computeContact(
  object: RigidObject,
  finger: Finger,
  settings: Pick<SolverSettings, 'contactTolerance'>,
  out: Contact = createContact(),
  ws: ContactWorkspace = createContactWorkspace(),
  rollerCoordinates = true,
): Contact {
  const R = object.rotation, p = object.position;
  const c = finger.rollerCenter;
  const rho = finger.rollerRadius;
  const cl = ws.centerLocal;
  const dx = c[0] - p[0], dy = c[1] - p[1], dz = c[2] - p[2];
  cl[0] = R[0] * dx + R[3] * dy + R[6] * dz;
  cl[1] = R[1] * dx + R[4] * dy + R[7] * dz;
  cl[2] = R[2] * dx + R[5] * dy + R[8] * dz;
  const xl = out.objectPointLocal, nl = out.normalLocal;
  if (finger.rollerKind === 'sphere') {
    const q = closestSurfacePoint(object.shape, cl, ws.query);
    copy3(q.point, xl);
    copy3(q.normal, nl);
    out.gap = q.signedDistance - rho;
  } else {
    out.gap = cylinderContactLocal(object, finger, out, ws);
  }
  const x = out.objectPoint, n = out.normal, y = out.rollerPoint;
  x[0] = R[0] * xl[0] + R[1] * xl[1] + R[2] * xl[2] + p[0];
  x[1] = R[3] * xl[0] + R[4] * xl[1] + R[5] * xl[2] + p[1];
  x[2] = R[6] * xl[0] + R[7] * xl[1] + R[8] * xl[2] + p[2];
  n[0] = R[0] * nl[0] + R[1] * nl[1] + R[2] * nl[2];
  n[1] = R[3] * nl[0] + R[4] * nl[1] + R[5] * nl[2];
  n[2] = R[6] * nl[0] + R[7] * nl[1] + R[8] * nl[2];
  if (finger.rollerKind === 'sphere') {
    y[0] = c[0] - rho * n[0];
    y[1] = c[1] - rho * n[1];
    y[2] = c[2] - rho * n[2];
  }
  const tolerance = settings.contactTolerance;
  out.state = out.gap > tolerance ? 'separated' : out.gap < -tolerance ? 'penetrating' : 'touching';
  if (rollerCoordinates) rollerFrameCoordinates(finger, out);

  const v = objectPointVelocity(object.linearVelocity, object.angularVelocity, p, x, out.objectVelocity);
  const vn = v[0] * n[0] + v[1] * n[1] + v[2] * n[2];
  const t = out.tangentialVelocity;
  t[0] = v[0] - vn * n[0];
  t[1] = v[1] - vn * n[1];
  t[2] = v[2] - vn * n[2];
  out.normalSpeed = vn;
  out.tangentialSpeed = Math.sqrt(t[0] * t[0] + t[1] * t[1] + t[2] * t[2]);
  out.rollAxisDistance = finger.rollIndex >= 0 ? distanceToAxis(finger.axes, finger.points, 3 * finger.rollIndex, y) : Number.NaN;
  out.pivotAxisDistance = finger.pivotIndex >= 0 ? distanceToAxis(finger.axes, finger.points, 3 * finger.pivotIndex, y) : Number.NaN;
  out.pivotCenterDistance = finger.pivotIndex >= 0 ? distanceToAxis(finger.axes, finger.points, 3 * finger.pivotIndex, c) : Number.NaN;
  return out;
}

/**
 * Cylindrical roller. Along the roller axis a(s) = c + s a, |s| <= half width, the object's
 * signed distance is convex with slope n . a; where it has an interior minimum s*, the normal
 * there is perpendicular to the axis and the contact lies on the curved face:
 * x = closest point of a(s*), y = a(s*) - rho n, gap = sd(a(s*)) - rho, exact to rounding and
 * valid for penetration too. Otherwise the contact is on a rim or an end face: GJK gives it when
 * separated; when overlapping, GJK has no closest points, so the roller is taken as its core (the
 * cylinder shrunk by m = min(radius, half width)) grown by a ball of radius m, which rounds the
 * rims, and penetration is the core distance minus m. Writes x and n (object frame) and y (world
 * frame) and returns the gap, m.
 */
function cylinderContactLocal(object: RigidObject, finger: Finger, out: Contact, ws: ContactWorkspace): number {
  const R = object.rotation;
  const a = finger.rollerAxis;
  const al = ws.axisLocal;
  al[0] = R[0] * a[0] + R[3] * a[1] + R[6] * a[2];
  al[1] = R[1] * a[0] + R[4] * a[1] + R[7] * a[2];
  al[2] = R[2] * a[0] + R[5] * a[1] + R[8] * a[2];
  // Roller frame in object coordinates: columns (e1, e2, axis), so the cylinder's z maps onto the axis.
  const e1 = perpendicular(al, ws.frameX);
  const e2 = ws.frameY;
  e2[0] = al[1] * e1[2] - al[2] * e1[1];
  e2[1] = al[2] * e1[0] - al[0] * e1[2];
  e2[2] = al[0] * e1[1] - al[1] * e1[0];
  const rho = finger.rollerRadius, halfWidth = finger.rollerHalfWidth;
  ws.objectPosed.shape = object.shape;
  const roller = ws.rollerPosed, core = ws.corePosed;
  placeAlongAxis(roller, e1, e2, al, ws.centerLocal);
  placeAlongAxis(core, e1, e2, al, ws.centerLocal);
  const rs = roller.shape;
  rs.radius = rho;
  rs.halfLength = halfWidth;
  const xl = out.objectPointLocal, nl = out.normalLocal;
  const y = out.rollerPoint;
  let gap: number;
  let yx: number, yy: number, yz: number;
  const q = ws.query;
  const s = curvedFaceContact(object.shape, ws.centerLocal, al, halfWidth, ws.axisPoint, q);
  const result = Number.isNaN(s) ? gjkDistance(ws.objectPosed, roller, ws.gjkResult, ws.gjk) : ws.gjkResult;
  if (!Number.isNaN(s)) {
    copy3(q.point, xl);
    copy3(q.normal, nl);
    gap = q.signedDistance - rho;
    const cl = ws.centerLocal;
    yx = cl[0] + s * al[0] - rho * nl[0];
    yy = cl[1] + s * al[1] - rho * nl[1];
    yz = cl[2] + s * al[2] - rho * nl[2];
  } else if (!result.intersecting && result.distance > 0) {
    const d = result.distance;
    copy3(result.pointA, xl);
    nl[0] = (result.pointB[0] - xl[0]) / d;
    nl[1] = (result.pointB[1] - xl[1]) / d;
    nl[2] = (result.pointB[2] - xl[2]) / d;
    yx = result.pointB[0]; yy = result.pointB[1]; yz = result.pointB[2];
    gap = d;
  } else {
    const margin = Math.min(rho, halfWidth);
    const cs = core.shape;
    cs.radius = rho - margin;
    cs.halfLength = halfWidth - margin;
    const inner = gjkDistance(ws.objectPosed, core, ws.gjkResult, ws.gjk);
    if (!inner.intersecting && inner.distance > 0) {
      const d = inner.distance;
      copy3(inner.pointA, xl);
      nl[0] = (inner.pointB[0] - xl[0]) / d;
      nl[1] = (inner.pointB[1] - xl[1]) / d;
      nl[2] = (inner.pointB[2] - xl[2]) / d;
      yx = inner.pointB[0] - margin * nl[0];
      yy = inner.pointB[1] - margin * nl[1];
      yz = inner.pointB[2] - margin * nl[2];
      gap = d - margin;
    } else {
      // Deep overlap: fall back to the object's surface nearest the roller centre.
      closestSurfacePoint(object.shape, ws.centerLocal, q);
      copy3(q.point, xl);
      copy3(q.normal, nl);
      gap = q.signedDistance - rho;
      const cl = ws.centerLocal;
      yx = cl[0] - rho * nl[0]; yy = cl[1] - rho * nl[1]; yz = cl[2] - rho * nl[2];
    }
  }
  const p = object.position;
  y[0] = R[0] * yx + R[1] * yy + R[2] * yz + p[0];
  y[1] = R[3] * yx + R[4] * yy + R[5] * yz + p[1];
  y[2] = R[6] * yx + R[7] * yy + R[8] * yz + p[2];
  return gap;
}

const SLOPE_TOLERANCE = 1e-12;
const ROOT_ITERATIONS = 80;

/** Slope n . a of the signed distance at p = c + s a (object frame), with that point's closest-point query written into closest. */
function slopeAlongAxis(shape: ConvexShape, center: Float64Array, axis: Float64Array, s: number, p: Float64Array, closest: SurfaceQuery): number {
  p[0] = center[0] + s * axis[0];
  p[1] = center[1] + s * axis[1];
  p[2] = center[2] + s * axis[2];
  const n = closestSurfacePoint(shape, p, closest).normal;
  return n[0] * axis[0] + n[1] * axis[1] + n[2] * axis[2];
}

/**
 * Axial position s* in [-halfWidth, halfWidth] of the minimum of the signed distance along the
 * roller axis when it is interior (slope changes sign), found by the Illinois variant of regula
 * falsi on the nondecreasing slope; NaN when the minimum is at an end. closest then holds the
 * closest point of c + s* a (object frame); axisPoint is room for the points on the axis.
 */
function curvedFaceContact(shape: ConvexShape, center: Float64Array, axis: Float64Array, halfWidth: number, axisPoint: Float64Array, closest: SurfaceQuery): number {
  let a = -halfWidth, b = halfWidth;
  let fa = slopeAlongAxis(shape, center, axis, a, axisPoint, closest);
  let fb = slopeAlongAxis(shape, center, axis, b, axisPoint, closest);
  if (fa > SLOPE_TOLERANCE || fb < -SLOPE_TOLERANCE) return Number.NaN;
  if (fa >= -SLOPE_TOLERANCE && fb <= SLOPE_TOLERANCE) {
    // Flat along the whole width (line contact): take the middle of the roller.
    slopeAlongAxis(shape, center, axis, 0, axisPoint, closest);
    return 0;
  }
  let s = 0;
  let side = 0;
  for (let i = 0; i < ROOT_ITERATIONS; i++) {
    s = (a * fb - b * fa) / (fb - fa);
    if (!(s > a && s < b)) s = 0.5 * (a + b);
    const fs = slopeAlongAxis(shape, center, axis, s, axisPoint, closest);
    if (fs === 0 || b - a <= 1e-15 * halfWidth) return s;
    if (fs > 0) {
      b = s; fb = fs;
      if (side === 1) fa *= 0.5;
      side = 1;
    } else {
      a = s; fa = fs;
      if (side === -1) fb *= 0.5;
      side = -1;
    }
    if (Math.abs(fs) <= 1e-15) return s;
  }
  return s;
}

function placeAlongAxis(posed: PosedShape, e1: Vec3Like, e2: Vec3Like, axis: Vec3Like, center: Float64Array): void {
  const rot = posed.rotation;
  rot[0] = e1[0]; rot[1] = e2[0]; rot[2] = axis[0];
  rot[3] = e1[1]; rot[4] = e2[1]; rot[5] = axis[1];
  rot[6] = e1[2]; rot[7] = e2[2]; rot[8] = axis[2];
  copy3(center, posed.position);
}

function rollerFrameCoordinates(finger: Finger, out: Contact): void {
  const Rr = finger.rollerRotation, c = finger.rollerCenter, y = out.rollerPoint, yl = out.rollerPointLocal;
  const dx = y[0] - c[0], dy = y[1] - c[1], dz = y[2] - c[2];
  yl[0] = Rr[0] * dx + Rr[3] * dy + Rr[6] * dz;
  yl[1] = Rr[1] * dx + Rr[4] * dy + Rr[7] * dz;
  yl[2] = Rr[2] * dx + Rr[5] * dy + Rr[8] * dz;
  const a = finger.homeRollerAxis, m = finger.rollerMeridian, q = finger.rollerQuarterMeridian;
  const length = Math.sqrt(yl[0] * yl[0] + yl[1] * yl[1] + yl[2] * yl[2]);
  if (length === 0 || a[0] * a[0] + a[1] * a[1] + a[2] * a[2] === 0) {
    out.latitude = Number.NaN;
    out.longitude = Number.NaN;
    return;
  }
  const along = (yl[0] * a[0] + yl[1] * a[1] + yl[2] * a[2]) / length;
  out.latitude = Math.asin(along > 1 ? 1 : along < -1 ? -1 : along);
  // atan2 takes the unnormalised direction: both of its arguments scale by the same positive length.
  out.longitude = Math.atan2(yl[0] * q[0] + yl[1] * q[1] + yl[2] * q[2], yl[0] * m[0] + yl[1] * m[1] + yl[2] * m[2]);
}

function copy3(from: ArrayLike<number>, to: Float64Array): void {
  to[0] = from[0];
  to[1] = from[1];
  to[2] = from[2];
}
