import { readFileSync } from 'node:fs';
import { MAX_FINGERS, MAX_JOINTS_PER_FINGER } from '../../src/lib/sheet/schema';

/**
 * The largest sheet the schema accepts in the ways that make a report long: the most fingers,
 * each with the most joints, every quantity written as a long expression, and the longest
 * description. Built from the peg example so it solves like a real hand.
 */
export function largestSheet(): Record<string, any> {
  const doc = JSON.parse(readFileSync('content/sheets/line4-peg-tilt.json', 'utf8'));
  const template = doc.hand.fingers[0];
  const long = (value: string) => `${value}${' + 0 rad/s'.repeat(45)}`;
  doc.description = 'A very long description of the grasp. '.repeat(500).slice(0, 20_000);
  doc.hand.fingers = Array.from({ length: MAX_FINGERS }, (_, f) => {
    const angle = (2 * Math.PI * f) / MAX_FINGERS;
    const [c, s] = [Math.cos(angle), Math.sin(angle)];
    const at = (p: number[]) => [p[0] * c - p[1] * s, p[0] * s + p[1] * c, p[2]];
    const [base, pivot, roll] = template.joints;
    const extra = Array.from({ length: MAX_JOINTS_PER_FINGER - 3 }, (_, k) => ({
      ...pivot,
      name: `f${f}-extra-${k}`,
      role: 'other',
      axis: k % 2 ? [1, 0, 0] : [0, 1, 0],
      point: at([-0.045 + 0.002 * k, 0, 0.02 + 0.006 * k]),
      rateLimit: long('6 rad/s'),
    }));
    return {
      name: `finger-${f}`,
      joints: [
        { ...base, name: `f${f}-base`, axis: at(base.axis), point: at(base.point), rateLimit: long('2.5 rad/s') },
        ...extra,
        { ...pivot, name: `f${f}-pivot`, axis: at(pivot.axis), point: at(pivot.point), rateLimit: long('6 rad/s') },
        { ...roll, name: `f${f}-roll`, axis: at(roll.axis), point: at(roll.point), rateLimit: long('25 rad/s') },
      ],
      roller: { ...template.roller, center: at(template.roller.center) },
    };
  });
  return doc;
}
