/**
 * A hand's joint axes and origins read from a URDF robot description (XML). URDF places each joint
 * frame by an origin (xyz in m, rpy in rad: fixed-axis roll about x, pitch about y, yaw about z, so
 * R = Rz(yaw) Ry(pitch) Rx(roll)) relative to its parent link's frame, and gives the joint axis in
 * the joint frame; the child link's frame is the joint frame at a joint value of 0. Composing the
 * origins from a chosen palm link gives every axis and point in the palm frame at home, which is
 * what a sheet's joints hold. Revolute and continuous joints map to sheet joints, fixed joints only
 * move the frames; any other joint type in a chosen chain is refused with its location.
 */
import { XMLParser } from 'fast-xml-parser';
import { quat, vec3 } from '../kinematics';
import { MAX_FINGERS, MAX_JOINTS_PER_FINGER, MAX_LENGTH } from './schema';
import type { FingerInput, JointInput, JointRole, RollerInput, Vec3Tuple } from './types';

/** Largest URDF text read, in characters: a robot description with hundreds of links is far below it. */
export const MAX_URDF_TEXT = 5_000_000;

/** Where a problem is: the element path always, the line and column (1-based) of the element or character when known. */
export interface UrdfLocation {
  /** Element path, e.g. `robot/joint "index-pivot"/origin`. */
  path: string;
  line?: number;
  column?: number;
}

export interface UrdfIssue extends UrdfLocation {
  message: string;
}

/** A frame relative to its parent: translation (m) and rotation as a quaternion [x, y, z, w]. */
export interface UrdfFrame {
  position: Vec3Tuple;
  rotation: [number, number, number, number];
}

export type UrdfJointType = 'revolute' | 'continuous' | 'prismatic' | 'fixed' | 'floating' | 'planar';
const JOINT_TYPES: readonly UrdfJointType[] = ['revolute', 'continuous', 'prismatic', 'fixed', 'floating', 'planar'];

export interface UrdfJoint {
  name: string;
  type: UrdfJointType;
  parent: string;
  child: string;
  /** Joint frame in the parent link's frame. */
  origin: UrdfFrame;
  /** Unit axis in the joint frame (URDF default: x). */
  axis: Vec3Tuple;
  /** Position limits, rad, when the file gives both. */
  limits?: { lower: number; upper: number };
  /** Velocity limit, rad/s, when the file gives a positive one. */
  velocity?: number;
  at: UrdfLocation;
}

/** A link's collision (else visual) shape when it is one a roller can be: in the link's frame. */
export type UrdfRollerShape =
  | { kind: 'sphere'; radius: number; origin: UrdfFrame }
  | { kind: 'cylinder'; radius: number; length: number; origin: UrdfFrame };

export interface UrdfLink {
  name: string;
  shape?: UrdfRollerShape;
  at: UrdfLocation;
}

export interface UrdfRobot {
  name: string;
  links: UrdfLink[];
  joints: UrdfJoint[];
  /** The links no joint has as child, in file order (a well-formed tree has one). */
  roots: string[];
}

export type ParseUrdfResult = { ok: true; robot: UrdfRobot } | { ok: false; issues: UrdfIssue[] };

const ELEMENT_LISTS = new Set(['link', 'joint', 'collision', 'visual']);
const DECIMAL = /^[+-]?(\d+\.?\d*|\.\d+)([eE][+-]?\d+)?$/;
const IDENTITY_FRAME: UrdfFrame = { position: [0, 0, 0], rotation: [0, 0, 0, 1] };

type Element = Record<string | symbol, unknown>;

/** Line and column (1-based) of a character offset in the text. */
function lineAndColumn(text: string, offset: number): { line: number; column: number } {
  let line = 1;
  let lineStart = 0;
  for (let i = text.indexOf('\n'); i !== -1 && i < offset; i = text.indexOf('\n', i + 1)) {
    line++;
    lineStart = i + 1;
  }
  return { line, column: offset - lineStart + 1 };
}

class Reader {
  readonly issues: UrdfIssue[] = [];
  private readonly meta = XMLParser.getMetaDataSymbol() as symbol;
  constructor(private readonly text: string) {}

  /** The element's place in the text; an element without attributes carries none, so the enclosing one (near) stands in. */
  locate(element: Element | undefined, path: string, near?: Element): UrdfLocation {
    const own = (element?.[this.meta] as { startIndex?: number } | undefined)?.startIndex;
    const start = own ?? (near?.[this.meta] as { startIndex?: number } | undefined)?.startIndex;
    return start === undefined ? { path } : { path, ...lineAndColumn(this.text, start) };
  }

