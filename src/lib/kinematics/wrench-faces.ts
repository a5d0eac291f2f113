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

/**
 * One contact's set in the enumeration's space: its points and its faces. Each face is a list of
 * point indices whose first is its reference: rows p_k - p_ref for the others span its directions,
 * and checks p_x - p_ref for every point x outside it tell when it is farthest along u (when
 * q . u <= 0 for all of them); along such a u the contact reaches exactly as far as p_ref.
 */
export interface ContactFaces {
  /** Point coordinates, `size` numbers each. */
  vertices: Float64Array;
  faces: readonly (readonly number[])[];
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
export function countCombinations(contacts: readonly Pick<ContactFaces, 'faces'>[], target: number): number {
  let ways = new Float64Array(target + 1);
  ways[0] = 1;
  for (const { faces } of contacts) {
    const next = ways.slice();
    for (const face of faces) {
      const rowCount = face.length - 1;
      for (let r = 0; r + rowCount <= target; r++) next[r + rowCount] += ways[r];
    }
    ways = next;
  }
  return ways[target];
}

/** Relative size below which the chosen rows' volume counts as zero: the rows are then dependent. */
const DEPENDENT = 1e-12;

/**
 * The rows p_k - p_ref of one face (`face` lists point indices into `points`, at `base`, `size`
 * numbers each) made orthonormal by Gram-Schmidt, so the volume of any choice is the product of
 * its projections' pivots, written into `out` at `at`; false when they are dependent.
 */
function orthonormalRows(points: Float64Array, base: number, face: readonly number[], size: number, out: Float64Array, at: number): boolean {
  const reference = base + face[0] * size;
  for (let r = 0; r + 1 < face.length; r++) {
    const row = at + r * size, point = base + face[r + 1] * size;
    for (let j = 0; j < size; j++) out[row + j] = points[point + j] - points[reference + j];
    let before = 0;
    for (let j = 0; j < size; j++) before += out[row + j] * out[row + j];
    before = Math.sqrt(before);
    for (let q = 0; q < r; q++) {
      let dot = 0;
      for (let j = 0; j < size; j++) dot += out[row + j] * out[at + q * size + j];
      for (let j = 0; j < size; j++) out[row + j] -= dot * out[at + q * size + j];
    }
    let norm = 0;
    for (let j = 0; j < size; j++) norm += out[row + j] * out[row + j];
    norm = Math.sqrt(norm);
    if (!(norm > DEPENDENT * before)) return false;
    for (let j = 0; j < size; j++) out[row + j] /= norm;
  }
  return true;
}

/**
 * The open subspace after the e rows of `projected` (e x s, row-major, in the coordinates of the s
 * orthonormal rows of `basis` at `basisAt`, each `size` long) are taken out of it: Householder
 * reflections H_0 ... H_{e-1} bring the rows to triangular form (Golub & Van Loan, "Matrix
 * Computations", sec. 5.2), and the same reflections applied to the basis leave its last s - e
 * rows orthonormal and orthogonal to the rows; those go into `out` at `outAt`. Returns the rows'
 * volume (the product of the triangle's diagonal), 0 when they are dependent. `work` holds s x size numbers.
 */
function reduceBasis(
  projected: Float64Array, e: number, s: number, basis: Float64Array, basisAt: number, size: number, work: Float64Array, out: Float64Array, outAt: number,
): number {
  const m = projected;
  let volume = 1;
  for (let j = 0; j < s * size; j++) work[j] = basis[basisAt + j];
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
    // Row k of the reflected basis lies along the rows taken out and is never read again, so only the rows after it are updated.
    for (let j = 0; j < size; j++) {
      let dot = 0;
      for (let i = k; i < s; i++) dot += m[k * s + i] * work[i * size + j];
      const factor = (2 * dot) / vv;
      for (let i = k + 1; i < s; i++) work[i * size + j] -= factor * m[k * s + i];
    }
  }
  for (let j = 0; j < (s - e) * size; j++) out[outAt + j] = work[e * size + j];
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

/**
 * The search's state, allocated once per call in flat arrays. The faces it may pick ("items") are
 * sorted by falling row count, then by contact, and stored by index: their contact, row count,
 * orthonormal rows, checks and reference point. A class rather than closures keeps every array a
 * field that optimised code loads once per method, and keeps numbers unboxed between the steps.
 */
class FaceSearch {
  readonly size: number;
  readonly target: number;
  readonly contactCount: number;
  readonly tolerance: number;
  readonly visitor: FaceNormalVisitor;
  /** Every contact's points, one after another (`size` numbers each), from vertexStart[c] to vertexStart[c + 1]. */
  readonly vertices: Float64Array;
  readonly vertexStart: Int32Array;
  readonly itemCount: number;
  readonly itemContact: Int32Array;
  readonly itemRowCount: Int32Array;
  /** Start of each item's rows in `rows`, of its checks in `checks` (ending at checkEnd), and of its reference point in `vertices`. */
  readonly rowStart: Int32Array;
  readonly rows: Float64Array;
  readonly checkStart: Int32Array;
  readonly checkEnd: Int32Array;
  readonly checks: Float64Array;
  readonly referenceStart: Int32Array;
  /** A contact may supply the last row in a plane when one of its one-row faces comes at or after the start of the search. */
  readonly lastOneRow: Int32Array;
  /** The subspace still open at each depth, as orthonormal rows in the full space (size x size numbers per depth), and the volume chosen so far. */
  readonly bases: Float64Array;
  readonly volumes: Float64Array;
  readonly projected: Float64Array;
  readonly work: Float64Array;
  readonly complement: Float64Array;
  readonly used: Uint8Array;
  readonly picked: Int32Array;
  readonly normal: Float64Array;
  readonly farthest: Float64Array;
  readonly known: Uint8Array;
  readonly planeReferences: Float64Array;
  readonly planeChecks: Float64Array;
  readonly planePoints: Float64Array;
  readonly order: Int32Array;
  readonly hull: Int32Array;

