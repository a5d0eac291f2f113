/**
 * Grasp quality under friction (Ferrari & Canny, "Planning optimal grasps", IEEE ICRA 1992).
 *
 * Contact model: each contact i at x_i with outward object normal n_i pushes on the object with a
 * force inside its Coulomb cone |f_t| <= mu_i f_n (point contact with friction); a soft finger
 * may also twist about the normal, |tau_n| <= gamma f_n, with the coupled linear bound
 * |f_t| / mu_i + |tau_n| / gamma <= f_n. The cone is linearised by m edges inscribed in it,
 * f_ik = -n_i + mu_i (cos(2 pi k / m) t1 + sin(2 pi k / m) t2), each with unit normal component,
 * and a soft finger adds the pure twists -n_i with spin +-gamma about n_i. Each force becomes the
 * wrench w = (f, (x_i - p) x f / L) about the object origin p, the torque divided by the
 * characteristic length L so force and torque share one unit.
 *
 * Q_L1 is the radius of the largest origin-centred ball inside conv(union of all w_ik) (total
 * normal force 1); Q_Linf the same for the Minkowski sum of conv{0, w_i1, ..., w_im} over the
 * contacts (each normal force at most 1). Both are the smallest distance from the origin to a
 * hull facet; the grasp is force closure when the origin is strictly inside (Q > 0). The facet
 * that sets Q_L1 has outward normal u: the contacts can push least along u, so an external
 * wrench along -u is the one resisted worst.
 *
 * Neither hull is built from the sum's points (there are (m + 1)^k of them). Each P_i =
 * conv({0} U G_i) is a pyramid with apex 0 over the base of G_i, so its faces are the apex, each
 * face F of the base, the pyramid over each F and the base itself. A facet of W = P_1 + ... + P_k
 * has a normal u orthogonal to one face per contributing contact (five independent rows in all),
 * each chosen face lying in the face of its P_i that maximises u, at the distance
 * h_W(u) = sum_i max(0, max_j u . w_ij). The union's hull is handled alike in the lifted space
 * (w, 1), where its facets are linear. Every unit u has support h(u) >= Q (the ball of radius Q
 * lies inside), with equality along the nearest facet, so the smallest support over a candidate
 * set that holds every facet normal is exactly Q; the containment check only skips candidates.
 *
 * Three point contacts with friction first try the force-cone route (three-contact-quality.ts),
 * which finds the same facets from the contacts' 3-D force cones; it answers null for layouts it
 * cannot separate safely and for grasps without force closure, and the face search then decides.
 */
import { baseFaces, countCombinations, forEachFaceNormal, type ContactFaces, type FaceNormalVisitor } from './wrench-faces';
import { threeContactQualities, type ForceCone } from './three-contact-quality';
import { hullFacets } from './wrench-hull';

/** Wrench-space dimension: force (3) and torque over L (3). */
const D = 6;
/** Lifted wrench space (w, 1) in which a facet of the union's hull is a linear hyperplane. */
const LIFTED = D + 1;

/** Relative size below which a hull distance counts as zero: the grasp is then not force closure. */
export const FORCE_CLOSURE_TOLERANCE = 1e-5;

/** Friction and scaling of the quality computation, SI. */
export interface GraspQualityInput {
  /** Object origin p, m, world frame. */
  origin: ArrayLike<number>;
  /** Contact points x_i (3 per contact), m, world frame. */
  points: ArrayLike<number>;
  /** Outward unit object normals n_i (3 per contact), world frame. */
  normals: ArrayLike<number>;
  /** Friction coefficient mu_i per contact (dimensionless, >= 0). */
  friction: ArrayLike<number>;
  contactCount: number;
  /** Edges m of each linearised friction cone (>= 3). */
  coneEdges: number;
  /** Torsional friction gamma of a soft finger, m; 0 for point contacts with friction. */
  torsionalFriction: number;
  /** Characteristic length L, m; undefined for the largest |x_i - p|. */
  torqueLength?: number;
}

