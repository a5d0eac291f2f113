/**
 * The sheet document format, version 1: a zod schema whose parsed output is exactly
 * `SheetDocument` (every quantity in SI, every unit quaternion checked, defaults filled in).
 */
import { DEFAULT_CONE_EDGES, DEFAULT_FRICTION } from '../kinematics';
import { z } from '../validation/zod';
import type {
  CommandedSolution,
  FingerInput,
  GraspQualitySettings,
  JointInput,
  MatrixGenerator,
  MatrixSettings,
  ObjectAcceleration,
  ObjectShape,
  Pose,
  QuaternionInput,
  RollerInput,
  RunSettings,
  SheetDocument,
  SolverSettings,
  SweepSettings,
  Twist,
  Vec3Tuple,
} from './types';
import { ANGLE_UNITS, ANGULAR_SPEED_UNITS, DEFAULT_DISPLAY_UNITS, LENGTH_UNITS, type DisplayUnits } from './display-units';
import {
  createExpressionBudget,
  expressionOperations,
  MAX_EXPRESSION_LENGTH,
  QUANTITY_KINDS,
  parseQuantity,
  readSheetVariables,
  type ExpressionBudget,
  type QuantityKind,
  type VariableScope,
} from './units';
import { twistAboutContact, twistAboutOrigin } from './twist-entry';
import { createDocumentTrail, formatIssuePath, getAt, type DocumentTrail } from './document-path';
import { COMMANDED_SOLUTIONS, DEFAULT_COMMANDED, DEFAULT_RUN, DEFAULT_SOLVER, ROTATION_METRIC_KEYS, SHEET_FORMAT, SHEET_VERSION, commandedSolutionOf } from './sheet-constants';

export { formatIssuePath, COMMANDED_SOLUTIONS, DEFAULT_COMMANDED, DEFAULT_RUN, DEFAULT_SOLVER, ROTATION_METRIC_KEYS, SHEET_FORMAT, SHEET_VERSION, commandedSolutionOf };

/** Largest deviation of |q| from 1 accepted without `normalize: true`. */
export const QUATERNION_NORM_TOLERANCE = 1e-6;
export const MAX_FINGERS = 8;
export const MAX_JOINTS_PER_FINGER = 12;
const MIN_AXIS_NORM = 1e-12;
const MISSING = 'required field is missing';

/** Largest friction coefficient accepted: past 5 a contact holds by adhesion, not Coulomb friction. */
export const MAX_FRICTION = 5;
export const MIN_CONE_EDGES = 3;
export const MAX_CONE_EDGES = 32;
/**
 * Most friction-cone generators (cone edges, plus two twists per soft finger with torsional
 * friction) over all fingers: the wrench hull's facets grow steeply with them, and 96 keep one
 * evaluation within a few tenths of a second.
 */
export const MAX_CONE_GENERATORS = 96;
export const DEFAULT_GRASP_QUALITY: GraspQualitySettings = { coneEdges: DEFAULT_CONE_EDGES, torsionalFriction: 0 };

/**
 * Error text for a field: "required" when it is absent, the given expectation for a wrong type;
 * a passed limit keeps the common message, which states the limit.
 */
function expect(text: string) {
  return (issue: { input?: unknown; code?: string }) => {
    if (issue.input === undefined) return MISSING;
    return issue.code === 'too_big' || issue.code === 'too_small' ? undefined : text;
  };
}

/** A number for messages: six significant digits. */
const shown = (value: number) => String(Number(value.toPrecision(6)));

const IDENTITY: QuaternionInput = { w: 1, x: 0, y: 0, z: 0 };

function quantityText(kind: Exclude<QuantityKind, 'any'>): string {
  const { noun, si, example } = QUANTITY_KINDS[kind];
  const siShown = kind === 'rate' ? '1/s' : si;
  return `${noun}: a number in ${siShown} or a string with a unit such as "${example}"`;
}

/** Names and descriptions of the schema parts, used for the JSON Schema export ($defs and descriptions). */
export const sheetSchemaMetadata = z.registry<{ id?: string; description: string }>();

function named<T extends z.ZodType>(schema: T, id: string | undefined, description: string): T {
  sheetSchemaMetadata.add(schema, id === undefined ? { description } : { id, description });
  return schema;
}

export const MAX_VARIABLES_TEXT = 20_000;
export const MAX_NOTES_TEXT = 100_000;
export const MAX_DESCRIPTION_TEXT = 20_000;

/**
 * The variables of the sheet being read and what is left of its operations. zod has no
 * per-parse context, so parseSheet sets these for the duration of one synchronous parse and
 * the quantity fields read them.
 */
let activeVariables: VariableScope | undefined;
let activeBudget: ExpressionBudget | undefined;

const capitalised = (text: string) => text[0].toUpperCase() + text.slice(1);

/** Largest length accepted, in m: a hand and everything it holds fit within 10 m of the palm. */
export const MAX_LENGTH = 10;
/** Largest speed accepted, in m/s: 100 m/s is far past any motion of an object held in a hand. */
export const MAX_SPEED = 100;
/** Largest angular speed accepted, in rad/s (about 95 000 rpm): faster than the fastest small motors. */
export const MAX_ANGULAR_SPEED = 10_000;
/** Largest acceleration accepted, in m/s^2 (about 1000 g): far past anything a hand does to an object it holds. */
export const MAX_ACCELERATION = 10_000;
/** Largest angular acceleration accepted, in rad/s^2: a drive reaching the largest angular speed within 10 ms. */
export const MAX_ANGULAR_ACCELERATION = 1e6;
/** Longest time step accepted, in s: a closed-loop tick longer than an hour controls nothing. */
export const MAX_TIME = 3600;
/** Largest rate (loop gain) accepted, in 1/s: a million per second is past any control loop's bandwidth. */
export const MAX_RATE = 1e6;
/**
 * Largest angle magnitude accepted, in rad (about 160 turns): a continuous roll joint may carry several turns,
 * while past this a double spaces angles by more than 1e-13 rad and their sines lose digits.
 */
export const MAX_ANGLE = 1000;
/** Largest angle tolerance or angle noise accepted, in rad: no orientation error exceeds pi rad, so a larger one means nothing. */
export const MAX_ANGLE_TOLERANCE = Math.PI;
/** Most values of a sweep: each is a full solve, and 1000 already resolves any curve a sheet can show. */
export const MAX_SWEEP_STEPS = 1000;
/**
 * Largest damping accepted, in m: its square is added to J Jᵀ, whose entries are squared lever
 * arms of a hand (well under 1 m²); more damping drowns every joint rate toward zero.
 */
export const MAX_DAMPING = 1;

