/**
 * Q_L1 and Q_Linf of exactly three point contacts with friction, from the contacts' force cones
 * rather than from a search over face combinations in the 6-D wrench space.
 *
 * Contact i at lever rho_i = (x_i - p) / L pushes with forces f of its linearised cone (edges f_ij,
 * unit normal push: f . (-n_i) = 1), giving wrenches (f, rho_i x f). Along a direction u = (u_f,
 * u_t) of wrench space each reaches u . (f, rho_i x f) = f . y_i with y_i = u_f - rho_i x u_t, the
 * velocity of the point rho_i under the twist (u_f, u_t): so a contact's support is its 3-D force
 * set's support at y_i, and the nine numbers of y_a, y_b, y_c obey the three rigid-body conditions
 * (rho_a - rho_b) . (y_a - y_b) = 0 (and b, c; c, a). A facet normal u is a direction at which
 * the faces each contact offers add up to a facet (G. M. Ziegler, 1995, Graduate Texts in Mathematics 152, sec.
 * 7.1: the normal fan of a Minkowski sum is the common refinement of the summands' fans), so it
 * is a positive combination of rays of the contacts' 3-D fans that meets the conditions: a
 * positive dependency among the rays' images q under the conditions (a 3- or 2-vector each), found by signs of
 * small determinants (Cramer's rule).
 *
 * - Q_Linf: contact i's set is the pyramid K_i = conv{0, f_i1, ..., f_im}. Its fan has m + 1 rays
 *   (the outward normals of the triangles (0, f_j, f_j+1), support 0, and of the base, -n_i,
 *   support 1) and 2m walls (one per edge, spanned by the normals of the two facets beside it).
 *   With three conditions in 3-D, a facet takes a ray of two contacts and a wall of the third,
 *   or a wall of two contacts while the third's y is 0, or the third alone (its y in the kernel
 *   of its conditions).
 * - Q_L1: the hull of the union is the cone over (w, 1) cut at 1; in the lifted space the union
 *   gives y_i + c n_i (c the facet's offset), with two conditions left, and each contact's set is
 *   the polar of its friction cone: m rays (normals of the cone's sides) and m 2-D faces (one per
 *   edge). A facet takes a ray of each contact, or a ray of one and a face of another, or one
 *   contact alone.
 *
 * The determinants are tested with a slack, so the candidates may include directions that are not
 * facet normals: harmless, because with the origin inside every unit u has support h(u) >= Q,
 * with equality at the nearest facet, so Q is the smallest support over any set of directions
 * that holds every facet normal. Rays that are dependent (all determinants of a combination near
 * zero) would hide facets, so they hand the grasp to the face search, as do other contact models
 * and counts, contacts on one line, and grasps that are not force closure. The candidates whose
 * support comes within a relative 1e-6 of the smallest are then made exact: the points each
 * contact has on the facet (within 1e-8 of the largest wrench of its farthest along u) give the
 * facet's directions, five of them chosen by pivoted Gram-Schmidt (Golub & Van Loan, "Matrix
 * Computations", sec. 5.4.2), and the exact normal is u with those directions taken out.
 */

const D = 6;
const LIFTED = D + 1;

/** Smallest ratio of a vector's part outside the span of the earlier ones to its length for the contacts' spaces to count as independent. */
const INDEPENDENT = 1e-3;
/** A combination whose largest determinant is below this (unit rays, unit conditions) has dependent rays and may hide a facet. */
const DEPENDENT = 1e-6;
/** Slack of the sign tests relative to the largest determinant: a test this close to zero passes, adding a direction rather than losing a facet. */
const SIGN_SLACK = 1e-9;
/** Candidates whose support is within this relative distance of the smallest found are made exact. */
const NEAR_MINIMUM = 1e-6;
/** A contact's point lies on the facet when it is within this much of the largest wrench below the contact's farthest along u. */
const TOUCHING = 1e-8;

/** Every vector here is a Float64Array, so the helpers below see one kind of array and stay optimised. */
type Vector = Float64Array;

