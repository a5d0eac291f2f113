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

/** Facets in flat pools: six vertex indices, unit normal and offset each; a dead facet keeps its slot until compacted. */
interface FacetPool {
  count: number;
  vertices: Int32Array;
  normals: Float64Array;
  offsets: Float64Array;
}

function grow(pool: FacetPool): void {
  const capacity = 2 * pool.offsets.length;
  const vertices = new Int32Array(capacity * D), normals = new Float64Array(capacity * D), offsets = new Float64Array(capacity);
  vertices.set(pool.vertices);
  normals.set(pool.normals);
  offsets.set(pool.offsets);
  pool.vertices = vertices;
  pool.normals = normals;
  pool.offsets = offsets;
}

/** Scratch of the hull: the elimination matrix and its pivot bookkeeping, reused for every facet. */
const eliminated = new Float64Array((D - 1) * D);
const pivotColumn = new Int32Array(D - 1);
const usedColumn = new Uint8Array(D);
const differences = new Float64Array((D - 1) * D);

/** Unit vector orthogonal to the five rows of `rows` (row-major, 6 columns), by Gauss-Jordan elimination with full pivoting, into out at offset. */
function orthogonalUnit(rows: Float64Array, out: Float64Array, at: number): void {
  const rowCount = D - 1;
  const a = eliminated;
  a.set(rows);
  usedColumn.fill(0);
  for (let r = 0; r < rowCount; r++) {
    let best = -1, bestRow = r, bestCol = 0;
    for (let i = r; i < rowCount; i++) {
      for (let j = 0; j < D; j++) {
        if (usedColumn[j]) continue;
        const value = Math.abs(a[i * D + j]);
        if (value > best) { best = value; bestRow = i; bestCol = j; }
      }
    }
    if (bestRow !== r) for (let j = 0; j < D; j++) { const t = a[r * D + j]; a[r * D + j] = a[bestRow * D + j]; a[bestRow * D + j] = t; }
    pivotColumn[r] = bestCol;
    usedColumn[bestCol] = 1;
    const p = a[r * D + bestCol];
    for (let i = 0; i < rowCount; i++) {
      if (i === r) continue;
      const factor = a[i * D + bestCol] / p;
      if (factor !== 0) for (let j = 0; j < D; j++) a[i * D + j] -= factor * a[r * D + j];
    }
  }
  let free = 0;
  while (usedColumn[free]) free++;
  for (let j = 0; j < D; j++) out[at + j] = 0;
  out[at + free] = 1;
  for (let r = 0; r < rowCount; r++) out[at + pivotColumn[r]] = -a[r * D + free] / a[r * D + pivotColumn[r]];
  let norm = 0;
  for (let j = 0; j < D; j++) norm += out[at + j] * out[at + j];
  norm = Math.sqrt(norm);
  for (let j = 0; j < D; j++) out[at + j] /= norm;
}

