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
 */
import { hullFacets } from './wrench-hull';

/** Wrench-space dimension: force (3) and torque over L (3). */
const D = 6;

/** Relative size below which a hull distance counts as zero: the grasp is then not force closure. */
export const FORCE_CLOSURE_TOLERANCE = 1e-5;

/** Largest number of points in the Minkowski sum for Q_Linf; past it the hull takes more than about 0.2 s (the count grows as (edges + 1)^contacts). */
export const MAX_MINKOWSKI_POINTS = 130;

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
  /** Q_Linf: ball radius in the Minkowski sum of the contacts' wrench sets (each normal force at most 1); null when that sum has more than MAX_MINKOWSKI_POINTS points. */
  maxQuality: number | null;
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

/** Smallest distance from the origin to a facet of conv(points) and that facet's outward unit normal (6-D); non-positive when the origin is not strictly inside. */
export function nearestFacet(points: readonly number[][]): { distance: number; normal: number[] } {
  const hull = hullFacets(points.flat(), points.length);
  if (hull.count === 0) return { distance: 0, normal: Array.from(hull.flatNormal) };
  let best = 0;
  for (let k = 1; k < hull.count; k++) if (hull.offsets[k] < hull.offsets[best]) best = k;
  return { distance: hull.offsets[best], normal: Array.from(hull.normals.subarray(best * D, best * D + D)) };
}

/** Points of the Minkowski sum of conv{0, generators} over the contacts, or null past MAX_MINKOWSKI_POINTS. */
function minkowskiPoints(perContact: readonly number[][][]): number[][] | null {
  const total = perContact.reduce((product, generators) => product * (generators.length + 1), 1);
  if (total > MAX_MINKOWSKI_POINTS) return null;
  let sums: number[][] = [new Array<number>(D).fill(0)];
  for (const generators of perContact) {
    const next: number[][] = [];
    for (const s of sums) {
      next.push(s);
      for (const g of generators) next.push(s.map((x, j) => x + g[j]));
    }
    sums = next;
  }
  return sums;
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
    return { contactCount, coneEdges, torqueLength, forceClosure: false, sumQuality: 0, maxQuality: 0, weakestWrench, weakestWords: 'no contact: every push is unresisted' };
  }
  const scale = union.reduce((m, w) => Math.max(m, Math.hypot(...w)), 0);
  const sum = nearestFacet(union);
  const forceClosure = sum.distance > FORCE_CLOSURE_TOLERANCE * scale;
  // Adding 0 turns -0 into 0, so a reported wrench never shows a negative zero.
  for (let j = 0; j < D; j++) weakestWrench[j] = -sum.normal[j] + 0;
  const minkowski = minkowskiPoints(perContact);
  const maxQuality = minkowski === null ? null : forceClosure ? Math.max(0, nearestFacet(minkowski).distance) : 0;
  const words = describeWrench(weakestWrench);
  return {
    contactCount,
    coneEdges,
    torqueLength,
    forceClosure,
    sumQuality: forceClosure ? sum.distance : 0,
    maxQuality,
    weakestWrench,
    weakestWords: forceClosure ? `${words} is resisted worst` : `${words} is not resisted at all`,
  };
}
