/**
 * The numeric inputs of a sheet worth sweeping, as JSON pointers into the SI document, each with
 * the unit it is shown in and a default range around its current value.
 */
import type { SheetDocument, SweepSettings } from '../sheet/types';

export interface DisplayUnit {
  symbol: string;
  /** Shown value = SI value * factor. */
  factor: number;
}

export const UNITS = {
  mm: { symbol: 'mm', factor: 1000 },
  deg: { symbol: 'deg', factor: 180 / Math.PI },
  mmPerSecond: { symbol: 'mm/s', factor: 1000 },
  degPerSecond: { symbol: 'deg/s', factor: 180 / Math.PI },
} satisfies Record<string, DisplayUnit>;

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

/** The unit and default span of a pointer, judged by its last tokens. */
function unitFor(path: string): { unit: DisplayUnit; span: number | null } {
  if (path.endsWith('/angle')) return { unit: UNITS.deg, span: Math.PI / 6 };
  if (path.includes('/twist/linear/')) return { unit: UNITS.mmPerSecond, span: 0.02 };
  if (path.includes('/twist/angular/')) return { unit: UNITS.degPerSecond, span: 0.5 };
  return { unit: UNITS.mm, span: null };
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

/** The useful sweep inputs of this sheet: its own sweep first (if any), roller radii, object size, joint angles, damping, twist. */
export function sweepInputs(doc: SheetDocument): SweepInput[] {
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
    const { unit, span } = unitFor(path);
    const [from, to] = rangeAround(value, span);
    return { path, label, unit, value, from, to };
  });
  const own = doc.sweep;
  if (!own) return inputs;
  const known = inputs.find((input) => input.path === own.path);
  const sheetSweep: SweepInput = {
    path: own.path,
    label: `The sheet's sweep: ${known?.label ?? own.path}`,
    unit: known?.unit ?? unitFor(own.path).unit,
    value: numberAt(doc, own.path),
    from: own.from,
    to: own.to,
  };
  return [sheetSweep, ...inputs.filter((input) => input !== known)];
}

/** Sweep settings from values typed in the display unit. */
export function sweepSettingsFrom(input: SweepInput, fromShown: number, toShown: number, steps: number): SweepSettings {
  return { path: input.path, from: fromShown / input.unit.factor, to: toShown / input.unit.factor, steps };
}
