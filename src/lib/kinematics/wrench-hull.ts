/**
 * Facets of the convex hull of points in six dimensions (wrench space), by the beneath-beyond
 * method (incremental hull; Edelsbrunner, "Algorithms in Combinatorial Geometry", 1987, ch. 8) in
 * floating point. The points are first joggled by a seeded perturbation of JOGGLE times their
 * scale (the "QJ" option of Qhull; Barber, Dobkin & Huhdanpaa, ACM TOMS 22(4), 1996), so every
 * facet is a simplex and every ridge has exactly two facets; each facet distance then carries an
 * error of about that size. The npm n-dimensional hull (convex-hull 1.0.3) returned cells that are
 * not supporting hyperplanes for random points in six dimensions and took 30 ms for 24 wrenches,
 * so the hull is ours; the tests check it against linear programs solved by yalps.
 */
import { createRandom, nextUniform } from './random';

const D = 6;

/** Relative size of the joggle applied to every coordinate (times the largest coordinate magnitude). */
export const JOGGLE = 1e-7;
const JOGGLE_SEED = 0x5eed;

/** Hull facets: unit outward normals u_k (6 per facet) and offsets c_k, with u_k . w <= c_k for every point w. */
export interface HullFacets {
  /** Number of facets; 0 when the points do not span six dimensions. */
  count: number;
  normals: Float64Array;
  offsets: Float64Array;
  /** When count is 0: a unit direction u with u . w equal for every point and <= 0 (no point reaches past the origin along u). */
  flatNormal: Float64Array;
}

interface Facet {
  vertices: number[];
  normal: Float64Array;
  offset: number;
  alive: boolean;
}

/** Unit vector orthogonal to the five rows given (row-major, 6 columns), by Gauss-Jordan elimination with full pivoting. */
function orthogonalUnit(rows: Float64Array, out: Float64Array): Float64Array {
  const rowCount = D - 1;
  const a = Float64Array.from(rows);
  const pivotColumn = new Int32Array(rowCount);
  const used = new Uint8Array(D);
  for (let r = 0; r < rowCount; r++) {
    let best = -1, bestRow = r, bestCol = 0;
    for (let i = r; i < rowCount; i++) {
      for (let j = 0; j < D; j++) {
        if (used[j]) continue;
        const value = Math.abs(a[i * D + j]);
        if (value > best) { best = value; bestRow = i; bestCol = j; }
      }
    }
    if (bestRow !== r) for (let j = 0; j < D; j++) { const t = a[r * D + j]; a[r * D + j] = a[bestRow * D + j]; a[bestRow * D + j] = t; }
    pivotColumn[r] = bestCol;
    used[bestCol] = 1;
    const p = a[r * D + bestCol];
    for (let i = 0; i < rowCount; i++) {
      if (i === r) continue;
      const factor = a[i * D + bestCol] / p;
      if (factor !== 0) for (let j = 0; j < D; j++) a[i * D + j] -= factor * a[r * D + j];
    }
  }
  let free = 0;
  while (used[free]) free++;
  out.fill(0);
  out[free] = 1;
  for (let r = 0; r < rowCount; r++) out[pivotColumn[r]] = -a[r * D + free] / a[r * D + pivotColumn[r]];
  let norm = 0;
  for (let j = 0; j < D; j++) norm += out[j] * out[j];
  norm = Math.sqrt(norm);
  for (let j = 0; j < D; j++) out[j] /= norm;
  return out;
}

/** Facet through six points (indices), its normal pointing away from the interior point. */
function makeFacet(points: Float64Array, vertices: number[], interior: Float64Array, differences: Float64Array): Facet {
  const o = vertices[0] * D;
  for (let r = 1; r < D; r++) {
    const v = vertices[r] * D;
    for (let j = 0; j < D; j++) differences[(r - 1) * D + j] = points[v + j] - points[o + j];
  }
  const normal = orthogonalUnit(differences, new Float64Array(D));
  let offset = 0, inside = 0;
  for (let j = 0; j < D; j++) { offset += normal[j] * points[o + j]; inside += normal[j] * interior[j]; }
  if (inside > offset) {
    for (let j = 0; j < D; j++) normal[j] = -normal[j];
    offset = -offset;
  }
  return { vertices: vertices.slice().sort((x, y) => x - y), normal, offset, alive: true };
}

