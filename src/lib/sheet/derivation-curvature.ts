/**
 * Derivations of each contact's surface curvature, relative curvature and contact-point motion
 * (Montana 1988), in the form and units of derivation.ts: the closed form of the shape at the
 * contact, then K_rel = K_o + R_psi K_f R_psi, then a_f and a_o with the numbers put in.
 */
import { sheetCurvature, type ContactCurvature, type SheetResult, type SurfaceCurvature } from '../kinematics';
import { column, formatLatexNumber, matrix, type DerivationEntry } from './derivation';
import type { ObjectShape, RollerInput, SheetDocument } from './types';

const num = formatLatexNumber;

function pair(values: readonly number[]): string {
  return `(${num(values[0])},\\; ${num(values[1])})`;
}

const REGION_TEXT: Record<SurfaceCurvature['region'], string> = {
  sphere: 'ball',
  ellipsoid: 'ellipsoid',
  face: 'flat face',
  'rounded-edge': 'rounded edge',
  'rounded-corner': 'rounded corner',
  'sharp-edge': 'sharp edge',
  side: 'side',
  cap: 'flat end',
  rim: 'rim',
  hemisphere: 'hemispherical end',
};

/** The closed form of an object shape's principal curvatures at the contact, with the numbers put in. */
function objectFormula(shape: ObjectShape, curvature: SurfaceCurvature, pointLocal: ArrayLike<number>): string {
  const k = curvature.principalCurvatures;
  if (!k) return `\\text{${REGION_TEXT[curvature.region]}: the curvature is unbounded, so there are no principal curvatures}`;
  const result = `\\kappa = ${pair(k)}`;
  switch (shape.kind) {
    case 'sphere':
      return `\\kappa_1 = \\kappa_2 = \\frac{1}{r} = \\frac{1}{${num(shape.radius)}} \\;\\Rightarrow\\; ${result}`;
    case 'capsule':
      return curvature.region === 'side'
        ? `\\kappa_1 = \\frac{1}{r} = \\frac{1}{${num(shape.radius)}} \\text{ around the axis},\\; \\kappa_2 = 0 \\text{ along it} \\;\\Rightarrow\\; ${result}`
        : `\\kappa_1 = \\kappa_2 = \\frac{1}{r} = \\frac{1}{${num(shape.radius)}} \\;\\Rightarrow\\; ${result}`;
    case 'cylinder':
      return curvature.region === 'side'
        ? `\\kappa_1 = \\frac{1}{r} = \\frac{1}{${num(shape.radius)}} \\text{ around the axis},\\; \\kappa_2 = 0 \\text{ along it} \\;\\Rightarrow\\; ${result}`
        : `\\text{flat end: } ${result}`;
    case 'box': {
      const f = shape.filletRadius ?? 0;
      if (curvature.region === 'rounded-edge') return `\\kappa_1 = \\frac{1}{f} = \\frac{1}{${num(f)}} \\text{ across the edge},\\; \\kappa_2 = 0 \\text{ along it} \\;\\Rightarrow\\; ${result}`;
      if (curvature.region === 'rounded-corner') return `\\kappa_1 = \\kappa_2 = \\frac{1}{f} = \\frac{1}{${num(f)}} \\;\\Rightarrow\\; ${result}`;
      return `\\text{flat face: } ${result}`;
    }
    case 'ellipsoid': {
      const [a, b, c] = shape.semiAxes;
      const [x, y, z] = [pointLocal[0], pointLocal[1], pointLocal[2]];
      const s = (x * x) / a ** 4 + (y * y) / b ** 4 + (z * z) / c ** 4;
      const gaussian = 1 / (a * a * b * b * c * c * s * s);
      return `L = \\frac{P\\,\\operatorname{diag}(a^{-2}, b^{-2}, c^{-2})\\,P}{\\lVert \\operatorname{diag}(a^{-2}, b^{-2}, c^{-2})\\, x_O \\rVert},\\; (a, b, c) = (${num(a)}, ${num(b)}, ${num(c)}),\\; x_O = ${column(pointLocal)} \\;\\Rightarrow\\; ${result},\\quad \\kappa_1 \\kappa_2 = \\frac{1}{a^2 b^2 c^2 \\left(\\frac{x^2}{a^4} + \\frac{y^2}{b^4} + \\frac{z^2}{c^4}\\right)^2} = ${num(gaussian)}`;
    }
  }
}

/** The closed form of a roller's principal curvatures at the contact. */
function rollerFormula(roller: RollerInput, curvature: SurfaceCurvature): string {
  const k = curvature.principalCurvatures;
  if (!k) return `\\text{${REGION_TEXT[curvature.region]}: the curvature is unbounded, so there are no principal curvatures}`;
  const result = `\\kappa = ${pair(k)}`;
  if (roller.kind === 'sphere') return `\\kappa_1 = \\kappa_2 = \\frac{1}{\\rho} = \\frac{1}{${num(roller.radius)}} \\;\\Rightarrow\\; ${result}`;
  if (curvature.region === 'cap') return `\\text{flat end: } ${result}`;
  return `\\kappa_1 = \\frac{1}{\\rho} = \\frac{1}{${num(roller.radius)}} \\text{ around the roller axis},\\; \\kappa_2 = 0 \\text{ along it} \\;\\Rightarrow\\; ${result}`;
}