  constructor(contacts: readonly ContactFaces[], size: number, tolerance: number, visitor: FaceNormalVisitor) {
    const target = size - 1;
    const contactCount = contacts.length;
    this.size = size;
    this.target = target;
    this.contactCount = contactCount;
    this.tolerance = tolerance;
    this.visitor = visitor;
    this.vertexStart = new Int32Array(contactCount + 1);
    let vertexTotal = 0, mostVertices = 0, faceTotal = 0, rowTotal = 0, checkTotal = 0;
    contacts.forEach(({ vertices, faces }, contact) => {
      const count = vertices.length / size;
      this.vertexStart[contact] = vertexTotal;
      vertexTotal += vertices.length;
      mostVertices = Math.max(mostVertices, count);
      for (const face of faces) {
        faceTotal++;
        rowTotal += (face.length - 1) * size;
        checkTotal += (count - face.length) * size;
      }
    });
    this.vertexStart[contactCount] = vertexTotal;
    this.vertices = new Float64Array(vertexTotal);
    contacts.forEach(({ vertices }, contact) => this.vertices.set(vertices, this.vertexStart[contact]));

    // Faces with independent rows, at most `target` of them, in the order the search takes them.
    const candidates: number[] = [];
    const faceContact = new Int32Array(faceTotal), faceList: (readonly number[])[] = [];
    const rows = new Float64Array(rowTotal), faceRowStart = new Int32Array(faceTotal);
    let rowAt = 0;
    contacts.forEach(({ faces }, contact) => faces.forEach((face) => {
      const index = faceList.length;
      faceContact[index] = contact;
      faceList.push(face);
      faceRowStart[index] = rowAt;
      if (face.length - 1 <= target && orthonormalRows(this.vertices, this.vertexStart[contact], face, size, rows, rowAt)) candidates.push(index);
      rowAt += (face.length - 1) * size;
    }));
    candidates.sort((a, b) => faceList[b].length - faceList[a].length || faceContact[a] - faceContact[b] || a - b);
    const itemCount = candidates.length;
    this.itemCount = itemCount;
    this.itemContact = new Int32Array(itemCount);
    this.itemRowCount = new Int32Array(itemCount);
    this.rowStart = new Int32Array(itemCount);
    this.rows = rows;
    this.checkStart = new Int32Array(itemCount);
    this.checkEnd = new Int32Array(itemCount);
    this.checks = new Float64Array(checkTotal);
    this.referenceStart = new Int32Array(itemCount);
    this.lastOneRow = new Int32Array(contactCount).fill(-1);
    const inFace = new Uint8Array(mostVertices);
    let checkAt = 0;
    candidates.forEach((face, item) => {
      const contact = faceContact[face], list = faceList[face];
      const base = this.vertexStart[contact], count = (this.vertexStart[contact + 1] - base) / size;
      const reference = base + list[0] * size;
      this.itemContact[item] = contact;
      this.itemRowCount[item] = list.length - 1;
      this.rowStart[item] = faceRowStart[face];
      this.referenceStart[item] = reference;
      if (list.length === 2) this.lastOneRow[contact] = item;
      inFace.fill(0);
      for (const index of list) inFace[index] = 1;
      this.checkStart[item] = checkAt;
      for (let x = 0; x < count; x++) {
        if (inFace[x]) continue;
        for (let j = 0; j < size; j++) this.checks[checkAt + j] = this.vertices[base + x * size + j] - this.vertices[reference + j];
        checkAt += size;
      }
      this.checkEnd[item] = checkAt;
    });

    this.bases = new Float64Array((contactCount + 1) * size * size);
    for (let j = 0; j < size; j++) this.bases[j * size + j] = 1;
    this.volumes = new Float64Array(contactCount + 1);
    this.volumes[0] = 1;
    this.projected = new Float64Array(size * size);
    this.work = new Float64Array(size * size);
    this.complement = new Float64Array(size);
    this.used = new Uint8Array(contactCount);
    this.picked = new Int32Array(contactCount);
    this.normal = new Float64Array(size);
    this.farthest = new Float64Array(contactCount);
    this.known = new Uint8Array(contactCount);
    this.planeReferences = new Float64Array(2 * contactCount);
    this.planeChecks = new Float64Array((2 * checkTotal) / size);
    this.planePoints = new Float64Array(2 * mostVertices);
    this.order = new Int32Array(mostVertices);
    this.hull = new Int32Array(2 * mostVertices + 1);
  }