/** Quality of a grasp under friction (dimensionless: wrench per unit normal force, torque over L). */
export interface GraspQuality {
  contactCount: number;
  coneEdges: number;
  /** Characteristic length L used, m. */
  torqueLength: number;
  /** Origin strictly inside the hull of the contact wrenches. */
  forceClosure: boolean;
  /** Q_L1: ball radius in the hull of all edge wrenches (total normal force 1); 0 without force closure. */
  sumQuality: number;
  /** Q_Linf: ball radius in the Minkowski sum of the contacts' wrench sets (each normal force at most 1); null when it takes more than MAX_FACE_COMBINATIONS face combinations. */
  maxQuality: number | null;
  /** Face combinations Q_Linf takes (0 without force closure, where Q_Linf is 0). */
  maxQualityCombinations: number;
  /** External wrench resisted worst, unit, [force (3), torque / L (3)], world frame. */
  weakestWrench: Float64Array;
  /** The same in words, e.g. "a push along −z". */
  weakestWords: string;
}

/** Two unit tangents t1, t2 with (t1, t2, n) right-handed, from the axis least aligned with n. */
function tangents(nx: number, ny: number, nz: number): [number[], number[]] {
  const ax = Math.abs(nx), ay = Math.abs(ny), az = Math.abs(nz);
  const e = ax <= ay && ax <= az ? [1, 0, 0] : ay <= az ? [0, 1, 0] : [0, 0, 1];
  let t1 = [e[1] * nz - e[2] * ny, e[2] * nx - e[0] * nz, e[0] * ny - e[1] * nx];
  const length = Math.hypot(t1[0], t1[1], t1[2]);
  t1 = t1.map((c) => c / length);
  const t2 = [ny * t1[2] - nz * t1[1], nz * t1[0] - nx * t1[2], nx * t1[1] - ny * t1[0]];
  return [t1, t2];
}

/** The linearised wrench generators of each contact: edges, then the soft finger's two twists ([force, torque / L], world frame). */
export function contactWrenches(input: Readonly<GraspQualityInput>, torqueLength: number): number[][][] {
  const { origin, points, normals, friction, contactCount, coneEdges, torsionalFriction } = input;
  const perContact: number[][][] = [];
  for (let i = 0; i < contactCount; i++) {
    const rx = points[3 * i] - origin[0], ry = points[3 * i + 1] - origin[1], rz = points[3 * i + 2] - origin[2];
    const nx = normals[3 * i], ny = normals[3 * i + 1], nz = normals[3 * i + 2];
    const [t1, t2] = tangents(nx, ny, nz);
    const wrench = (fx: number, fy: number, fz: number, spin: number): number[] => [
      fx, fy, fz,
      (ry * fz - rz * fy + spin * nx) / torqueLength,
      (rz * fx - rx * fz + spin * ny) / torqueLength,
      (rx * fy - ry * fx + spin * nz) / torqueLength,
    ];
    const generators: number[][] = [];
    for (let k = 0; k < coneEdges; k++) {
      const angle = (2 * Math.PI * k) / coneEdges;
      const c = friction[i] * Math.cos(angle), s = friction[i] * Math.sin(angle);
      generators.push(wrench(-nx + c * t1[0] + s * t2[0], -ny + c * t1[1] + s * t2[1], -nz + c * t1[2] + s * t2[2], 0));
    }
    if (torsionalFriction > 0) {
      generators.push(wrench(-nx, -ny, -nz, torsionalFriction), wrench(-nx, -ny, -nz, -torsionalFriction));
    }
    perContact.push(generators);
  }
  return perContact;
}

/** Largest length of any generator (dimensionless wrench per unit normal force): the scale of the tolerances. */
function largestWrench(perContact: readonly number[][][]): number {
  let largest = 0;
  for (const generators of perContact) {
    for (const w of generators) {
      let square = 0;
      for (let j = 0; j < D; j++) square += w[j] * w[j];
      if (square > largest) largest = square;
    }
  }
  return Math.sqrt(largest);
}

/** Smallest distance from the origin to a facet of conv(points) and that facet's outward unit normal (6-D); non-positive when the origin is not strictly inside. */
export function nearestFacet(points: readonly number[][]): { distance: number; normal: number[] } {
  const hull = hullFacets(points.flat(), points.length);
  if (hull.count === 0) return { distance: 0, normal: Array.from(hull.flatNormal) };
  let best = 0;
  for (let k = 1; k < hull.count; k++) if (hull.offsets[k] < hull.offsets[best]) best = k;
  return { distance: hull.offsets[best], normal: Array.from(hull.normals.subarray(best * D, best * D + D)) };
}