/** Appends the facet through six points (indices, ascending), its normal pointing away from the interior point. */
function addFacet(pool: FacetPool, points: Float64Array, vertices: ArrayLike<number>, interior: Float64Array): void {
  if (pool.count === pool.offsets.length) grow(pool);
  const k = pool.count++;
  const o = vertices[0] * D;
  for (let r = 1; r < D; r++) {
    const v = vertices[r] * D;
    for (let j = 0; j < D; j++) differences[(r - 1) * D + j] = points[v + j] - points[o + j];
  }
  for (let r = 0; r < D; r++) pool.vertices[k * D + r] = vertices[r];
  const normal = pool.normals, at = k * D;
  orthogonalUnit(differences, normal, at);
  let offset = 0, inside = 0;
  for (let j = 0; j < D; j++) { offset += normal[at + j] * points[o + j]; inside += normal[at + j] * interior[j]; }
  if (inside > offset) {
    for (let j = 0; j < D; j++) normal[at + j] = -normal[at + j];
    offset = -offset;
  }
  pool.offsets[k] = offset;
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
    if (best < 0) return { chosen, flatNormal: flatNormalOf(points, first, reduce) };
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
function flatNormalOf(points: Float64Array, first: number, reduce: (v: Float64Array) => number): Float64Array {
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

/** Most points a hull takes: ridge keys pack five indices of 9 bits each. */
export const MAX_HULL_POINTS = 511;

/** Hull facets of `count` points (at most MAX_HULL_POINTS) in six dimensions (row-major, 6 numbers each); the points are joggled in a copy. */
export function hullFacets(input: ArrayLike<number>, count: number): HullFacets {
  if (count > MAX_HULL_POINTS) throw new Error(`the wrench hull takes at most ${MAX_HULL_POINTS} points, got ${count}`);
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
  const pool: FacetPool = { count: 0, vertices: new Int32Array(64 * D), normals: new Float64Array(64 * D), offsets: new Float64Array(64) };
  const sortedChosen = chosen.slice().sort((x, y) => x - y);
  for (let skip = 0; skip <= D; skip++) addFacet(pool, points, sortedChosen.filter((_, k) => k !== skip), interior);

  const inHull = new Uint8Array(count);
  for (const i of chosen) inHull[i] = 1;
  const visibleTolerance = 1e3 * Number.EPSILON * scale;
  let visibleFlags = new Uint8Array(64);
  // A ridge is keyed by its five ascending vertex indices packed into one exact number (9 bits each).
  const ridgeFacets = new Map<number, number>();
  const ridge = new Int32Array(D - 1);
  const created = new Int32Array(D);
  for (let p = 0; p < count; p++) {
    if (inHull[p]) continue;
    inHull[p] = 1;
    if (visibleFlags.length < pool.count) visibleFlags = new Uint8Array(2 * pool.count);
    let anyVisible = false;
    for (let k = 0; k < pool.count; k++) {
      let distance = -pool.offsets[k];
      for (let j = 0; j < D; j++) distance += pool.normals[k * D + j] * points[p * D + j];
      visibleFlags[k] = distance > visibleTolerance ? 1 : 0;
      if (visibleFlags[k]) anyVisible = true;
    }
    if (!anyVisible) continue;
    // A ridge of a visible facet lies on the horizon when no other visible facet shares it.
    ridgeFacets.clear();
    for (let k = 0; k < pool.count; k++) {
      if (!visibleFlags[k]) continue;
      for (let skip = 0; skip < D; skip++) {
        let key = 0;
        for (let r = 0; r < D; r++) if (r !== skip) key = key * 512 + pool.vertices[k * D + r];
        ridgeFacets.set(key, ridgeFacets.has(key) ? -1 : k * D + skip);
      }
    }
    const before = pool.count;
    for (const slot of ridgeFacets.values()) {
      if (slot < 0) continue;
      const k = Math.floor(slot / D), skip = slot % D;
      for (let r = 0, m = 0; r < D; r++) if (r !== skip) ridge[m++] = pool.vertices[k * D + r];
      // Vertices stay ascending so that a ridge met again later gets the same key.
      let m = 0, placed = false;
      for (let r = 0; r < D - 1; r++) {
        if (!placed && p < ridge[r]) { created[m++] = p; placed = true; }
        created[m++] = ridge[r];
      }
      if (!placed) created[m] = p;
      addFacet(pool, points, created, interior);
    }
    // Compact: drop the visible facets, keep the old survivors and the new facets in order.
    let write = 0;
    for (let k = 0; k < pool.count; k++) {
      if (k < before && visibleFlags[k]) continue;
      if (write !== k) {
        pool.offsets[write] = pool.offsets[k];
        for (let j = 0; j < D; j++) { pool.normals[write * D + j] = pool.normals[k * D + j]; pool.vertices[write * D + j] = pool.vertices[k * D + j]; }
      }
      write++;
    }
    pool.count = write;
  }

  return {
    count: pool.count,
    normals: pool.normals.slice(0, pool.count * D),
    offsets: pool.offsets.slice(0, pool.count),
    flatNormal: new Float64Array(D),
  };
}
