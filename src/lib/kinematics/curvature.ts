/**
 * Surface curvature at a contact and the rolling-contact kinematics it governs (Montana 1988, "The
 * kinematics of contact and grasp", Int. J. Robotics Research 7(3)). Computed once per evaluation
 * from a solved sheet, never in the per-solve loop, so the results are plain arrays (JSON-ready),
 * with null where a quantity does not exist.
 *
 * Conventions. n is the object's outward unit normal at the contact; the roller's outward normal
 * there is -n. A surface's shape operator L (the derivative of its outward unit normal along the
 * surface, 1/m) is positive semi-definite on a convex surface; its eigenvalues are the principal
 * curvatures k1 >= k2 and its unit eigenvectors d1, d2 the principal directions, ordered so that
 * d1 x d2 is that surface's outward normal (a Gauss frame in Montana's sense). The object's contact
 * frame is (x_o, y_o, n) = (d1, d2, n) of the object; the roller's is (x_f, y_f, -n) with
 * x_f = cos(psi) x_o - sin(psi) y_o and y_f = -sin(psi) x_o - cos(psi) y_o. In the object's frame
 * the relative curvature is K_rel = K_o + R_psi K_f R_psi, R_psi = [[cos psi, -sin psi], [-sin psi, -cos psi]].
 *
 * Contact-point velocities: differentiating n along both surfaces and the contact condition gives
 * L_o a_o + L_f a_f = n x w and a_f - a_o = v_t, where w = w_o - w_f is the object's angular
 * velocity relative to the roller, v_t the tangential slip v_o(x) - v_f(y), and a_o, a_f the
 * velocities of the contact point over the object and over the roller. Hence
 * a_f = K_rel^-1 (n x w + L_o v_t) and a_o = K_rel^-1 (n x w - L_f v_t); in the object's contact
 * frame n x w = (-w_y, w_x), which is Montana's contact equation.
 */
import type { RollerInput, SheetDocument, Vec3Tuple } from '../sheet/types';
import type { Contact } from './contact';
import { toMatrix3 } from './quat';
import type { FingerResult, SheetResult } from './scene';
import { shapeFromInput, type ConvexShape } from './shapes';
import { cross, perpendicular, type Vec3Like } from './vec3';

/** Where on a surface the contact lies, which decides its curvature. */
export type SurfaceRegion =
  | 'sphere' | 'ellipsoid' | 'face' | 'rounded-edge' | 'rounded-corner' | 'sharp-edge' | 'side' | 'cap' | 'rim' | 'hemisphere';

/** Curvature of one surface at the contact. */
export interface SurfaceCurvature {
  region: SurfaceRegion;
  /** Principal curvatures k1 >= k2, 1/m; null on a sharp edge or corner, or past the floating-point range. */
  principalCurvatures: [number, number] | null;
  /** Unit principal directions d1, d2 with d1 x d2 the surface's outward normal; null with the curvatures. */
  principalDirections: [Vec3Tuple, Vec3Tuple] | null;
}

/** 'defined'; 'singular' when the surfaces conform along a direction (line contact); 'undefined' when a surface has no curvature there. */
export type RelativeCurvatureStatus = 'defined' | 'singular' | 'undefined';

/** Relative curvature K_rel = K_o + R_psi K_f R_psi of the contact (palm frame). */
export interface RelativeCurvature {
  status: RelativeCurvatureStatus;
  /** Montana's psi: the angle from the object's d1 to the roller's d1, rad (null when undefined). */
  angle: number | null;
  /** K_rel in the object's contact frame (x_o, y_o), rows, 1/m. */
  matrix: [[number, number], [number, number]] | null;
  /** Eigenvalues of K_rel, descending, 1/m. */
  principalCurvatures: [number, number] | null;
  /** Its unit eigenvectors, d1 x d2 = n, palm frame. */
  principalDirections: [Vec3Tuple, Vec3Tuple] | null;
}

/** 'defined'; 'not-touching' outside the touching band; 'singular' or 'undefined' as the relative curvature. */
export type WanderStatus = 'defined' | 'not-touching' | 'singular' | 'undefined';

/** How the contact point moves over the roller and the object for the sheet's twist and the full solution's joint rates (palm frame). */
export interface ContactWander {
  status: WanderStatus;
  /** w = w_o - w_f, the object's angular velocity relative to the roller, rad/s. */
  relativeAngularVelocity: Vec3Tuple;
  /** v_t, the tangential part of the slip v_o(x) - J theta_dot left by the full solution, m/s. */
  tangentialSlip: Vec3Tuple;
  /** a_f: velocity of the contact point over the roller, m/s, and its magnitude. */
  rollerVelocity: Vec3Tuple | null;
  rollerSpeed: number | null;
  /** a_o: velocity of the contact point over the object, m/s, and its magnitude. */
  objectVelocity: Vec3Tuple | null;
  objectSpeed: number | null;
}