/** A facet's distance from the origin (dimensionless) and its outward unit normal, [force, torque / L], world frame. */
export interface NearestFacet {
  distance: number;
  normal: Vector;
}

/** Q_L1 (hull of the union) and Q_Linf (Minkowski sum) of three contacts. */
export interface ThreeContactQualities {
  sum: NearestFacet;
  max: NearestFacet;
}

/** One contact in the quality's units: its cone edges (forces, unit normal push), unit outward normal and lever (x_i - p) / L. */
export interface ForceCone {
  edges: readonly Vector[];
  normal: Vector;
  lever: Vector;
}

function dot(a: Vector, b: Vector): number {
  let sum = 0;
  for (let j = 0; j < a.length; j++) sum += a[j] * b[j];
  return sum;
}

function cross(a: Vector, b: Vector): Vector {
  return Float64Array.of(a[1] * b[2] - a[2] * b[1], a[2] * b[0] - a[0] * b[2], a[0] * b[1] - a[1] * b[0]);
}

function scaled(v: Vector, factor: number): Vector {
  const out = new Float64Array(v.length);
  for (let j = 0; j < v.length; j++) out[j] = v[j] * factor;
  return out;
}

function unit(v: Vector): Vector {
  return scaled(v, 1 / Math.sqrt(dot(v, v)));
}

/** Takes the orthonormal rows of `basis` out of v in place, twice, so the second pass recovers the digits the first cancels (Golub & Van Loan, sec. 5.2.8). */
function reject(v: Vector, basis: readonly Vector[]): void {
  for (let pass = 0; pass < 2; pass++) {
    for (const b of basis) {
      const d = dot(v, b);
      for (let j = 0; j < v.length; j++) v[j] -= d * b[j];
    }
  }
}

/** Orthonormal rows spanning `rows` by Gram-Schmidt; null when a row keeps less than INDEPENDENT of its length. */
function orthonormalize(rows: readonly Vector[]): Vector[] | null {
  const basis: Vector[] = [];
  for (const row of rows) {
    const v = row.slice();
    const before = Math.sqrt(dot(v, v));
    reject(v, basis);
    const after = Math.sqrt(dot(v, v));
    if (!(after > INDEPENDENT * before)) return null;
    basis.push(scaled(v, 1 / after));
  }
  return basis;
}

/** `count` orthonormal vectors completing the orthonormal rows of `basis`, each from the unit vector that sticks out most. */
function complement(basis: readonly Vector[], count: number): Vector[] {
  const n = basis[0].length;
  const found: Vector[] = [];
  while (found.length < count) {
    let best = new Float64Array(n), bestNorm = -1;
    for (let k = 0; k < n; k++) {
      const e = new Float64Array(n);
      e[k] = 1;
      reject(e, basis);
      reject(e, found);
      const norm = Math.sqrt(dot(e, e));
      if (norm > bestNorm) { bestNorm = norm; best = e; }
    }
    found.push(scaled(best, 1 / bestNorm));
  }
  return found;
}

/** Inverse of a symmetric positive definite matrix (rows) by Gauss-Jordan elimination; callers have checked it is far from singular. */
function invert(matrix: readonly Vector[]): Vector[] {
  const n = matrix.length;
  const a = matrix.map((row, i) => {
    const extended = new Float64Array(2 * n);
    extended.set(row);
    extended[n + i] = 1;
    return extended;
  });
  for (let col = 0; col < n; col++) {
    let pivot = col;
    for (let r = col + 1; r < n; r++) if (Math.abs(a[r][col]) > Math.abs(a[pivot][col])) pivot = r;
    [a[col], a[pivot]] = [a[pivot], a[col]];
    const p = a[col][col];
    for (let j = 0; j < 2 * n; j++) a[col][j] /= p;
    for (let r = 0; r < n; r++) {
      const factor = a[r][col];
      if (r === col || factor === 0) continue;
      for (let j = 0; j < 2 * n; j++) a[r][j] -= factor * a[col][j];
    }
  }
  return a.map((row) => row.slice(n));
}