/** Most face combinations Q_Linf examines (at most about 60 ms of work on a loaded 2-core machine); past it Q_Linf is not computed. */
export const MAX_FACE_COMBINATIONS = 500_000;

/** Face combinations past which Q_L1 is faster by the incremental hull of the union than by its faces. */
const MAX_UNION_FACE_COMBINATIONS = 4_000;

/** Base faces of one contact's generators (vertex indices), from its friction and torsion. */
function contactBaseFaces(input: Readonly<GraspQualityInput>, contact: number): number[][] {
  return baseFaces(input.coneEdges, input.friction[contact] > 0, input.torsionalFriction > 0);
}

/** One contact's set in the enumeration's space: its points (the apex 0 first, then the generators, `size` numbers each, lifted by a trailing 1 when size is 7) and its faces as point lists. */
function contactSet(generators: readonly number[][], size: number, faces: readonly (readonly number[])[]): ContactFaces {
  const points = new Float64Array((generators.length + 1) * size);
  generators.forEach((w, k) => {
    for (let j = 0; j < D; j++) points[(k + 1) * size + j] = w[j];
    if (size === LIFTED) points[(k + 1) * size + D] = 1;
  });
  return { vertices: points, faces };
}

/** Point lists (apex 0, generator k at k + 1) of the cone over each base face: the faces of the lifted cone over the generators (w, 1). */
function coneFaceLists(base: readonly number[][]): number[][] {
  return base.map((vertices) => [0, ...vertices.map((v) => v + 1)]);
}

/** Point lists of the faces of P_i = conv({0} U G_i): each base face of two or more vertices, and the pyramid over every base face. */
function pyramidFaceLists(base: readonly number[][]): number[][] {
  return base.flatMap((vertices) => {
    const face = vertices.map((v) => v + 1);
    return face.length > 1 ? [face, [0, ...face]] : [[0, ...face]];
  });
}

/**
 * Q_L1 from the faces of the union's hull: in the lifted space (w, 1) a facet u . w = c is the
 * linear hyperplane (u, -c), orthogonal to (v, 1) for one vertex v of each contributing base face
 * and to that face's edge directions (v' - v, 0) (the Cayley trick), six rows in all. Every unit u
 * has support max_k u . w_k >= Q_L1, with equality along the nearest facet's normal, so the smallest
 * support over these candidate normals (and their opposites) is Q_L1 without checking that each
 * candidate is a facet. Null when the union spans fewer than five dimensions or past the work cap.
 */
export function unionFaceQuality(input: Readonly<GraspQualityInput>, perContact: readonly number[][][]): { distance: number; normal: number[] } | null {
  const contacts = perContact.map((generators, i) => contactSet(generators, LIFTED, coneFaceLists(contactBaseFaces(input, i))));
  if (countCombinations(contacts, LIFTED - 1) > MAX_UNION_FACE_COMBINATIONS) return null;
  const nearest = new NearestUnionFacet(1e-9 * largestWrench(perContact));
  forEachFaceNormal(contacts, LIFTED, nearest.tolerance, nearest);
  return nearest.found ? { distance: nearest.distance, normal: Array.from(nearest.normal) } : null;
}

/** Keeps the nearest candidate facet of the union's hull from lifted normals (a class, so the search calls one known method and no number is boxed). */
class NearestUnionFacet implements FaceNormalVisitor {
  readonly tolerance: number;
  found = false;
  distance = Infinity;
  readonly normal = new Float64Array(D);

  constructor(tolerance: number) {
    this.tolerance = tolerance;
  }