/** The magnitude limit of each kind of quantity field; any quantity (sweep ends) is checked where it is used. */
const KIND_LIMITS: Record<Exclude<QuantityKind, 'any'>, number> = {
  length: MAX_LENGTH,
  angle: MAX_ANGLE,
  speed: MAX_SPEED,
  angularSpeed: MAX_ANGULAR_SPEED,
  acceleration: MAX_ACCELERATION,
  angularAcceleration: MAX_ANGULAR_ACCELERATION,
  time: MAX_TIME,
  rate: MAX_RATE,
};

interface QuantityRange {
  /** Refuse 0 and below (strict) or below 0. */
  bound?: { min: 0; strict: boolean };
  /** Largest magnitude; by default the limit of the kind. */
  max?: number;
}

function quantity(kind: QuantityKind, id: string, range: QuantityRange = {}) {
  const text = kind === 'any' ? 'a quantity: a number in SI units or a string with a unit' : quantityText(kind);
  const read = z
    // An empty text is a field added but not yet filled ("Add rate limit"): required, like a missing one.
    .union([z.number(), z.string().trim().min(1, { error: MISSING }).max(MAX_EXPRESSION_LENGTH)], { error: expect(`expected ${text}`) })
    .transform((value, ctx) => {
      const result = parseQuantity(value, kind, activeVariables, activeBudget);
      if (!result.ok) {
        ctx.addIssue({ code: 'custom', message: result.message, input: value });
        return z.NEVER;
      }
      return result.value;
    });
  const unit = kind === 'any' ? '' : kind === 'rate' ? '1/s' : QUANTITY_KINDS[kind].si;
  const max = range.max ?? (kind === 'any' ? undefined : KIND_LIMITS[kind]);
  const { bound } = range;
  if (!bound && max === undefined) return named(read, id, capitalised(text));
  let checked = z.number();
  if (bound) {
    checked = bound.strict
      ? checked.gt(0, { error: `must be greater than 0 ${unit}` })
      : checked.gte(0, { error: `must not be negative (${unit})` });
  }
  const parts = [capitalised(text)];
  if (bound) parts.push(bound.strict ? 'greater than 0' : 'not negative');
  if (max !== undefined) {
    const limit = `${shown(max)} ${unit}`;
    checked = bound
      ? checked.lte(max, { error: `must be at most ${limit}` })
      : checked.gte(-max, { error: `must lie between -${limit} and ${limit}` }).lte(max, { error: `must lie between -${limit} and ${limit}` });
    parts.push(bound ? `at most ${limit}` : `between -${limit} and ${limit}`);
  }
  return named(read.pipe(checked), id, parts.join('; '));
}

const positive = { bound: { min: 0, strict: true } } as const;
const nonNegative = { bound: { min: 0, strict: false } } as const;

const length = quantity('length', 'Length');
const positiveLength = quantity('length', 'PositiveLength', positive);
const nonNegativeLength = quantity('length', 'NonNegativeLength', nonNegative);
const damping = quantity('length', 'Damping', { ...nonNegative, max: MAX_DAMPING });
const angle = quantity('angle', 'Angle');
const positiveAngle = quantity('angle', 'PositiveAngle', { ...positive, max: MAX_ANGLE_TOLERANCE });
const nonNegativeAngle = quantity('angle', 'NonNegativeAngle', { ...nonNegative, max: MAX_ANGLE_TOLERANCE });
const speed = quantity('speed', 'Speed');
const nonNegativeSpeed = quantity('speed', 'NonNegativeSpeed', nonNegative);
const angularSpeed = quantity('angularSpeed', 'AngularSpeed');
const positiveAngularSpeed = quantity('angularSpeed', 'PositiveAngularSpeed', positive);
const acceleration = quantity('acceleration', 'Acceleration');
const angularAcceleration = quantity('angularAcceleration', 'AngularAcceleration');
const positiveTime = quantity('time', 'PositiveTime', positive);
const positiveRate = quantity('rate', 'PositiveRate', positive);
const anyQuantity = quantity('any', 'Quantity');

function vec3(component: z.ZodType<number, unknown>, what: string) {
  return z
    .tuple([component, component, component], { error: expect(`expected ${what}: an array of three components [x, y, z]`) })
    .transform((v): Vec3Tuple => [v[0], v[1], v[2]]);
}

const lengthVector = named(vec3(length, 'a position (lengths)'), 'Position', 'Point [x, y, z] in the palm frame, each a length');

/** Joint and roller axes: any non-zero direction, scaled silently to unit length. */
const axisVector = vec3(z.number({ error: expect('expected a number (axis components are unitless)') }), 'a direction')
  .transform((v, ctx): Vec3Tuple => {
    const norm = Math.hypot(v[0], v[1], v[2]);
    if (!(norm > MIN_AXIS_NORM)) {
      ctx.addIssue({ code: 'custom', message: 'axis must not be the zero vector', input: v });
      return z.NEVER;
    }
    // Past the largest double the length is Infinity and every component would scale to 0.
    if (!Number.isFinite(norm)) {
      ctx.addIssue({ code: 'custom', message: 'axis components are too large to scale to unit length', input: v });
      return z.NEVER;
    }
    return [v[0] / norm, v[1] / norm, v[2] / norm];
  });
named(axisVector, 'Direction', 'Direction [x, y, z] (unitless, non-zero); scaled to unit length when read');

const name = z.string({ error: expect('expected a name (text)') }).trim().min(1, { error: 'must not be empty' }).max(120);

const quaternionSchema = z
  .strictObject({
    w: z.number({ error: expect('expected a number') }),
    x: z.number({ error: expect('expected a number') }),
    y: z.number({ error: expect('expected a number') }),
    z: z.number({ error: expect('expected a number') }),
  });
named(quaternionSchema, 'Quaternion', `Unit quaternion, scalar first (w, x, y, z); |q| must be 1 within ${QUATERNION_NORM_TOLERANCE} unless the pose sets normalize`);

const axisAngleSchema = z
  .strictObject({ axis: axisVector, angle })
  .transform(({ axis, angle: turn }): QuaternionInput => {
    const s = Math.sin(turn / 2);
    return { w: Math.cos(turn / 2), x: s * axis[0], y: s * axis[1], z: s * axis[2] };
  });
named(axisAngleSchema, 'AxisAngle', 'Rotation by angle about axis (right-hand rule)');

