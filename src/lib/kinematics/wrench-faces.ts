/**
 * Facet normals of wrench sets built from the contacts' own face lattices, without a hull.
 *
 * Each contact's generators (its linearised cone edges at unit normal push, and a soft finger's
 * two twists) form a base B_i whose faces are known in closed form: an m-gon (point contact with
 * friction), a bipyramid over the m-gon with the twists as apexes (soft finger), a segment between
 * the twists (soft finger without friction) or one point (frictionless). A facet of a sum or union
 * of such sets has a normal orthogonal to the direction spaces of one face per contributing contact
 * (Ziegler's polytope textbook, 1995, sec. 7.1 for Minkowski sums; the Cayley trick of
 * Huber, Rambau & Santos, 2000, for the hull of a union). Picking faces whose spans are independent
 * and add up to one less than the space dimension gives a finite set of candidate normals that
 * contains every facet normal; the callers evaluate support functions along them. The rows are
 * multiplied as exterior products, each face's once, so a combination costs one wedge per
 * contact, and the normal is the Hodge dual of the product (its cofactors).
 */

/** One face: `rowCount` rows of `size` numbers spanning its direction space (and, for lifted faces, its position). */
export interface FaceRows {
  rowCount: number;
  rows: Float64Array;
}

/** Faces of one contact's base as affinely independent vertex lists (indices into its generators: m edges, then the twists +gamma and -gamma). */
export function baseFaces(coneEdges: number, hasFriction: boolean, hasTorsion: boolean): number[][] {
  const m = coneEdges;
  const faces: number[][] = [];
  const plus = m, minus = m + 1;
  if (!hasFriction) {
    // All cone edges coincide at the push -n: a point, or the midpoint of the twists' segment.
    if (!hasTorsion) return [[0]];
    return [[plus], [minus], [plus, minus]];
  }
  for (let j = 0; j < m; j++) faces.push([j], [j, (j + 1) % m]);
  if (!hasTorsion) {
    faces.push([0, 1, 2]);
    return faces;
  }
  faces.push([plus], [minus]);
  for (let j = 0; j < m; j++) {
    faces.push([plus, j], [minus, j], [plus, j, (j + 1) % m], [minus, j, (j + 1) % m]);
  }
  faces.push([plus, minus, 0, 1]);
  return faces;
}

/** Number of ways to pick at most one face per contact with row counts adding up to `target` (spans not yet checked for independence). */
export function countCombinations(facesPerContact: readonly (readonly FaceRows[])[], target: number): number {
  let ways = new Float64Array(target + 1);
  ways[0] = 1;
  for (const faces of facesPerContact) {
    const next = ways.slice();
    for (const face of faces) {
      for (let r = 0; r + face.rowCount <= target; r++) next[r + face.rowCount] += ways[r];
    }
    ways = next;
  }
  return ways[target];
}

/** Relative size below which a wedge of face rows counts as zero: the rows are then dependent. */
const DEPENDENT = 1e-12;

/** Basis k-vectors of an n-dimensional space: the index sets as bit masks, ascending, and each mask's place in that list. */
interface Subsets {
  bySize: number[][];
  rank: Int32Array;
}

const subsetCache = new Map<number, Subsets>();

function subsets(size: number): Subsets {
  let cached = subsetCache.get(size);
  if (cached) return cached;
  const bySize: number[][] = Array.from({ length: size + 1 }, () => []);
  const rank = new Int32Array(1 << size);
  for (let mask = 0; mask < 1 << size; mask++) {
    let bits = 0;
    for (let b = mask; b; b &= b - 1) bits++;
    rank[mask] = bySize[bits].length;
    bySize[bits].push(mask);
  }
  cached = { bySize, rank };
  subsetCache.set(size, cached);
  return cached;
}

/** Product table of a k-vector and an l-vector: for each pair of disjoint basis sets, their places and the sign of merging them into ascending order. */
interface WedgeTable {
  left: Int32Array;
  right: Int32Array;
  into: Int32Array;
  sign: Float64Array;
}

const wedgeCache = new Map<string, WedgeTable>();

function wedgeTable(size: number, k: number, l: number): WedgeTable {
  const key = `${size}:${k}:${l}`;
  let cached = wedgeCache.get(key);
  if (cached) return cached;
  const { bySize, rank } = subsets(size);
  const left: number[] = [], right: number[] = [], into: number[] = [], sign: number[] = [];
  for (const a of bySize[k]) {
    for (const b of bySize[l]) {
      if (a & b) continue;
      // Each pair (i in a, j in b) with i > j is one transposition of the merge.
      let swaps = 0;
      for (let j = 0; j < size; j++) {
        if (!(b & (1 << j))) continue;
        for (let i = j + 1; i < size; i++) if (a & (1 << i)) swaps++;
      }
      left.push(rank[a]);
      right.push(rank[b]);
      into.push(rank[a | b]);
      sign.push(swaps % 2 === 0 ? 1 : -1);
    }
  }
  cached = { left: Int32Array.from(left), right: Int32Array.from(right), into: Int32Array.from(into), sign: Float64Array.from(sign) };
  wedgeCache.set(key, cached);
  return cached;
}