  visit(lifted: Float64Array, farthest: Float64Array): void {
    let norm = 0;
    for (let j = 0; j < D; j++) norm += lifted[j] * lifted[j];
    // A lifted normal along (0, 1) alone would be a hyperplane at infinity: six rows with 1 in the last place rule it out up to rounding.
    if (norm < 1e-18) return;
    norm = Math.sqrt(norm);
    // The candidate facet u . w = c passes through the chosen faces; a generator (w, 1) of any contact beyond it rules it out.
    const slack = this.tolerance * norm;
    let most = 0;
    for (let i = 0; i < farthest.length; i++) {
      if (farthest[i] > slack) return;
      if (farthest[i] > most) most = farthest[i];
    }
    // u . w = (u, -c) . (w, 1) + c, and the apex 0 of every cone counts as reaching 0.
    most -= lifted[D];
    const distance = most / norm;
    if (!this.found || distance < this.distance) {
      this.found = true;
      this.distance = distance;
      for (let j = 0; j < D; j++) this.normal[j] = lifted[j] / norm;
    }
  }
}

/** Keeps the candidate normal of least support of the Minkowski sum: each contact reaches at least its apex 0, so the support is sum_i max(0, max_k u . w_ik). */
class LeastSumSupport implements FaceNormalVisitor {
  found = false;
  distance = Infinity;
  readonly normal = new Float64Array(D);

  visit(u: Float64Array, farthest: Float64Array): void {
    let support = 0;
    for (let i = 0; i < farthest.length; i++) support += farthest[i];
    if (support < this.distance) {
      this.found = true;
      this.distance = support;
      this.normal.set(u);
    }
  }
}

/** Q_Linf by faces: its value, the facet normal and the number of face combinations it took (or would have taken, when over the cap). */
export interface SumFaceQuality {
  distance: number | null;
  normal: number[] | null;
  combinations: number;
}

/** Q_Linf and its facet's outward unit normal (6-D, [force, torque / L], world frame) from the contacts' face lattices, or null past MAX_FACE_COMBINATIONS. */
export function nearestSumFacet(input: Readonly<GraspQualityInput>, perContact: readonly number[][][]): SumFaceQuality {
  const scale = largestWrench(perContact);
  const contacts = perContact.map((generators, i) => contactSet(generators, D, pyramidFaceLists(contactBaseFaces(input, i))));
  const combinations = countCombinations(contacts, D - 1);
  if (combinations > MAX_FACE_COMBINATIONS) return { distance: null, normal: null, combinations };
  const least = new LeastSumSupport();
  forEachFaceNormal(contacts, D, 1e-9 * scale, least);
  return least.found ? { distance: least.distance, normal: Array.from(least.normal), combinations } : { distance: null, normal: null, combinations };
}

/** Face combinations by contact models (cone edges, then per contact whether it has friction, and whether fingers are soft): they depend on nothing else. */
const faceCombinationCounts = new Map<string, number>();

/** Face combinations of Q_Linf's face search for these contacts (the count reported beside Q_Linf, whichever route computed it). */
function sumFaceCombinations(input: Readonly<GraspQualityInput>): number {
  const models = Array.from({ length: input.contactCount }, (_, i) => (input.friction[i] > 0 ? 'f' : '0')).join('');
  const key = `${input.coneEdges}:${models}:${input.torsionalFriction > 0}`;
  let count = faceCombinationCounts.get(key);
  if (count === undefined) {
    count = countCombinations(Array.from({ length: input.contactCount }, (_, i) => ({ faces: pyramidFaceLists(contactBaseFaces(input, i)) })), D - 1);
    faceCombinationCounts.set(key, count);
  }
  return count;
}

/** Each contact's cone edges (forces, unit normal push), outward normal and lever (x_i - p) / L, for the route of three point contacts. */
export function forceCones(input: Readonly<GraspQualityInput>, torqueLength: number, perContact: readonly number[][][]): ForceCone[] {
  const { origin, points, normals } = input;
  return perContact.map((generators, i) => ({
    edges: generators.map((w) => Float64Array.of(w[0], w[1], w[2])),
    normal: Float64Array.of(normals[3 * i], normals[3 * i + 1], normals[3 * i + 2]),
    lever: Float64Array.from([0, 1, 2], (t) => (points[3 * i + t] - origin[t]) / torqueLength),
  }));
}

/** Three point contacts, each with friction: the contact model the force-cone route covers. */
export function threePointContacts(input: Readonly<GraspQualityInput>): boolean {
  if (input.contactCount !== 3 || input.torsionalFriction > 0) return false;
  for (let i = 0; i < 3; i++) if (!(input.friction[i] > 0)) return false;
  return true;
}

