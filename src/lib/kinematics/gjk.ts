/**
 * Distance between two convex support-mapped shapes by GJK (Gilbert, Johnson & Keerthi 1988),
 * with the sub-simplex search done by closest-point region tests (Ericson 2005, sec. 5.1.5-5.1.6,
 * and sec. 9.5). Allocation-free: all scratch lives in a reusable workspace.
 */
import { support, type ConvexShape } from './shapes';
import type { Vec3Like } from './vec3';

/** A shape placed in a common frame: x_frame = rotation x_shape + position (m; rotation row-major). */
export interface PosedShape {
  shape: ConvexShape;
  position: Float64Array;
  rotation: Float64Array;
}

/** Closest points of two shapes in the common frame. */
export interface GjkResult {
  /** Distance between the shapes, m (0 when they touch or overlap). */
  distance: number;
  /** Point of shape A nearest to B, m. */
  pointA: Float64Array;
  /** Point of shape B nearest to A, m. */
  pointB: Float64Array;
  /** The shapes overlap (or touch within the tolerance); the points are then not meaningful. */
  intersecting: boolean;
  iterations: number;
}

/** Scratch for gjkDistance; reuse one per caller. */
export interface GjkWorkspace {
  /** Simplex vertices of A - B, and their A and B parts, four of each, xyz packed. */
  w: Float64Array;
  a: Float64Array;
  b: Float64Array;
  lambda: Float64Array;
  direction: Float64Array;
  local: Float64Array;
  supportLocal: Float64Array;
  triangle: Float64Array;
  best: Float64Array;
}

const MAX_ITERATIONS = 64;
const RELATIVE_TOLERANCE = 1e-12;
const ABSOLUTE_TOLERANCE_SQUARED = 1e-24;

/** New GJK scratch space. */
export function createGjkWorkspace(): GjkWorkspace {
  return {
    w: new Float64Array(12),
    a: new Float64Array(12),
    b: new Float64Array(12),
    lambda: new Float64Array(4),
    direction: new Float64Array(3),
    local: new Float64Array(3),
    supportLocal: new Float64Array(3),
    triangle: new Float64Array(3),
    best: new Float64Array(4),
  };
}

/** Empty result to reuse as `out`. */
export function createGjkResult(): GjkResult {
  return { distance: 0, pointA: new Float64Array(3), pointB: new Float64Array(3), intersecting: false, iterations: 0 };
}

/** Identity-posed shape at the origin of the common frame (m). */
export function posedShape(shape: ConvexShape, position: Vec3Like = [0, 0, 0], rotation: ArrayLike<number> = [1, 0, 0, 0, 1, 0, 0, 0, 1]): PosedShape {
  return { shape, position: Float64Array.from([position[0], position[1], position[2]]), rotation: Float64Array.from(Array.from(rotation)) };
}

/** Support point of a posed shape along d, written at out[offset..offset+3) (common frame, m). */
export function supportPosed(s: PosedShape, d: Vec3Like, out: Float64Array, offset: number, ws: GjkWorkspace): void {
  const r = s.rotation;
  const local = ws.local;
  // Direction into the shape frame with R^T, support there, then back with R.
  local[0] = r[0] * d[0] + r[3] * d[1] + r[6] * d[2];
  local[1] = r[1] * d[0] + r[4] * d[1] + r[7] * d[2];
  local[2] = r[2] * d[0] + r[5] * d[1] + r[8] * d[2];
  const p = support(s.shape, local, ws.supportLocal);
  out[offset] = r[0] * p[0] + r[1] * p[1] + r[2] * p[2] + s.position[0];
  out[offset + 1] = r[3] * p[0] + r[4] * p[1] + r[5] * p[2] + s.position[1];
  out[offset + 2] = r[6] * p[0] + r[7] * p[1] + r[8] * p[2] + s.position[2];
}

