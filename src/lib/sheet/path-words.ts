/**
 * Document paths in words a developer reads at once: "finger 1 (north) / joint 2 (north-pivot) /
 * point on the axis, x" rather than `hand.fingers[0].joints[1].point[0]`.
 */
import { getAt, type DocumentPath } from './document-path';

/** Words for the fields of the sheet, keyed by their keys joined with dots (finger and joint fields relative to their finger or joint). */
const SHEET_FIELDS: Record<string, string> = {
  format: 'file format',
  version: 'format version',
  title: 'title',
  description: 'description',
  tags: 'tags',
  variables: 'variables',
  notes: 'notes',
  hand: 'hand',
  'hand.name': 'hand / name',
  'hand.fingers': 'hand / fingers',
  object: 'object',
  'object.shape': 'object / shape',
  'object.pose': 'object / pose',
  'object.twist': 'object / twist',
  'object.acceleration': 'object / acceleration',
  motion: 'motion',
  'motion.target': 'target pose',
  'motion.run': 'run',
  'motion.run.noise': 'run / sensor noise',
  sweep: 'sweep',
  solver: 'solver',
  graspQuality: 'grasp quality',
  'object.shape.kind': 'object / shape',
  'object.shape.radius': 'object / radius',
  'object.shape.halfLength': 'object / half length',
  'object.shape.halfExtents': 'object / half extents',
  'object.shape.semiAxes': 'object / semi-axes',
  'object.shape.filletRadius': 'object / fillet radius',
  'object.pose.position': 'object / position',
  'object.pose.orientation': 'object / orientation',
  'object.twist.linear': 'object / velocity of the origin',
  'object.twist.angular': 'object / angular velocity',
  'object.acceleration.linear': 'object / acceleration of the origin',
  'object.acceleration.angular': 'object / angular acceleration',
  'motion.target.position': 'target pose / position',
  'motion.target.orientation': 'target pose / orientation',
  'motion.run.gain': 'run / gain',
  'motion.run.dt': 'run / time step',
  'motion.run.maxTicks': 'run / most time steps',
  'motion.run.positionTolerance': 'run / position tolerance',
  'motion.run.angleTolerance': 'run / angle tolerance',
  'motion.run.stopOnSingular': 'run / stop on a singular warning',
  'motion.run.noise.seed': 'run / sensor noise seed',
  'motion.run.noise.position': 'run / sensor noise on position',
  'motion.run.noise.angle': 'run / sensor noise on angle',
  'sweep.path': 'sweep / input swept',
  'sweep.from': 'sweep / from',
  'sweep.to': 'sweep / to',
  'sweep.steps': 'sweep / steps',
  'solver.damping': 'solver / damping',
  'solver.singularRatio': 'solver / rank-loss ratio',
  'solver.axisDistance': 'solver / axis distance',
  'solver.minTangentialSpeed': 'solver / least tangential speed',
  'solver.contactTolerance': 'solver / contact tolerance',
  'solver.softFinger': 'solver / soft finger',
  'graspQuality.coneEdges': 'grasp quality / friction cone edges',
  'graspQuality.torsionalFriction': 'grasp quality / torsional friction',
  'graspQuality.torqueLength': 'grasp quality / torque length',
};

const FINGER_FIELDS: Record<string, string> = {
  name: 'name',
  friction: 'friction coefficient',
  joints: 'joints',
  roller: 'roller',
  'roller.kind': 'roller shape',
  'roller.radius': 'roller radius',
  'roller.center': 'roller centre',
  'roller.halfWidth': 'roller half width',
  'roller.axis': 'roller axis',
};

const JOINT_FIELDS: Record<string, string> = {
  name: 'name',
  role: 'role',
  axis: 'axis at home',
  point: 'point on the axis',
  angle: 'angle',
  limits: 'limits',
  'limits.min': 'lower limit',
  'limits.max': 'upper limit',
  rateLimit: 'rate limit',
};

/** Fields holding [x, y, z]: an index into them is an axis. */
const VECTORS = new Set([
  'object.shape.halfExtents', 'object.shape.semiAxes', 'object.pose.position', 'object.twist.linear', 'object.twist.angular',
  'object.acceleration.linear', 'object.acceleration.angular', 'motion.target.position', 'roller.center', 'roller.axis', 'axis', 'point',
]);

/** A key the tables do not know, in words: "halfWidth" reads "half width". */
const keyWords = (key: string) => key.replace(/([a-z0-9])([A-Z])/g, '$1 $2').toLowerCase();

/** The rest of a path (keys and indices below a finger, a joint or the sheet) as one field in words. */
function fieldWords(rest: readonly (string | number)[], table: Record<string, string>): string {
  let known = 0;
  let words = '';
  for (let end = rest.length; end > 0; end--) {
    const key = rest.slice(0, end).join('.');
    if (rest.slice(0, end).every((part) => typeof part === 'string') && table[key] !== undefined) {
      known = end;
      words = table[key];
      break;
    }
  }
  const matched = rest.slice(0, known).join('.');
  const tail = rest.slice(known).map((part, i) => {
    if (typeof part === 'string') return keyWords(part);
    if (i === 0 && VECTORS.has(matched) && part < 3) return 'xyz'[part]!;
    return `item ${part + 1}`;
  });
  if (words === '') return tail.join(' ');
  return tail.length === 0 ? words : `${words}, ${tail.join(' ')}`;
}

/** "finger 2 (south)": the position counted from one, and the name where the document gives one. */
function named(kind: string, index: number, name: unknown): string {
  return typeof name === 'string' && name.trim() !== '' ? `${kind} ${index + 1} (${name.trim()})` : `${kind} ${index + 1}`;
}

/**
 * A path as written by formatIssuePath ("hand.fingers[0].roller.radius") back into keys and
 * indices; "(document)" is the empty path.
 */
export function parsePathText(text: string): (string | number)[] {
  if (text === '(document)') return [];
  const out: (string | number)[] = [];
  for (const match of text.matchAll(/([^.[\]]+)|\[(\d+)\]/g)) out.push(match[2] === undefined ? match[1]! : Number(match[2]));
  return out;
}

/**
 * A document path in words, parts from the finger down to the field joined by " / "; `document`
 * (either revision, as written) lends finger and joint names.
 */
export function describePath(path: string | DocumentPath, document?: unknown): string {
  const parts = typeof path === 'string' ? parsePathText(path) : path;
  if (parts.length === 0) return 'the whole sheet';
  if (parts[0] === 'hand' && parts[1] === 'fingers' && typeof parts[2] === 'number') {
    const finger = parts[2];
    const fingerPath = ['hand', 'fingers', finger];
    const out = [named('finger', finger, getAt(document, [...fingerPath, 'name']))];
    const rest = parts.slice(3);
    if (rest[0] === 'joints' && typeof rest[1] === 'number') {
      out.push(named('joint', rest[1], getAt(document, [...fingerPath, 'joints', rest[1], 'name'])));
      if (rest.length > 2) out.push(fieldWords(rest.slice(2), JOINT_FIELDS));
    } else if (rest.length > 0) {
      out.push(fieldWords(rest, FINGER_FIELDS));
    }
    return out.join(' / ');
  }
  if (parts[0] === 'tags' && typeof parts[1] === 'number') return `tag ${parts[1] + 1}`;
  return fieldWords(parts, SHEET_FIELDS);
}
