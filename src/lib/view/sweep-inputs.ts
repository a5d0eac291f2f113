/**
 * The numeric inputs of a sheet worth sweeping, as JSON pointers into the SI document, each with
 * the unit it is shown in (the sheet's display units) and a default range around its current value.
 */
import { DEFAULT_DISPLAY_UNITS, shownUnit, toShown, type DisplayUnits } from '../sheet/display-units';
import type { SheetDocument, SweepSettings } from '../sheet/types';

export interface DisplayUnit {
  /** Unit the value is shown in ("" for a number without unit). */
  symbol: string;
  /** Shown value = SI value * factor. */
  factor: number;
}

export interface SweepInput {
  path: string;
  label: string;
  unit: DisplayUnit;
  /** Current value, SI. */
  value: number;
  /** Suggested range, SI. */
  from: number;
  to: number;
}

export const DEFAULT_SWEEP_STEPS = 41;

/** Number at a JSON pointer (RFC 6901) of the document, NaN when the pointer does not reach a number. */
export function numberAt(doc: SheetDocument, pointer: string): number {
  let node: unknown = doc;
  for (const raw of pointer.slice(1).split('/')) {
    const token = raw.replace(/~1/g, '/').replace(/~0/g, '~');
    if (node === null || typeof node !== 'object' || !Object.hasOwn(node, token)) return NaN;
    node = (node as Record<string, unknown>)[token];
  }
  return typeof node === 'number' ? node : NaN;
}

/** A range around the value: plus or minus a quarter for positive sizes, or a fixed span about it for signed inputs. */
function rangeAround(value: number, signedSpan: number | null): [number, number] {
  if (signedSpan !== null) return [value - signedSpan, value + signedSpan];
  return value > 0 ? [0.75 * value, 1.25 * value] : [0, 1];
}

/** Last tokens of pointers whose number has no unit, and those of other SI units than a length (the default). */
const UNITLESS = /\/(axis\/\d|orientation\/[wxyz]|friction|singularRatio|coneEdges|maxTicks|seed|steps)$/;
const SI_UNITS: [RegExp, string][] = [
  [/\/twist\/linear\/\d$|\/minTangentialSpeed$/, 'm/s'],
  [/\/twist\/angular\/\d$|\/rateLimit$/, 'rad/s'],
  [/\/acceleration\/linear\/\d$/, 'm/s^2'],
  [/\/acceleration\/angular\/\d$/, 'rad/s^2'],
  [/\/(angle|min|max|angleTolerance)$/, 'rad'],
  [/\/dt$/, 's'],
  [/\/gain$/, '1/s'],
];

/** The SI unit of the number at a pointer, judged by its last tokens: "1" without unit, "m" for every length. */
export function siUnitAt(path: string): string {
  if (UNITLESS.test(path)) return '1';
  return SI_UNITS.find(([pattern]) => pattern.test(path))?.[1] ?? 'm';
}

/** The unit a pointer's number is shown in under the sheet's display units, and its default span (SI; null for a size). */
function unitFor(path: string, units: DisplayUnits): { unit: DisplayUnit; span: number | null } {
  const si = siUnitAt(path);
  const unit = { symbol: si === '1' ? '' : shownUnit(si, units), factor: toShown(1, si, units) };
  if (path.endsWith('/angle')) return { unit, span: Math.PI / 6 };
  if (path.includes('/twist/linear/')) return { unit, span: 0.02 };
  if (path.includes('/twist/angular/')) return { unit, span: 0.5 };
  return { unit, span: null };
}

function objectSizePaths(doc: SheetDocument): [string, string][] {
  const shape = doc.object.shape;
  const axes = ['x', 'y', 'z'];
  switch (shape.kind) {
    case 'sphere':
      return [['/object/shape/radius', 'Object radius']];
    case 'box':
      return axes.map((axis, i) => [`/object/shape/halfExtents/${i}`, `Object half extent ${axis}`]);
    case 'ellipsoid':
      return axes.map((axis, i) => [`/object/shape/semiAxes/${i}`, `Object semi-axis ${axis}`]);
    case 'cylinder':
    case 'capsule':
      return [
        ['/object/shape/radius', 'Object radius'],
        ['/object/shape/halfLength', 'Object half length'],
      ];
  }
}

/** The useful sweep inputs of this sheet, shown in its display units: its own sweep first (if any), roller radii, object size, joint angles, damping, twist. */
export function sweepInputs(doc: SheetDocument, units: Readonly<DisplayUnits> = DEFAULT_DISPLAY_UNITS): SweepInput[] {
  const entries: [string, string][] = [
    ...doc.hand.fingers.map((finger, f): [string, string] => [`/hand/fingers/${f}/roller/radius`, `Roller radius, ${finger.name}`]),
    ...objectSizePaths(doc),
    ...doc.hand.fingers.flatMap((finger, f) =>
      finger.joints.map((joint, k): [string, string] => [`/hand/fingers/${f}/joints/${k}/angle`, `Joint angle, ${joint.name}`]),
    ),
    ['/solver/damping', 'Solver damping'],
    ...['x', 'y', 'z'].map((axis, i): [string, string] => [`/object/twist/linear/${i}`, `Object velocity ${axis}`]),
    ...['x', 'y', 'z'].map((axis, i): [string, string] => [`/object/twist/angular/${i}`, `Object angular velocity ${axis}`]),
  ];
  const inputs: SweepInput[] = entries.map(([path, label]) => {
    const value = numberAt(doc, path);
    const { unit, span } = unitFor(path, units);
    const [from, to] = rangeAround(value, span);
    return { path, label, unit, value, from, to };
  });
  const own = doc.sweep;
  if (!own) return inputs;
  const known = inputs.find((input) => input.path === own.path);
  const sheetSweep: SweepInput = {
    path: own.path,
    label: `The sheet's sweep: ${known?.label ?? own.path}`,
    unit: known?.unit ?? unitFor(own.path, units).unit,
    value: numberAt(doc, own.path),
    from: own.from,
    to: own.to,
  };
  return [sheetSweep, ...inputs.filter((input) => input !== known)];
}

/** Sweep settings from values typed in the display unit; stored values stay SI. */
export function sweepSettingsFrom(input: SweepInput, fromShown: number, toShown: number, steps: number): SweepSettings {
  return { path: input.path, from: fromShown / input.unit.factor, to: toShown / input.unit.factor, steps };
}