/** q scaled to unit length, or undefined after an issue at "orientation" when it is zero, too large, or off unit length without normalize. */
function unitOrientation(q: QuaternionInput, normalize: boolean, ctx: { addIssue: (issue: z.core.$ZodRawIssue) => void }, advice: string): QuaternionInput | undefined {
  const norm = Math.hypot(q.w, q.x, q.y, q.z);
  if (!(norm > MIN_AXIS_NORM)) {
    ctx.addIssue({ code: 'custom', message: 'orientation quaternion must not be zero', path: ['orientation'], input: q });
    return undefined;
  }
  if (!Number.isFinite(norm)) {
    ctx.addIssue({ code: 'custom', message: 'orientation quaternion components are too large to scale to unit length', path: ['orientation'], input: q });
    return undefined;
  }
  if (Math.abs(norm - 1) > QUATERNION_NORM_TOLERANCE && !normalize) {
    ctx.addIssue({
      code: 'custom',
      message: `orientation quaternion is not a unit quaternion (|q| = ${norm.toPrecision(8)}, allowed 1 ± ${QUATERNION_NORM_TOLERANCE}); ${advice}`,
      path: ['orientation'],
      input: q,
    });
    return undefined;
  }
  return { w: q.w / norm, x: q.x / norm, y: q.y / norm, z: q.z / norm };
}

const poseSchema = z
  .strictObject({
    position: lengthVector,
    orientation: z.union([quaternionSchema, axisAngleSchema]).optional(),
    normalize: named(
      z.boolean().optional(),
      undefined,
      'Scale a non-unit orientation quaternion to unit length instead of rejecting it',
    ),
  })
  .transform((pose, ctx): Pose => {
    const orientation = unitOrientation(pose.orientation ?? IDENTITY, pose.normalize === true, ctx, 'fix it or set "normalize": true on this pose');
    return orientation === undefined ? z.NEVER : { position: pose.position, orientation };
  });

named(poseSchema, 'Pose', 'Position and orientation (quaternion or axis-angle; identity when absent)');

const entryFrameSchema = named(
  z.enum(['palm', 'object'], { error: expect('expected a frame: "palm" or "object"') }),
  'EntryFrame',
  'Frame the twist and its point are written in: "palm" (the world frame) or "object" (the object frame, turning with the object)',
);

const twistPointSchema = named(
  vec3(length, 'a point (lengths)'),
  'TwistPoint',
  'Point [x, y, z] whose velocity "linear" gives: in the palm frame, or in the object frame relative to the object origin (the object centre is [0, 0, 0])',
);

const twistContactSchema = named(
  z.strictObject({ contact: name }),
  'TwistContact',
  'The contact point of the finger of this name, as the solve finds it at the sheet\'s pose and joint angles',
);

const twistSchema = z
  .strictObject({
    linear: vec3(speed, 'a velocity (speeds)'),
    angular: vec3(angularSpeed, 'an angular velocity (angular speeds)'),
    frame: entryFrameSchema.optional(),
    about: z
      .union([twistPointSchema, twistContactSchema], { error: expect('expected a point [x, y, z] (lengths) or a finger\'s contact { "contact": "finger name" }') })
      .optional(),
  })
  .transform((t) => ({ linear: t.linear, angular: t.angular, frame: t.frame, about: t.about }));

named(
  twistSchema,
  'Twist',
  'Velocity of a point of the object (m/s) and angular velocity (rad/s): by default of the object origin in the palm frame; "about" names another point, or a finger\'s contact as { "contact": "finger name" }, and "frame": "object" writes all three in the object frame. The sheet converts to the origin velocity in the palm frame.',
);

const objectAccelerationSchema = z
  .strictObject({
    linear: vec3(acceleration, 'an acceleration (accelerations)').optional(),
    angular: vec3(angularAcceleration, 'an angular acceleration (angular accelerations)').optional(),
  })
  .transform((a): ObjectAcceleration => ({ linear: a.linear ?? [0, 0, 0], angular: a.angular ?? [0, 0, 0] }));

named(
  objectAccelerationSchema,
  'ObjectAcceleration',
  'Acceleration of the object origin (m/s^2) and angular acceleration (rad/s^2), palm frame, for the acceleration feed-forward; a missing part is zero',
);

const objectShapeSchema = z.discriminatedUnion(
  'kind',
  [
    z.strictObject({ kind: z.literal('sphere'), radius: positiveLength }),
    z.strictObject({
      kind: z.literal('box'),
      halfExtents: vec3(positiveLength, 'three half extents (lengths)'),
      filletRadius: nonNegativeLength.optional(),
    }),
    z.strictObject({ kind: z.literal('cylinder'), radius: positiveLength, halfLength: positiveLength }),
    z.strictObject({ kind: z.literal('capsule'), radius: positiveLength, halfLength: nonNegativeLength }),
    z.strictObject({ kind: z.literal('ellipsoid'), semiAxes: vec3(positiveLength, 'three semi-axes (lengths)') }),
  ],
  { error: expect('expected an object shape with kind "sphere", "box", "cylinder", "capsule" or "ellipsoid"') },
).transform((shape, ctx): ObjectShape => {
  if (shape.kind !== 'box') return shape;
  const filletRadius = shape.filletRadius ?? 0;
  const smallest = Math.min(...shape.halfExtents);
  if (filletRadius > smallest) {
    ctx.addIssue({
      code: 'custom',
      message: `fillet radius (${shown(filletRadius)} m) must not exceed the smallest half extent (${shown(smallest)} m)`,
      path: ['filletRadius'],
      input: filletRadius,
    });
    return z.NEVER;
  }
  return { kind: 'box', halfExtents: shape.halfExtents, filletRadius };
});

named(objectShapeSchema, 'ObjectShape', 'Convex object shape in its own frame (cylinder and capsule along z)');

const objectSchema = z
  .strictObject({ shape: objectShapeSchema, pose: poseSchema, twist: twistSchema, acceleration: objectAccelerationSchema.optional() })
  .transform((o): SheetDocument['object'] => {
    const { frame = 'palm', about, linear, angular } = o.twist;
    // A twist about the object origin in the palm frame is the solve's own form and is kept as written. One about a
    // finger's contact waits, as written, for the contacts: parseSheet converts it once the hand is read.
    const twist: Twist = frame === 'palm' && about === undefined
      ? { linear, angular }
      : about !== undefined && !Array.isArray(about)
        ? { linear, angular, entered: { frame, about: [0, 0, 0], contact: about.contact, linear, angular } }
        : twistAboutOrigin({ frame, about: about ?? [0, 0, 0], linear, angular }, o.pose);
    const object: SheetDocument['object'] = { shape: o.shape, pose: o.pose, twist };
    if (o.acceleration) object.acceleration = o.acceleration;
    return object;
  });

const limitsSchema = z
  .strictObject({ min: angle, max: angle })
  .check((ctx) => {
    if (ctx.value.min > ctx.value.max) {
      ctx.issues.push({
        code: 'custom',
        message: `limits are reversed: min (${shown(ctx.value.min)} rad) is greater than max (${shown(ctx.value.max)} rad)`,
        input: ctx.value,
      });
    }
  });