  fail(at: UrdfLocation, message: string): void {
    this.issues.push({ ...at, message });
  }

  /** A required attribute's text, or an issue. */
  attribute(element: Element, name: string, path: string, near?: Element): string | undefined {
    const value = element[name];
    if (typeof value === 'string' && value.trim() !== '') return value.trim();
    this.fail(this.locate(element, path, near), `attribute "${name}" is missing`);
    return undefined;
  }

  /** `count` decimal numbers separated by spaces in an attribute, or an issue naming the attribute and what it holds. */
  numbers(element: Element, name: string, count: number, path: string, fallback?: number[]): number[] | undefined {
    const raw = element[name];
    if (raw === undefined && fallback) return fallback;
    const text = typeof raw === 'string' ? raw.trim() : '';
    const parts = text === '' ? [] : text.split(/\s+/);
    const values = parts.map((part) => (DECIMAL.test(part) ? Number(part) : Number.NaN));
    if (raw === undefined) {
      this.fail(this.locate(element, path), `attribute "${name}" is missing`);
      return undefined;
    }
    if (parts.length !== count || values.some((v) => !Number.isFinite(v))) {
      const expected = count === 1 ? 'a number' : `${count} numbers separated by spaces`;
      this.fail(this.locate(element, path), `attribute ${name}="${text}" must be ${expected}`);
      return undefined;
    }
    return values;
  }

  /** The optional <origin> child of an element as a frame (URDF defaults: no offset, no rotation). */
  origin(parent: Element, path: string): UrdfFrame | undefined {
    const origin = child(parent, 'origin');
    if (!origin) return IDENTITY_FRAME;
    const at = `${path}/origin`;
    const xyz = this.numbers(origin, 'xyz', 3, at, [0, 0, 0]);
    const rpy = this.numbers(origin, 'rpy', 3, at, [0, 0, 0]);
    if (!xyz || !rpy) return undefined;
    return { position: [xyz[0], xyz[1], xyz[2]], rotation: rotationFromRpy(rpy[0], rpy[1], rpy[2]) };
  }
}

function child(element: Element, name: string): Element | undefined {
  const value = element[name];
  const first = Array.isArray(value) ? value[0] : value;
  // An empty element such as <origin></origin> reads as an empty string; it still is an element.
  if (first === '') return {};
  return first !== null && typeof first === 'object' ? (first as Element) : undefined;
}

function children(element: Element, name: string): Element[] {
  const value = element[name];
  const list = Array.isArray(value) ? value : value === undefined ? [] : [value];
  return list.map((item) => (item !== null && typeof item === 'object' ? (item as Element) : {}));
}

/** Rotation of URDF rpy (rad) as a quaternion [x, y, z, w]: R = Rz(yaw) Ry(pitch) Rx(roll), about fixed axes. */
export function rotationFromRpy(roll: number, pitch: number, yaw: number): [number, number, number, number] {
  const z = quat.fromAxisAngle([0, 0, 1], yaw);
  const y = quat.fromAxisAngle([0, 1, 0], pitch);
  const x = quat.fromAxisAngle([1, 0, 0], roll);
  const q = quat.multiply(quat.multiply(z, y), x);
  return [q[0], q[1], q[2], q[3]];
}

/** Frame b given in frame a, expressed in a's parent: a ∘ b. */
export function composeFrames(a: Readonly<UrdfFrame>, b: Readonly<UrdfFrame>): UrdfFrame {
  const p = vec3.add(a.position, quat.rotate(a.rotation, b.position));
  const q = quat.normalize(quat.multiply(a.rotation, b.rotation));
  return { position: [p[0], p[1], p[2]], rotation: [q[0], q[1], q[2], q[3]] };
}

function readShape(reader: Reader, link: Element, path: string): UrdfRollerShape | undefined {
  for (const kind of ['collision', 'visual'] as const) {
    for (const [index, part] of children(link, kind).entries()) {
      const partPath = `${path}/${kind}[${index + 1}]`;
      const geometry = child(part, 'geometry');
      if (!geometry) continue;
      const sphere = child(geometry, 'sphere');
      const cylinder = child(geometry, 'cylinder');
      if (!sphere && !cylinder) continue;
      const origin = reader.origin(part, partPath);
      if (!origin) return undefined;
      if (sphere) {
        const [radius] = reader.numbers(sphere, 'radius', 1, `${partPath}/geometry/sphere`) ?? [];
        return radius === undefined ? undefined : { kind: 'sphere', radius, origin };
      }
      const at = `${partPath}/geometry/cylinder`;
      const [radius] = reader.numbers(cylinder!, 'radius', 1, at) ?? [];
      const [length] = reader.numbers(cylinder!, 'length', 1, at) ?? [];
      return radius === undefined || length === undefined ? undefined : { kind: 'cylinder', radius, length, origin };
    }
  }
  return undefined;
}