const AXES = ['x', 'y', 'z'];
const MINUS = '\u2212';

/** A 3-vector's direction in words: "+z" when within about 25 degrees of an axis, else its rounded unit components. */
function directionWords(v: readonly number[]): string {
  const length = Math.hypot(v[0], v[1], v[2]);
  const unit = v.map((c) => c / length);
  const axis = unit.reduce((best, c, j) => (Math.abs(c) > Math.abs(unit[best]) ? j : best), 0);
  if (Math.abs(unit[axis]) >= 0.9) return `${unit[axis] > 0 ? '+' : MINUS}${AXES[axis]}`;
  const shown = unit.map((c) => {
    const rounded = Number(c.toFixed(2));
    return rounded === 0 ? '0' : rounded < 0 ? `${MINUS}${-rounded}` : String(rounded);
  });
  return `(${shown.join(', ')})`;
}

/** The external wrench [force, torque / L] in words: its larger part first, the other named when it is at least a third of it. */
export function describeWrench(wrench: ArrayLike<number>): string {
  const force = [wrench[0], wrench[1], wrench[2]], torque = [wrench[3], wrench[4], wrench[5]];
  const f = Math.hypot(...force), t = Math.hypot(...torque);
  const push = `a push along ${directionWords(force)}`, twist = `a twist about ${directionWords(torque)}`;
  if (f >= t) return t >= f / 3 ? `${push} with ${twist}` : push;
  return f >= t / 3 ? `${twist} with ${push}` : twist;
}

/** Ferrari-Canny quality Q_L1 and Q_Linf, force closure and the weakest external wrench of the contacts given (world frame; dimensionless qualities, L in m). */
export function computeGraspQuality(input: Readonly<GraspQualityInput>): GraspQuality {
  const { origin, points, contactCount, coneEdges } = input;
  let farthest = 0;
  for (let i = 0; i < contactCount; i++) {
    farthest = Math.max(farthest, Math.hypot(points[3 * i] - origin[0], points[3 * i + 1] - origin[1], points[3 * i + 2] - origin[2]));
  }
  // Contacts at the origin itself carry no torque; any positive L then gives the same qualities.
  const torqueLength = input.torqueLength ?? (farthest > 0 ? farthest : 1);
  const perContact = contactWrenches(input, torqueLength);
  const union = perContact.flat();
  const weakestWrench = new Float64Array(D);
  if (union.length === 0) {
    weakestWrench[0] = 1;
    return { contactCount, coneEdges, torqueLength, forceClosure: false, sumQuality: 0, maxQuality: 0, maxQualityCombinations: 0, weakestWrench, weakestWords: 'no contact: every push is unresisted' };
  }
  const scale = largestWrench(perContact);
  // Three point contacts with friction take the force-cone route when it applies (force closure, contacts far from dependent).
  const three = threePointContacts(input) ? threeContactQualities(forceCones(input, torqueLength, perContact), perContact, scale, FORCE_CLOSURE_TOLERANCE) : null;
  const sum = three?.sum ?? unionFaceQuality(input, perContact) ?? nearestFacet(union);
  const forceClosure = sum.distance > FORCE_CLOSURE_TOLERANCE * scale;
  // Adding 0 turns -0 into 0, so a reported wrench never shows a negative zero.
  for (let j = 0; j < D; j++) weakestWrench[j] = -sum.normal[j] + 0;
  // Q_L1 <= Q_Linf <= k Q_L1, so without force closure Q_Linf is 0 as well.
  const sumByFaces = three ? { distance: three.max.distance, combinations: sumFaceCombinations(input) } : forceClosure ? nearestSumFacet(input, perContact) : null;
  const maxQuality = sumByFaces === null ? 0 : sumByFaces.distance === null ? null : Math.max(0, sumByFaces.distance);
  const words = describeWrench(weakestWrench);
  return {
    contactCount,
    coneEdges,
    torqueLength,
    forceClosure,
    sumQuality: forceClosure ? sum.distance : 0,
    maxQuality,
    maxQualityCombinations: sumByFaces?.combinations ?? 0,
    weakestWrench,
    weakestWords: forceClosure ? `${words} is resisted worst` : `${words} is not resisted at all`,
  };
}