  /** How far each contact not marked known reaches along the normal, by its vertices. */
  reachOfOthers(): void {
    const { size, vertices, vertexStart, known, normal, farthest, contactCount } = this;
    for (let contact = 0; contact < contactCount; contact++) {
      if (known[contact]) continue;
      let most = -Infinity;
      for (let at = vertexStart[contact]; at < vertexStart[contact + 1]; at += size) {
        let dot = 0;
        for (let j = 0; j < size; j++) dot += vertices[at + j] * normal[j];
        if (dot > most) most = dot;
      }
      farthest[contact] = most;
    }
  }

  /** Visits the normal with the first `count` picked faces' reaches from their reference points and the other contacts' by search. */
  visitPicked(count: number): void {
    const { size, vertices, referenceStart, itemContact, picked, normal, farthest, known } = this;
    for (let k = 0; k < count; k++) {
      const item = picked[k], reference = referenceStart[item];
      let dot = 0;
      for (let j = 0; j < size; j++) dot += vertices[reference + j] * normal[j];
      farthest[itemContact[item]] = dot;
      known[itemContact[item]] = 1;
    }
    this.reachOfOthers();
    for (let k = 0; k < count; k++) known[itemContact[picked[k]]] = 0;
    this.visitor.visit(normal, farthest);
  }

  /** Bit 1: every check of the first `count` picked faces passes along the normal; bit 2: along its opposite. */
  signsOf(count: number): number {
    const { size, checks, checkStart, checkEnd, picked, normal, tolerance } = this;
    let plus = true, minus = true;
    for (let k = count - 1; k >= 0; k--) {
      const end = checkEnd[picked[k]];
      for (let at = checkStart[picked[k]]; at < end; at += size) {
        let dot = 0;
        for (let j = 0; j < size; j++) dot += checks[at + j] * normal[j];
        if (dot > tolerance) plus = false;
        if (dot < -tolerance) minus = false;
        if (!plus && !minus) return 0;
      }
    }
    return (plus ? 1 : 0) | (minus ? 2 : 0);
  }

  /** Indices of the 2-D hull of the first `count` plane points, counter-clockwise, into `hull` (Andrew's monotone chain); returns their number. */
  planeHull(count: number): number {
    const { planePoints, order, hull } = this;
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
  }

