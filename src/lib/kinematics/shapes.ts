/**
 * Convex object shapes in their own frame (centred at the origin; cylinder and capsule along z):
 * closest surface point, outward normal and signed distance to a query point (negative inside),
 * and the support mapping used by GJK.
 */
import type { ObjectShape } from '../sheet/types';
import type { Vec3, Vec3Like } from './vec3';

export type ShapeKind = 'sphere' | 'box' | 'cylinder' | 'capsule' | 'ellipsoid';

/**
 * A convex shape with its numbers unpacked for fast queries.
 * radius: sphere radius, cylinder or capsule radius, or the box fillet radius (m).
 * halfLength: cylinder or capsule half length along z (m).
 * extents: box outer half extents (fillet included) or ellipsoid semi-axes (m).
 */
export interface ConvexShape {
  kind: ShapeKind;
  radius: number;
  halfLength: number;
  extents: Float64Array;
}

/** Closest surface point of a shape to a query point, in the shape's frame. */
export interface SurfaceQuery {
  /** Closest surface point, m. */
  point: Float64Array;
  /** Outward unit normal at that point. */
  normal: Float64Array;
  /** Distance from the surface to the query point, m; negative inside. */
  signedDistance: number;
}

/** Ball of radius r about the origin (m). */
export function sphereShape(radius: number): ConvexShape {
  return { kind: 'sphere', radius, halfLength: 0, extents: new Float64Array(3) };
}

/** Box with outer half extents (m) whose edges and corners are rounded by filletRadius (m). */
export function boxShape(halfExtents: Vec3Like, filletRadius = 0): ConvexShape {
  return { kind: 'box', radius: filletRadius, halfLength: 0, extents: Float64Array.from([halfExtents[0], halfExtents[1], halfExtents[2]]) };
}

/** Solid cylinder of radius r along z from -halfLength to +halfLength (m). */
export function cylinderShape(radius: number, halfLength: number): ConvexShape {
  return { kind: 'cylinder', radius, halfLength, extents: new Float64Array(3) };
}

/** Capsule: the segment z in [-halfLength, halfLength] swept by a ball of radius r (m). */
export function capsuleShape(radius: number, halfLength: number): ConvexShape {
  return { kind: 'capsule', radius, halfLength, extents: new Float64Array(3) };
}

/** Ellipsoid with semi-axes along x, y, z (m). */
export function ellipsoidShape(semiAxes: Vec3Like): ConvexShape {
  return { kind: 'ellipsoid', radius: 0, halfLength: 0, extents: Float64Array.from([semiAxes[0], semiAxes[1], semiAxes[2]]) };
}

/** Unpacked shape of a sheet's object shape (object frame, m). */
export function shapeFromInput(shape: ObjectShape): ConvexShape {
  switch (shape.kind) {
    case 'sphere':
      return sphereShape(shape.radius);
    case 'box':
      return boxShape(shape.halfExtents, shape.filletRadius ?? 0);
    case 'cylinder':
      return cylinderShape(shape.radius, shape.halfLength);
    case 'capsule':
      return capsuleShape(shape.radius, shape.halfLength);
    case 'ellipsoid':
      return ellipsoidShape(shape.semiAxes);
  }
}

/** Empty query result to reuse as `out`. */
export function createSurfaceQuery(): SurfaceQuery {
  return { point: new Float64Array(3), normal: new Float64Array(3), signedDistance: 0 };
}

/** Closest surface point, outward normal and signed distance of point p (shape frame, m). */
export function closestSurfacePoint(shape: ConvexShape, p: Vec3Like, out: SurfaceQuery = createSurfaceQuery()): SurfaceQuery {
  switch (shape.kind) {
    case 'sphere':
      closestOnCapsule(shape.radius, 0, p, out);
      break;
    case 'capsule':
      closestOnCapsule(shape.radius, shape.halfLength, p, out);
      break;
    case 'box':
      closestOnRoundedBox(shape.extents, shape.radius, p, out);
      break;
    case 'cylinder':
      closestOnCylinder(shape.radius, shape.halfLength, p, out);
      break;
    case 'ellipsoid':
      closestOnEllipsoid(shape.extents, p, out);
      break;
  }
  return out;
}

const scratchQuery = createSurfaceQuery();

/** Signed distance from the surface to point p (shape frame, m; negative inside). */
export function signedDistance(shape: ConvexShape, p: Vec3Like): number {
  return closestSurfacePoint(shape, p, scratchQuery).signedDistance;
}