/** Matrix (rows) times vector. */
function apply(matrix: readonly Vector[], v: Vector): Vector {
  const out = new Float64Array(matrix.length);
  for (let r = 0; r < matrix.length; r++) out[r] = dot(matrix[r], v);
  return out;
}

/** Largest u . g over the points (the apex 0 included when `withApex`). */
function reach(points: readonly Vector[], u: Vector, withApex: boolean): number {
  let most = withApex ? 0 : -Infinity;
  for (const g of points) {
    const level = dot(u, g);
    if (level > most) most = level;
  }
  return most;
}

/** Support of the Minkowski sum of the contacts' pyramids along unit u: sum over the contacts of max(0, max_j u . g_ij). */
function sumSupport(perContact: readonly (readonly Vector[])[], u: Vector): number {
  let support = 0;
  for (const generators of perContact) support += reach(generators, u, true);
  return support;
}

/** Support of the hull of the union along unit u: max over all generators of u . g. */
function unionSupport(perContact: readonly (readonly Vector[])[], u: Vector): number {
  let support = -Infinity;
  for (const generators of perContact) support = Math.max(support, reach(generators, u, false));
  return support;
}

/** Support along unit u of the Minkowski sum of the contacts' pyramids when `sum`, else of the union's hull. */
function support(perContact: readonly (readonly Vector[])[], u: Vector, sum: boolean): number {
  return sum ? sumSupport(perContact, u) : unionSupport(perContact, u);
}

/** Candidate unit directions with their approximate supports, kept while they may come near the smallest. */
class Candidates {
  least = Infinity;
  readonly supports: number[] = [];
  readonly directions: Vector[] = [];
  /** Where callers build a direction (its first D numbers) before offering it, so rejected ones allocate nothing. */
  readonly scratch = new Float64Array(LIFTED);

  /** Forgets every candidate, for the next search. */
  clear(): void {
    this.least = Infinity;
    this.supports.length = 0;
    this.directions.length = 0;
  }

  /** Offers the direction in `scratch`, of length `length`, with its approximate support along the unit direction. */
  offer(support: number, length: number): void {
    if (!(length > 0) || support > this.least + NEAR_MINIMUM * Math.abs(this.least)) return;
    if (support < this.least) this.least = support;
    this.supports.push(support);
    this.directions.push(scaled(this.scratch.subarray(0, D), 1 / length));
  }

  /** Offers the direction u (D numbers) with its support computed in full: of the Minkowski sum when `sum`, else of the union. */
  offerExact(u: Vector, perContact: readonly (readonly Vector[])[], sum: boolean): void {
    const length = Math.sqrt(dot(u, u));
    if (!(length > 0)) return;
    this.scratch.set(u);
    this.offer(support(perContact, scaled(u, 1 / length), sum), length);
  }

  near(): Vector[] {
    return this.directions.filter((_, k) => this.supports[k] <= this.least + NEAR_MINIMUM * Math.abs(this.least));
  }
}

/**
 * The exact facet normal near unit u: the directions between the points of each group that u
 * touches (within TOUCHING times `scale` of the group's farthest, the apex 0 among them when
 * `withApex`), five of them made orthonormal with pivoting (the largest left each time), taken
 * out of u. Null when they span fewer than five dimensions: u is then near no facet.
 */