function surfaceEntry(id: string, label: string, latex: string, curvature: SurfaceCurvature): DerivationEntry {
  const directions = curvature.principalDirections;
  const withDirections = directions ? `${latex},\\quad d_1 = ${column(directions[0])},\\; d_2 = ${column(directions[1])}` : latex;
  return { id, label, latex: withDirections, value: curvature.principalCurvatures ? [...curvature.principalCurvatures] : [], unit: '1/m' };
}

function relativeEntry(id: string, label: string, c: ContactCurvature): DerivationEntry {
  const r = c.relative;
  if (!r.matrix || !r.principalCurvatures || r.angle === null) {
    return { id, label, latex: '\\text{undefined: a surface has no curvature at the contact}', value: [], unit: '1/m' };
  }
  const ko = c.object.principalCurvatures!, kf = c.roller.principalCurvatures!;
  // cos and sin of a right angle come out as 6e-17 rather than 0; shown to four digits they are 0.
  const snap = (x: number) => (Math.abs(x) < 1e-12 ? 0 : x);
  const cos = snap(Math.cos(r.angle)), sin = snap(Math.sin(r.angle));
  const rotation = matrix([cos, -sin, -sin, -cos], 2, 2);
  const singular = r.status === 'singular' ? ' \\quad (\\kappa_2 \\approx 0: \\text{line contact})' : '';
  return {
    id,
    label,
    latex: `K_{rel} = K_o + R_\\psi K_f R_\\psi = ${matrix([ko[0], 0, 0, ko[1]], 2, 2)} + ${rotation} ${matrix([kf[0], 0, 0, kf[1]], 2, 2)} ${rotation} = ${matrix(r.matrix.flat(), 2, 2)},\\; \\psi = ${num(r.angle)} \\;\\Rightarrow\\; \\kappa_{rel} = ${pair(r.principalCurvatures)}${singular}`,
    value: [...r.principalCurvatures],
    unit: '1/m',
  };
}

const NO_MOTION: Record<string, string> = {
  'not-touching': '\\text{the roller does not touch the object}',
  singular: '\\text{line contact: the contact point is not determined along the line}',
  undefined: '\\text{a surface has no curvature at the contact}',
};

function fingerCurvatureEntries(doc: SheetDocument, result: SheetResult, i: number, c: ContactCurvature, entries: DerivationEntry[]): void {
  const f = result.fingers[i];
  const input = doc.hand.fingers[i];
  const id = `finger.${i}.curvature`;
  entries.push(surfaceEntry(
    `${id}.object`, `${f.name}: object principal curvatures at the contact (${REGION_TEXT[c.object.region]})`,
    objectFormula(doc.object.shape, c.object, f.contact.objectPointLocal), c.object,
  ));
  entries.push(surfaceEntry(`${id}.roller`, `${f.name}: roller principal curvatures at the contact (${REGION_TEXT[c.roller.region]})`, rollerFormula(input.roller, c.roller), c.roller));
  entries.push(relativeEntry(`${id}.relative`, `${f.name}: relative curvature of the rolling contact (Montana)`, c));
  const w = c.wander;
  const rates = Array.from(f.full.rates, (rate, k) => `${rate < 0 ? `(${num(rate)})` : num(rate)} ${column(f.jointAxes, 3 * k)}`).join(' - ');
  entries.push({
    id: `${id}.relativeAngularVelocity`,
    label: `${f.name}: angular velocity of the object relative to the roller`,
    latex: `w = \\omega_o - \\sum_k \\dot\\theta_k \\omega_k = ${column(result.object.angularVelocity)} - ${rates} = ${column(w.relativeAngularVelocity)}`,
    value: [...w.relativeAngularVelocity],
    unit: 'rad/s',
  });
  if (w.status !== 'defined' || !w.rollerVelocity || !w.objectVelocity || w.rollerSpeed === null || w.objectSpeed === null) {
    entries.push({ id: `${id}.wander`, label: `${f.name}: motion of the contact point`, latex: NO_MOTION[w.status] ?? `\\text{${w.status}}`, value: [], unit: 'm/s' });
    return;
  }
  const given = `n = ${column(f.contact.normal)},\\; w = ${column(w.relativeAngularVelocity)},\\; v_t = ${column(w.tangentialSlip)}`;
  entries.push({
    id: `${id}.wander.roller`,
    label: `${f.name}: velocity of the contact point over the roller`,
    latex: `a_f = K_{rel}^{-1}\\left(n \\times w + L_o v_t\\right),\\; ${given} \\;\\Rightarrow\\; a_f = ${column(w.rollerVelocity)},\\; \\lVert a_f \\rVert = ${num(w.rollerSpeed)}`,
    value: [...w.rollerVelocity],
    unit: 'm/s',
  });
  entries.push({
    id: `${id}.wander.object`,
    label: `${f.name}: velocity of the contact point over the object`,
    latex: `a_o = K_{rel}^{-1}\\left(n \\times w - L_f v_t\\right),\\; ${given} \\;\\Rightarrow\\; a_o = ${column(w.objectVelocity)},\\; \\lVert a_o \\rVert = ${num(w.objectSpeed)}`,
    value: [...w.objectVelocity],
    unit: 'm/s',
  });
}

/** Derivation entries of every contact's curvature and contact-point motion of a solved sheet (1/m, rad/s, m/s; palm frame). */
export function curvatureEntries(doc: SheetDocument, result: SheetResult): DerivationEntry[] {
  const entries: DerivationEntry[] = [];
  sheetCurvature(doc, result).forEach((c, i) => fingerCurvatureEntries(doc, result, i, c, entries));
  return entries;
}