/** Support point: the shape point farthest along direction d (shape frame, m). */
export function support<T extends Vec3 = number[]>(shape: ConvexShape, d: Vec3Like, out?: T): T {
  const o = out ?? ([0, 0, 0] as T);
  const dx = d[0], dy = d[1], dz = d[2];
  const length = Math.sqrt(dx * dx + dy * dy + dz * dz);
  const ux = length > 0 ? dx / length : 0;
  const uy = length > 0 ? dy / length : 0;
  const uz = length > 0 ? dz / length : 1;
  switch (shape.kind) {
    case 'sphere': {
      const r = shape.radius;
      o[0] = r * ux; o[1] = r * uy; o[2] = r * uz;
      break;
    }
    case 'capsule': {
      const r = shape.radius;
      o[0] = r * ux; o[1] = r * uy; o[2] = r * uz + (uz < 0 ? -shape.halfLength : shape.halfLength);
      break;
    }
    case 'box': {
      const e = shape.extents, f = shape.radius;
      o[0] = (ux < 0 ? f - e[0] : e[0] - f) + f * ux;
      o[1] = (uy < 0 ? f - e[1] : e[1] - f) + f * uy;
      o[2] = (uz < 0 ? f - e[2] : e[2] - f) + f * uz;
      break;
    }
    case 'cylinder': {
      const radial = Math.sqrt(ux * ux + uy * uy);
      const s = radial > 0 ? shape.radius / radial : 0;
      o[0] = s * ux; o[1] = s * uy; o[2] = uz < 0 ? -shape.halfLength : shape.halfLength;
      break;
    }
    case 'ellipsoid': {
      // Maximiser of d.x on x^T diag(e)^-2 x = 1: x = diag(e)^2 d / |diag(e) d|.
      const e = shape.extents;
      const ax = e[0] * ux, ay = e[1] * uy, az = e[2] * uz;
      const s = 1 / Math.sqrt(ax * ax + ay * ay + az * az);
      o[0] = e[0] * ax * s; o[1] = e[1] * ay * s; o[2] = e[2] * az * s;
      break;
    }
  }
  return o;
}

function closestOnCapsule(radius: number, halfLength: number, p: Vec3Like, out: SurfaceQuery): void {
  const x = p[0], y = p[1];
  const axial = p[2] > halfLength ? halfLength : p[2] < -halfLength ? -halfLength : p[2];
  const z = p[2] - axial;
  const d = Math.sqrt(x * x + y * y + z * z);
  const n = out.normal;
  if (d > 0) {
    n[0] = x / d; n[1] = y / d; n[2] = z / d;
  } else if (halfLength > 0) {
    // On the core segment every radial direction is nearest; report +x.
    n[0] = 1; n[1] = 0; n[2] = 0;
  } else {
    n[0] = 0; n[1] = 0; n[2] = 1;
  }
  out.point[0] = radius * n[0];
  out.point[1] = radius * n[1];
  out.point[2] = axial + radius * n[2];
  out.signedDistance = d - radius;
}

function closestOnRoundedBox(extents: Float64Array, fillet: number, p: Vec3Like, out: SurfaceQuery): void {
  const cx = extents[0] - fillet, cy = extents[1] - fillet, cz = extents[2] - fillet;
  const px = p[0], py = p[1], pz = p[2];
  // The rounded box is the core box grown by the fillet radius: outside the core the answer is the
  // nearest core point pushed out by the fillet; inside the core it is the nearest flat face.
  const qx = px > cx ? cx : px < -cx ? -cx : px;
  const qy = py > cy ? cy : py < -cy ? -cy : py;
  const qz = pz > cz ? cz : pz < -cz ? -cz : pz;
  const dx = px - qx, dy = py - qy, dz = pz - qz;
  const d = Math.sqrt(dx * dx + dy * dy + dz * dz);
  const n = out.normal, x = out.point;
  if (d > 0) {
    n[0] = dx / d; n[1] = dy / d; n[2] = dz / d;
    x[0] = qx + fillet * n[0]; x[1] = qy + fillet * n[1]; x[2] = qz + fillet * n[2];
    out.signedDistance = d - fillet;
    return;
  }
  const gx = extents[0] - Math.abs(px), gy = extents[1] - Math.abs(py), gz = extents[2] - Math.abs(pz);
  x[0] = px; x[1] = py; x[2] = pz;
  n[0] = 0; n[1] = 0; n[2] = 0;
  if (gx <= gy && gx <= gz) {
    const s = px < 0 ? -1 : 1;
    x[0] = s * extents[0]; n[0] = s; out.signedDistance = -gx;
  } else if (gy <= gz) {
    const s = py < 0 ? -1 : 1;
    x[1] = s * extents[1]; n[1] = s; out.signedDistance = -gy;
  } else {
    const s = pz < 0 ? -1 : 1;
    x[2] = s * extents[2]; n[2] = s; out.signedDistance = -gz;
  }
}