function readJoint(reader: Reader, joint: Element, index: number): UrdfJoint | undefined {
  const named = typeof joint.name === 'string' && joint.name.trim() !== '' ? joint.name.trim() : undefined;
  const path = named ? `robot/joint "${named}"` : `robot/joint[${index + 1}]`;
  const at = reader.locate(joint, path);
  const before = reader.issues.length;
  const name = reader.attribute(joint, 'name', path);
  const typeText = reader.attribute(joint, 'type', path);
  const type = typeText && (JOINT_TYPES as readonly string[]).includes(typeText) ? (typeText as UrdfJointType) : undefined;
  if (typeText && !type) reader.fail(at, `joint type "${typeText}" is not a URDF joint type (${JOINT_TYPES.join(', ')})`);
  const parentElement = child(joint, 'parent');
  const childElement = child(joint, 'child');
  if (!parentElement) reader.fail(at, 'element <parent link="..."/> is missing');
  if (!childElement) reader.fail(at, 'element <child link="..."/> is missing');
  const parent = parentElement ? reader.attribute(parentElement, 'link', `${path}/parent`, joint) : undefined;
  const childLink = childElement ? reader.attribute(childElement, 'link', `${path}/child`, joint) : undefined;
  const origin = reader.origin(joint, path);
  const axisElement = child(joint, 'axis');
  const axisValues = axisElement ? reader.numbers(axisElement, 'xyz', 3, `${path}/axis`, [1, 0, 0]) : [1, 0, 0];
  let axis: Vec3Tuple | undefined;
  if (axisValues) {
    const length = Math.hypot(axisValues[0], axisValues[1], axisValues[2]);
    if (!(length > 1e-12) || !Number.isFinite(length)) reader.fail(reader.locate(axisElement, `${path}/axis`), `axis xyz="${String(axisElement?.xyz)}" must be a non-zero direction`);
    else axis = [axisValues[0] / length, axisValues[1] / length, axisValues[2] / length];
  }
  const limitElement = child(joint, 'limit');
  let limits: UrdfJoint['limits'];
  let velocity: number | undefined;
  if (limitElement) {
    const limitPath = `${path}/limit`;
    const lower = limitElement.lower === undefined ? undefined : reader.numbers(limitElement, 'lower', 1, limitPath)?.[0];
    const upper = limitElement.upper === undefined ? undefined : reader.numbers(limitElement, 'upper', 1, limitPath)?.[0];
    const speed = limitElement.velocity === undefined ? undefined : reader.numbers(limitElement, 'velocity', 1, limitPath)?.[0];
    if (lower !== undefined && upper !== undefined && type === 'revolute') {
      if (lower > upper) reader.fail(reader.locate(limitElement, limitPath), `limit lower="${lower}" is greater than upper="${upper}"`);
      else limits = { lower, upper };
    }
    if (speed !== undefined && speed < 0) reader.fail(reader.locate(limitElement, limitPath), `limit velocity="${speed}" must not be negative`);
    // URDF files often write velocity="0" for "not stated"; only a positive speed is a limit.
    else if (speed !== undefined && speed > 0) velocity = speed;
  }
  if (reader.issues.length > before || !name || !type || !parent || !childLink || !origin || !axis) return undefined;
  return { name, type, parent, child: childLink, origin, axis, ...(limits ? { limits } : {}), ...(velocity !== undefined ? { velocity } : {}), at };
}

