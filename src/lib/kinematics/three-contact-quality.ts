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
 * the faces each contact offers add up to a facet (Ziegler, "Lectures on Polytopes", 1995, sec.
 * 7.1: the normal fan of a Minkowski sum is the common refinement of the summands' fans), so it
 * is a positive combination of rays of the contacts' 3-D fans that meets the conditions: a
 * positive dependency among the rays' images q = N_i rho under the conditions, found by signs of
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

/** A facet's distance from the origin (dimensionless) and its outward unit normal, [force, torque / L], world frame. */
export interface NearestFacet {
  distance: number;
  normal: number[];
}

/** Q_L1 (hull of the union) and Q_Linf (Minkowski sum) of three contacts. */
export interface ThreeContactQualities {
  sum: NearestFacet;
  max: NearestFacet;
}

/** One contact in the quality's units: its cone edges (forces, unit normal push), unit outward normal and lever (x_i - p) / L. */
export interface ForceCone {
  edges: readonly (readonly number[])[];
  normal: readonly number[];
  lever: readonly number[];
}

function dot(a: ArrayLike<number>, b: ArrayLike<number>): number {
  let sum = 0;
  for (let j = 0; j < a.length; j++) sum += a[j] * b[j];
  return sum;
}

function cross(a: ArrayLike<number>, b: ArrayLike<number>): number[] {
  return [a[1] * b[2] - a[2] * b[1], a[2] * b[0] - a[0] * b[2], a[0] * b[1] - a[1] * b[0]];
}

function unit(v: readonly number[]): number[] {
  const length = Math.sqrt(dot(v, v));
  return v.map((x) => x / length);
}

/** Takes the orthonormal rows of `basis` out of v in place, twice, so the second pass recovers the digits the first cancels (Golub & Van Loan, sec. 5.2.8). */
function reject(v: number[], basis: readonly (readonly number[])[]): void {
  for (let pass = 0; pass < 2; pass++) {
    for (const b of basis) {
      const d = dot(v, b);
      for (let j = 0; j < v.length; j++) v[j] -= d * b[j];
    }
  }
}

/** Orthonormal rows spanning `rows` by Gram-Schmidt; null when a row keeps less than INDEPENDENT of its length. */
function orthonormalize(rows: readonly (readonly number[])[]): number[][] | null {
  const basis: number[][] = [];
  for (const row of rows) {
    const v = row.slice();
    const before = Math.sqrt(dot(v, v));
    reject(v, basis);
    const after = Math.sqrt(dot(v, v));
    if (!(after > INDEPENDENT * before)) return null;
    basis.push(v.map((x) => x / after));
  }
  return basis;
}

/** `count` orthonormal vectors completing the orthonormal rows of `basis` (length n each), from the unit vectors that stick out most. */
function complement(basis: readonly (readonly number[])[], count: number): number[][] {
  const n = basis[0].length;
  const found: number[][] = [];
  while (found.length < count) {
    let best: number[] = [], bestNorm = -1;
    for (let k = 0; k < n; k++) {
      const e = new Array<number>(n).fill(0);
      e[k] = 1;
      reject(e, basis);
      reject(e, found);
      const norm = Math.sqrt(dot(e, e));
      if (norm > bestNorm) { bestNorm = norm; best = e; }
    }
    found.push(best.map((x) => x / bestNorm));
  }
  return found;
}

/** Inverse of a symmetric positive definite matrix by Gauss-Jordan elimination (callers have checked it is far from singular). */
function invert(matrix: readonly (readonly number[])[]): number[][] {
  const n = matrix.length;
  const a = matrix.map((row, i) => [...row, ...Array.from({ length: n }, (_, j) => (i === j ? 1 : 0))]);
  for (let col = 0; col < n; col++) {
    let pivot = col;
    for (let r = col + 1; r < n; r++) if (Math.abs(a[r][col]) > Math.abs(a[pivot][col])) pivot = r;
    [a[col], a[pivot]] = [a[pivot], a[col]];
    const p = a[col][col];
    for (let j = 0; j < 2 * n; j++) a[col][j] /= p;
    for (let r = 0; r < n; r++) {
      if (r === col || a[r][col] === 0) continue;
      const factor = a[r][col];
      for (let j = 0; j < 2 * n; j++) a[r][j] -= factor * a[col][j];
    }
  }
  return a.map((row) => row.slice(n));
}

/** Matrix (rows) times vector. */
function apply(matrix: readonly (readonly number[])[], v: ArrayLike<number>): number[] {
  return matrix.map((row) => dot(row, v));
}

/** Largest u . g over the points (the apex 0 included when `withApex`). */
function reach(points: readonly (readonly number[])[], u: ArrayLike<number>, withApex: boolean): number {
  let most = withApex ? 0 : -Infinity;
  for (const g of points) {
    const level = dot(u, g);
    if (level > most) most = level;
  }
  return most;
}

/** Support of the Minkowski sum of the contacts' pyramids along unit u: sum over the contacts of max(0, max_j u . g_ij). */
function sumSupport(perContact: readonly (readonly (readonly number[])[])[], u: readonly number[]): number {
  let support = 0;
  for (const generators of perContact) support += reach(generators, u, true);
  return support;
}

/** Support of the hull of the union along unit u: max over all generators of u . g. */
function unionSupport(perContact: readonly (readonly (readonly number[])[])[], u: readonly number[]): number {
  let support = -Infinity;
  for (const generators of perContact) support = Math.max(support, reach(generators, u, false));
  return support;
}

/** Candidate unit directions with their approximate supports, kept while they may come near the smallest. */
class Candidates {
  least = Infinity;
  readonly supports: number[] = [];
  readonly directions: number[][] = [];
  /** Where callers build a direction (its first D numbers) before offering it, so rejected ones allocate nothing. */
  readonly scratch = new Float64Array(LIFTED);

  /** Offers the direction in `scratch`, of length `length`, with its approximate support along the unit direction. */
  offer(support: number, length: number): void {
    if (!(length > 0) || support > this.least + NEAR_MINIMUM * Math.abs(this.least)) return;
    if (support < this.least) this.least = support;
    const u = new Array<number>(D);
    for (let j = 0; j < D; j++) u[j] = this.scratch[j] / length;
    this.supports.push(support);
    this.directions.push(u);
  }

  /** Offers unit u with its support computed in full by `support`. */
  offerExact(u: readonly number[], support: (u: readonly number[]) => number): void {
    const length = Math.sqrt(dot(u, u));
    if (!(length > 0)) return;
    for (let j = 0; j < D; j++) this.scratch[j] = u[j];
    this.offer(support(u.map((x) => x / length)), length);
  }

  near(): number[][] {
    return this.directions.filter((_, k) => this.supports[k] <= this.least + NEAR_MINIMUM * Math.abs(this.least));
  }
}

/**
 * The exact facet normal near unit u: the directions between the points of each group that u
 * touches (within TOUCHING times `scale` of the group's farthest, the apex 0 among them when
 * `withApex`), five of them made orthonormal with pivoting (the largest left each time), taken
 * out of u. Null when they span fewer than five dimensions: u is then near no facet.
 */
function exactNormal(u: readonly number[], groups: readonly (readonly (readonly number[])[])[], withApex: boolean, scale: number): number[] | null {
  const rows: number[][] = [];
  for (const generators of groups) {
    const points = withApex ? [new Array<number>(D).fill(0), ...generators] : generators;
    const levels = points.map((g) => dot(u, g));
    let top = 0;
    for (let k = 1; k < points.length; k++) if (levels[k] > levels[top]) top = k;
    for (let k = 0; k < points.length; k++) {
      if (k !== top && levels[k] >= levels[top] - TOUCHING * scale) rows.push(points[k].map((x, j) => x - points[top][j]));
    }
  }
  const basis: number[][] = [];
  while (basis.length < D - 1) {
    let best = -1, bestNorm = 1e-6 * TOUCHING * scale;
    rows.forEach((row, k) => {
      const norm = Math.sqrt(dot(row, row));
      if (norm > bestNorm) { bestNorm = norm; best = k; }
    });
    if (best < 0) return null;
    const [chosen] = rows.splice(best, 1);
    reject(chosen, basis);
    basis.push(unit(chosen));
    for (const row of rows) reject(row, basis.slice(-1));
  }
  const normal = u.slice();
  reject(normal, basis);
  return unit(normal);
}

/** The smallest exact support over the candidates near the smallest approximate one. */
function settle(candidates: Candidates, groups: readonly (readonly (readonly number[])[])[], withApex: boolean, scale: number, support: (u: readonly number[]) => number): NearestFacet | null {
  let best: NearestFacet | null = null;
  for (const approximate of candidates.near()) {
    const normal = exactNormal(approximate, groups, withApex, scale) ?? approximate;
    const distance = support(normal);
    if (best === null || distance < best.distance) best = { distance, normal };
  }
  return best;
}

/** Outward unit normals of the sides of a friction cone (side j through edges j and j + 1): the rays of its polar cone. */
function sideNormals(edges: readonly (readonly number[])[]): number[][] {
  const m = edges.length;
  return edges.map((edge, j) => {
    const n = unit(cross(edge, edges[(j + 1) % m]));
    return dot(n, edges[(j + 2) % m]) > 0 ? n.map((x) => -x) : n;
  });
}

/** The sign (+1 or -1) shared by the weights of a positive dependency (each within a slack of it), 0 when their signs differ, NaN when all are near zero (the vectors are dependent). */
function signOf(w0: number, w1: number, w2: number, w3: number): number {
  const largest = Math.max(Math.abs(w0), Math.abs(w1), Math.abs(w2), Math.abs(w3));
  if (!(largest > DEPENDENT)) return NaN;
  const slack = SIGN_SLACK * largest;
  if (w0 >= -slack && w1 >= -slack && w2 >= -slack && w3 >= -slack) return 1;
  if (w0 <= slack && w1 <= slack && w2 <= slack && w3 <= slack) return -1;
  return 0;
}

/** Rows of the map from a direction's coordinates to the contacts' 3-vectors (3 per contact): y_i = u_f - rho_i x u_t (+ c n_i when lifted). */
function contactRows(contacts: readonly ForceCone[], lifted: boolean): number[][] {
  const rows: number[][] = [];
  for (const { lever: r, normal } of contacts) {
    // -rho x u_t as rows acting on u_t: the negated cross-product matrix of rho.
    const twist = [[0, r[2], -r[1]], [-r[2], 0, r[0]], [r[1], -r[0], 0]];
    for (let t = 0; t < 3; t++) {
      const row = [t === 0 ? 1 : 0, t === 1 ? 1 : 0, t === 2 ? 1 : 0, ...twist[t]];
      if (lifted) row.push(normal[t]);
      rows.push(row);
    }
  }
  return rows;
}

/**
 * The conditions on the contacts' 3-vectors (rows of 9 spanning what the map's image misses) and
 * the way back: for a contact's 3-vector y, G^-1 M_i^T y with G = M^T M (least squares), so a
 * positive combination of rays that meets the conditions maps back to the direction giving it.
 */
function structure(rows: readonly (readonly number[])[]): { conditions: number[][]; back: (contact: number, y: readonly number[]) => number[] } | null {
  const size = rows[0].length;
  const columns = Array.from({ length: size }, (_, k) => rows.map((row) => row[k]));
  const image = orthonormalize(columns);
  if (image === null) return null;
  const conditions = complement(image, rows.length - size);
  const gram = columns.map((a) => columns.map((b) => dot(a, b)));
  const inverse = invert(gram);
  const back = (contact: number, y: readonly number[]) => {
    const v = new Array<number>(size).fill(0);
    for (let t = 0; t < 3; t++) for (let k = 0; k < size; k++) v[k] += rows[3 * contact + t][k] * y[t];
    return apply(inverse, v);
  };
  return { conditions, back };
}

/** The image of a contact's 3-vector y under the conditions (one number per condition). */
function imageOf(conditions: readonly (readonly number[])[], contact: number, y: readonly number[]): number[] {
  return conditions.map((row) => row[3 * contact] * y[0] + row[3 * contact + 1] * y[1] + row[3 * contact + 2] * y[2]);
}

/** Flat copies (`size` numbers per vector) of a contact's vectors, for the tables of the inner loops. */
function flat(vectors: readonly (readonly number[])[], size: number): Float64Array {
  const out = new Float64Array(vectors.length * size);
  vectors.forEach((v, k) => out.set(v.slice(0, size), k * size));
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

/** Adds weight times way (a `size`-vector at `at` in `ways`) into `out`. */
function addWay(out: Float64Array, weight: number, ways: Float64Array, at: number, size: number): void {
  for (let j = 0; j < size; j++) out[j] += weight * ways[at * size + j];
}

/** Q_L1: positive dependencies in the plane of the two lifted conditions among the rays of the contacts' polar cones; undefined when rays are dependent. */
function unionQuality(contacts: readonly ForceCone[], perContact: readonly number[][][], scale: number): NearestFacet | null | undefined {
  const lifted = structure(contactRows(contacts, true));
  if (lifted === null) return null;
  const { conditions, back } = lifted;
  const m = contacts[0].edges.length;
  const rays = contacts.map(({ edges }) => sideNormals(edges));
  const q = rays.map((contactRays, i) => flat(contactRays.map((r) => imageOf(conditions, i, r)), 2));
  const ways = rays.map((contactRays, i) => flat(contactRays.map((r) => back(i, r)), LIFTED));
  const candidates = new Candidates();
  /** n = (u_f, u_t, c) from three rays' weights; the plane u . w = c supports the union, so its distance is c / |u|. */
  const offer = (sign: number, w0: number, c0: number, r0: number, w1: number, c1: number, r1: number, w2: number, c2: number, r2: number) => {
    const n = candidates.scratch.fill(0);
    addWay(n, sign * w0, ways[c0], r0, LIFTED);
    addWay(n, sign * w1, ways[c1], r1, LIFTED);
    addWay(n, sign * w2, ways[c2], r2, LIFTED);
    let square = 0;
    for (let j = 0; j < D; j++) square += n[j] * n[j];
    const length = Math.sqrt(square);
    candidates.offer(n[D] / length, length);
  };
  // A ray of each contact: det(y, z) x + det(z, x) y + det(x, y) z = 0 for 2-vectors.
  const d01 = determinants(q[0], q[1]), d12 = determinants(q[1], q[2]), d20 = determinants(q[2], q[0]);
  for (let j = 0; j < m; j++) {
    for (let k = 0; k < m; k++) {
      for (let l = 0; l < m; l++) {
        const w0 = d12[k * m + l], w1 = d20[l * m + j], w2 = d01[j * m + k];
        const sign = signOf(w0, w1, w2, 0);
        if (Number.isNaN(sign)) return undefined;
        if (sign !== 0) offer(sign, w0, 0, j, w1, 1, k, w2, 2, l);
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
          const w0 = cc[before * m + l], w1 = -bc[k * m + l], w2 = bc[k * m + before];
          const sign = signOf(w0, w1, w2, 0);
          if (Number.isNaN(sign)) return undefined;
          if (sign !== 0) offer(sign, w0, b, k, w1, c, before, w2, c, l);
        }
      }
    }
  }
  // One contact alone: its 3-vector spans the kernel of its two conditions (both signs, supports computed in full).
  for (let c = 0; c < 3; c++) {
    const kernel = cross(conditions[0].slice(3 * c, 3 * c + 3), conditions[1].slice(3 * c, 3 * c + 3));
    for (const sign of [1, -1]) {
      candidates.offerExact(back(c, kernel.map((x) => sign * x)).slice(0, D), (u) => unionSupport(perContact, u));
    }
  }
  return settle(candidates, [perContact.flat()], false, scale, (u) => unionSupport(perContact, u));
}

/** Q_Linf: positive dependencies in the 3-D space of the rigid-body conditions among the rays and walls of the pyramids' fans; undefined when rays are dependent. */
function sumQuality(contacts: readonly ForceCone[], perContact: readonly number[][][], scale: number): NearestFacet | null | undefined {
  const plain = structure(contactRows(contacts, false));
  if (plain === null) return null;
  const { conditions, back } = plain;
  const m = contacts[0].edges.length;
  const rayCount = m + 1, wallCount = 2 * m;
  // Rays: the triangles' outward normals (support 0), then the base's, -n (support 1).
  const rays = contacts.map(({ edges, normal }) => [...sideNormals(edges), normal.map((x) => -x)]);
  // Walls: base edge j between triangle j and the base; apex edge j between triangles j - 1 and j.
  const wallFrom = new Int32Array(wallCount), wallTo = new Int32Array(wallCount);
  for (let j = 0; j < m; j++) {
    wallFrom[j] = j;
    wallTo[j] = m;
    wallFrom[m + j] = (j + m - 1) % m;
    wallTo[m + j] = j;
  }
  const qs = rays.map((contactRays, i) => contactRays.map((r) => imageOf(conditions, i, r)));
  const q = qs.map((images) => flat(images, 3));
  const ways = rays.map((contactRays, i) => flat(contactRays.map((r) => back(i, r)), D));
  const etas = qs.map((images) => flat(Array.from(wallFrom, (p, w) => cross(images[p], images[wallTo[w]])), 3));
  const candidates = new Candidates();
  /** u from four rays' weights; each contact reaches its rays' supports, so h(u) = (weight on base rays) / |u|. */
  const offer = (sign: number, w0: number, c0: number, r0: number, w1: number, c1: number, r1: number, w2: number, c2: number, r2: number, w3: number, c3: number, r3: number) => {
    const u = candidates.scratch.fill(0);
    addWay(u, sign * w0, ways[c0], r0, D);
    addWay(u, sign * w1, ways[c1], r1, D);
    addWay(u, sign * w2, ways[c2], r2, D);
    addWay(u, sign * w3, ways[c3], r3, D);
    const reached = sign * ((r0 === m ? w0 : 0) + (r1 === m ? w1 : 0) + (r2 === m ? w2 : 0) + (r3 === m ? w3 : 0));
    let square = 0;
    for (let j = 0; j < D; j++) square += u[j] * u[j];
    const length = Math.sqrt(square);
    candidates.offer(reached / length, length);
  };
  const others = (c: number) => [c === 0 ? 1 : 0, c === 2 ? 1 : 2];
  // A ray of a, a ray of b, a wall (p, r) of c: det(B, C, E) A - det(A, C, E) B + det(A, B, E) C - det(A, B, C) E = 0.
  const ab = new Float64Array(rayCount);
  for (let c = 0; c < 3; c++) {
    const [a, b] = others(c);
    const aEta = dots(q[a], etas[c], 3), bEta = dots(q[b], etas[c], 3);
    const qc = q[c];
    for (let k = 0; k < rayCount; k++) {
      for (let l = 0; l < rayCount; l++) {
        const x = q[a], y = q[b];
        const cx = x[3 * k + 1] * y[3 * l + 2] - x[3 * k + 2] * y[3 * l + 1];
        const cy = x[3 * k + 2] * y[3 * l] - x[3 * k] * y[3 * l + 2];
        const cz = x[3 * k] * y[3 * l + 1] - x[3 * k + 1] * y[3 * l];
        for (let r = 0; r < rayCount; r++) ab[r] = cx * qc[3 * r] + cy * qc[3 * r + 1] + cz * qc[3 * r + 2];
        for (let w = 0; w < wallCount; w++) {
          const p = wallFrom[w], r = wallTo[w];
          const w0 = bEta[l * wallCount + w], w1 = -aEta[k * wallCount + w], w2 = ab[r], w3 = -ab[p];
          const sign = signOf(w0, w1, w2, w3);
          if (Number.isNaN(sign)) return undefined;
          if (sign !== 0) offer(sign, w0, a, k, w1, b, l, w2, c, p, w3, c, r);
        }
      }
    }
  }
  // A wall (p1, r1) of b and a wall (p2, r2) of c; a's velocity 0.
  for (let a = 0; a < 3; a++) {
    const [b, c] = others(a);
    const bEta = dots(q[b], etas[c], 3), etaC = dots(etas[b], q[c], 3);
    for (let w1 = 0; w1 < wallCount; w1++) {
      const p1 = wallFrom[w1], r1 = wallTo[w1];
      for (let w2 = 0; w2 < wallCount; w2++) {
        const p2 = wallFrom[w2], r2 = wallTo[w2];
        const v0 = bEta[r1 * wallCount + w2], v1 = -bEta[p1 * wallCount + w2], v2 = etaC[w1 * rayCount + r2], v3 = -etaC[w1 * rayCount + p2];
        const sign = signOf(v0, v1, v2, v3);
        if (Number.isNaN(sign)) return undefined;
        if (sign !== 0) offer(sign, v0, b, p1, v1, b, r1, v2, c, p2, v3, c, r2);
      }
    }
  }
  // Two contacts at rest: the third's velocity spans the kernel of its conditions (both signs, supports computed in full).
  for (let c = 0; c < 3; c++) {
    const rows = conditions.map((row) => row.slice(3 * c, 3 * c + 3));
    let kernel = cross(rows[0], rows[1]);
    for (const [i, j] of [[0, 2], [1, 2]]) {
      const other = cross(rows[i], rows[j]);
      if (dot(other, other) > dot(kernel, kernel)) kernel = other;
    }
    for (const sign of [1, -1]) {
      candidates.offerExact(back(c, kernel.map((x) => sign * x)), (u) => sumSupport(perContact, u));
    }
  }
  return settle(candidates, perContact, true, scale, (u) => sumSupport(perContact, u));
}

/**
 * Q_L1 and Q_Linf with their facet normals for three point contacts with friction (cones in the
 * quality's units; `perContact` their wrenches [force, torque / L]; `scale` the largest wrench's
 * length), or null when this route does not apply: nearly dependent contact spaces or rays, or
 * a grasp whose Q_L1 is not above `closureTolerance` times the scale (not force closure).
 */
export function threeContactQualities(contacts: readonly ForceCone[], perContact: readonly number[][][], scale: number, closureTolerance: number): ThreeContactQualities | null {
  if (contacts.length !== 3) return null;
  const sum = unionQuality(contacts, perContact, scale);
  if (!sum || !(sum.distance > closureTolerance * scale)) return null;
  const max = sumQuality(contacts, perContact, scale);
  return max ? { sum, max } : null;
}