/** Curvature and rolling kinematics of one finger's contact (palm frame, SI). */
export interface ContactCurvature {
  object: SurfaceCurvature;
  roller: SurfaceCurvature;
  relative: RelativeCurvature;
  wander: ContactWander;
}

/**
 * A point counts as on a seam (edge, rim, fillet boundary) within this fraction of the shape's size:
 * far above the rounding of the closest-point queries, far below any dimension a sheet describes.
 */
const SEAM_TOLERANCE = 1e-9;

/**
 * The relative curvature counts as singular when its smaller eigenvalue is at most this fraction of
 * the larger: the radius of relative curvature is then a billion times the other and the contact
 * point is not determined along that direction (a line contact).
 */
export const SINGULAR_CURVATURE_RATIO = 1e-9;

const UNDEFINED_SURFACE = (region: SurfaceRegion): SurfaceCurvature => ({ region, principalCurvatures: null, principalDirections: null });

function tuple(x: number, y: number, z: number): Vec3Tuple {
  return [x, y, z];
}

function finiteAll(values: readonly number[]): boolean {
  return values.every(Number.isFinite);
}

/** Surface of the given principal curvatures, d1 the unit vector given and d2 = normal x d1; undefined when a number overflows. */
function surface(region: SurfaceRegion, k1: number, k2: number, d1: Vec3Like, normal: Vec3Like): SurfaceCurvature {
  const d2 = cross(normal, d1);
  const numbers = [k1, k2, d1[0], d1[1], d1[2], d2[0], d2[1], d2[2]];
  if (!finiteAll(numbers)) return UNDEFINED_SURFACE(region);
  return { region, principalCurvatures: [k1, k2], principalDirections: [tuple(d1[0], d1[1], d1[2]), tuple(d2[0], d2[1], d2[2])] };
}

/** Umbilic surface (both principal curvatures k, 1/m) with d1 any unit tangent. */
function umbilic(region: SurfaceRegion, k: number, normal: Vec3Like): SurfaceCurvature {
  return surface(region, k, k, perpendicular(normal), normal);
}

/** Cylinder-like surface: curvature k (1/m) around the unit axis, 0 along it; d2 is the axis made tangent. */
function cylindrical(region: SurfaceRegion, k: number, axis: Vec3Like, normal: Vec3Like): SurfaceCurvature {
  const along = axis[0] * normal[0] + axis[1] * normal[1] + axis[2] * normal[2];
  const tx = axis[0] - along * normal[0], ty = axis[1] - along * normal[1], tz = axis[2] - along * normal[2];
  const length = Math.hypot(tx, ty, tz);
  if (!(length > 0)) return UNDEFINED_SURFACE(region);
  const d2 = [tx / length, ty / length, tz / length];
  // d1 = d2 x n makes d1 x d2 = n.
  return surface(region, k, 0, cross(d2, normal), normal);
}

/** Eigenvalues (descending) of the symmetric 2 x 2 [[p, q], [q, r]] and the angle of the first eigenvector from the first basis vector, rad. */
function symmetricEigen2(p: number, q: number, r: number): [number, number, number] {
  const mean = 0.5 * (p + r);
  const spread = Math.hypot(0.5 * (p - r), q);
  return [mean + spread, mean - spread, 0.5 * Math.atan2(2 * q, p - r)];
}

function ellipsoidCurvature(semiAxes: Float64Array, point: Vec3Like): SurfaceCurvature {
  // Implicit surface F = sum (x_i / e_i)^2 - 1: L = P (Hess F) P / |grad F| on the tangent plane, the
  // factor 2 of both cancelling (do Carmo 1976, sec. 3-3; Goldman 2005, "Curvature formulas for
  // implicit curves and surfaces").
  const h0 = 1 / (semiAxes[0] * semiAxes[0]), h1 = 1 / (semiAxes[1] * semiAxes[1]), h2 = 1 / (semiAxes[2] * semiAxes[2]);
  const gx = point[0] * h0, gy = point[1] * h1, gz = point[2] * h2;
  const gradient = Math.hypot(gx, gy, gz);
  const normal = [gx / gradient, gy / gradient, gz / gradient];
  if (!finiteAll(normal)) return UNDEFINED_SURFACE('ellipsoid');
  const t1 = perpendicular(normal);
  const t2 = cross(normal, t1);
  const l11 = (t1[0] * t1[0] * h0 + t1[1] * t1[1] * h1 + t1[2] * t1[2] * h2) / gradient;
  const l12 = (t1[0] * t2[0] * h0 + t1[1] * t2[1] * h1 + t1[2] * t2[2] * h2) / gradient;
  const l22 = (t2[0] * t2[0] * h0 + t2[1] * t2[1] * h1 + t2[2] * t2[2] * h2) / gradient;
  const [k1, k2, angle] = symmetricEigen2(l11, l12, l22);
  const c = Math.cos(angle), s = Math.sin(angle);
  const d1 = [c * t1[0] + s * t2[0], c * t1[1] + s * t2[1], c * t1[2] + s * t2[2]];
  return surface('ellipsoid', k1, k2, d1, normal);
}