/** Every tree rule a chain walk relies on: unique names, known links, one parent per link, no cycle. */
function checkTree(reader: Reader, links: UrdfLink[], joints: UrdfJoint[]): string[] {
  const linkNames = new Map<string, UrdfLink>();
  for (const link of links) {
    if (linkNames.has(link.name)) reader.fail(link.at, `link name "${link.name}" is used twice`);
    else linkNames.set(link.name, link);
  }
  const jointNames = new Set<string>();
  const parentJoint = new Map<string, UrdfJoint>();
  for (const joint of joints) {
    if (jointNames.has(joint.name)) reader.fail(joint.at, `joint name "${joint.name}" is used twice`);
    jointNames.add(joint.name);
    if (!linkNames.has(joint.parent)) reader.fail({ ...joint.at, path: `${joint.at.path}/parent` }, `parent link "${joint.parent}" is not a link of this robot`);
    if (!linkNames.has(joint.child)) reader.fail({ ...joint.at, path: `${joint.at.path}/child` }, `child link "${joint.child}" is not a link of this robot`);
    const earlier = parentJoint.get(joint.child);
    if (earlier) reader.fail(joint.at, `link "${joint.child}" is already the child of joint "${earlier.name}"; a link has one parent joint`);
    else parentJoint.set(joint.child, joint);
  }
  if (reader.issues.length > 0) return [];
  for (const joint of joints) {
    // Walking up from each joint's child must reach a root; coming back to the start is a cycle.
    const seen = new Set<string>([joint.child]);
    for (let up = parentJoint.get(joint.parent); up; up = parentJoint.get(up.parent)) {
      if (seen.has(up.child)) {
        reader.fail(joint.at, `joint "${joint.name}" closes a cycle of links (${[...seen].join(' → ')}); a URDF robot is a tree`);
        return [];
      }
      seen.add(up.child);
    }
  }
  const roots = links.filter((link) => !parentJoint.has(link.name)).map((link) => link.name);
  if (roots.length === 0 && links.length > 0) reader.fail({ path: 'robot' }, 'every link is the child of a joint, so the links form a cycle');
  return roots;
}

/** Reads a URDF document into links and joints, or lists every problem with its line, column and element path. */
export function parseUrdf(text: string): ParseUrdfResult {
  if (text.length > MAX_URDF_TEXT) return { ok: false, issues: [{ path: '(file)', message: `the file has ${text.length} characters; at most ${MAX_URDF_TEXT} are read` }] };
  const reader = new Reader(text);
  let document: Element;
  try {
    document = new XMLParser({
      ignoreAttributes: false,
      attributeNamePrefix: '',
      parseAttributeValue: false,
      captureMetaData: true,
      isArray: (name, _path, _leaf, isAttribute) => !isAttribute && ELEMENT_LISTS.has(name),
      // Validating first: the parser alone reads some broken files without complaint.
    }).parse(text, true) as Element;
  } catch (error) {
    const message = error instanceof Error ? error.message : String(error);
    // The validator's message ends in ":line:column".
    const located = /^([\s\S]*):(\d+):(\d+)$/.exec(message);
    return {
      ok: false,
      issues: [
        located
          ? { path: '(file)', line: Number(located[2]), column: Number(located[3]), message: `not well-formed XML: ${located[1]}` }
          : { path: '(file)', message: `not readable as XML: ${message}` },
      ],
    };
  }
  const robot = child(document, 'robot');
  if (!robot) return { ok: false, issues: [{ path: '(file)', message: 'the root element must be <robot>' }] };
  const robotName = typeof robot.name === 'string' && robot.name.trim() !== '' ? robot.name.trim() : undefined;
  if (!robotName) reader.fail(reader.locate(robot, 'robot'), 'attribute "name" is missing');

  const links: UrdfLink[] = [];
  children(robot, 'link').forEach((link, index) => {
    const path = typeof link.name === 'string' && link.name.trim() !== '' ? `robot/link "${link.name.trim()}"` : `robot/link[${index + 1}]`;
    const name = reader.attribute(link, 'name', path);
    const shape = readShape(reader, link, path);
    if (name) links.push({ name, at: reader.locate(link, path), ...(shape ? { shape } : {}) });
  });
  if (children(robot, 'link').length === 0) reader.fail(reader.locate(robot, 'robot'), 'the robot has no <link> elements');
  const joints = children(robot, 'joint')
    .map((joint, index) => readJoint(reader, joint, index))
    .filter((joint): joint is UrdfJoint => joint !== undefined);
  if (reader.issues.length > 0) return { ok: false, issues: reader.issues };
  const roots = checkTree(reader, links, joints);
  if (reader.issues.length > 0) return { ok: false, issues: reader.issues };
  return { ok: true, robot: { name: robotName!, links, joints, roots } };
}

/**
 * The link a hand's fingers most likely hang from: walking down from the first root through single fixed joints
 * (a mount above the palm), the first link with several child joints or a moving one.
 */