function exactNormal(u: Vector, groups: readonly (readonly Vector[])[], withApex: boolean, scale: number): Vector | null {
  const apex = new Float64Array(D);
  const rows: Vector[] = [];
  for (const generators of groups) {
    let top = withApex ? apex : generators[0], most = dot(u, top);
    for (const g of generators) {
      const level = dot(u, g);
      if (level > most) { most = level; top = g; }
    }
    const level = most - TOUCHING * scale;
    for (let k = withApex ? -1 : 0; k < generators.length; k++) {
      const g = k < 0 ? apex : generators[k];
      if (g === top || dot(u, g) < level) continue;
      const row = new Float64Array(D);
      for (let j = 0; j < D; j++) row[j] = g[j] - top[j];
      rows.push(row);
    }
  }
  const basis: Vector[] = [];
  while (basis.length < D - 1) {
    let best = -1, bestNorm = 1e-6 * TOUCHING * scale;
    rows.forEach((row, k) => {
      const norm = Math.sqrt(dot(row, row));
      if (norm > bestNorm) { bestNorm = norm; best = k; }
    });
    if (best < 0) return null;
    const [chosen] = rows.splice(best, 1);
    reject(chosen, basis);
    const b = unit(chosen);
    basis.push(b);
    for (const row of rows) reject(row, [b]);
  }
  const normal = u.slice();
  reject(normal, basis);
  return unit(normal);
}

/** The smallest exact support (of the Minkowski sum of the groups' pyramids with apex 0 when `withApex`, else of their union's hull) over the candidates near the smallest approximate one. */
function settle(groups: readonly (readonly Vector[])[], withApex: boolean, scale: number): NearestFacet | null {
  let best: NearestFacet | null = null;
  for (const approximate of candidates.near()) {
    const normal = exactNormal(approximate, groups, withApex, scale) ?? approximate;
    const distance = support(groups, normal, withApex);
    if (best === null || distance < best.distance) best = { distance, normal };
  }
  return best;
}

/** Outward unit normals of the sides of a friction cone (side j through edges j and j + 1): the rays of its polar cone. */
function sideNormals(edges: readonly Vector[]): Vector[] {
  const m = edges.length;
  return edges.map((edge, j) => {
    const n = unit(cross(edge, edges[(j + 1) % m]));
    return dot(n, edges[(j + 2) % m]) > 0 ? scaled(n, -1) : n;
  });
}

/** What Dependency.sign answers when every weight is near zero: the vectors are dependent and may hide a facet. */
const DEPENDENT_RAYS = 2;

/**
 * A combination of up to four rays (contact and ray index each) with the weights of their linear
 * dependency, in typed arrays so the hot loops pass only small integers between calls (a number
 * crossing a call that is not inlined is boxed on the heap).
 */
class Dependency {
  readonly weights = new Float64Array(4);
  readonly contacts = new Int32Array(4);
  readonly rays = new Int32Array(4);

  /** +1 or -1 when the weights share that sign (each within a slack of it), 0 when their signs differ, DEPENDENT_RAYS when all are near zero. */
  sign(): number {
    const w = this.weights;
    const largest = Math.max(Math.abs(w[0]), Math.abs(w[1]), Math.abs(w[2]), Math.abs(w[3]));
    if (!(largest > DEPENDENT)) return DEPENDENT_RAYS;
    const slack = SIGN_SLACK * largest;
    if (w[0] >= -slack && w[1] >= -slack && w[2] >= -slack && w[3] >= -slack) return 1;
    if (w[0] <= slack && w[1] <= slack && w[2] <= slack && w[3] <= slack) return -1;
    return 0;
  }

  set(k: number, contact: number, ray: number): void {
    this.contacts[k] = contact;
    this.rays[k] = ray;
  }
}

/**
 * The one dependency and candidate list the searches reuse (each search clears the list first).
 * V8 discards optimised code that has seen class instances once a collection frees them, so
 * instances made per call would send every evaluation after a collection back to unoptimised code.
 */
const dependency = new Dependency();
const candidates = new Candidates();

/** Rows of the map from a direction's coordinates to the contacts' 3-vectors (3 per contact): y_i = u_f - rho_i x u_t (+ c n_i when lifted). */
function contactRows(contacts: readonly ForceCone[], lifted: boolean): Vector[] {
  const rows: Vector[] = [];
  for (const { lever: r, normal } of contacts) {
    // -rho x u_t as rows acting on u_t: the negated cross-product matrix of rho.
    const twist = [[0, r[2], -r[1]], [-r[2], 0, r[0]], [r[1], -r[0], 0]];
    for (let t = 0; t < 3; t++) {
      const row = new Float64Array(lifted ? LIFTED : D);
      row[t] = 1;
      row.set(twist[t], 3);
      if (lifted) row[D] = normal[t];
      rows.push(row);
    }
  }
  return rows;
}

