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
 * contains every facet normal; the callers evaluate support functions along them.
 *
 * Each choice of faces is taken once, its faces in order of falling row count, so the last face
 * has the fewest rows. The subspace still open after each face is kept as orthonormal rows, and a
 * face's rows are taken out of it by Householder reflections (Golub & Van Loan, "Matrix
 * Computations", sec. 5.2). When the faces so far leave a plane open, the last face is an edge of
 * one more contact, and along a normal in that plane that edge is the contact's farthest face: so
 * the candidates there are the outward normals of the edges of the 2-D hull of that contact's
 * vertices projected into the plane, and the earlier faces' checks, projected into the plane once,
 * cost two multiplications each. How far a chosen contact reaches along a normal is the reach of
 * its chosen face's point, so only the other contacts are searched.
 */

/** One face: `rowCount` rows of `size` numbers spanning its direction space (and, for lifted faces, its position), and its check directions. */
export interface FaceRows {
  rowCount: number;
  rows: Float64Array;
  /** Directions q (each `size` numbers) with q . u <= 0 for all of them exactly when the face lies in its contact's face farthest along u. */
  checks: Float64Array;
  /** A point of the face (`size` numbers): along a normal that passes the checks, the contact reaches exactly as far as this point. */
  reference: Float64Array;
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

/** Relative size below which the chosen rows' volume counts as zero: the rows are then dependent. */
const DEPENDENT = 1e-12;

/** A face's rows made orthonormal (Gram-Schmidt), so the volume of any choice is the product of its projections' pivots; null when they are dependent. */
function orthonormalRows(face: FaceRows, size: number): Float64Array | null {
  const rows = face.rows.slice(0, face.rowCount * size);
  for (let r = 0; r < face.rowCount; r++) {
    const row = rows.subarray(r * size, (r + 1) * size);
    let before = 0;
    for (let j = 0; j < size; j++) before += row[j] * row[j];
    before = Math.sqrt(before);
    for (let q = 0; q < r; q++) {
      let dot = 0;
      for (let j = 0; j < size; j++) dot += row[j] * rows[q * size + j];
      for (let j = 0; j < size; j++) row[j] -= dot * rows[q * size + j];
    }
    let norm = 0;
    for (let j = 0; j < size; j++) norm += row[j] * row[j];
    norm = Math.sqrt(norm);
    if (!(norm > DEPENDENT * before)) return null;
    for (let j = 0; j < size; j++) row[j] /= norm;
  }
  return rows;
}

/**
 * The open subspace after the e rows of `projected` (e x s, row-major, in the coordinates of the s
 * orthonormal rows of `basis`, each `size` long) are taken out of it: Householder reflections
 * H_0 ... H_{e-1} bring the rows to triangular form (Golub & Van Loan, "Matrix Computations",
 * sec. 5.2), and the same reflections applied to `basis` leave its last s - e rows orthonormal and
 * orthogonal to the rows; those go into `out`. Returns the rows' volume (the product of the
 * triangle's diagonal), 0 when they are dependent. `work` holds s x size numbers.
 */
function reduceBasis(projected: Float64Array, e: number, s: number, basis: Float64Array, size: number, work: Float64Array, out: Float64Array): number {
  const m = projected;
  let volume = 1;
  for (let j = 0; j < s * size; j++) work[j] = basis[j];
  for (let k = 0; k < e; k++) {
    // Column k of the transpose is row k of the projection, from entry k on.
    let norm = 0;
    for (let i = k; i < s; i++) norm += m[k * s + i] * m[k * s + i];
    norm = Math.sqrt(norm);
    volume *= norm;
    if (!(volume > DEPENDENT)) return 0;
    const alpha = m[k * s + k] > 0 ? -norm : norm;
    // v = x - alpha e_k, kept in row k of the projection; H = I - 2 v v^T / (v . v).
    m[k * s + k] -= alpha;
    const vv = 2 * norm * (norm + Math.abs(m[k * s + k] + alpha));
    for (let r = k + 1; r < e; r++) {
      let dot = 0;
      for (let i = k; i < s; i++) dot += m[k * s + i] * m[r * s + i];
      const factor = (2 * dot) / vv;
      for (let i = k; i < s; i++) m[r * s + i] -= factor * m[k * s + i];
    }
    for (let j = 0; j < size; j++) {
      let dot = 0;
      for (let i = k; i < s; i++) dot += m[k * s + i] * work[i * size + j];
      const factor = (2 * dot) / vv;
      for (let i = k; i < s; i++) work[i * size + j] -= factor * m[k * s + i];
    }
  }
  for (let j = 0; j < (s - e) * size; j++) out[j] = work[e * size + j];
  return volume;
}

/** The 3 x 3 minor of the three rows of 4 in `p` on columns a, b, c. */
function minor(p: Float64Array, a: number, b: number, c: number): number {
  return p[a] * (p[4 + b] * p[8 + c] - p[4 + c] * p[8 + b]) - p[b] * (p[4 + a] * p[8 + c] - p[4 + c] * p[8 + a]) + p[c] * (p[4 + a] * p[8 + b] - p[4 + b] * p[8 + a]);
}

/**
 * The unit normal of the s - 1 rows of `projected` (s = 3 or 4, row-major) into `out`, as the signed
 * cofactors (the cross product when s = 3); returns its length, the rows' volume, 0 when dependent.
 */
function lastNormal(projected: Float64Array, s: number, out: Float64Array): number {
  const p = projected;
  if (s === 3) {
    out[0] = p[1] * p[5] - p[2] * p[4];
    out[1] = p[2] * p[3] - p[0] * p[5];
    out[2] = p[0] * p[4] - p[1] * p[3];
  } else {
    // Each component is the 3 x 3 minor without that column, alternating in sign.
    out[0] = -minor(p, 1, 2, 3);
    out[1] = minor(p, 0, 2, 3);
    out[2] = -minor(p, 0, 1, 3);
    out[3] = minor(p, 0, 1, 2);
  }
  let norm = 0;
  for (let j = 0; j < s; j++) norm += out[j] * out[j];
  norm = Math.sqrt(norm);
  if (!(norm > DEPENDENT)) return 0;
  for (let j = 0; j < s; j++) out[j] /= norm;
  return norm;
}

/** Twice the signed area of the triangle of points a, b, c (x, y pairs in `points`): positive for a counter-clockwise turn. */
function turn(points: Float64Array, a: number, b: number, c: number): number {
  return (points[2 * b] - points[2 * a]) * (points[2 * c + 1] - points[2 * a + 1]) - (points[2 * b + 1] - points[2 * a + 1]) * (points[2 * c] - points[2 * a]);
}

/** One contact's set: its vertices (the apex 0 among them) and its faces, in the enumeration's space. */
export interface ContactFaces {
  /** Vertex coordinates, `size` numbers each. */
  vertices: Float64Array;
  faces: FaceRows[];
}

/** Calls `visit` with unit normals u (dimensionless, the rows' frame) including every facet normal of the sum of the contacts' sets, each whose chosen faces pass their checks (q . u <= tolerance), and how far each contact reaches along u (max u . x over its vertices). */
export function forEachFaceNormal(
  contacts: readonly ContactFaces[], size: number, tolerance: number,
  visit: (normal: Float64Array, farthest: Float64Array) => void,
): void {
  const target = size - 1;
  const contactCount = contacts.length;
  const items: { contact: number; rowCount: number; rows: Float64Array; checks: Float64Array; reference: Float64Array }[] = [];
  contacts.forEach(({ faces }, contact) => faces.forEach((face) => {
    const rows = orthonormalRows(face, size);
    if (rows !== null && face.rowCount <= target) items.push({ contact, rowCount: face.rowCount, rows, checks: face.checks, reference: face.reference });
  }));
  items.sort((a, b) => b.rowCount - a.rowCount || a.contact - b.contact);
  // A contact may supply the last row in a plane when one of its one-row faces comes at or after the start of the search.
  const lastOneRow = new Int32Array(contactCount).fill(-1);
  items.forEach((item, index) => { if (item.rowCount === 1) lastOneRow[item.contact] = index; });
  // The subspace still open at each depth, as orthonormal rows in the full space, and the volume chosen so far.
  const bases = Array.from({ length: contactCount + 1 }, () => new Float64Array(size * size));
  for (let j = 0; j < size; j++) bases[0][j * size + j] = 1;
  const volumes = new Float64Array(contactCount + 1);
  volumes[0] = 1;
  const projected = new Float64Array(size * size), work = new Float64Array(size * size), complement = new Float64Array(size);
  const used = new Uint8Array(contactCount);
  const picked = new Int32Array(contactCount);
  const normal = new Float64Array(size);
  const farthest = new Float64Array(contactCount);
  const known = new Uint8Array(contactCount);
  const planeReferences = new Float64Array(2 * contactCount);

  /** How far each contact not marked known reaches along the normal, by its vertices. */
  const reachOfOthers = (): void => {
    for (let contact = 0; contact < contactCount; contact++) {
      if (known[contact]) continue;
      const vertices = contacts[contact].vertices;
      let most = -Infinity;
      for (let at = 0; at < vertices.length; at += size) {
        let dot = 0;
        for (let j = 0; j < size; j++) dot += vertices[at + j] * normal[j];
        if (dot > most) most = dot;
      }
      farthest[contact] = most;
    }
  };

  /** Visits the normal with the first `count` picked faces' reaches from their reference points and the other contacts' by search. */
  const visitPicked = (count: number): void => {
    for (let k = 0; k < count; k++) {
      const item = items[picked[k]];
      let dot = 0;
      for (let j = 0; j < size; j++) dot += item.reference[j] * normal[j];
      farthest[item.contact] = dot;
      known[item.contact] = 1;
    }
    reachOfOthers();
    for (let k = 0; k < count; k++) known[items[picked[k]].contact] = 0;
    visit(normal, farthest);
  };
  const checkCount = items.reduce((total, item) => total + item.checks.length / size, 0);
  const planeChecks = new Float64Array(2 * checkCount);
  const mostVertices = contacts.reduce((most, { vertices }) => Math.max(most, vertices.length / size), 0);
  const planePoints = new Float64Array(2 * mostVertices);
  const order = new Int32Array(mostVertices), hull = new Int32Array(2 * mostVertices + 1);

  /** Bit 1: every check of the first `count` picked faces passes along the normal; bit 2: along its opposite. */
  const signsOf = (count: number): number => {
    let plus = true, minus = true;
    for (let k = count - 1; k >= 0; k--) {
      const checks = items[picked[k]].checks;
      for (let at = 0; at < checks.length; at += size) {
        let dot = 0;
        for (let j = 0; j < size; j++) dot += checks[at + j] * normal[j];
        if (dot > tolerance) plus = false;
        if (dot < -tolerance) minus = false;
        if (!plus && !minus) return 0;
      }
    }
    return (plus ? 1 : 0) | (minus ? 2 : 0);
  };

  /** Indices of the 2-D hull of the first `count` plane points, counter-clockwise, into `hull` (Andrew's monotone chain); returns their number. */
  const planeHull = (count: number): number => {
    for (let i = 0; i < count; i++) {
      let at = i;
      const x = planePoints[2 * i], y = planePoints[2 * i + 1];
      while (at > 0) {
        const before = order[at - 1];
        const bx = planePoints[2 * before], by = planePoints[2 * before + 1];
        if (bx < x || (bx === x && by <= y)) break;
        order[at] = before;
        at--;
      }
      order[at] = i;
    }
    let length = 0;
    for (let k = 0; k < count; k++) {
      while (length >= 2 && turn(planePoints, hull[length - 2], hull[length - 1], order[k]) <= 0) length--;
      hull[length++] = order[k];
    }
    for (let k = count - 2, lower = length + 1; k >= 0; k--) {
      while (length >= lower && turn(planePoints, hull[length - 2], hull[length - 1], order[k]) <= 0) length--;
      hull[length++] = order[k];
    }
    // The chain ends where it began.
    return length - 1;
  };

  /** The last face, of one row, after the faces picked so far left a plane open. */
  const pickInPlane = (start: number, depth: number): void => {
    const basis = bases[depth];
    // Most candidates fail an early check, so checks and reference points are projected into the plane only when first needed.
    let projectedChecks = 0;
    let referencesProjected = false;
    for (let contact = 0; contact < contactCount; contact++) {
      if (used[contact] || lastOneRow[contact] < start) continue;
      const vertices = contacts[contact].vertices;
      const count = vertices.length / size;
      for (let v = 0; v < count; v++) {
        let a = 0, b = 0;
        for (let j = 0; j < size; j++) { a += vertices[v * size + j] * basis[j]; b += vertices[v * size + j] * basis[size + j]; }
        planePoints[2 * v] = a;
        planePoints[2 * v + 1] = b;
      }
      const corners = planeHull(count);
      for (let k = 0; k < corners; k++) {
        const from = hull[k], to = hull[k + 1];
        const ex = planePoints[2 * to] - planePoints[2 * from], ey = planePoints[2 * to + 1] - planePoints[2 * from + 1];
        const length = Math.sqrt(ex * ex + ey * ey);
        if (!(length > 0)) continue;
        // Outward normal of a counter-clockwise edge.
        const x = ey / length, y = -ex / length;
        let passes = true;
        for (let k = 0, check = 0; k < depth && passes; k++) {
          const checks = items[picked[k]].checks;
          for (let at = 0; at < checks.length; at += size, check++) {
            if (check === projectedChecks) {
              let a = 0, b = 0;
              for (let j = 0; j < size; j++) { a += checks[at + j] * basis[j]; b += checks[at + j] * basis[size + j]; }
              planeChecks[2 * check] = a;
              planeChecks[2 * check + 1] = b;
              projectedChecks++;
            }
            if (planeChecks[2 * check] * x + planeChecks[2 * check + 1] * y > tolerance) { passes = false; break; }
          }
        }
        if (!passes) continue;
        if (!referencesProjected) {
          for (let k = 0; k < depth; k++) {
            const reference = items[picked[k]].reference;
            let a = 0, b = 0;
            for (let j = 0; j < size; j++) { a += reference[j] * basis[j]; b += reference[j] * basis[size + j]; }
            planeReferences[2 * k] = a;
            planeReferences[2 * k + 1] = b;
          }
          referencesProjected = true;
        }
        for (let j = 0; j < size; j++) normal[j] = x * basis[j] + y * basis[size + j];
        for (let k = 0; k < depth; k++) {
          const other = items[picked[k]].contact;
          farthest[other] = planeReferences[2 * k] * x + planeReferences[2 * k + 1] * y;
          known[other] = 1;
        }
        farthest[contact] = planePoints[2 * from] * x + planePoints[2 * from + 1] * y;
        known[contact] = 1;
        reachOfOthers();
        known.fill(0);
        visit(normal, farthest);
      }
    }
  };

  const pick = (start: number, depth: number, rows: number): void => {
    const open = size - rows;
    if (open === 2) {
      pickInPlane(start, depth);
      return;
    }
    const basis = bases[depth];
    const unused = contactCount - depth;
    for (let index = start; index < items.length; index++) {
      const item = items[index];
      const rowCount = item.rowCount;
      // The faces after this one have at most as many rows: the unused contacts must be able to supply the rows still missing.
      if (rows + unused * rowCount < target) break;
      if (used[item.contact] || rows + rowCount > target) continue;
      for (let r = 0; r < rowCount; r++) {
        for (let c = 0; c < open; c++) {
          let dot = 0;
          for (let j = 0; j < size; j++) dot += item.rows[r * size + j] * basis[c * size + j];
          projected[r * open + c] = dot;
        }
      }
      const remaining = open - rowCount;
      let volume: number;
      if (remaining === 1 && open <= 4) {
        volume = lastNormal(projected, open, complement) * volumes[depth];
        if (!(volume > DEPENDENT)) continue;
        for (let j = 0; j < size; j++) {
          let sum = 0;
          for (let q = 0; q < open; q++) sum += complement[q] * basis[q * size + j];
          normal[j] = sum;
        }
      } else {
        volume = reduceBasis(projected, rowCount, open, basis, size, work, remaining === 1 ? normal : bases[depth + 1]) * volumes[depth];
        if (!(volume > DEPENDENT)) continue;
      }
      picked[depth] = index;
      if (remaining === 1) {
        const signs = signsOf(depth + 1);
        if (signs & 1) visitPicked(depth + 1);
        if (signs & 2) {
          for (let j = 0; j < size; j++) normal[j] = -normal[j];
          visitPicked(depth + 1);
        }
      } else {
        used[item.contact] = 1;
        volumes[depth + 1] = volume;
        pick(index + 1, depth + 1, rows + rowCount);
        used[item.contact] = 0;
      }
    }
  };
  pick(0, 0, 0);
}