function closestOnCylinder(radius: number, halfLength: number, p: Vec3Like, out: SurfaceQuery): void {
  const px = p[0], py = p[1], pz = p[2];
  const rho = Math.sqrt(px * px + py * py);
  const ex = rho > 0 ? px / rho : 1, ey = rho > 0 ? py / rho : 0;
  const sz = pz < 0 ? -1 : 1;
  const radialGap = rho - radius, axialGap = Math.abs(pz) - halfLength;
  const n = out.normal, x = out.point;
  if (radialGap <= 0 && axialGap <= 0) {
    if (radialGap >= axialGap) {
      x[0] = radius * ex; x[1] = radius * ey; x[2] = pz;
      n[0] = ex; n[1] = ey; n[2] = 0;
      out.signedDistance = radialGap;
    } else {
      x[0] = px; x[1] = py; x[2] = sz * halfLength;
      n[0] = 0; n[1] = 0; n[2] = sz;
      out.signedDistance = axialGap;
    }
    return;
  }
  const r = radialGap > 0 ? radius : rho;
  x[0] = r * ex; x[1] = r * ey; x[2] = axialGap > 0 ? sz * halfLength : pz;
  const dx = px - x[0], dy = py - x[1], dz = pz - x[2];
  const d = Math.sqrt(dx * dx + dy * dy + dz * dz);
  n[0] = dx / d; n[1] = dy / d; n[2] = dz / d;
  out.signedDistance = d;
}

const BISECTION_LIMIT = 200;

function robustLength2(a: number, b: number): number {
  const m = Math.max(Math.abs(a), Math.abs(b));
  if (m === 0) return 0;
  const x = a / m, y = b / m;
  return m * Math.sqrt(x * x + y * y);
}

function robustLength3(a: number, b: number, c: number): number {
  const m = Math.max(Math.abs(a), Math.abs(b), Math.abs(c));
  if (m === 0) return 0;
  const x = a / m, y = b / m, z = c / m;
  return m * Math.sqrt(x * x + y * y + z * z);
}

// Root of F(s) = (r0 z0 / (s + r0))^2 + (z1 / (s + 1))^2 - 1 by bisection (Eberly, section 2.9).
function ellipseRoot(r0: number, z0: number, z1: number, g: number): number {
  const n0 = r0 * z0;
  let s0 = z1 - 1;
  let s1 = g < 0 ? 0 : robustLength2(n0, z1) - 1;
  let s = 0;
  for (let i = 0; i < BISECTION_LIMIT; i++) {
    s = 0.5 * (s0 + s1);
    if (s === s0 || s === s1) break;
    const ratio0 = n0 / (s + r0), ratio1 = z1 / (s + 1);
    const f = ratio0 * ratio0 + ratio1 * ratio1 - 1;
    if (f > 0) s0 = s;
    else if (f < 0) s1 = s;
    else break;
  }
  return s;
}

// Root of F(s) = sum_i (r_i z_i / (s + r_i))^2 - 1 with r2 = 1 by bisection (Eberly, section 3.9).
function ellipsoidRoot(r0: number, r1: number, z0: number, z1: number, z2: number, g: number): number {
  const n0 = r0 * z0, n1 = r1 * z1;
  let s0 = z2 - 1;
  let s1 = g < 0 ? 0 : robustLength3(n0, n1, z2) - 1;
  let s = 0;
  for (let i = 0; i < BISECTION_LIMIT; i++) {
    s = 0.5 * (s0 + s1);
    if (s === s0 || s === s1) break;
    const ratio0 = n0 / (s + r0), ratio1 = n1 / (s + r1), ratio2 = z2 / (s + 1);
    const f = ratio0 * ratio0 + ratio1 * ratio1 + ratio2 * ratio2 - 1;
    if (f > 0) s0 = s;
    else if (f < 0) s1 = s;
    else break;
  }
  return s;
}

// Closest point on the ellipse (x/e0)^2 + (y/e1)^2 = 1, e0 >= e1 > 0, to (y0, y1) >= 0, written to out[i0], out[i1].
function closestOnEllipseQuadrant(e0: number, e1: number, y0: number, y1: number, out: Float64Array, i0: number, i1: number): void {
  if (y1 > 0) {
    if (y0 > 0) {
      const z0 = y0 / e0, z1 = y1 / e1;
      const g = z0 * z0 + z1 * z1 - 1;
      if (g !== 0) {
        const r0 = (e0 / e1) * (e0 / e1);
        const s = ellipseRoot(r0, z0, z1, g);
        out[i0] = (r0 * y0) / (s + r0);
        out[i1] = y1 / (s + 1);
      } else {
        out[i0] = y0;
        out[i1] = y1;
      }
    } else {
      out[i0] = 0;
      out[i1] = e1;
    }
    return;
  }
  const numer0 = e0 * y0, denom0 = e0 * e0 - e1 * e1;
  if (numer0 < denom0) {
    const xde0 = numer0 / denom0;
    out[i0] = e0 * xde0;
    out[i1] = e1 * Math.sqrt(1 - xde0 * xde0);
  } else {
    out[i0] = e0;
    out[i1] = 0;
  }
}

