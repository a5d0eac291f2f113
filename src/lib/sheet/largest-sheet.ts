/**
 * The most expensive sheet document the format accepts: the most fingers and joints, half the
 * sheet's operations spent on variables and half on quantity fields written as the longest
 * expressions allowed (each one different, so no cache helps), and the longest description.
 * Used to measure the worst cost of reading, storing and reporting a sheet.
 */
import { MAX_DESCRIPTION_TEXT, MAX_FINGERS, MAX_JOINTS_PER_FINGER, MAX_VARIABLES_TEXT } from './schema';
import { MAX_EXPRESSION_LENGTH, MAX_SHEET_OPERATIONS, MAX_VARIABLE_LINES, parseQuantity, parseVariables, type ExpressionBudget } from './units';

/**
 * `value unit` followed by distinct zero terms while the expression stays within its limits and
 * the budget; the plain SI value when the budget cannot pay even for that.
 */
function heaviestExpression(value: number, unit: string, si: number, salt: number, budget: ExpressionBudget): string | number {
  let text: string | number = si;
  let candidate = `${value} ${unit} + ${salt}e-300 ${unit}`;
  for (let i = 0; candidate.length <= MAX_EXPRESSION_LENGTH; i++) {
    const probe = { ...budget };
    if (!parseQuantity(candidate, 'any', undefined, probe).ok) break;
    text = candidate;
    candidate = `${candidate} + ${i % 2 === 0 ? '0' : '(0)'} ${unit}`;
  }
  if (typeof text === 'string') parseQuantity(text, 'any', undefined, budget);
  return text;
}

/** Variables lines while they cost at most `operations`, within the text limits. */
function heaviestVariables(operations: number): string {
  const lines: string[] = [];
  for (let i = 0; i < MAX_VARIABLE_LINES; i++) {
    const next = [...lines, `v${i} = ${i === 0 ? '1 mm' : `v${i - 1} + 1 mm`} + 2 mm + 3 mm`].join('\n');
    const budget = { remaining: operations };
    if (next.length > MAX_VARIABLES_TEXT || parseVariables(next, budget).issues.length > 0) break;
    lines.push(next.slice(next.lastIndexOf('\n') + 1));
  }
  return lines.join('\n');
}

/** The parts of a sheet document as written (before parsing) that the largest sheet is built from. */
interface WrittenSheet {
  hand: {
    name: string;
    fingers: { joints: { role: string; axis: number[]; point: number[] }[]; roller: { center: number[] } & Record<string, unknown> }[];
  };
}

/** The largest valid document built from a valid sheet document with plain SI numbers in its first finger (its object and motion kept). */
export function largestSheet(example: WrittenSheet): Record<string, unknown> {
  const variables = heaviestVariables(MAX_SHEET_OPERATIONS / 2);
  // The example's own object and motion keep their unit strings; a margin pays for them.
  const budget = { remaining: MAX_SHEET_OPERATIONS / 2 - 100 };
  let salt = 0;
  const length = (value: number) => heaviestExpression(value * 1000, 'mm', value, ++salt, budget);
  const angle = (degrees: number) => heaviestExpression(degrees, 'deg', (degrees * Math.PI) / 180, ++salt, budget);
  const angularSpeed = (value: number) => heaviestExpression(value, 'rad/s', value, ++salt, budget);
  const point = (p: number[]) => p.map((v) => length(v));
  const template = example.hand.fingers[0];
  const fingers = Array.from({ length: MAX_FINGERS }, (_, f) => {
    // Each finger turned about the palm's z axis, so every finger touches the object somewhere else.
    const turn = (2 * Math.PI * f) / MAX_FINGERS;
    const [c, s] = [Math.cos(turn), Math.sin(turn)];
    const turned = (p: number[]) => [p[0] * c - p[1] * s, p[0] * s + p[1] * c, p[2]];
    return {
      name: `finger-${f}`,
      joints: Array.from({ length: MAX_JOINTS_PER_FINGER }, (_, j) => {
        const joint = template.joints[Math.min(j, template.joints.length - 1)];
        return {
          name: `finger-${f}-joint-${j}`,
          role: joint.role,
          axis: turned(joint.axis),
          point: point(turned(joint.point)),
          angle: angle(0),
          rateLimit: angularSpeed(6),
          limits: { min: angle(-120), max: angle(120) },
        };
      }),
      roller: { ...template.roller, radius: length(0.014), center: point(turned(template.roller.center)) },
    };
  });
  const description = 'A long description of the grasp, as long as the format allows. '.repeat(400).slice(0, MAX_DESCRIPTION_TEXT);
  return { ...example, description, variables, hand: { name: example.hand.name, fingers } };
}
