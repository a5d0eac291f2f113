/**
 * Grasp map of all contacts (Murray, Li & Sastry 1994, ch. 5, sec. 2): an object twist (v, w),
 * taken at the object origin p in the world frame, moves the object point at contact x_i with
 * v + w x (x_i - p) = [I, -[x_i - p]x] (v, w). Stacking these rows for every contact (and the
 * spin row [0, n_i^T] for a soft finger) gives the contact map A = G^T; its rank tells which
 * object motions the contacts can drive, and its null space the twists no contact notices.
 */
import { createLinalgWorkspace, createMatrix, nullSpace, svd, type LinalgWorkspace, type Matrix } from './linalg';

/** Rank and undrivable object twists of the grasp (world frame). */
export interface GraspResult {
  /** Number of contacts used. */
  contactCount: number;
  /** Contact map A (rows x 6, row-major): contact velocities (m/s; rad/s for spin rows) per object twist [v (m/s), w (rad/s)]. */
  contactMap: Matrix;
  /** Singular values of A, descending (up to 6; mixed units, m/s per unit twist). */
  singularValues: Float64Array;
  /** Numerical rank of A (dimensionless, 6 = every object twist is driven). */
  rank: number;
  /** Number of undrivable twist directions (6 - rank). */
  undrivableCount: number;
  /** Unit twists [vx, vy, vz, wx, wy, wz] spanning the null space, 6 numbers each, the first undrivableCount used. */
  undrivable: Float64Array;
}

/** Scratch for computeGrasp. */
export interface GraspWorkspace {
  linalg: LinalgWorkspace;
  basis: Matrix;
}

/** Empty grasp result for up to maxContacts contacts (4 rows each, to allow soft fingers). */
export function createGraspResult(maxContacts: number): GraspResult {
  return {
    contactCount: 0,
    contactMap: createMatrix(Math.max(1, 4 * maxContacts), 6),
    singularValues: new Float64Array(6),
    rank: 0,
    undrivableCount: 6,
    undrivable: new Float64Array(36),
  };
}

/** New scratch space for computeGrasp with up to maxContacts contacts. */
export function createGraspWorkspace(maxContacts: number): GraspWorkspace {
  return { linalg: createLinalgWorkspace(6, Math.max(6, 4 * maxContacts)), basis: createMatrix(6, 6) };
}

/**
 * Grasp of contacts at points x_i (3 per contact) with normals n_i about the object origin p
 * (world frame, m); relativeTolerance sets the rank cut sigma > relativeTolerance sigma_max.
 */
export function computeGrasp(
  origin: ArrayLike<number>,
  points: ArrayLike<number>,
  normals: ArrayLike<number>,
  contactCount: number,
  softFinger: boolean,
  relativeTolerance: number,
  out: GraspResult,
  ws: GraspWorkspace,
): GraspResult {
  const a = out.contactMap;
  const d = a.data;
  let row = 0;
  for (let i = 0; i < contactCount; i++) {
    const rx = points[3 * i] - origin[0], ry = points[3 * i + 1] - origin[1], rz = points[3 * i + 2] - origin[2];
    // Rows of [I, -[r]x]: -[r]x w = w x r.
    const o = row * 6;
    d[o] = 1; d[o + 1] = 0; d[o + 2] = 0; d[o + 3] = 0; d[o + 4] = rz; d[o + 5] = -ry;
    d[o + 6] = 0; d[o + 7] = 1; d[o + 8] = 0; d[o + 9] = -rz; d[o + 10] = 0; d[o + 11] = rx;
    d[o + 12] = 0; d[o + 13] = 0; d[o + 14] = 1; d[o + 15] = ry; d[o + 16] = -rx; d[o + 17] = 0;
    row += 3;
    if (softFinger) {
      const s = row * 6;
      d[s] = 0; d[s + 1] = 0; d[s + 2] = 0;
      d[s + 3] = normals[3 * i]; d[s + 4] = normals[3 * i + 1]; d[s + 5] = normals[3 * i + 2];
      row += 1;
    }
  }
  a.rows = row;
  a.cols = 6;
  out.contactCount = contactCount;
  const s = out.singularValues;
  s.fill(0);
  if (row === 0) {
    out.rank = 0;
    out.undrivableCount = 6;
    out.undrivable.fill(0);
    for (let k = 0; k < 6; k++) out.undrivable[6 * k + k] = 1;
    return out;
  }
  const f = svd(a, ws.linalg.svd, ws.linalg);
  const k = row < 6 ? row : 6;
  for (let i = 0; i < k; i++) s[i] = f.s[i];
  const tolerance = relativeTolerance * s[0];
  let r = 0;
  for (let i = 0; i < k; i++) if (s[i] > tolerance) r++;
  out.rank = r;
  out.undrivableCount = 6 - r;
  if (row >= 6) {
    // Tall A: V is 6 x 6 and its columns past the rank span the null space.
    const v = f.v.data;
    for (let c = 0; c < 6 - r; c++) for (let j = 0; j < 6; j++) out.undrivable[6 * c + j] = v[j * 6 + r + c];
  } else {
    const count = nullSpace(a, ws.basis, ws.linalg, tolerance);
    const b = ws.basis.data;
    for (let c = 0; c < count; c++) for (let j = 0; j < 6; j++) out.undrivable[6 * c + j] = b[j * 6 + c];
  }
  return out;
}
