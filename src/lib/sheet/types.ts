import type { DisplayUnits } from './display-units';
/**
 * The parsed sheet document (format version 1) as the kinematics core consumes it.
 * Every quantity is in SI units (m, rad, s) and every vector is in the palm (world) frame
 * unless its name says otherwise. The zod schema in `schema.ts` produces exactly this shape.
 */

export type Vec3Tuple = [number, number, number];

/** Unit quaternion, scalar first, as written in sheet documents. */
export interface QuaternionInput {
  w: number;
  x: number;
  y: number;
  z: number;
}

export type ObjectShape =
  | { kind: 'sphere'; radius: number }
  | { kind: 'box'; halfExtents: Vec3Tuple; filletRadius: number }
  | { kind: 'cylinder'; radius: number; halfLength: number }
  | { kind: 'capsule'; radius: number; halfLength: number }
  | { kind: 'ellipsoid'; semiAxes: Vec3Tuple };

export interface Pose {
  position: Vec3Tuple;
  orientation: QuaternionInput;
}

export interface Twist {
  /** Velocity of the object origin, m/s, world frame. */
  linear: Vec3Tuple;
  /** Angular velocity, rad/s, world frame. */
  angular: Vec3Tuple;
  /** The twist as written, when it was given in the object frame or about another point than the object origin; linear and angular above are converted from it. */
  entered?: TwistEntry;
}

/** The frame a twist or a point is written in: the palm (world) frame or the object's own frame. */
export type EntryFrame = 'palm' | 'object';

/**
 * A twist as written: the velocity of point `about` (m/s) and the angular velocity (rad/s), all three in `frame`; `about` in the object frame
 * is relative to the object origin. With `contact`, the sheet named a finger's contact as the point and `about` is where that contact was found.
 */
export interface TwistEntry {
  frame: EntryFrame;
  about: Vec3Tuple;
  /** Name of the finger whose contact point the twist was written about. */
  contact?: string;
  linear: Vec3Tuple;
  angular: Vec3Tuple;
}

/**
 * The joint rates a sheet sends to the controller: 'steer-and-roll' for every finger with a base, a pivot and a roll
 * joint (the full solution for any other finger), or 'full' (the damped least-squares rates) for every finger.
 */
export type CommandedSolution = 'steer-and-roll' | 'full';

/** The object's acceleration for the feed-forward, palm frame; absent means zero. */
export interface ObjectAcceleration {
  /** Acceleration of the object origin, m/s^2, world frame. */
  linear: Vec3Tuple;
  /** Angular acceleration, rad/s^2, world frame. */
  angular: Vec3Tuple;
}

export type JointRole = 'base' | 'pivot' | 'roll' | 'other';

export interface JointInput {
  name: string;
  role: JointRole;
  /** Unit axis at the home configuration, palm frame. */
  axis: Vec3Tuple;
  /** A point on the axis at the home configuration, palm frame, m. */
  point: Vec3Tuple;
  /** Current joint angle, rad (0 = home). */
  angle: number;
  /** Joint limits, rad; absent = unlimited. */
  limits?: { min: number; max: number };
  /** Largest joint speed, rad/s; absent = unlimited. */
  rateLimit?: number;
}

/** Roller geometry at the home configuration, palm frame (the last link's frame at home). */
export type RollerInput =
  | { kind: 'sphere'; radius: number; center: Vec3Tuple }
  | { kind: 'cylinder'; radius: number; halfWidth: number; center: Vec3Tuple; axis: Vec3Tuple };

export interface FingerInput {
  name: string;
  joints: JointInput[];
  roller: RollerInput;
  /** Coulomb friction coefficient at this finger's contact (dimensionless); absent = DEFAULT_FRICTION. */
  friction?: number;
}