function boxCurvature(extents: Float64Array, fillet: number, point: Vec3Like, normal: Vec3Like): SurfaceCurvature {
  const tolerance = SEAM_TOLERANCE * Math.max(extents[0], extents[1], extents[2]);
  if (fillet <= tolerance) {
    let onBoundary = 0;
    for (let i = 0; i < 3; i++) if (Math.abs(point[i]) >= extents[i] - tolerance) onBoundary++;
    return onBoundary >= 2 ? UNDEFINED_SURFACE('sharp-edge') : umbilic('face', 0, normal);
  }
  // Outside the core box (the box shrunk by the fillet) a coordinate lies on a face or a fillet.
  let outside = 0, edgeAxis = -1;
  for (let i = 0; i < 3; i++) {
    if (Math.abs(point[i]) > extents[i] - fillet + tolerance) outside++;
    else edgeAxis = i;
  }
  if (outside <= 1) return umbilic('face', 0, normal);
  if (outside === 3) return umbilic('rounded-corner', 1 / fillet, normal);
  const axis = [0, 0, 0];
  axis[edgeAxis] = 1;
  return cylindrical('rounded-edge', 1 / fillet, axis, normal);
}

const Z_AXIS = [0, 0, 1];

function cylinderCurvature(radius: number, halfLength: number, point: Vec3Like, normal: Vec3Like): SurfaceCurvature {
  const tolerance = SEAM_TOLERANCE * Math.max(radius, halfLength);
  const onSide = Math.hypot(point[0], point[1]) >= radius - tolerance;
  const onCap = Math.abs(point[2]) >= halfLength - tolerance;
  if (onSide && onCap) return UNDEFINED_SURFACE('rim');
  return onCap ? umbilic('cap', 0, normal) : cylindrical('side', 1 / radius, Z_AXIS, normal);
}

/** Principal curvatures (1/m) and directions of an object shape at its surface point with its outward unit normal, both in the object frame. */
export function objectSurfaceCurvature(shape: ConvexShape, point: Vec3Like, normal: Vec3Like): SurfaceCurvature {
  switch (shape.kind) {
    case 'sphere':
      return umbilic('sphere', 1 / shape.radius, normal);
    case 'capsule':
      return Math.abs(point[2]) <= shape.halfLength ? cylindrical('side', 1 / shape.radius, Z_AXIS, normal) : umbilic('hemisphere', 1 / shape.radius, normal);
    case 'cylinder':
      return cylinderCurvature(shape.radius, shape.halfLength, point, normal);
    case 'box':
      return boxCurvature(shape.extents, shape.radius, point, normal);
    case 'ellipsoid':
      return ellipsoidCurvature(shape.extents, point);
  }
}

/** A roller's current geometry, palm frame: kind, radius and half width (m), centre (m) and unit axis (cylinder). */
export interface RollerGeometry {
  kind: RollerInput['kind'];
  radius: number;
  halfWidth: number;
  center: Vec3Like;
  axis: Vec3Like;
}

/** Principal curvatures (1/m) and directions of a roller at its surface point with its outward unit normal, palm frame. */
export function rollerSurfaceCurvature(roller: RollerGeometry, point: Vec3Like, normal: Vec3Like): SurfaceCurvature {
  if (roller.kind === 'sphere') return umbilic('sphere', 1 / roller.radius, normal);
  const a = roller.axis, c = roller.center;
  const rx = point[0] - c[0], ry = point[1] - c[1], rz = point[2] - c[2];
  const axial = rx * a[0] + ry * a[1] + rz * a[2];
  const radial = Math.hypot(rx - axial * a[0], ry - axial * a[1], rz - axial * a[2]);
  const tolerance = SEAM_TOLERANCE * Math.max(roller.radius, roller.halfWidth);
  const onSide = radial >= roller.radius - tolerance;
  const onCap = Math.abs(axial) >= roller.halfWidth - tolerance;
  if (onSide && onCap) return UNDEFINED_SURFACE('rim');
  return onCap ? umbilic('cap', 0, normal) : cylindrical('side', 1 / roller.radius, a, normal);
}