/** The conditions on the contacts' 3-vectors and what maps a contact's 3-vector back to a direction: the map's rows and G^-1. */
interface Structure {
  conditions: Vector[];
  rows: readonly Vector[];
  inverse: Vector[];
}

/**
 * The conditions on the contacts' 3-vectors (rows of 9 spanning what the map's image misses) and
 * the way back: for a contact's 3-vector y, G^-1 M_i^T y with G = M^T M (least squares), so a
 * positive combination of rays that meets the conditions maps back to the direction giving it.
 * Null when the map loses a dimension (contacts on one line).
 */
function structure(rows: readonly Vector[]): Structure | null {
  const size = rows[0].length;
  const columns: Vector[] = [];
  for (let k = 0; k < size; k++) {
    const column = new Float64Array(rows.length);
    for (let r = 0; r < rows.length; r++) column[r] = rows[r][k];
    columns.push(column);
  }
  const image = orthonormalize(columns);
  if (image === null) return null;
  const conditions = complement(image, rows.length - size);
  const gram = columns.map((a) => {
    const row = new Float64Array(size);
    for (let k = 0; k < size; k++) row[k] = dot(a, columns[k]);
    return row;
  });
  return { conditions, rows, inverse: invert(gram) };
}

/** The direction whose contact `contact` gets the 3-vector y: G^-1 M_i^T y (see structure). */
function back({ rows, inverse }: Structure, contact: number, y: Vector): Vector {
  const size = inverse.length;
  const v = new Float64Array(size);
  for (let t = 0; t < 3; t++) for (let k = 0; k < size; k++) v[k] += rows[3 * contact + t][k] * y[t];
  return apply(inverse, v);
}

/** The image of a contact's 3-vector y under the conditions (one number per condition). */
function imageOf(conditions: readonly Vector[], contact: number, y: Vector): Vector {
  const out = new Float64Array(conditions.length);
  for (let r = 0; r < conditions.length; r++) {
    const row = conditions[r];
    out[r] = row[3 * contact] * y[0] + row[3 * contact + 1] * y[1] + row[3 * contact + 2] * y[2];
  }
  return out;
}

/** The 3-vector of contact c that every condition maps to zero: the largest cross product of two conditions' parts for c. */
function kernelOf(conditions: readonly Vector[], c: number): Vector {
  const parts = conditions.map((row) => Float64Array.of(row[3 * c], row[3 * c + 1], row[3 * c + 2]));
  let kernel: Vector = new Float64Array(3), most = -1;
  for (let i = 0; i < parts.length; i++) {
    for (let j = i + 1; j < parts.length; j++) {
      const candidate = cross(parts[i], parts[j]);
      const size = dot(candidate, candidate);
      if (size > most) { most = size; kernel = candidate; }
    }
  }
  return kernel;
}

/** The vectors one after another in one array. */
function flat(vectors: readonly Vector[]): Float64Array {
  const size = vectors[0].length;
  const out = new Float64Array(vectors.length * size);
  vectors.forEach((v, k) => out.set(v, k * size));
  return out;
}

/** Table of x_k . y_l (k over `xs`, l over `ys`, `size` numbers each), row-major. */
function dots(xs: Float64Array, ys: Float64Array, size: number): Float64Array {
  const rows = xs.length / size, cols = ys.length / size;
  const out = new Float64Array(rows * cols);
  for (let k = 0; k < rows; k++) {
    for (let l = 0; l < cols; l++) {
      let sum = 0;
      for (let j = 0; j < size; j++) sum += xs[k * size + j] * ys[l * size + j];
      out[k * cols + l] = sum;
    }
  }
  return out;
}

