/**
 * Hand templates (our own layouts) and new sheets built from them. Every finger is the chain
 * base (swings the finger toward the object) -> pivot (steers the roller about the contact
 * normal, axis through the roller centre) -> roll (spins the roller about an axis through its
 * centre). The palm lies in the plane z = 0 and the object sits centred above it on the z axis.
 */
import { closestSurfacePoint, shapeFromInput, signedDistance, support, vec3, type ConvexShape } from '../kinematics';
import { DEFAULT_RUN, DEFAULT_SOLVER, SHEET_FORMAT, SHEET_VERSION } from './sheet-constants';
import type { FingerInput, JointInput, ObjectShape, SheetDocument, Vec3Tuple } from './types';

const deg = Math.PI / 180;

export type TemplateRoller = { kind: 'sphere'; radius: number } | { kind: 'cylinder'; radius: number; halfWidth: number };

export interface FingerTemplate {
  name: string;
  /** Direction of the finger around the palm, rad from +x toward +y. */
  azimuth: number;
  /** Direction of the contact seen from the object centre, rad above (+) or below (-) the horizontal. */
  elevation: number;
  /** Distance of the base joint from the palm centre, m. */
  palmRadius: number;
  /** Height of the base joint above the palm, m. */
  baseHeight: number;
  roller: TemplateRoller;
  /** Base joint travel either side of home, rad. */
  baseTravel: number;
  /** Pivot joint travel either side of home, rad. */
  pivotTravel: number;
  /** Rate limits of base, pivot and roll, rad/s. */
  rateLimits: { base: number; pivot: number; roll: number };
}

export interface HandTemplate {
  id: string;
  name: string;
  description: string;
  fingers: FingerTemplate[];
  /** Preferred height of the object centre above the palm, m (raised if the object would touch the palm). */
  graspHeight: number;
}

const sphere = (radius: number): TemplateRoller => ({ kind: 'sphere', radius });
const wheel = (radius: number, halfWidth: number): TemplateRoller => ({ kind: 'cylinder', radius, halfWidth });

function finger(
  name: string,
  azimuthDeg: number,
  elevationDeg: number,
  palmRadius: number,
  baseHeight: number,
  roller: TemplateRoller,
): FingerTemplate {
  return {
    name,
    azimuth: azimuthDeg * deg,
    elevation: elevationDeg * deg,
    palmRadius,
    baseHeight,
    roller,
    baseTravel: 35 * deg,
    pivotTravel: 120 * deg,
    rateLimits: { base: 2.5, pivot: 6, roll: 25 },
  };
}

export const HAND_TEMPLATES: readonly HandTemplate[] = [
  {
    id: 'duo-opposed',
    name: 'Duo opposed',
    description: 'Two fingers facing each other across a 45 mm palm, 14 mm ball rollers, contacts on the equator.',
    graspHeight: 0.085,
    fingers: [finger('left', 180, 0, 0.045, 0.012, sphere(0.014)), finger('right', 0, 0, 0.045, 0.012, sphere(0.014))],
  },
  {
    id: 'tri-radial',
    name: 'Tri radial',
    description: 'Three fingers 120 degrees apart on a 55 mm palm, 12 mm ball rollers cradling the part slightly below its equator.',
    graspHeight: 0.09,
    fingers: [
      finger('north', 90, -15, 0.055, 0.01, sphere(0.012)),
      finger('southwest', 210, -15, 0.055, 0.01, sphere(0.012)),
      finger('southeast', 330, -15, 0.055, 0.01, sphere(0.012)),
    ],
  },
  {
    id: 'quad-cross',
    name: 'Quad cross',
    description:
      'Four fingers on a cross over a 60 mm palm with 10 mm wheel rollers; the east-west pair sits low, the north-south pair high.',
    graspHeight: 0.095,
    fingers: [
      finger('east', 0, -10, 0.06, 0.008, wheel(0.01, 0.006)),
      finger('north', 90, 10, 0.06, 0.02, wheel(0.01, 0.006)),
      finger('west', 180, -10, 0.06, 0.008, wheel(0.01, 0.006)),
      finger('south', 270, 10, 0.06, 0.02, wheel(0.01, 0.006)),
    ],
  },
  {
    id: 'penta-fan',
    name: 'Penta fan',
    description:
      'Four fingers fanned over 84 degrees on a 65 mm rim with 9 mm ball rollers, opposed by a low 16 mm thumb roller on a 50 mm radius.',
    graspHeight: 0.1,
    fingers: [
      finger('thumb', 180, -20, 0.05, 0.006, sphere(0.016)),
      finger('fan-1', -42, 5, 0.065, 0.015, sphere(0.009)),
      finger('fan-2', -14, 12, 0.065, 0.018, sphere(0.009)),
      finger('fan-3', 14, 12, 0.065, 0.018, sphere(0.009)),
      finger('fan-4', 42, 5, 0.065, 0.015, sphere(0.009)),
    ],
  },
];

/** The template with this id; throws a RangeError naming the known ids otherwise. */
export function getHandTemplate(templateId: string): HandTemplate {
  const template = HAND_TEMPLATES.find((t) => t.id === templateId);
  if (!template) {
    throw new RangeError(`unknown hand template "${templateId}"; known: ${HAND_TEMPLATES.map((t) => t.id).join(', ')}`);
  }
  return template;
}

const tuple = (v: ArrayLike<number>): Vec3Tuple => [v[0], v[1], v[2]];