const jointSchema = z
  .strictObject({
    name,
    role: z.enum(['base', 'pivot', 'roll', 'other'], { error: expect('expected a joint role: "base", "pivot", "roll" or "other"') }),
    axis: axisVector,
    point: lengthVector,
    angle: angle.optional(),
    limits: limitsSchema.optional(),
    rateLimit: positiveAngularSpeed.optional(),
  })
  .transform((j): JointInput => {
    const joint: JointInput = { name: j.name, role: j.role, axis: j.axis, point: j.point, angle: j.angle ?? 0 };
    if (j.limits) joint.limits = { min: j.limits.min, max: j.limits.max };
    if (j.rateLimit !== undefined) joint.rateLimit = j.rateLimit;
    return joint;
  });

named(jointSchema, 'Joint', 'Revolute joint: axis and a point on it at home (palm frame), current angle, optional limits and rate limit');

const rollerSchema = z
  .discriminatedUnion(
    'kind',
    [
      z.strictObject({ kind: z.literal('sphere'), radius: positiveLength, center: lengthVector }),
      z.strictObject({
        kind: z.literal('cylinder'),
        radius: positiveLength,
        halfWidth: positiveLength,
        center: lengthVector,
        axis: axisVector,
      }),
    ],
    { error: expect('expected a roller with kind "sphere" or "cylinder"') },
  )
  .transform((r): RollerInput => r);

named(rollerSchema, 'Roller', 'Roller at the home configuration (palm frame): sphere, or cylinder spinning about its axis');

function uniqueNames(what: string) {
  return (ctx: { value: { name: string }[]; issues: z.core.$ZodRawIssue[] }) => {
    const seen = new Map<string, number>();
    ctx.value.forEach((item, index) => {
      const first = seen.get(item.name);
      if (first !== undefined) {
        ctx.issues.push({
          code: 'custom',
          message: `${what} name "${item.name}" is already used at index ${first}`,
          path: [index, 'name'],
          input: item.name,
        });
      } else seen.set(item.name, index);
    });
  };
}

const fingerSchema = z
  .strictObject({
    name,
    joints: z
      .array(jointSchema, { error: expect('expected a list of joints') })
      .min(1, { error: 'a finger needs at least one joint' })
      .max(MAX_JOINTS_PER_FINGER, { error: `a finger has at most ${MAX_JOINTS_PER_FINGER} joints` })
      .check(uniqueNames('joint')),
    roller: rollerSchema,
    friction: named(
      z
        .number({ error: expect('expected a friction coefficient (a number, no unit)') })
        .gte(0, { error: 'must not be negative' })
        .lte(MAX_FRICTION, { error: `must be at most ${MAX_FRICTION}` })
        .optional(),
      undefined,
      `Coulomb friction coefficient at this finger's contact, 0 to ${MAX_FRICTION}; ${DEFAULT_FRICTION} when absent`,
    ),
  })
  .transform((f): FingerInput => {
    const { friction, ...finger } = f;
    return friction === undefined ? finger : { ...finger, friction };
  });

named(fingerSchema, 'Finger', 'Serial chain of revolute joints from the palm to the roller');

const handSchema = z
  .strictObject({
    name,
    fingers: z
      .array(fingerSchema, { error: expect('expected a list of fingers') })
      .min(1, { error: 'a hand needs at least one finger' })
      .max(MAX_FINGERS, { error: `a hand has at most ${MAX_FINGERS} fingers` })
      .check(uniqueNames('finger')),
  })
  .transform((h) => ({ name: h.name, fingers: h.fingers }));

const solverSchema = z
  .strictObject({
    damping: damping.default(DEFAULT_SOLVER.damping),
    singularRatio: z
      .number({ error: expect('expected a number between 0 and 1') })
      .gt(0, { error: 'must be between 0 and 1' })
      .lt(1, { error: 'must be between 0 and 1' })
      .default(DEFAULT_SOLVER.singularRatio),
    axisDistance: nonNegativeLength.default(DEFAULT_SOLVER.axisDistance),
    minTangentialSpeed: nonNegativeSpeed.default(DEFAULT_SOLVER.minTangentialSpeed),
    contactTolerance: nonNegativeLength.default(DEFAULT_SOLVER.contactTolerance),
    softFinger: z.boolean().default(DEFAULT_SOLVER.softFinger),
  })
  .transform((s): SolverSettings => s);

named(solverSchema, 'SolverSettings', 'Thresholds and options of the contact solve; every field has a default');

const graspQualitySchema = z
  .strictObject({
    // The range comes before the whole-number check so that 1e308 is told the stated limit, not the safe-integer one.
    coneEdges: z
      .number({ error: expect('expected a whole number of cone edges') })
      .min(MIN_CONE_EDGES, { error: `at least ${MIN_CONE_EDGES} cone edges` })
      .max(MAX_CONE_EDGES, { error: `at most ${MAX_CONE_EDGES} cone edges` })
      .int({ error: 'expected a whole number of cone edges' })
      .default(DEFAULT_GRASP_QUALITY.coneEdges),
    torsionalFriction: nonNegativeLength.default(DEFAULT_GRASP_QUALITY.torsionalFriction),
    torqueLength: positiveLength.optional(),
  })
  .transform((g): GraspQualitySettings => {
    const { torqueLength, ...rest } = g;
    return torqueLength === undefined ? rest : { ...rest, torqueLength };
  });

named(graspQualitySchema, 'GraspQualitySettings', 'Friction-cone edges, soft-finger torsional friction and the torque length of the grasp quality; every field has a default');

const noiseSchema = z.strictObject({
  seed: z.int({ error: expect('expected an integer seed') }),
  position: nonNegativeLength,
  angle: nonNegativeAngle,
});

const runSchema = z
  .strictObject({
    gain: positiveRate.default(DEFAULT_RUN.gain),
    dt: positiveTime.default(DEFAULT_RUN.dt),
    maxTicks: z
      .int({ error: expect('expected a whole number of ticks') })
      .min(1, { error: 'at least one tick' })
      .max(1_000_000, { error: 'at most 1000000 ticks' })
      .default(DEFAULT_RUN.maxTicks),
    positionTolerance: positiveLength.default(DEFAULT_RUN.positionTolerance),
    angleTolerance: positiveAngle.default(DEFAULT_RUN.angleTolerance),
    stopOnSingular: z.boolean().default(DEFAULT_RUN.stopOnSingular),
    noise: noiseSchema.optional(),
  })
  .transform((r): RunSettings => {
    const { noise, ...rest } = r;
    return noise ? { ...rest, noise } : rest;
  });

named(runSchema, 'RunSettings', 'Closed-loop run toward the target pose; every field except noise has a default');