/** Distance and closest points of shapes A and B (common frame, m). */
export function gjkDistance(shapeA: PosedShape, shapeB: PosedShape, out: GjkResult = createGjkResult(), ws: GjkWorkspace = createGjkWorkspace()): GjkResult {
  const w = ws.w, a = ws.a, b = ws.b, lambda = ws.lambda, d = ws.direction;
  // Start from the difference of the shape origins, an interior point of A - B for our shapes.
  let vx = shapeA.position[0] - shapeB.position[0];
  let vy = shapeA.position[1] - shapeB.position[1];
  let vz = shapeA.position[2] - shapeB.position[2];
  if (vx === 0 && vy === 0 && vz === 0) vx = 1;
  let count = 0;
  let intersecting = false;
  let iterations = 0;
  for (; iterations < MAX_ITERATIONS; iterations++) {
    d[0] = -vx; d[1] = -vy; d[2] = -vz;
    const k = count * 3;
    supportPosed(shapeA, d, a, k, ws);
    d[0] = vx; d[1] = vy; d[2] = vz;
    supportPosed(shapeB, d, b, k, ws);
    const wx = a[k] - b[k], wy = a[k + 1] - b[k + 1], wz = a[k + 2] - b[k + 2];
    const vv = vx * vx + vy * vy + vz * vz;
    const vw = vx * wx + vy * wy + vz * wz;
    if (count > 0 && vv - vw <= RELATIVE_TOLERANCE * vv) break;
    let duplicate = false;
    for (let i = 0; i < count; i++) {
      if (w[3 * i] === wx && w[3 * i + 1] === wy && w[3 * i + 2] === wz) duplicate = true;
    }
    if (duplicate) break;
    w[k] = wx; w[k + 1] = wy; w[k + 2] = wz;
    count++;
    count = closestOnSimplex(count, ws);
    if (count === 4) {
      intersecting = true;
      break;
    }
    vx = 0; vy = 0; vz = 0;
    for (let i = 0; i < count; i++) {
      vx += lambda[i] * w[3 * i];
      vy += lambda[i] * w[3 * i + 1];
      vz += lambda[i] * w[3 * i + 2];
    }
    if (vx * vx + vy * vy + vz * vz <= ABSOLUTE_TOLERANCE_SQUARED) {
      intersecting = true;
      break;
    }
  }
  const pa = out.pointA, pb = out.pointB;
  pa[0] = 0; pa[1] = 0; pa[2] = 0;
  pb[0] = 0; pb[1] = 0; pb[2] = 0;
  for (let i = 0; i < count; i++) {
    const l = lambda[i];
    pa[0] += l * a[3 * i]; pa[1] += l * a[3 * i + 1]; pa[2] += l * a[3 * i + 2];
    pb[0] += l * b[3 * i]; pb[1] += l * b[3 * i + 1]; pb[2] += l * b[3 * i + 2];
  }
  out.intersecting = intersecting;
  out.distance = intersecting ? 0 : Math.sqrt(vx * vx + vy * vy + vz * vz);
  out.iterations = iterations;
  return out;
}

function moveVertex(ws: GjkWorkspace, from: number, to: number): void {
  if (from === to) return;
  for (let c = 0; c < 3; c++) {
    ws.w[3 * to + c] = ws.w[3 * from + c];
    ws.a[3 * to + c] = ws.a[3 * from + c];
    ws.b[3 * to + c] = ws.b[3 * from + c];
  }
}

/** Keeps the simplex vertices with positive weight, in order, and returns their count. */
function compact(count: number, weights: Float64Array, ws: GjkWorkspace): number {
  let kept = 0;
  for (let i = 0; i < count; i++) {
    if (weights[i] > 0) {
      moveVertex(ws, i, kept);
      ws.lambda[kept] = weights[i];
      kept++;
    }
  }
  return kept;
}

/**
 * Barycentric weights of the point of triangle (i, j, k) of the simplex nearest the origin
 * (Ericson 2005, sec. 5.1.5, ClosestPtPointTriangle with P = 0); returns the squared distance.
 */