/** Rounds away floating-point dust (such as 6e-17 for cos 90 deg) so that sheets read cleanly. */
function tidy(v: ArrayLike<number>, decimals: number): Vec3Tuple {
  const factor = 10 ** decimals;
  return [0, 1, 2].map((i) => Math.round(v[i] * factor) / factor + 0) as Vec3Tuple;
}

/** Distance t along unit direction u (object frame) at which the surface distance equals clearance, m. */
function rayDistanceAtClearance(shape: ConvexShape, u: Vec3Tuple, clearance: number): number {
  let inside = 0;
  let outside = vec3.dot(support(shape, u), u) + clearance;
  // The signed distance of a convex body is convex, so along a ray from its centre it only grows.
  for (let i = 0; i < 80; i++) {
    const mid = 0.5 * (inside + outside);
    if (signedDistance(shape, vec3.scale(u, mid)) < clearance) inside = mid;
    else outside = mid;
  }
  return outside;
}

/** Height of the object centre above the palm for this template and shape, m. */
export function objectHeightFor(template: HandTemplate, objectShape: ObjectShape): number {
  const below = -support(shapeFromInput(objectShape), [0, 0, -1])[2];
  const palmClearance = 0.015;
  return Math.max(template.graspHeight, below + palmClearance);
}

/** A finger of the template placed so that its roller touches the object at rest (palm frame, m). */
function placeFinger(spec: FingerTemplate, shape: ConvexShape, objectCenter: Vec3Tuple): FingerInput {
  const u: Vec3Tuple = [
    Math.cos(spec.elevation) * Math.cos(spec.azimuth),
    Math.cos(spec.elevation) * Math.sin(spec.azimuth),
    Math.sin(spec.elevation),
  ];
  const rho = spec.roller.radius;
  const localCenter = vec3.scale(u, rayDistanceAtClearance(shape, u, rho));
  const normal = tuple(closestSurfacePoint(shape, localCenter).normal);
  const center = tidy(localCenter.map((c, i) => c + objectCenter[i]), 9);
  // Base axis horizontal and across the finger, so the base swings the roller along the normal;
  // on a flat top or bottom face the normal is vertical and the finger direction decides instead.
  const across = vec3.cross([0, 0, 1], normal);
  const sideways = vec3.normalize(vec3.norm(across) > 1e-6 ? across : [-u[1], u[0], 0]);
  const rollAxis = tidy(vec3.normalize(vec3.cross(normal, sideways)), 12);
  const basePoint = tidy([spec.palmRadius * Math.cos(spec.azimuth), spec.palmRadius * Math.sin(spec.azimuth), spec.baseHeight], 9);
  const joint = (name: string, role: JointInput['role'], axis: Vec3Tuple, point: Vec3Tuple, travel: number | null, rate: number): JointInput => {
    const j: JointInput = { name, role, axis, point, angle: 0, rateLimit: rate };
    if (travel !== null) j.limits = { min: -travel, max: travel };
    return j;
  };
  return {
    name: spec.name,
    joints: [
      joint(`${spec.name}-base`, 'base', tidy(sideways, 12), basePoint, spec.baseTravel, spec.rateLimits.base),
      joint(`${spec.name}-pivot`, 'pivot', tidy(vec3.scale(normal, -1), 12), center, spec.pivotTravel, spec.rateLimits.pivot),
      joint(`${spec.name}-roll`, 'roll', rollAxis, center, null, spec.rateLimits.roll),
    ],
    roller:
      spec.roller.kind === 'sphere'
        ? { kind: 'sphere', radius: rho, center }
        : { kind: 'cylinder', radius: rho, halfWidth: spec.roller.halfWidth, center, axis: rollAxis },
  };
}

/** The template's hand with every roller touching the object centred at objectCenter (palm frame, m). */
export function createHandFromTemplate(
  templateId: string,
  objectShape: ObjectShape,
  objectCenter: Vec3Tuple,
): SheetDocument['hand'] {
  const template = getHandTemplate(templateId);
  const shape = shapeFromInput(objectShape);
  return { name: template.name, fingers: template.fingers.map((spec) => placeFinger(spec, shape, objectCenter)) };
}

/** A new sheet (SI) with the template's hand in contact with the object, which spins slowly about z toward a 45 degree turn. */
export function createSheetFromTemplate(templateId: string, objectShape: ObjectShape): SheetDocument {
  const template = getHandTemplate(templateId);
  const objectCenter: Vec3Tuple = [0, 0, objectHeightFor(template, objectShape)];
  const halfTurn = 22.5 * deg;
  return {
    format: SHEET_FORMAT,
    version: SHEET_VERSION,
    title: `${template.name} on a ${objectShape.kind}`,
    description: template.description,
    tags: [template.id, objectShape.kind],
    object: {
      shape: objectShape,
      pose: { position: objectCenter, orientation: { w: 1, x: 0, y: 0, z: 0 } },
      twist: { linear: [0, 0, 0], angular: [0, 0, 0.2] },
    },
    hand: createHandFromTemplate(templateId, objectShape, objectCenter),
    motion: {
      target: { position: objectCenter, orientation: { w: Math.cos(halfTurn), x: 0, y: 0, z: Math.sin(halfTurn) } },
      run: { ...DEFAULT_RUN },
    },
    solver: { ...DEFAULT_SOLVER },
  };
}