  /** The last face, of one row, after the faces picked so far left a plane open. */
  pickInPlane(start: number, depth: number): void {
    const {
      size, contactCount, used, lastOneRow, vertices, vertexStart, planePoints, hull, checks, checkStart, checkEnd, picked, planeChecks,
      planeReferences, referenceStart, itemContact, normal, farthest, known, tolerance,
    } = this;
    const basis = this.bases, b0 = depth * size * size, b1 = b0 + size;
    // Most candidates fail an early check, so checks and reference points are projected into the plane only when first needed.
    let projectedChecks = 0;
    let referencesProjected = false;
    for (let contact = 0; contact < contactCount; contact++) {
      if (used[contact] || lastOneRow[contact] < start) continue;
      const first = vertexStart[contact];
      const count = (vertexStart[contact + 1] - first) / size;
      for (let v = 0; v < count; v++) {
        const at = first + v * size;
        let a = 0, b = 0;
        for (let j = 0; j < size; j++) { a += vertices[at + j] * basis[b0 + j]; b += vertices[at + j] * basis[b1 + j]; }
        planePoints[2 * v] = a;
        planePoints[2 * v + 1] = b;
      }
      const corners = this.planeHull(count);
      for (let k = 0; k < corners; k++) {
        const from = hull[k], to = hull[k + 1];
        const ex = planePoints[2 * to] - planePoints[2 * from], ey = planePoints[2 * to + 1] - planePoints[2 * from + 1];
        const length = Math.sqrt(ex * ex + ey * ey);
        if (!(length > 0)) continue;
        // Outward normal of a counter-clockwise edge.
        const x = ey / length, y = -ex / length;
        let passes = true;
        for (let k = 0, check = 0; k < depth && passes; k++) {
          const end = checkEnd[picked[k]];
          for (let at = checkStart[picked[k]]; at < end; at += size, check++) {
            if (check === projectedChecks) {
              let a = 0, b = 0;
              for (let j = 0; j < size; j++) { a += checks[at + j] * basis[b0 + j]; b += checks[at + j] * basis[b1 + j]; }
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
            const reference = referenceStart[picked[k]];
            let a = 0, b = 0;
            for (let j = 0; j < size; j++) { a += vertices[reference + j] * basis[b0 + j]; b += vertices[reference + j] * basis[b1 + j]; }
            planeReferences[2 * k] = a;
            planeReferences[2 * k + 1] = b;
          }
          referencesProjected = true;
        }
        for (let j = 0; j < size; j++) normal[j] = x * basis[b0 + j] + y * basis[b1 + j];
        for (let k = 0; k < depth; k++) {
          const other = itemContact[picked[k]];
          farthest[other] = planeReferences[2 * k] * x + planeReferences[2 * k + 1] * y;
          known[other] = 1;
        }
        farthest[contact] = planePoints[2 * from] * x + planePoints[2 * from + 1] * y;
        known[contact] = 1;
        this.reachOfOthers();
        for (let k = 0; k < depth; k++) known[itemContact[picked[k]]] = 0;
        known[contact] = 0;
        this.visitor.visit(normal, farthest);
      }
    }
  }

  pick(start: number, depth: number, rows: number): void {
    const { size, target } = this;
    const open = size - rows;
    if (open === 2) {
      this.pickInPlane(start, depth);
      return;
    }
    const { itemCount, itemContact, itemRowCount, rowStart, used, projected, complement, normal, bases, volumes, picked, work } = this;
    const itemRows = this.rows;
    const basisAt = depth * size * size;
    const unused = this.contactCount - depth;
    for (let index = start; index < itemCount; index++) {
      const rowCount = itemRowCount[index];
      // The faces after this one have at most as many rows: the unused contacts must be able to supply the rows still missing.
      if (rows + unused * rowCount < target) break;
      if (used[itemContact[index]] || rows + rowCount > target) continue;
      const first = rowStart[index];
      for (let r = 0; r < rowCount; r++) {
        for (let c = 0; c < open; c++) {
          let dot = 0;
          for (let j = 0; j < size; j++) dot += itemRows[first + r * size + j] * bases[basisAt + c * size + j];
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
          for (let q = 0; q < open; q++) sum += complement[q] * bases[basisAt + q * size + j];
          normal[j] = sum;
        }
      } else if (remaining === 1) {
        volume = reduceBasis(projected, rowCount, open, bases, basisAt, size, work, normal, 0) * volumes[depth];
        if (!(volume > DEPENDENT)) continue;
      } else {
        volume = reduceBasis(projected, rowCount, open, bases, basisAt, size, work, bases, basisAt + size * size) * volumes[depth];
        if (!(volume > DEPENDENT)) continue;
      }
      picked[depth] = index;
      if (remaining === 1) {
        const signs = this.signsOf(depth + 1);
        if (signs & 1) this.visitPicked(depth + 1);
        if (signs & 2) {
          for (let j = 0; j < size; j++) normal[j] = -normal[j];
          this.visitPicked(depth + 1);
        }
      } else {
        used[itemContact[index]] = 1;
        volumes[depth + 1] = volume;
        this.pick(index + 1, depth + 1, rows + rowCount);
        used[itemContact[index]] = 0;
      }
    }
  }
}

/** Receives each candidate normal u and how far each contact reaches along it; both arrays are reused for the next candidate. */
export interface FaceNormalVisitor {
  visit(normal: Float64Array, farthest: Float64Array): void;
}

/** Calls `visitor.visit` with unit normals u (dimensionless, the rows' frame) including every facet normal of the sum of the contacts' sets, each whose chosen faces pass their checks (q . u <= tolerance), and how far each contact reaches along u (max u . x over its vertices). */
export function forEachFaceNormal(contacts: readonly ContactFaces[], size: number, tolerance: number, visitor: FaceNormalVisitor): void {
  new FaceSearch(contacts, size, tolerance, visitor).pick(0, 0, 0);
}