/** The object's curvature with its directions turned into the palm frame by the row-major object rotation. */
function toPalm(local: SurfaceCurvature, rotation: ArrayLike<number>): SurfaceCurvature {
  if (!local.principalDirections) return local;
  const turn = (d: Vec3Tuple): Vec3Tuple => [
    rotation[0] * d[0] + rotation[1] * d[1] + rotation[2] * d[2],
    rotation[3] * d[0] + rotation[4] * d[1] + rotation[5] * d[2],
    rotation[6] * d[0] + rotation[7] * d[1] + rotation[8] * d[2],
  ];
  return { ...local, principalDirections: [turn(local.principalDirections[0]), turn(local.principalDirections[1])] };
}

function dot3(a: Vec3Like, b: Vec3Like): number {
  return a[0] * b[0] + a[1] * b[1] + a[2] * b[2];
}

/** Relative curvature K_rel = K_o + R_psi K_f R_psi (1/m) of the object's and roller's curvature at the contact, palm frame, n the object's outward unit normal. */
export function relativeCurvature(object: SurfaceCurvature, roller: SurfaceCurvature, normal: Vec3Like): RelativeCurvature {
  const ko = object.principalCurvatures, kf = roller.principalCurvatures;
  const dirO = object.principalDirections, dirF = roller.principalDirections;
  if (!ko || !kf || !dirO || !dirF) return { status: 'undefined', angle: null, matrix: null, principalCurvatures: null, principalDirections: null };
  const [xo, yo] = dirO;
  // x_f = cos(psi) x_o - sin(psi) y_o; the roller's d1 is normalised within the tangent plane of n.
  const along = dot3(dirF[0], xo), across = -dot3(dirF[0], yo);
  const length = Math.hypot(along, across);
  const c = along / length, s = across / length;
  // R_psi diag(kf) R_psi with R_psi = [[c, -s], [-s, -c]].
  const m11 = ko[0] + kf[0] * c * c + kf[1] * s * s;
  const m12 = (kf[1] - kf[0]) * c * s;
  const m22 = ko[1] + kf[0] * s * s + kf[1] * c * c;
  const [k1, k2, angle] = symmetricEigen2(m11, m12, m22);
  const ca = Math.cos(angle), sa = Math.sin(angle);
  const d1 = [ca * xo[0] + sa * yo[0], ca * xo[1] + sa * yo[1], ca * xo[2] + sa * yo[2]];
  const d2 = cross(normal, d1);
  const numbers = [m11, m12, m22, k1, k2, ...d1, ...d2];
  if (!finiteAll(numbers)) return { status: 'undefined', angle: null, matrix: null, principalCurvatures: null, principalDirections: null };
  return {
    status: k1 > 0 && k2 > SINGULAR_CURVATURE_RATIO * k1 ? 'defined' : 'singular',
    angle: Math.atan2(s, c),
    matrix: [[m11, m12], [m12, m22]],
    principalCurvatures: [k1, k2],
    principalDirections: [tuple(d1[0], d1[1], d1[2]), tuple(d2[0], d2[1], d2[2])],
  };
}

/** Shape operator of a surface with defined curvature applied to the tangent vector v, from its principal curvatures and directions (palm frame, 1/m times the unit of v). */
export function applyShapeOperator(curvature: SurfaceCurvature, v: Vec3Like): number[] {
  const [k1, k2] = curvature.principalCurvatures!;
  const [d1, d2] = curvature.principalDirections!;
  const a = k1 * dot3(d1, v), b = k2 * dot3(d2, v);
  return [a * d1[0] + b * d2[0], a * d1[1] + b * d2[1], a * d1[2] + b * d2[2]];
}

/** K_rel^-1 b for a tangent vector b, through the eigen-decomposition of K_rel (palm frame; 1/m inverted). */
function solveRelative(relative: RelativeCurvature, b: Vec3Like): Vec3Tuple {
  const [k1, k2] = relative.principalCurvatures!;
  const [d1, d2] = relative.principalDirections!;
  const a = dot3(d1, b) / k1, c = dot3(d2, b) / k2;
  return tuple(a * d1[0] + c * d2[0], a * d1[1] + c * d2[1], a * d1[2] + c * d2[2]);
}