/** out = a ^ b for a k-vector a and an l-vector b (coefficients in basis-set order, `length` of the result); returns the Euclidean norm of the result. */
function wedgeBy(table: WedgeTable, length: number, a: Float64Array, b: Float64Array, out: Float64Array): number {
  for (let r = 0; r < length; r++) out[r] = 0;
  const { left, right, into, sign } = table;
  for (let t = 0; t < left.length; t++) out[into[t]] += sign[t] * a[left[t]] * b[right[t]];
  let norm = 0;
  for (let r = 0; r < length; r++) norm += out[r] * out[r];
  return Math.sqrt(norm);
}

/** The wedge of one face's rows, a rowCount-vector, and its norm. */
function faceWedge(face: FaceRows, size: number): { vector: Float64Array; norm: number } {
  let vector = new Float64Array(1);
  vector[0] = 1;
  let norm = 1;
  for (let r = 0; r < face.rowCount; r++) {
    const out = new Float64Array(subsets(size).bySize[r + 1].length);
    norm = wedgeBy(wedgeTable(size, r, 1), out.length, vector, face.rows.subarray(r * size, (r + 1) * size), out);
    vector = out;
  }
  return { vector, norm };
}

/** Calls `visit` with the unit normal (dimensionless, the rows' frame) of each choice of at most one face per contact whose rows are independent and number size - 1 (`chosen[i]`: face index or -1). */
export function forEachFaceNormal(
  facesPerContact: readonly (readonly FaceRows[])[], size: number,
  visit: (normal: Float64Array, chosen: Int32Array) => void,
): void {
  const target = size - 1;
  const contactCount = facesPerContact.length;
  const { bySize, rank } = subsets(size);
  const wedges = facesPerContact.map((faces) => faces.map((face) => faceWedge(face, size)));
  const widest = Math.max(...bySize.map((list) => list.length));
  const products = Array.from({ length: contactCount + 1 }, () => new Float64Array(widest));
  products[0][0] = 1;
  const bounds = new Float64Array(contactCount + 1);
  bounds[0] = 1;
  const chosen = new Int32Array(contactCount).fill(-1);
  const rowsAfter = new Int32Array(contactCount + 1);
  for (let i = contactCount - 1; i >= 0; i--) {
    rowsAfter[i] = rowsAfter[i + 1] + facesPerContact[i].reduce((most, face) => Math.max(most, face.rowCount), 0);
  }
  const tables = Array.from({ length: size }, (_, k) => Array.from({ length: size - k }, (_, l) => wedgeTable(size, k, l)));
  const complementPlace = Int32Array.from({ length: size }, (_, j) => rank[((1 << size) - 1) ^ (1 << j)]);
  const normal = new Float64Array(size);

  const emitNormal = (product: Float64Array, productNorm: number): void => {
    for (let j = 0; j < size; j++) normal[j] = ((j % 2 === 0 ? 1 : -1) * product[complementPlace[j]]) / productNorm;
    visit(normal, chosen);
  };

  const pick = (contact: number, depth: number, rows: number): void => {
    if (contact === contactCount || rows + rowsAfter[contact] < target) return;
    pick(contact + 1, depth, rows);
    const faces = facesPerContact[contact];
    const product = products[depth], next = products[depth + 1];
    for (let f = 0; f < faces.length; f++) {
      const rowCount = faces[f].rowCount;
      // The contacts after this one must be able to supply the rows still missing.
      if (rows + rowCount > target || rows + rowCount + rowsAfter[contact + 1] < target) continue;
      const { vector, norm } = wedges[contact][f];
      const productNorm = wedgeBy(tables[rows][rowCount], bySize[rows + rowCount].length, product, vector, next);
      const bound = bounds[depth] * norm;
      if (!(productNorm > DEPENDENT * bound)) continue;
      chosen[contact] = f;
      if (rows + rowCount === target) {
        emitNormal(next, productNorm);
      } else {
        bounds[depth + 1] = bound;
        pick(contact + 1, depth + 1, rows + rowCount);
      }
      chosen[contact] = -1;
    }
  };
  pick(0, 0, 0);
}