const sweepSchema = z
  .strictObject({
    path: z
      .string()
      .regex(/^(\/([^~/]|~[01])*)+$/, { error: 'expected a JSON pointer such as "/hand/fingers/0/roller/radius"' }),
    from: anyQuantity,
    to: anyQuantity,
    steps: z
      .int({ error: expect('expected a whole number of steps') })
      .min(2, { error: 'a sweep needs at least 2 steps' })
      .max(MAX_SWEEP_STEPS, { error: `a sweep has at most ${MAX_SWEEP_STEPS} steps` }),
  })
  .transform((s): SweepSettings => s);

named(sweepSchema, 'Sweep', 'Vary one numeric input (JSON pointer into the SI document) over a range');

/** Most targets of a matrix (listed and generated) and most start poses: targets times starts runs, each up to the run's tick limit. */
export const MAX_MATRIX_TARGETS = 500;
export const MAX_MATRIX_STARTS = 20;

const groupLabel = z.string({ error: expect('expected a group label (text)') }).trim().min(1, { error: 'must not be empty' }).max(60);
const matrixOrientation = z.union([quaternionSchema, axisAngleSchema]);

const matrixTargetSchema = z
  .strictObject({ orientation: matrixOrientation, group: named(groupLabel.optional(), undefined, 'Group whose mean and standard deviation this target counts toward') })
  .transform((t, ctx) => {
    const orientation = unitOrientation(t.orientation, false, ctx, 'fix it');
    if (orientation === undefined) return z.NEVER;
    return t.group === undefined ? { orientation } : { orientation, group: t.group };
  });
named(matrixTargetSchema, 'MatrixTarget', 'Rotation (quaternion or axis-angle, palm frame) applied to the start orientation, with an optional group label');

const matrixStartSchema = z
  .strictObject({ orientation: matrixOrientation, label: groupLabel.optional() })
  .transform((s, ctx) => {
    const orientation = unitOrientation(s.orientation, false, ctx, 'fix it');
    if (orientation === undefined) return z.NEVER;
    return s.label === undefined ? { orientation } : { orientation, label: s.label };
  });
named(matrixStartSchema, 'MatrixStart', 'Object orientation to start from (quaternion or axis-angle, palm frame); position and joint angles are the sheet\'s');

const generatorCount = z
  .int({ error: expect('expected a whole number of targets') })
  .min(1, { error: 'at least one target' })
  .max(MAX_MATRIX_TARGETS, { error: `at most ${MAX_MATRIX_TARGETS} targets` });

const matrixGeneratorSchema = z
  .discriminatedUnion(
    'kind',
    [
      z.strictObject({ kind: z.literal('spread-axes'), count: generatorCount, angle, group: groupLabel.optional() }),
      z.strictObject({ kind: z.literal('random'), count: generatorCount, seed: z.int({ error: expect('expected an integer seed') }), group: groupLabel.optional() }),
    ],
    { error: expect('expected a generator with kind "spread-axes" (count, angle) or "random" (count, seed)') },
  )
  .transform((g): MatrixGenerator => g);
named(matrixGeneratorSchema, 'MatrixGenerator', 'Targets by rule: "spread-axes" turns by angle about count axes spread evenly over the sphere (Fibonacci lattice); "random" draws count uniform rotations from seed');

const matrixSchema = z
  .strictObject({
    targets: z.array(matrixTargetSchema).max(MAX_MATRIX_TARGETS, { error: `at most ${MAX_MATRIX_TARGETS} targets` }).default([]),
    starts: z.array(matrixStartSchema).max(MAX_MATRIX_STARTS, { error: `at most ${MAX_MATRIX_STARTS} start poses` }).default([]),
    generators: z.array(matrixGeneratorSchema).max(20, { error: 'at most 20 generators' }).default([]),
    metric: named(
      z.enum(ROTATION_METRIC_KEYS, { error: expect('expected a metric: "phi2", "phi3", "phi4", "phi5" or "phi6"') }).default('phi6'),
      undefined,
      'Orientation error reported, by Huynh (2009): phi2 quaternion difference, phi3 inner-product angle, phi4 inner-product distance, phi5 matrix deviation, phi6 geodesic angle (default)',
    ),
  })
  .transform((m, ctx): MatrixSettings => {
    const total = m.targets.length + m.generators.reduce((sum, g) => sum + g.count, 0);
    if (total === 0) ctx.addIssue({ code: 'custom', message: 'a matrix needs at least one target (listed or generated)', path: ['targets'], input: m.targets });
    else if (total > MAX_MATRIX_TARGETS) ctx.addIssue({ code: 'custom', message: `${total} targets listed and generated; at most ${MAX_MATRIX_TARGETS}`, path: ['generators'], input: m.generators });
    return m;
  });
named(matrixSchema, 'Matrix', 'Test matrix: every target from every start pose, run to convergence or failure with the run settings');

const unitChoice = <T extends readonly [string, ...string[]]>(units: T) =>
  z.enum(units, { error: expect(`expected one of ${units.map((u) => `"${u}"`).join(', ')}`) });

const displaySchema = z
  .strictObject({
    length: unitChoice(LENGTH_UNITS).default(DEFAULT_DISPLAY_UNITS.length),
    angle: unitChoice(ANGLE_UNITS).default(DEFAULT_DISPLAY_UNITS.angle),
    angularSpeed: unitChoice(ANGULAR_SPEED_UNITS).default(DEFAULT_DISPLAY_UNITS.angularSpeed),
  })
  .transform((d): DisplayUnits => d);

named(displaySchema, 'DisplayUnits', 'Units the sheet shows its numbers in (results, derivation, comparison, report); inputs and exports stay SI. Defaults: mm, deg, rad/s');

/** Value at a JSON pointer (RFC 6901) inside a parsed document, or undefined when it does not resolve. */
export function resolvePointer(root: unknown, pointer: string): unknown {
  if (pointer === '') return root;
  let node: unknown = root;
  for (const raw of pointer.slice(1).split('/')) {
    const token = raw.replace(/~1/g, '/').replace(/~0/g, '~');
    if (node === null || typeof node !== 'object' || !Object.hasOwn(node, token)) return undefined;
    node = (node as Record<string, unknown>)[token];
  }
  return node;
}