/** Contact-point velocities over roller a_f = K_rel^-1 (n x w + L_o v_t) and object a_o = K_rel^-1 (n x w - L_f v_t), m/s, palm frame, from w = w_o - w_f (rad/s) and slip v_t (m/s). */
export function contactPointVelocities(
  object: SurfaceCurvature, roller: SurfaceCurvature, relative: RelativeCurvature, normal: Vec3Like,
  relativeAngularVelocity: Vec3Tuple, tangentialSlip: Vec3Tuple, touching: boolean,
): ContactWander {
  const base = { relativeAngularVelocity, tangentialSlip, rollerVelocity: null, rollerSpeed: null, objectVelocity: null, objectSpeed: null };
  if (relative.status !== 'defined') return { status: relative.status, ...base };
  if (!touching) return { status: 'not-touching', ...base };
  const turn = cross(normal, relativeAngularVelocity);
  const lo = applyShapeOperator(object, tangentialSlip), lf = applyShapeOperator(roller, tangentialSlip);
  const rollerVelocity = solveRelative(relative, [turn[0] + lo[0], turn[1] + lo[1], turn[2] + lo[2]]);
  const objectVelocity = solveRelative(relative, [turn[0] - lf[0], turn[1] - lf[1], turn[2] - lf[2]]);
  const rollerSpeed = Math.hypot(...rollerVelocity), objectSpeed = Math.hypot(...objectVelocity);
  if (!finiteAll([...rollerVelocity, ...objectVelocity, rollerSpeed, objectSpeed])) return { status: 'undefined', ...base };
  return { status: 'defined', relativeAngularVelocity, tangentialSlip, rollerVelocity, rollerSpeed, objectVelocity, objectSpeed };
}

/** w_o - sum_k theta_dot_k w_k: the object's angular velocity relative to the roller for the full solution's rates, rad/s, palm frame. */
function relativeAngularVelocityOf(finger: FingerResult, objectAngularVelocity: Vec3Like): Vec3Tuple {
  const axes = finger.jointAxes, rates = finger.full.rates;
  const w = tuple(objectAngularVelocity[0], objectAngularVelocity[1], objectAngularVelocity[2]);
  for (let k = 0; k < rates.length; k++) {
    w[0] -= rates[k] * axes[3 * k];
    w[1] -= rates[k] * axes[3 * k + 1];
    w[2] -= rates[k] * axes[3 * k + 2];
  }
  return w;
}

/** Tangential part of the full solution's slip v_o(x) - J theta_dot, m/s, palm frame. */
function tangentialSlipOf(finger: FingerResult, contact: Contact): Vec3Tuple {
  const r = finger.full.residual, n = contact.normal;
  const normalPart = r[0] * n[0] + r[1] * n[1] + r[2] * n[2];
  return tuple(r[0] - normalPart * n[0], r[1] - normalPart * n[1], r[2] - normalPart * n[2]);
}

/** Curvature and rolling kinematics of one finger's contact after a solve (palm frame, SI); objectRotation row-major, object to palm. */
export function contactCurvature(shape: ConvexShape, objectRotation: ArrayLike<number>, objectAngularVelocity: Vec3Like, roller: RollerInput, finger: FingerResult): ContactCurvature {
  const contact = finger.contact;
  const n = contact.normal;
  const object = toPalm(objectSurfaceCurvature(shape, contact.objectPointLocal, contact.normalLocal), objectRotation);
  const geometry: RollerGeometry = {
    kind: roller.kind,
    radius: roller.radius,
    halfWidth: roller.kind === 'cylinder' ? roller.halfWidth : 0,
    center: finger.rollerCenter,
    axis: finger.rollerAxis,
  };
  const rollerCurvature = rollerSurfaceCurvature(geometry, contact.rollerPoint, [-n[0], -n[1], -n[2]]);
  const relative = relativeCurvature(object, rollerCurvature, n);
  const wander = contactPointVelocities(
    object, rollerCurvature, relative, n, relativeAngularVelocityOf(finger, objectAngularVelocity), tangentialSlipOf(finger, contact), contact.state === 'touching',
  );
  return { object, roller: rollerCurvature, relative, wander };
}

/**
 * Curvature and rolling kinematics of every finger's contact of a solved sheet (palm frame, SI), in finger order; a finger
 * with an entry in `known` takes it as it is (an earlier evaluation's, from the same finger input, object and solver settings).
 */
export function sheetCurvature(doc: SheetDocument, result: SheetResult, known: readonly (ContactCurvature | undefined)[] = []): ContactCurvature[] {
  const shape = shapeFromInput(doc.object.shape);
  const rotation = toMatrix3(result.object.orientation);
  return result.fingers.map((finger, i) => known[i] ?? contactCurvature(shape, rotation, result.object.angularVelocity, doc.hand.fingers[i].roller, finger));
}