/** Table of the 2 x 2 determinants det(x_k, y_l) of 2-vectors, row-major. */
function determinants(xs: Float64Array, ys: Float64Array): Float64Array {
  const rows = xs.length / 2, cols = ys.length / 2;
  const out = new Float64Array(rows * cols);
  for (let k = 0; k < rows; k++) for (let l = 0; l < cols; l++) out[k * cols + l] = xs[2 * k] * ys[2 * l + 1] - xs[2 * k + 1] * ys[2 * l];
  return out;
}

/** Adds weight times the way back of (contact, ray) from `ways` (`size` numbers per ray) into `out`. */
function addWay(out: Float64Array, weight: number, ways: Float64Array, ray: number, size: number): void {
  for (let j = 0; j < size; j++) out[j] += weight * ways[ray * size + j];
}

/**
 * Offers the union's facet from the dependency's three rays (weights times `sign`): n = (u_f, u_t, c) from their ways back
 * (`ways` per contact, LIFTED numbers per ray); the plane u . w = c supports the union, so its distance is c / |u|. The offers
 * are module functions rather than closures of each search: V8 keeps a closure's optimised code only while a closure of it
 * lives, so closures made per call would run unoptimised after every collection.
 */
function offerUnionFacet(ways: readonly Float64Array[], sign: number): void {
  const n = candidates.scratch.fill(0), weights = dependency.weights;
  for (let k = 0; k < 3; k++) addWay(n, sign * weights[k], ways[dependency.contacts[k]], dependency.rays[k], LIFTED);
  let square = 0;
  for (let j = 0; j < D; j++) square += n[j] * n[j];
  const length = Math.sqrt(square);
  candidates.offer(n[D] / length, length);
}

/** Offers the Minkowski sum's facet from the dependency's four rays (weights times `sign`; `ways` D numbers per ray): each contact reaches its rays' supports, so h(u) = (weight on the base rays, index `baseRay`) / |u|. */
function offerSumFacet(ways: readonly Float64Array[], baseRay: number, sign: number): void {
  const u = candidates.scratch.fill(0), weights = dependency.weights;
  let reached = 0;
  for (let k = 0; k < 4; k++) {
    addWay(u, sign * weights[k], ways[dependency.contacts[k]], dependency.rays[k], D);
    if (dependency.rays[k] === baseRay) reached += sign * weights[k];
  }
  let square = 0;
  for (let j = 0; j < D; j++) square += u[j] * u[j];
  const length = Math.sqrt(square);
  candidates.offer(reached / length, length);
}

/** Q_L1: positive dependencies in the plane of the two lifted conditions among the rays of the contacts' polar cones; undefined when rays are dependent. */
function unionQuality(contacts: readonly ForceCone[], perContact: readonly (readonly Vector[])[], scale: number): NearestFacet | null | undefined {
  const lifted = structure(contactRows(contacts, true));
  if (lifted === null) return null;
  const { conditions } = lifted;
  const m = contacts[0].edges.length;
  const rays = contacts.map(({ edges }) => sideNormals(edges));
  const q = rays.map((contactRays, i) => flat(contactRays.map((r) => imageOf(conditions, i, r))));
  const ways = rays.map((contactRays, i) => flat(contactRays.map((r) => back(lifted, i, r))));
  candidates.clear();
  const weights = dependency.weights;
  // Three rays here: the fourth weight, left over from an earlier search, must not count in the sign test.
  weights[3] = 0;
  // A ray of each contact: det(y, z) x + det(z, x) y + det(x, y) z = 0 for 2-vectors.
  const d01 = determinants(q[0], q[1]), d12 = determinants(q[1], q[2]), d20 = determinants(q[2], q[0]);
  for (let j = 0; j < m; j++) {
    for (let k = 0; k < m; k++) {
      for (let l = 0; l < m; l++) {
        weights[0] = d12[k * m + l];
        weights[1] = d20[l * m + j];
        weights[2] = d01[j * m + k];
        const sign = dependency.sign();
        if (sign === DEPENDENT_RAYS) return undefined;
        if (sign === 0) continue;
        dependency.set(0, 0, j);
        dependency.set(1, 1, k);
        dependency.set(2, 2, l);
        offerUnionFacet(ways, sign);
      }
    }
  }
  // A ray k of b and the polar face of c's edge l (between its sides l - 1 and l); a's coordinates 0.
  for (let b = 0; b < 3; b++) {
    for (let c = 0; c < 3; c++) {
      if (b === c) continue;
      const bc = determinants(q[b], q[c]), cc = determinants(q[c], q[c]);
      for (let k = 0; k < m; k++) {
        for (let l = 0; l < m; l++) {
          const before = (l + m - 1) % m;
          // x = q_bk, y = q_c,before, z = q_cl.
          weights[0] = cc[before * m + l];
          weights[1] = -bc[k * m + l];
          weights[2] = bc[k * m + before];
          const sign = dependency.sign();
          if (sign === DEPENDENT_RAYS) return undefined;
          if (sign === 0) continue;
          dependency.set(0, b, k);
          dependency.set(1, c, before);
          dependency.set(2, c, l);
          offerUnionFacet(ways, sign);
        }
      }
    }
  }
  // One contact alone: its 3-vector spans the kernel of its two conditions (both signs, supports computed in full).
  for (let c = 0; c < 3; c++) {
    const kernel = kernelOf(conditions, c);
    for (const sign of [1, -1]) {
      candidates.offerExact(back(lifted, c, scaled(kernel, sign)).subarray(0, D), perContact, false);
    }
  }
  return settle([perContact.flat()], false, scale);
}