// Closest point on the ellipsoid with e0 >= e1 >= e2 > 0 to y in the first octant (Eberly, section 3).
function closestOnEllipsoidOctant(e: Float64Array, y: Float64Array, x: Float64Array): void {
  const e0 = e[0], e1 = e[1], e2 = e[2];
  const y0 = y[0], y1 = y[1], y2 = y[2];
  if (y2 > 0) {
    if (y1 > 0) {
      if (y0 > 0) {
        const z0 = y0 / e0, z1 = y1 / e1, z2 = y2 / e2;
        const g = z0 * z0 + z1 * z1 + z2 * z2 - 1;
        if (g !== 0) {
          const r0 = (e0 / e2) * (e0 / e2), r1 = (e1 / e2) * (e1 / e2);
          const s = ellipsoidRoot(r0, r1, z0, z1, z2, g);
          x[0] = (r0 * y0) / (s + r0);
          x[1] = (r1 * y1) / (s + r1);
          x[2] = y2 / (s + 1);
        } else {
          x[0] = y0; x[1] = y1; x[2] = y2;
        }
      } else {
        x[0] = 0;
        closestOnEllipseQuadrant(e1, e2, y1, y2, x, 1, 2);
      }
    } else {
      x[1] = 0;
      if (y0 > 0) {
        closestOnEllipseQuadrant(e0, e2, y0, y2, x, 0, 2);
      } else {
        x[0] = 0;
        x[2] = e2;
      }
    }
    return;
  }
  const denom0 = e0 * e0 - e2 * e2, denom1 = e1 * e1 - e2 * e2;
  const numer0 = e0 * y0, numer1 = e1 * y1;
  if (numer0 < denom0 && numer1 < denom1) {
    const xde0 = numer0 / denom0, xde1 = numer1 / denom1;
    const discriminant = 1 - xde0 * xde0 - xde1 * xde1;
    if (discriminant > 0) {
      x[0] = e0 * xde0;
      x[1] = e1 * xde1;
      x[2] = e2 * Math.sqrt(discriminant);
      return;
    }
  }
  x[2] = 0;
  closestOnEllipseQuadrant(e0, e1, y0, y1, x, 0, 1);
}

const sortedAxes = new Float64Array(3);
const octantPoint = new Float64Array(3);
const octantClosest = new Float64Array(3);
const axisOrder = new Int32Array(3);

function closestOnEllipsoid(semiAxes: Float64Array, p: Vec3Like, out: SurfaceQuery): void {
  // Sort the axes descending and reflect into the first octant, as Eberly's algorithm assumes.
  let a = 0, b = 1, c = 2, t = 0;
  if (semiAxes[a] < semiAxes[b]) { t = a; a = b; b = t; }
  if (semiAxes[b] < semiAxes[c]) { t = b; b = c; c = t; }
  if (semiAxes[a] < semiAxes[b]) { t = a; a = b; b = t; }
  axisOrder[0] = a; axisOrder[1] = b; axisOrder[2] = c;
  for (let i = 0; i < 3; i++) {
    const k = axisOrder[i];
    sortedAxes[i] = semiAxes[k];
    octantPoint[i] = Math.abs(p[k]);
  }
  closestOnEllipsoidOctant(sortedAxes, octantPoint, octantClosest);
  const x = out.point, n = out.normal;
  let inside = 0, distanceSquared = 0, normalLength = 0;
  for (let i = 0; i < 3; i++) {
    const k = axisOrder[i];
    const sign = p[k] < 0 ? -1 : 1;
    x[k] = sign * octantClosest[i];
    const dk = p[k] - x[k];
    distanceSquared += dk * dk;
    const q = p[k] / semiAxes[k];
    inside += q * q;
    n[k] = x[k] / (semiAxes[k] * semiAxes[k]);
    normalLength += n[k] * n[k];
  }
  normalLength = Math.sqrt(normalLength);
  n[0] /= normalLength; n[1] /= normalLength; n[2] /= normalLength;
  const d = Math.sqrt(distanceSquared);
  out.signedDistance = inside < 1 ? -d : d;
}