/** The sheet document schema, version 1: reads unit strings and fills defaults (output in SI). */
export const sheetSchema = z
  .strictObject({
    $schema: named(z.string().optional(), undefined, 'Optional link to the JSON Schema, for editors'),
    format: z.literal(SHEET_FORMAT, { error: expect(`expected "format": "${SHEET_FORMAT}"`) }),
    version: z.literal(SHEET_VERSION, { error: expect(`unsupported version; this reader understands version ${SHEET_VERSION}`) }),
    title: name,
    description: z.string().max(MAX_DESCRIPTION_TEXT).default(''),
    tags: z.array(z.string().trim().min(1).max(60)).max(50).default([]),
    variables: named(
      z.string({ error: expect('expected the variables as text, one "name = value" per line') }).max(MAX_VARIABLES_TEXT).optional(),
      undefined,
      'Named quantities, one "name = expression" per line (e.g. "rollerRadius = 14 mm"); any quantity field may use them in an expression',
    ),
    notes: named(
      z.string({ error: expect('expected the notes as Markdown text') }).max(MAX_NOTES_TEXT).optional(),
      undefined,
      'Notes in Markdown, with math between $ signs',
    ),
    object: objectSchema,
    hand: handSchema,
    motion: z.strictObject({ target: poseSchema, run: runSchema.prefault({}) }),
    sweep: sweepSchema.optional(),
    matrix: matrixSchema.optional(),
    solver: solverSchema.prefault({}),
    graspQuality: graspQualitySchema.optional(),
    commanded: named(
      z.enum(COMMANDED_SOLUTIONS, { error: expect('expected the commanded solution: "steer-and-roll" or "full"') }).optional(),
      'CommandedSolution',
      'Which joint rates go to the controller, and which runs, sweeps, exports and log comparisons follow: "steer-and-roll" (fingers with a base, a pivot and a roll joint steer their pivot and roll; any other finger takes the full solution) or "full" (the damped least-squares rates for every finger); "steer-and-roll" when absent',
    ),
    display: displaySchema.optional(),
  })
  .transform((d, ctx): SheetDocument => {
    const doc: SheetDocument = {
      format: d.format,
      version: d.version,
      title: d.title,
      description: d.description,
      tags: d.tags,
      object: d.object,
      hand: d.hand,
      motion: d.motion,
      solver: d.solver,
    };
    if (d.variables !== undefined) doc.variables = d.variables;
    if (d.notes !== undefined) doc.notes = d.notes;
    if (d.commanded !== undefined) doc.commanded = d.commanded;
    if (d.display !== undefined) doc.display = d.display;
    if (d.matrix !== undefined) doc.matrix = d.matrix;
    if (d.graspQuality !== undefined) {
      const perFinger = d.graspQuality.coneEdges + (d.solver.softFinger && d.graspQuality.torsionalFriction > 0 ? 2 : 0);
      const generators = perFinger * d.hand.fingers.length;
      if (generators > MAX_CONE_GENERATORS) {
        ctx.addIssue({
          code: 'custom',
          message: `${d.hand.fingers.length} fingers with ${perFinger} friction-cone generators each make ${generators}; at most ${MAX_CONE_GENERATORS} are computed, so use at most ${Math.floor(MAX_CONE_GENERATORS / d.hand.fingers.length) - (perFinger - d.graspQuality.coneEdges)} cone edges`,
          path: ['graspQuality', 'coneEdges'],
          input: d.graspQuality.coneEdges,
        });
        return z.NEVER;
      }
      doc.graspQuality = d.graspQuality;
    }
    if (d.sweep) {
      if (typeof resolvePointer(doc, d.sweep.path) !== 'number') {
        ctx.addIssue({
          code: 'custom',
          message: `sweep path "${d.sweep.path}" does not point to a number in this sheet`,
          path: ['sweep', 'path'],
          input: d.sweep.path,
        });
        return z.NEVER;
      }
      doc.sweep = d.sweep;
    }
    return doc;
  });

type Exactly<A, B> = (<T>() => T extends A ? 1 : 2) extends <T>() => T extends B ? 1 : 2 ? true : false;
const outputIsSheetDocument: Exactly<z.output<typeof sheetSchema>, SheetDocument> = true;
void outputIsSheetDocument;

export interface SheetIssue {
  /** Location in the input document, e.g. "hand.fingers[1].joints[0].axis". */
  path: string;
  message: string;
  /** For the variables text: the 1-based line (and column when known) of the problem. */
  line?: number;
  column?: number;
}

export type ParseSheetResult = { ok: true; doc: SheetDocument } | { ok: false; issues: SheetIssue[] };

/**
 * Most issues reported for one document. A file with thousands of unknown fields would
 * otherwise be answered with thousands of issues, each located in the text by a search.
 */
export const MAX_SHEET_ISSUES = 50;

function missingCount(issues: readonly z.core.$ZodIssue[]): number {
  return issues.filter((issue) => issue.message === MISSING || issue.code === 'unrecognized_keys').length;
}

function flattenIssues(issues: readonly z.core.$ZodIssue[], prefix: readonly PropertyKey[], out: SheetIssue[]): void {
  for (const issue of issues) {
    if (out.length >= MAX_SHEET_ISSUES) return;
    const path = [...prefix, ...issue.path];
    const best =
      issue.code === 'invalid_union'
        ? // The alternative the author most likely meant: the one with the fewest missing or unknown keys.
          [...issue.errors].sort((a, b) => missingCount(a) - missingCount(b) || a.length - b.length)[0]
        : undefined;
    // A union of plain values (number or unit string) already carries its own message.
    if (best && best.some((inner) => inner.path.length > 0)) {
      flattenIssues(best, path, out);
    } else if (issue.code === 'unrecognized_keys') {
      for (const key of issue.keys.slice(0, MAX_SHEET_ISSUES - out.length)) out.push({ path: formatIssuePath([...path, key]), message: `unknown field "${key}"` });
    } else {
      out.push({ path: formatIssuePath(path), message: issue.message });
    }
  }
}

/** The variables text of an untrusted document read into values, with its issues located by line. */
function readDocumentVariables(input: unknown, budget: ExpressionBudget): { scope: VariableScope | undefined; issues: SheetIssue[] } {
  const text = input !== null && typeof input === 'object' ? (input as { variables?: unknown }).variables : undefined;
  if (typeof text !== 'string' || text.length > MAX_VARIABLES_TEXT) return { scope: undefined, issues: [] };
  const parsed = readSheetVariables(text, budget);
  return {
    scope: parsed.values,
    issues: parsed.issues.map((issue) => ({
      path: 'variables',
      message: `line ${issue.line}: ${issue.message}`,
      line: issue.line,
      ...(issue.column ? { column: issue.column } : {}),
    })),
  };
}

/**
 * A sweep's values lie evenly between its ends, and every range of a field is an interval, so the ends decide:
 * each end is put into the swept field of the document as read (SI numbers, no sweep) and read again, and what
 * that field would be refused for is reported at the end.
 */