/** How the grasp quality under friction is computed; absent = every default. */
export interface GraspQualitySettings {
  /** Edges of each linearised friction cone (3 to 32). */
  coneEdges: number;
  /** Torsional friction gamma of a soft finger (solver.softFinger), m: the twist about the normal per unit normal force. */
  torsionalFriction: number;
  /** Characteristic length L dividing torques, m; absent = the largest contact distance from the object origin. */
  torqueLength?: number;
}

export interface SolverSettings {
  /** Damping of the damped least-squares solve, m (added as lambda^2 to J J^T). */
  damping: number;
  /** Ratio sigma_min / sigma_max below which the contact Jacobian counts as near rank loss. */
  singularRatio: number;
  /** Contact-to-axis distance below which a roll or pivot axis warning is raised, m. */
  axisDistance: number;
  /** Tangential contact speed below which the steer direction is undefined, m/s. */
  minTangentialSpeed: number;
  /** Gap magnitude within which a contact counts as touching, m. */
  contactTolerance: number;
  /** Add the no-spin-about-the-normal row (soft-finger contact). */
  softFinger: boolean;
}

export interface RunSettings {
  /** Fraction of the pose error commanded as twist per second, 1/s. */
  gain: number;
  /** Tick length, s. */
  dt: number;
  maxTicks: number;
  /** Convergence thresholds. */
  positionTolerance: number;
  angleTolerance: number;
  stopOnSingular: boolean;
  /** Seeded sensor noise on the measured pose (standard deviations, m and rad); absent = none. */
  noise?: { seed: number; position: number; angle: number };
}

export interface SweepSettings {
  /** JSON pointer of the numeric input to vary, e.g. "/hand/fingers/0/roller/radius". */
  path: string;
  from: number;
  to: number;
  steps: number;
}

/** A rotation metric of Huynh (2009), as ROTATION_METRICS names them. */
export type RotationMetricKey = 'phi2' | 'phi3' | 'phi4' | 'phi5' | 'phi6';

/** One target of a test matrix: a rotation applied to the start orientation (palm frame), with the group its statistics go to. */
export interface MatrixTarget {
  orientation: QuaternionInput;
  group?: string;
}

/** One start pose of a test matrix: the object orientation to start from (palm frame); the position and joint angles are the sheet's. */
export interface MatrixStart {
  orientation: QuaternionInput;
  label?: string;
}

/** Targets made by rule: count axes spread evenly over the sphere, each turned by angle (rad), or count uniformly random rotations from a seed. */
export type MatrixGenerator =
  | { kind: 'spread-axes'; count: number; angle: number; group?: string }
  | { kind: 'random'; count: number; seed: number; group?: string };

/** A test matrix: every target run from every start pose (none = the sheet's object pose) toward convergence, errors reported by metric. */
export interface MatrixSettings {
  targets: MatrixTarget[];
  starts: MatrixStart[];
  generators: MatrixGenerator[];
  metric: RotationMetricKey;
}

export interface SheetDocument {
  format: 'slipless.sheet';
  version: 1;
  title: string;
  description: string;
  tags: string[];
  object: { shape: ObjectShape; pose: Pose; twist: Twist; acceleration?: ObjectAcceleration };
  hand: { name: string; fingers: FingerInput[] };
  motion: { target: Pose; run: RunSettings };
  sweep?: SweepSettings;
  /** Target orientations, start poses and generators of a test matrix; absent = no matrix. */
  matrix?: MatrixSettings;
  solver: SolverSettings;
  graspQuality?: GraspQualitySettings;
  /** Which solution's joint rates are commanded; absent = 'steer-and-roll', what runs followed before the choice existed. */
  commanded?: CommandedSolution;
  /** Source text of the sheet's named quantities ("rollerRadius = 14 mm" per line); already applied to every field. */
  variables?: string;
  /** Notes in Markdown with $math$. */
  notes?: string;
  /** The units the sheet's numbers are shown in (results, derivation, comparison, report); absent means the defaults. */
  display?: DisplayUnits;
}