/** Seven affinely independent points chosen greedily far apart, or the direction normal to the affine hull when the points span fewer dimensions. */
function initialSimplex(points: Float64Array, count: number, tolerance: number): { chosen: number[]; flatNormal?: Float64Array } {
  let first = 0, farthest = -1;
  for (let i = 0; i < count; i++) {
    let norm = 0;
    for (let j = 0; j < D; j++) norm += points[i * D + j] ** 2;
    if (norm > farthest) { farthest = norm; first = i; }
  }
  const chosen = [first];
  const basis: Float64Array[] = [];
  const residual = new Float64Array(D);
  const reduce = (v: Float64Array) => {
    for (const b of basis) {
      let dot = 0;
      for (let j = 0; j < D; j++) dot += v[j] * b[j];
      for (let j = 0; j < D; j++) v[j] -= dot * b[j];
    }
    let norm = 0;
    for (let j = 0; j < D; j++) norm += v[j] * v[j];
    return Math.sqrt(norm);
  };
  while (chosen.length < D + 1) {
    let best = -1, bestDistance = tolerance;
    for (let i = 0; i < count; i++) {
      for (let j = 0; j < D; j++) residual[j] = points[i * D + j] - points[first * D + j];
      const distance = reduce(residual);
      if (distance > bestDistance) { bestDistance = distance; best = i; }
    }
    if (best < 0) return { chosen, flatNormal: flatNormalOf(points, first, basis, reduce) };
    const next = new Float64Array(D);
    for (let j = 0; j < D; j++) next[j] = points[best * D + j] - points[first * D + j];
    const norm = reduce(next);
    for (let j = 0; j < D; j++) next[j] /= norm;
    basis.push(next);
    chosen.push(best);
  }
  return { chosen };
}

/** A unit direction orthogonal to the affine hull's directions (the coordinate axis with the longest residual), signed so the points lie at or behind the origin along it. */
function flatNormalOf(points: Float64Array, first: number, basis: Float64Array[], reduce: (v: Float64Array) => number): Float64Array {
  let best = new Float64Array(D), bestNorm = 0;
  for (let axis = 0; axis < D; axis++) {
    const candidate = new Float64Array(D);
    candidate[axis] = 1;
    const norm = reduce(candidate);
    if (norm > bestNorm) { bestNorm = norm; best = candidate.map((x) => x / norm); }
  }
  let level = 0;
  for (let j = 0; j < D; j++) level += best[j] * points[first * D + j];
  return level > 0 ? best.map((x) => -x) : best;
}

/** Hull facets of `count` points in six dimensions (row-major, 6 numbers each); the points are joggled in a copy. */
export function hullFacets(input: ArrayLike<number>, count: number): HullFacets {
  let scale = 0;
  for (let i = 0; i < count * D; i++) scale = Math.max(scale, Math.abs(input[i]));
  const flat = (flatNormal: Float64Array): HullFacets => ({ count: 0, normals: new Float64Array(0), offsets: new Float64Array(0), flatNormal });
  if (scale === 0) {
    const normal = new Float64Array(D);
    normal[0] = 1;
    return flat(normal);
  }
  const points = new Float64Array(count * D);
  const random = createRandom(JOGGLE_SEED);
  for (let i = 0; i < count * D; i++) points[i] = input[i] + (2 * nextUniform(random) - 1) * JOGGLE * scale;
  // Spread below 100 joggles counts as none: the input points are then flat in that direction.
  const { chosen, flatNormal } = initialSimplex(points, count, 100 * JOGGLE * scale);
  if (flatNormal) return flat(flatNormal);

  const interior = new Float64Array(D);
  for (const i of chosen) for (let j = 0; j < D; j++) interior[j] += points[i * D + j] / (D + 1);
  const differences = new Float64Array((D - 1) * D);
  let facets: Facet[] = [];
  for (let skip = 0; skip <= D; skip++) facets.push(makeFacet(points, chosen.filter((_, k) => k !== skip), interior, differences));

  const inHull = new Uint8Array(count);
  for (const i of chosen) inHull[i] = 1;
  const visibleTolerance = 1e3 * Number.EPSILON * scale;
  for (let p = 0; p < count; p++) {
    if (inHull[p]) continue;
    const visible: Facet[] = [];
    for (const facet of facets) {
      let distance = -facet.offset;
      for (let j = 0; j < D; j++) distance += facet.normal[j] * points[p * D + j];
      if (distance > visibleTolerance) visible.push(facet);
    }
    if (visible.length === 0) continue;
    // A ridge of a visible facet lies on the horizon when no other visible facet shares it.
    const ridges = new Map<string, number[] | null>();
    for (const facet of visible) {
      facet.alive = false;
      for (let skip = 0; skip < D; skip++) {
        const ridge = facet.vertices.filter((_, k) => k !== skip);
        const key = ridge.join(',');
        ridges.set(key, ridges.has(key) ? null : ridge);
      }
    }
    facets = facets.filter((f) => f.alive);
    for (const ridge of ridges.values()) if (ridge) facets.push(makeFacet(points, [...ridge, p], interior, differences));
    inHull[p] = 1;
  }

  const normals = new Float64Array(facets.length * D);
  const offsets = new Float64Array(facets.length);
  facets.forEach((facet, k) => {
    normals.set(facet.normal, k * D);
    offsets[k] = facet.offset;
  });
  return { count: facets.length, normals, offsets, flatNormal: new Float64Array(D) };
}