export function suggestedPalm(robot: Readonly<UrdfRobot>): string {
  let link = robot.roots[0] ?? robot.links[0]?.name ?? '';
  for (;;) {
    const below = robot.joints.filter((joint) => joint.parent === link);
    if (below.length !== 1 || below[0].type !== 'fixed') return link;
    link = below[0].child;
  }
}

/** The joints from a palm link down to one tip link (a link without child joints), fixed ones included. */
export interface UrdfChain {
  tip: string;
  joints: UrdfJoint[];
  /** Why this chain cannot become a finger, located at the joint concerned; absent when it can. */
  refused?: UrdfIssue;
}

/** One chain per tip link below the palm link, in file order of the tips. */
export function listUrdfChains(robot: Readonly<UrdfRobot>, palm: string): UrdfChain[] {
  const below = new Map<string, UrdfJoint[]>();
  for (const joint of robot.joints) below.set(joint.parent, [...(below.get(joint.parent) ?? []), joint]);
  const chains: UrdfChain[] = [];
  const walk = (link: string, path: UrdfJoint[]) => {
    const next = below.get(link) ?? [];
    if (next.length === 0) {
      if (path.length > 0) chains.push(withRefusal({ tip: link, joints: path }));
      return;
    }
    for (const joint of next) walk(joint.child, [...path, joint]);
  };
  walk(palm, []);
  return chains;
}

function withRefusal(chain: UrdfChain): UrdfChain {
  const unsupported = chain.joints.find((joint) => joint.type !== 'revolute' && joint.type !== 'continuous' && joint.type !== 'fixed');
  if (unsupported) {
    return {
      ...chain,
      refused: { ...unsupported.at, message: `joint "${unsupported.name}" is ${unsupported.type}; a sheet's fingers have revolute joints only (revolute, continuous, or fixed between them)` },
    };
  }
  const moving = chain.joints.filter((joint) => joint.type !== 'fixed').length;
  if (moving === 0) return { ...chain, refused: { path: `robot/link "${chain.tip}"`, message: `the chain to "${chain.tip}" has no revolute joint` } };
  if (moving > MAX_JOINTS_PER_FINGER) {
    return { ...chain, refused: { path: `robot/link "${chain.tip}"`, message: `the chain to "${chain.tip}" has ${moving} revolute joints; a finger has at most ${MAX_JOINTS_PER_FINGER}` } };
  }
  return chain;
}

/** A revolute joint of a chain at home, in the palm frame. */
export interface UrdfPalmJoint {
  name: string;
  /** Unit axis, palm frame. */
  axis: Vec3Tuple;
  /** Origin of the joint frame, a point on the axis, palm frame, m. */
  point: Vec3Tuple;
  limits?: { min: number; max: number };
  /** rad/s */
  rateLimit?: number;
  at: UrdfLocation;
}

/** A chain's revolute joints and tip in the palm frame at home (every joint value 0). */
export interface UrdfPalmChain {
  tip: string;
  joints: UrdfPalmJoint[];
  /** The tip link's frame in the palm frame. */
  tipFrame: UrdfFrame;
  /** The tip link's sphere or cylinder as a roller, palm frame; absent when the link has neither. */
  roller?: RollerInput;
}

/** Values within a picometre of a round figure read as that figure, so that a composed 0.03 m is written 0.03 and not 0.030000000000000002. */
const tidy = (v: number) => {
  const rounded = Number(v.toFixed(12));
  return Object.is(rounded, -0) ? 0 : rounded;
};
const tidyVector = (v: ArrayLike<number>): Vec3Tuple => [tidy(v[0]), tidy(v[1]), tidy(v[2])];