function triangleWeights(ws: GjkWorkspace, i: number, j: number, k: number, out: Float64Array): number {
  const w = ws.w;
  const ax = w[3 * i], ay = w[3 * i + 1], az = w[3 * i + 2];
  const bx = w[3 * j], by = w[3 * j + 1], bz = w[3 * j + 2];
  const cx = w[3 * k], cy = w[3 * k + 1], cz = w[3 * k + 2];
  const abx = bx - ax, aby = by - ay, abz = bz - az;
  const acx = cx - ax, acy = cy - ay, acz = cz - az;
  const d1 = -(abx * ax + aby * ay + abz * az);
  const d2 = -(acx * ax + acy * ay + acz * az);
  let u = 1, v = 0, t = 0;
  if (d1 <= 0 && d2 <= 0) {
    u = 1; v = 0; t = 0;
  } else {
    const d3 = -(abx * bx + aby * by + abz * bz);
    const d4 = -(acx * bx + acy * by + acz * bz);
    const d5 = -(abx * cx + aby * cy + abz * cz);
    const d6 = -(acx * cx + acy * cy + acz * cz);
    const vc = d1 * d4 - d3 * d2;
    const vb = d5 * d2 - d1 * d6;
    const va = d3 * d6 - d5 * d4;
    if (d3 >= 0 && d4 <= d3) {
      u = 0; v = 1; t = 0;
    } else if (vc <= 0 && d1 >= 0 && d3 <= 0) {
      const s = d1 / (d1 - d3);
      u = 1 - s; v = s; t = 0;
    } else if (d6 >= 0 && d5 <= d6) {
      u = 0; v = 0; t = 1;
    } else if (vb <= 0 && d2 >= 0 && d6 <= 0) {
      const s = d2 / (d2 - d6);
      u = 1 - s; v = 0; t = s;
    } else if (va <= 0 && d4 - d3 >= 0 && d5 - d6 >= 0) {
      const s = (d4 - d3) / (d4 - d3 + (d5 - d6));
      u = 0; v = 1 - s; t = s;
    } else {
      const denominator = 1 / (va + vb + vc);
      v = vb * denominator;
      t = vc * denominator;
      u = 1 - v - t;
    }
  }
  out[0] = u; out[1] = v; out[2] = t;
  const px = u * ax + v * bx + t * cx, py = u * ay + v * by + t * cy, pz = u * az + v * bz + t * cz;
  return px * px + py * py + pz * pz;
}

const FACES = [0, 1, 2, 3, 0, 1, 3, 2, 0, 2, 3, 1, 1, 2, 3, 0];

/** Reduces the simplex to the smallest sub-simplex holding its point nearest the origin; 4 = origin inside. */
function closestOnSimplex(count: number, ws: GjkWorkspace): number {
  const w = ws.w, best = ws.best;
  if (count === 1) {
    ws.lambda[0] = 1;
    return 1;
  }
  if (count === 2) {
    const abx = w[3] - w[0], aby = w[4] - w[1], abz = w[5] - w[2];
    const denominator = abx * abx + aby * aby + abz * abz;
    let t = denominator > 0 ? -(w[0] * abx + w[1] * aby + w[2] * abz) / denominator : 0;
    t = t < 0 ? 0 : t > 1 ? 1 : t;
    best[0] = 1 - t; best[1] = t;
    return compact(2, best, ws);
  }
  if (count === 3) {
    triangleWeights(ws, 0, 1, 2, ws.triangle);
    best[0] = ws.triangle[0]; best[1] = ws.triangle[1]; best[2] = ws.triangle[2];
    return compact(3, best, ws);
  }
  // Tetrahedron (Ericson 2005, sec. 5.1.6): test each face whose plane separates the origin from the opposite vertex.
  let bestDistance = Infinity;
  let anyOutside = false;
  for (let f = 0; f < 4; f++) {
    const i = FACES[4 * f], j = FACES[4 * f + 1], k = FACES[4 * f + 2], o = FACES[4 * f + 3];
    const abx = w[3 * j] - w[3 * i], aby = w[3 * j + 1] - w[3 * i + 1], abz = w[3 * j + 2] - w[3 * i + 2];
    const acx = w[3 * k] - w[3 * i], acy = w[3 * k + 1] - w[3 * i + 1], acz = w[3 * k + 2] - w[3 * i + 2];
    const nx = aby * acz - abz * acy, ny = abz * acx - abx * acz, nz = abx * acy - aby * acx;
    const signOrigin = -(nx * w[3 * i] + ny * w[3 * i + 1] + nz * w[3 * i + 2]);
    const signOpposite = nx * (w[3 * o] - w[3 * i]) + ny * (w[3 * o + 1] - w[3 * i + 1]) + nz * (w[3 * o + 2] - w[3 * i + 2]);
    if (signOrigin * signOpposite > 0) continue;
    anyOutside = true;
    const distanceSquared = triangleWeights(ws, i, j, k, ws.triangle);
    if (distanceSquared < bestDistance) {
      bestDistance = distanceSquared;
      best[0] = 0; best[1] = 0; best[2] = 0; best[3] = 0;
      best[i] = ws.triangle[0]; best[j] = ws.triangle[1]; best[k] = ws.triangle[2];
    }
  }
  if (!anyOutside) return 4;
  return compact(4, best, ws);
}