function sweepEndIssues(doc: SheetDocument, sweep: SweepSettings): SheetIssue[] {
  const tokens = sweep.path.slice(1).split('/').map((raw) => raw.replace(/~1/g, '/').replace(/~0/g, '~'));
  const fieldPath = formatIssuePath(tokens.map((token) => (/^\d+$/.test(token) ? Number(token) : token)));
  const issues: SheetIssue[] = [];
  for (const end of ['from', 'to'] as const) {
    const trial = structuredClone(doc) as unknown as Record<string, unknown>;
    delete trial.sweep;
    delete trial.variables;
    delete trial.notes;
    let holder: Record<string, unknown> = trial;
    for (const token of tokens.slice(0, -1)) holder = holder[token] as Record<string, unknown>;
    holder[tokens[tokens.length - 1]] = sweep[end];
    const read = parseSheet(trial);
    if (read.ok) continue;
    const refused = read.issues.find((issue) => issue.path === fieldPath);
    if (refused) issues.push({ path: `sweep.${end}`, message: `${shown(sweep[end])} is outside what ${fieldPath} accepts: ${refused.message}` });
  }
  return issues;
}

/** Converts a twist written about a finger's contact now that the hand is read (in place); the located issue when it cannot be. */
function convertContactTwist(doc: SheetDocument): SheetIssue | undefined {
  const entry = doc.object.twist.entered;
  if (entry?.contact === undefined) return undefined;
  const path = formatIssuePath(['object', 'twist', 'about', 'contact']);
  try {
    const converted = twistAboutContact(doc, { ...entry, contact: entry.contact });
    if (!converted.ok) return { path, message: converted.message };
    doc.object.twist = converted.twist;
    return undefined;
  } catch (error) {
    return { path, message: `the contact of finger "${entry.contact}" could not be found: ${error instanceof Error ? error.message : String(error)}` };
  }
}

/**
 * sheetSchema as one generated function (z.compile), made on the first read: it runs the same checks and transforms
 * several times faster than zod's general reader, and hands any document it does not accept to that reader, so a
 * refused document gets zod's own issues. Where no code may be generated (a page whose policy forbids it), z.compile
 * gives back sheetSchema itself.
 */
let compiledSheetSchema: typeof sheetSchema | undefined;

/** The generated reader of sheetSchema, made now if it was not yet (a tenth of a second or more): the compute worker makes it before its first edit arrives. */
export function prepareSheetReader(): typeof sheetSchema {
  compiledSheetSchema ??= z.compile(sheetSchema);
  return compiledSheetSchema;
}

const missingMessage = (issue: z.core.$ZodRawIssue) => (issue.code === 'invalid_type' && issue.input === undefined ? MISSING : undefined);

/** A document read, with the operations its expressions left of the sheet's budget when it was accepted. */
interface SheetRead {
  result: ParseSheetResult;
  remaining: number;
  scope: VariableScope | undefined;
}

function readSheet(input: unknown): SheetRead {
  const budget = createExpressionBudget();
  const variables = readDocumentVariables(input, budget);
  const leftForFields = budget.remaining;
  activeVariables = variables.scope;
  activeBudget = budget;
  let result;
  try {
    result = prepareSheetReader().safeParse(input, { error: missingMessage });
    // A refused document was read twice, the generated reader's partial pass and then zod's own, on one budget; the
    // second reading is the full pass's answer as long as the budget never ran out, else it is read again on its own.
    if (!result.success && budget.remaining <= 0) {
      budget.remaining = leftForFields;
      result = sheetSchema.safeParse(input, { error: missingMessage });
    }
  } finally {
    activeVariables = undefined;
    activeBudget = undefined;
  }
  const read = (parsed: ParseSheetResult): SheetRead => ({ result: parsed, remaining: budget.remaining, scope: variables.scope });
  if (result.success && variables.issues.length === 0) {
    const contactIssue = convertContactTwist(result.data);
    if (contactIssue) return read({ ok: false, issues: [contactIssue] });
    const sweepIssues = result.data.sweep ? sweepEndIssues(result.data, result.data.sweep) : [];
    return read(sweepIssues.length === 0 ? { ok: true, doc: result.data } : { ok: false, issues: sweepIssues });
  }
  const issues: SheetIssue[] = variables.issues.slice(0, MAX_SHEET_ISSUES);
  if (!result.success) flattenIssues(result.error.issues, [], issues);
  return read({ ok: false, issues });
}

/**
 * Reads an untrusted sheet document (JSON value) into a SheetDocument in SI units, or lists
 * located issues. Quantity fields may be expressions over the document's `variables`.
 */
export function parseSheet(input: unknown): ParseSheetResult {
  return readSheet(input).result;
}

/** Matches any index of a list in an EditableField's path. */
const ANY_INDEX = -1;

/**
 * A field that the read document holds at the same path as the written one, with a value its own schema gives and no
 * other field's check reads: a change of it alone is read by that schema alone. `schema` gives the field's schema in
 * the last document read (undefined when that document reads the field some other way).
 */
interface EditableField {
  path: readonly (string | typeof ANY_INDEX)[];
  /** The kind its schema reads (its SI unit is the one a plain number is read in). */
  kind: Exclude<QuantityKind, 'any'>;
  schema: (doc: SheetDocument) => z.ZodType<number> | undefined;
}

const always = (schema: z.ZodType<number>) => () => schema;
/** The object's pose and twist pass through as written only while the twist is written about the origin in the palm frame. */
const whileTwistAtOrigin = (schema: z.ZodType<number>) => (doc: SheetDocument) => (doc.object.twist.entered === undefined ? schema : undefined);
const SHAPE_RADIUS: Partial<Record<ObjectShape['kind'], z.ZodType<number>>> = { sphere: positiveLength, cylinder: positiveLength, capsule: positiveLength };
const SHAPE_HALF_LENGTH: Partial<Record<ObjectShape['kind'], z.ZodType<number>>> = { cylinder: positiveLength, capsule: nonNegativeLength };