/** Q_Linf: positive dependencies in the 3-D space of the rigid-body conditions among the rays and walls of the pyramids' fans; undefined when rays are dependent. */
function sumQuality(contacts: readonly ForceCone[], perContact: readonly (readonly Vector[])[], scale: number): NearestFacet | null | undefined {
  const plain = structure(contactRows(contacts, false));
  if (plain === null) return null;
  const { conditions } = plain;
  const m = contacts[0].edges.length;
  const rayCount = m + 1, wallCount = 2 * m;
  // Rays: the triangles' outward normals (support 0), then the base's, -n (support 1).
  const rays = contacts.map(({ edges, normal }) => [...sideNormals(edges), scaled(normal, -1)]);
  // Walls: base edge j between triangle j and the base; apex edge j between triangles j - 1 and j.
  const wallFrom = new Int32Array(wallCount), wallTo = new Int32Array(wallCount);
  for (let j = 0; j < m; j++) {
    wallFrom[j] = j;
    wallTo[j] = m;
    wallFrom[m + j] = (j + m - 1) % m;
    wallTo[m + j] = j;
  }
  const qs = rays.map((contactRays, i) => contactRays.map((r) => imageOf(conditions, i, r)));
  const q = qs.map((images) => flat(images));
  const ways = rays.map((contactRays, i) => flat(contactRays.map((r) => back(plain, i, r))));
  const etas = qs.map((images) => flat(Array.from(wallFrom, (p, w) => cross(images[p], images[wallTo[w]]))));
  candidates.clear();
  const weights = dependency.weights;
  const others = (c: number) => [c === 0 ? 1 : 0, c === 2 ? 1 : 2];
  // q_i . eta_w for every ray of contact i and wall of contact c, one table per ordered pair, shared by both loops.
  const rayWall = q.map((rays) => etas.map((walls) => dots(rays, walls, 3)));
  // A ray of a, a ray of b, a wall (p, r) of c: det(B, C, E) A - det(A, C, E) B + det(A, B, E) C - det(A, B, C) E = 0.
  const ab = new Float64Array(rayCount);
  for (let c = 0; c < 3; c++) {
    const [a, b] = others(c);
    const aEta = rayWall[a][c], bEta = rayWall[b][c];
    const x = q[a], y = q[b], z = q[c];
    for (let k = 0; k < rayCount; k++) {
      for (let l = 0; l < rayCount; l++) {
        let crossed = false;
        for (let w = 0; w < wallCount; w++) {
          const w0 = bEta[l * wallCount + w], w1 = -aEta[k * wallCount + w];
          // Every weight is at most 1 (unit rays and conditions), so two of opposite signs past these bounds fail the sign test whatever the others are.
          if (w0 * w1 < 0 && Math.min(Math.abs(w0), Math.abs(w1)) > SIGN_SLACK && Math.max(Math.abs(w0), Math.abs(w1)) > DEPENDENT) continue;
          if (!crossed) {
            const cx = x[3 * k + 1] * y[3 * l + 2] - x[3 * k + 2] * y[3 * l + 1];
            const cy = x[3 * k + 2] * y[3 * l] - x[3 * k] * y[3 * l + 2];
            const cz = x[3 * k] * y[3 * l + 1] - x[3 * k + 1] * y[3 * l];
            for (let r = 0; r < rayCount; r++) ab[r] = cx * z[3 * r] + cy * z[3 * r + 1] + cz * z[3 * r + 2];
            crossed = true;
          }
          const p = wallFrom[w], r = wallTo[w];
          weights[0] = w0;
          weights[1] = w1;
          weights[2] = ab[r];
          weights[3] = -ab[p];
          const sign = dependency.sign();
          if (sign === DEPENDENT_RAYS) return undefined;
          if (sign === 0) continue;
          dependency.set(0, a, k);
          dependency.set(1, b, l);
          dependency.set(2, c, p);
          dependency.set(3, c, r);
          offerSumFacet(ways, m, sign);
        }
      }
    }
  }
  // A wall (p1, r1) of b and a wall (p2, r2) of c; a's velocity 0.
  for (let a = 0; a < 3; a++) {
    const [b, c] = others(a);
    const bEta = rayWall[b][c], cEta = rayWall[c][b];
    for (let w1 = 0; w1 < wallCount; w1++) {
      const p1 = wallFrom[w1], r1 = wallTo[w1];
      for (let w2 = 0; w2 < wallCount; w2++) {
        const p2 = wallFrom[w2], r2 = wallTo[w2];
        weights[0] = bEta[r1 * wallCount + w2];
        weights[1] = -bEta[p1 * wallCount + w2];
        weights[2] = cEta[r2 * wallCount + w1];
        weights[3] = -cEta[p2 * wallCount + w1];
        const sign = dependency.sign();
        if (sign === DEPENDENT_RAYS) return undefined;
        if (sign === 0) continue;
        dependency.set(0, b, p1);
        dependency.set(1, b, r1);
        dependency.set(2, c, p2);
        dependency.set(3, c, r2);
        offerSumFacet(ways, m, sign);
      }
    }
  }
  // Two contacts at rest: the third's velocity spans the kernel of its conditions (both signs, supports computed in full).
  for (let c = 0; c < 3; c++) {
    const kernel = kernelOf(conditions, c);
    for (const sign of [1, -1]) {
      candidates.offerExact(back(plain, c, scaled(kernel, sign)), perContact, true);
    }
  }
  return settle(perContact, true, scale);
}

/**
 * Q_L1 and Q_Linf with their facet normals for three point contacts with friction (cones in the
 * quality's units; `perContact` their wrenches [force, torque / L]; `scale` the largest wrench's
 * length), or null when this route does not apply: nearly dependent contact spaces or rays, or
 * a grasp whose Q_L1 is not above `closureTolerance` times the scale (not force closure).
 */
export function threeContactQualities(contacts: readonly ForceCone[], wrenches: readonly (readonly (readonly number[])[])[], scale: number, closureTolerance: number): ThreeContactQualities | null {
  if (contacts.length !== 3) return null;
  const perContact = wrenches.map((generators) => generators.map((w) => Float64Array.of(w[0], w[1], w[2], w[3], w[4], w[5])));
  const sum = unionQuality(contacts, perContact, scale);
  if (!sum || !(sum.distance > closureTolerance * scale)) return null;
  const max = sumQuality(contacts, perContact, scale);
  return max ? { sum, max } : null;
}