/** Composes a chain's origins from the palm: each revolute joint's axis and point, and the tip roller, in the palm frame. */
export function chainInPalmFrame(robot: Readonly<UrdfRobot>, chain: Readonly<UrdfChain>): { ok: true; chain: UrdfPalmChain } | { ok: false; issue: UrdfIssue } {
  if (chain.refused) return { ok: false, issue: chain.refused };
  let frame: UrdfFrame = IDENTITY_FRAME;
  const joints: UrdfPalmJoint[] = [];
  for (const joint of chain.joints) {
    frame = composeFrames(frame, joint.origin);
    const reach = Math.max(...frame.position.map(Math.abs));
    if (!(reach <= MAX_LENGTH)) {
      return {
        ok: false,
        issue: { ...joint.at, path: `${joint.at.path}/origin`, message: `joint "${joint.name}" lies ${reach.toPrecision(3)} m from the palm; a sheet holds at most ${MAX_LENGTH} m (URDF lengths are in metres)` },
      };
    }
    if (joint.type === 'fixed') continue;
    joints.push({
      name: joint.name,
      axis: tidyVector(vec3.normalize(quat.rotate(frame.rotation, joint.axis))),
      point: tidyVector(frame.position),
      ...(joint.limits ? { limits: { min: joint.limits.lower, max: joint.limits.upper } } : {}),
      ...(joint.velocity !== undefined ? { rateLimit: joint.velocity } : {}),
      at: joint.at,
    });
  }
  const shape = robot.links.find((link) => link.name === chain.tip)?.shape;
  let roller: RollerInput | undefined;
  if (shape) {
    const placed = composeFrames(frame, shape.origin);
    roller =
      shape.kind === 'sphere'
        ? { kind: 'sphere', radius: shape.radius, center: tidyVector(placed.position) }
        : {
            kind: 'cylinder',
            radius: shape.radius,
            halfWidth: shape.length / 2,
            center: tidyVector(placed.position),
            // A URDF cylinder's axis is the z axis of its origin frame.
            axis: tidyVector(quat.rotate(placed.rotation, [0, 0, 1])),
          };
  }
  return { ok: true, chain: { tip: chain.tip, joints, tipFrame: frame, ...(roller ? { roller } : {}) } };
}

/**
 * Roles a sheet finger usually has, by position from the palm: the last joint rolls the roller, the one before
 * steers it (pivot), the ones before swing the finger (base). A suggestion for the dialog, which the author changes.
 */
export function suggestedRoles(count: number): JointRole[] {
  return Array.from({ length: count }, (_, i) => (i === count - 1 ? 'roll' : i === count - 2 ? 'pivot' : 'base'));
}

/** What the author chose for one chain: its finger name, the role of each revolute joint, and a roller radius (m) when the tip link has no shape. */
export interface UrdfFingerChoice {
  tip: string;
  name: string;
  roles: JointRole[];
  rollerRadius?: number;
}

/**
 * The sheet hand (document form: numbers in m, rad and rad/s) made of the chosen chains, or the first problem,
 * located in the file when it is one. A tip without a shape gets a sphere of the chosen radius at the tip frame's origin.
 */
export function handFromUrdf(
  robot: Readonly<UrdfRobot>,
  palm: string,
  choices: readonly UrdfFingerChoice[],
): { ok: true; hand: { name: string; fingers: FingerInput[] } } | { ok: false; issue: UrdfIssue } {
  if (choices.length === 0) return { ok: false, issue: { path: '(choice)', message: 'pick at least one chain' } };
  if (choices.length > MAX_FINGERS) return { ok: false, issue: { path: '(choice)', message: `a hand has at most ${MAX_FINGERS} fingers; ${choices.length} chains are picked` } };
  const chains = listUrdfChains(robot, palm);
  const fingers: FingerInput[] = [];
  for (const choice of choices) {
    const chain = chains.find((c) => c.tip === choice.tip);
    if (!chain) return { ok: false, issue: { path: `robot/link "${choice.tip}"`, message: `link "${choice.tip}" is not a tip below the palm link "${palm}"` } };
    const placed = chainInPalmFrame(robot, chain);
    if (!placed.ok) return { ok: false, issue: placed.issue };
    const { joints, roller, tipFrame } = placed.chain;
    if (choice.roles.length !== joints.length) {
      return { ok: false, issue: { path: `robot/link "${choice.tip}"`, message: `${choice.roles.length} roles given for ${joints.length} revolute joints` } };
    }
    let fingerRoller = roller;
    if (!fingerRoller) {
      if (choice.rollerRadius === undefined || !(choice.rollerRadius > 0) || !(choice.rollerRadius <= MAX_LENGTH)) {
        return { ok: false, issue: { path: `robot/link "${choice.tip}"`, message: `link "${choice.tip}" has no sphere or cylinder; enter the roller radius` } };
      }
      fingerRoller = { kind: 'sphere', radius: choice.rollerRadius, center: tidyVector(tipFrame.position) };
    }
    fingers.push({
      name: choice.name,
      joints: joints.map(
        (joint, i): JointInput => ({
          name: joint.name,
          role: choice.roles[i],
          axis: joint.axis,
          point: joint.point,
          angle: 0,
          ...(joint.limits ? { limits: joint.limits } : {}),
          ...(joint.rateLimit !== undefined ? { rateLimit: joint.rateLimit } : {}),
        }),
      ),
      roller: fingerRoller,
    });
  }
  return { ok: true, hand: { name: robot.name, fingers } };
}
