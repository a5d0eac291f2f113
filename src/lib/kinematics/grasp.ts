/**
 * Grasp map of all contacts (Murray, Li & Sastry 1994, ch. 5, sec. 2): an object twist (v, w),
 * taken at the object origin p in the world frame, moves the object point at contact x_i with
 * v + w x (x_i - p) = [I, -[x_i - p]x] (v, w). Stacking these rows for every contact (and the
 * spin row [0, n_i^T] for a soft finger) gives the contact map A = G^T; its rank tells which
 * object motions the contacts can drive, and its null space the twists no contact notices.
 *
 * Referred to the contacts' centroid m instead of p (d_i = x_i - m), the map's Gram matrix is
 * block diagonal, diag(k I, S) with S = sum_i (|d_i|^2 I - d_i d_i^T) (+ n_i n_i^T for soft
 * fingers), so its SVD splits into sqrt(k) three times and the square roots of the eigenvalues
 * of the 3 x 3 matrix S. Rank and null space do not depend on the reference point; a null
 * rotation w of S gives the undrivable twist (v, w) = (-w x (m - p), w) about p.
 */
import type { SolverSettings } from '../sheet/types';
import { symmetricEigen3Packed } from './eigen3';
import { createMatrix, type Matrix } from './linalg';

/** Rank and undrivable object twists of the grasp (world frame). */
export interface GraspResult {
  /** Number of contacts used. */
  contactCount: number;
  /** Contact map A (rows x 6, row-major): contact velocities (m/s; rad/s for spin rows) per object twist [v (m/s), w (rad/s)]. */
  contactMap: Matrix;
  /** Singular values of the contact map referred to the contact centroid, descending: sqrt(k) three times (dimensionless) and sqrt(eig(S)) (m). */
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
  eigen: Float64Array;
  vectors: Float64Array;
  rotation: Float64Array;
  /** S packed as [s00, s11, s22, s01, s02, s12] for symmetricEigen3Packed. */
  entries: Float64Array;
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

/** New scratch space for computeGrasp. */
export function createGraspWorkspace(): GraspWorkspace {
  return { eigen: new Float64Array(3), vectors: new Float64Array(9), rotation: new Float64Array(3), entries: new Float64Array(6) };
}

/**
 * Grasp of contacts at points x_i (3 per contact) with normals n_i about the object origin p
 * (world frame, m), with the spin rows of settings.softFinger; a singular value counts toward the rank when
 * sigma > rankRatio sigma_max with rankRatio = settings.singularRatio (dimensionless), read from the settings object
 * because a number passed to a call that is not inlined is boxed on the heap.
 *
 * The cut is a judgement, not the numerical rank max(rows, cols) eps sigma_max of the finger
 * Jacobians: a twist whose singular value is below it needs contact speeds 1 / rankRatio times those
 * of the best driven twist, which the rollers cannot give in practice; and the rotational values are
 * square roots of eigenvalues of S, so an exactly undrivable rotation still shows about
 * sqrt(eps) sigma_max of rounding, far above any eps-sized cut.
 */
export function computeGrasp(
  origin: ArrayLike<number>,
  points: ArrayLike<number>,
  normals: ArrayLike<number>,
  contactCount: number,
  settings: Pick<SolverSettings, 'softFinger' | 'singularRatio'>,
  out: GraspResult,
  ws: GraspWorkspace = createGraspWorkspace(),
): GraspResult {
  const softFinger = settings.softFinger, rankRatio = settings.singularRatio;
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
  const sv = out.singularValues;
  // Only the twists the last call wrote need clearing; loops rather than fill, whose call overhead outweighs a few stores.
  const undrivable = out.undrivable;
  for (let i = 0, used = 6 * out.undrivableCount; i < used; i++) undrivable[i] = 0;
  if (contactCount === 0) {
    for (let i = 0; i < 6; i++) sv[i] = 0;
    out.rank = 0;
    out.undrivableCount = 6;
    for (let k = 0; k < 6; k++) undrivable[6 * k + k] = 1;
    return out;
  }
  let mx = 0, my = 0, mz = 0;
  for (let i = 0; i < contactCount; i++) {
    mx += points[3 * i]; my += points[3 * i + 1]; mz += points[3 * i + 2];
  }
  mx /= contactCount; my /= contactCount; mz /= contactCount;
  let s00 = 0, s11 = 0, s22 = 0, s01 = 0, s02 = 0, s12 = 0;
  for (let i = 0; i < contactCount; i++) {
    const dx = points[3 * i] - mx, dy = points[3 * i + 1] - my, dz = points[3 * i + 2] - mz;
    const dd = dx * dx + dy * dy + dz * dz;
    s00 += dd - dx * dx; s11 += dd - dy * dy; s22 += dd - dz * dz;
    s01 -= dx * dy; s02 -= dx * dz; s12 -= dy * dz;
    if (softFinger) {
      const nx = normals[3 * i], ny = normals[3 * i + 1], nz = normals[3 * i + 2];
      s00 += nx * nx; s11 += ny * ny; s22 += nz * nz;
      s01 += nx * ny; s02 += nx * nz; s12 += ny * nz;
    }
  }
  const entries = ws.entries;
  entries[0] = s00; entries[1] = s11; entries[2] = s22; entries[3] = s01; entries[4] = s02; entries[5] = s12;
  const e = symmetricEigen3Packed(entries, ws.eigen);
  const translational = Math.sqrt(contactCount);
  const r0 = Math.sqrt(e[0] > 0 ? e[0] : 0), r1 = Math.sqrt(e[1] > 0 ? e[1] : 0), r2 = Math.sqrt(e[2] > 0 ? e[2] : 0);
  // Merge sqrt(k) (three times) with the descending rotational values.
  let t = 0, q = 0;
  const rotational = ws.rotation;
  rotational[0] = r0; rotational[1] = r1; rotational[2] = r2;
  for (let i = 0; i < 6; i++) {
    if (q >= 3 || (t < 3 && translational >= rotational[q])) {
      sv[i] = translational;
      t++;
    } else {
      sv[i] = rotational[q];
      q++;
    }
  }
  const tolerance = rankRatio * sv[0];
  let nullRotations = 0;
  for (let i = 0; i < 3; i++) if (!(rotational[i] > tolerance)) nullRotations++;
  out.rank = 6 - nullRotations;
  out.undrivableCount = nullRotations;
  if (nullRotations === 0) return out;
  // Eigenvectors of S for its smallest eigenvalues are the rotations no contact notices; only a rank-deficient grasp needs them,
  // and the second pass repeats the same rotations, so its eigenvalues are those above.
  const vectors = ws.vectors;
  symmetricEigen3Packed(entries, ws.eigen, vectors);
  for (let c = 0; c < nullRotations; c++) {
    const col = 3 - nullRotations + c;
    writeUndrivable(out.undrivable, c, vectors[col], vectors[3 + col], vectors[6 + col], mx - origin[0], my - origin[1], mz - origin[2]);
  }
  return out;
}

/** Unit twist (v, w) about p with v = -w x (m - p), slot c of out. */
function writeUndrivable(out: Float64Array, c: number, wx: number, wy: number, wz: number, rx: number, ry: number, rz: number): void {
  const vx = -(wy * rz - wz * ry), vy = -(wz * rx - wx * rz), vz = -(wx * ry - wy * rx);
  const length = Math.sqrt(vx * vx + vy * vy + vz * vz + wx * wx + wy * wy + wz * wz);
  const o = 6 * c;
  out[o] = vx / length; out[o + 1] = vy / length; out[o + 2] = vz / length;
  out[o + 3] = wx / length; out[o + 4] = wy / length; out[o + 5] = wz / length;
}