const EDITABLE_FIELDS: readonly EditableField[] = [
  { path: ['hand', 'fingers', ANY_INDEX, 'roller', 'radius'], kind: 'length', schema: always(positiveLength) },
  { path: ['hand', 'fingers', ANY_INDEX, 'roller', 'halfWidth'], kind: 'length', schema: always(positiveLength) },
  { path: ['hand', 'fingers', ANY_INDEX, 'roller', 'center', ANY_INDEX], kind: 'length', schema: always(length) },
  { path: ['hand', 'fingers', ANY_INDEX, 'joints', ANY_INDEX, 'angle'], kind: 'angle', schema: always(angle) },
  { path: ['hand', 'fingers', ANY_INDEX, 'joints', ANY_INDEX, 'point', ANY_INDEX], kind: 'length', schema: always(length) },
  { path: ['hand', 'fingers', ANY_INDEX, 'joints', ANY_INDEX, 'rateLimit'], kind: 'angularSpeed', schema: always(positiveAngularSpeed) },
  { path: ['object', 'shape', 'radius'], kind: 'length', schema: (doc) => SHAPE_RADIUS[doc.object.shape.kind] },
  { path: ['object', 'shape', 'halfLength'], kind: 'length', schema: (doc) => SHAPE_HALF_LENGTH[doc.object.shape.kind] },
  { path: ['object', 'pose', 'position', ANY_INDEX], kind: 'length', schema: whileTwistAtOrigin(length) },
  { path: ['object', 'twist', 'linear', ANY_INDEX], kind: 'speed', schema: whileTwistAtOrigin(speed) },
  { path: ['object', 'twist', 'angular', ANY_INDEX], kind: 'angularSpeed', schema: whileTwistAtOrigin(angularSpeed) },
  { path: ['object', 'acceleration', 'linear', ANY_INDEX], kind: 'acceleration', schema: always(acceleration) },
  { path: ['object', 'acceleration', 'angular', ANY_INDEX], kind: 'angularAcceleration', schema: always(angularAcceleration) },
  { path: ['motion', 'target', 'position', ANY_INDEX], kind: 'length', schema: always(length) },
  { path: ['motion', 'run', 'gain'], kind: 'rate', schema: always(positiveRate) },
  { path: ['motion', 'run', 'dt'], kind: 'time', schema: always(positiveTime) },
  { path: ['motion', 'run', 'positionTolerance'], kind: 'length', schema: always(positiveLength) },
  { path: ['motion', 'run', 'angleTolerance'], kind: 'angle', schema: always(positiveAngle) },
  { path: ['solver', 'damping'], kind: 'length', schema: always(damping) },
  { path: ['solver', 'axisDistance'], kind: 'length', schema: always(nonNegativeLength) },
  { path: ['solver', 'minTangentialSpeed'], kind: 'speed', schema: always(nonNegativeSpeed) },
  { path: ['solver', 'contactTolerance'], kind: 'length', schema: always(nonNegativeLength) },
];

const EDITABLE_DEPTH = Math.max(...EDITABLE_FIELDS.map((field) => field.path.length));

function editableField(path: readonly (string | number)[]): EditableField | undefined {
  return EDITABLE_FIELDS.find((candidate) =>
    candidate.path.length === path.length && candidate.path.every((segment, i) => (segment === ANY_INDEX ? typeof path[i] === 'number' : segment === path[i])));
}

function editableSchema(path: readonly (string | number)[], doc: SheetDocument): z.ZodType<number> | undefined {
  return editableField(path)?.schema(doc);
}

/** A field of a document as written that createEditReader may read by its own schema when it alone changes. */
export interface EditablePath {
  path: (string | number)[];
  kind: Exclude<QuantityKind, 'any'>;
}

/** The editable fields of a document as written (see EditablePath), in document order. */
export function editablePaths(written: unknown): EditablePath[] {
  const found: EditablePath[] = [];
  const walk = (node: unknown, path: (string | number)[]) => {
    if (node === null || typeof node !== 'object') {
      const field = editableField(path);
      if (field !== undefined) found.push({ path: [...path], kind: field.kind });
      return;
    }
    // No editable field lies deeper: a document nested without bound is not walked further.
    if (path.length >= EDITABLE_DEPTH) return;
    const keys: (string | number)[] = Array.isArray(node) ? node.map((_, index) => index) : Object.keys(node);
    for (const key of keys) {
      path.push(key);
      walk((node as Record<string | number, unknown>)[key], path);
      path.pop();
    }
  };
  walk(written, []);
  return found;
}

/** `tree` with `value` at `path`: the objects and lists on the path are copied, everything else is shared. */
function withValueAt(tree: unknown, path: readonly (string | number)[], depth: number, value: unknown): unknown {
  if (depth === path.length) return value;
  const key = path[depth];
  if (Array.isArray(tree)) {
    const copy = tree.slice();
    copy[key as number] = withValueAt(tree[key as number], path, depth + 1, value);
    return copy;
  }
  const record = tree as Record<string, unknown>;
  return { ...record, [key]: withValueAt(record[key], path, depth + 1, value) };
}

/** What an edit reader keeps of the last document it read, when that was accepted. */
interface AcceptedSheet {
  /** Its step on the reader's trail. */
  step: number;
  doc: SheetDocument;
  remaining: number;
  scope: VariableScope | undefined;
}

/** Reads a sheet document as parseSheet does; see createEditReader. */
export type SheetReader = (input: unknown) => ParseSheetResult;

/**
 * A reader for the documents of one editor, each an edit of the one before, on their trail (one of its own when absent;
 * the compute worker shares one with its readings reader): a document that differs from the last one read, accepted, in
 * one field of EDITABLE_FIELDS alone is read by that field's schema alone, on what the last reading left of the
 * expression budget, and gives the last document with that value; every other document is read whole by parseSheet, as
 * is a field its schema refuses (so every issue is zod's own, located as ever). The documents it gives share the parts
 * an edit did not change, so nobody may change them.
 */
export function createEditReader(trail: DocumentTrail = createDocumentTrail()): SheetReader {
  let accepted: AcceptedSheet | undefined;
  const readWhole = (input: unknown, step: number): ParseSheetResult => {
    const read = readSheet(input);
    accepted = read.result.ok ? { step, doc: read.result.doc, remaining: read.remaining, scope: read.scope } : undefined;
    return read.result;
  };
  return (input) => {
    const { step, change, before } = trail.follow(input);
    const last = accepted;
    if (last !== undefined && last.step === step) return { ok: true, doc: last.doc };
    // A twist about a finger's contact and a sweep's ends are read from the whole hand, so any change reads the whole document.
    if (last === undefined || last.step !== step - 1 || change === 'more' || last.doc.sweep !== undefined || last.doc.object.twist.entered?.contact !== undefined) {
      return readWhole(input, step);
    }
    if (change === 'none') {
      accepted = { ...last, step };
      return { ok: true, doc: last.doc };
    }
    const schema = editableSchema(change, last.doc);
    if (schema === undefined) return readWhole(input, step);
    const budget = { remaining: last.remaining + (typeof before === 'string' ? expressionOperations(before) : 0) };
    activeVariables = last.scope;
    activeBudget = budget;
    let read;
    try {
      read = schema.safeParse(getAt(input, change), { error: missingMessage });
    } finally {
      activeVariables = undefined;
      activeBudget = undefined;
    }
    // With nothing left of the budget the whole reading might refuse a later field: it says which.
    if (!read.success || budget.remaining <= 0) return readWhole(input, step);
    const doc = withValueAt(last.doc, change, 0, read.data) as SheetDocument;
    accepted = { step, doc, remaining: budget.remaining, scope: last.scope };
    return { ok: true, doc };
  };
}
