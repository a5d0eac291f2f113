/**
 * Derivations of the reported numbers: for each, its formula and then the same formula with the
 * numbers put in, as a KaTeX string, so a reader can check it by hand. Built on demand from a
 * finished result, never in the solve loop.
 */
import type { FingerResult, SheetResult } from '../kinematics';
import { accelerationEntries } from './derivation-acceleration';
import { commandedEntries, twistEntries } from './derivation-commanded';
import { curvatureEntries } from './derivation-curvature';
import { deriveGraspQuality } from './derivation-grasp-quality';
import type { SheetDocument } from './types';

/** One derived number. `latex` is KaTeX: symbolic formula = numbers put in = value. */
export interface DerivationEntry {
  /** Stable id, e.g. "finger.0.full.rates". */
  id: string;
  label: string;
  latex: string;
  /** The value (a number, or the components of a vector or matrix row by row). */
  value: number | number[];
  unit: string;
}

/** Number in KaTeX with four significant digits and a power of ten outside [1e-3, 1e4). */
export function formatLatexNumber(x: number): string {
  if (Number.isNaN(x)) return '\\text{NaN}';
  if (!Number.isFinite(x)) return x > 0 ? '\\infty' : '-\\infty';
  if (x === 0) return '0';
  const magnitude = Math.abs(x);
  if (magnitude >= 1e-3 && magnitude < 1e4) return String(Number(x.toPrecision(4)));
  const exponent = Math.floor(Math.log10(magnitude));
  const mantissa = Number((x / 10 ** exponent).toPrecision(4));
  return `${mantissa} \\times 10^{${exponent}}`;
}

/** A column vector in KaTeX, `count` entries from `from`. */
export function column(v: ArrayLike<number>, from = 0, count = 3): string {
  const parts: string[] = [];
  for (let i = from; i < from + count; i++) parts.push(formatLatexNumber(v[i]));
  return `\\begin{pmatrix} ${parts.join(' \\\\ ')} \\end{pmatrix}`;
}

/** A row-major matrix in KaTeX. */
export function matrix(data: ArrayLike<number>, rows: number, cols: number): string {
  const lines: string[] = [];
  for (let i = 0; i < rows; i++) {
    const cells: string[] = [];
    for (let j = 0; j < cols; j++) cells.push(formatLatexNumber(data[i * cols + j]));
    lines.push(cells.join(' & '));
  }
  return `\\begin{pmatrix} ${lines.join(' \\\\ ')} \\end{pmatrix}`;
}

function list(v: ArrayLike<number>, count = v.length): number[] {
  return Array.from({ length: count }, (_, i) => v[i]);
}

function fingerEntries(doc: SheetDocument, result: SheetResult, i: number, f: FingerResult, entries: DerivationEntry[]): void {
  const input = doc.hand.fingers[i];
  const c = f.contact, full = f.full, s = f.steer;
  const rho = input.roller.radius;
  const id = `finger.${i}`;
  const n = f.jointAngles.length;
  const p = result.object.position;
  const v = result.object.linearVelocity, w = result.object.angularVelocity;
  entries.push({
    id: `${id}.contact.gap`,
    label: `${f.name}: gap between roller and object`,
    latex: `\\text{gap} = \\lVert c - x \\rVert - \\rho = \\left\\lVert ${column(f.rollerCenter)} - ${column(c.objectPoint)} \\right\\rVert - ${formatLatexNumber(rho)} = ${formatLatexNumber(c.gap)}`,
    value: c.gap,
    unit: 'm',
  });
  const centerOutside = input.roller.kind === 'sphere' && c.gap > -rho;
  entries.push({
    id: `${id}.contact.normal`,
    label: `${f.name}: outward object normal at the contact`,
    latex: centerOutside
      ? `n = \\frac{c - x}{\\lVert c - x \\rVert} = \\frac{${column(f.rollerCenter)} - ${column(c.objectPoint)}}{${formatLatexNumber(c.gap + rho)}} = ${column(c.normal)}`
      : `n = \\frac{\\nabla \\phi(x)}{\\lVert \\nabla \\phi(x) \\rVert} = ${column(c.normal)}`,
    value: list(c.normal),
    unit: '1',
  });
  entries.push({
    id: `${id}.contact.rollerPoint`,
    label: `${f.name}: roller contact point`,
    latex: `y = c - \\rho\\, n = ${column(f.rollerCenter)} - ${formatLatexNumber(rho)} ${column(c.normal)} = ${column(c.rollerPoint)}`,
    value: list(c.rollerPoint),
    unit: 'm',
  });
  entries.push({
    id: `${id}.contact.objectVelocity`,
    label: `${f.name}: object velocity at the contact`,
    latex: `v_o(x) = v + \\omega \\times (x - p) = ${column(v)} + ${column(w)} \\times \\left(${column(c.objectPoint)} - ${column(p)}\\right) = ${column(c.objectVelocity)}`,
    value: list(c.objectVelocity),
    unit: 'm/s',
  });
  entries.push({
    id: `${id}.contact.normalSpeed`,
    label: `${f.name}: normal part of the contact velocity`,
    latex: `v_n = n \\cdot v_o(x) = ${column(c.normal)} \\cdot ${column(c.objectVelocity)} = ${formatLatexNumber(c.normalSpeed)}`,
    value: c.normalSpeed,
    unit: 'm/s',
  });
  entries.push({
    id: `${id}.contact.tangentialSpeed`,
    label: `${f.name}: tangential contact speed`,
    latex: `\\lVert v_t \\rVert = \\lVert v_o(x) - v_n n \\rVert = \\left\\lVert ${column(c.tangentialVelocity)} \\right\\rVert = ${formatLatexNumber(c.tangentialSpeed)}`,
    value: c.tangentialSpeed,
    unit: 'm/s',
  });
  if (!Number.isNaN(c.latitude)) {
    entries.push({
      id: `${id}.contact.latitude`,
      label: `${f.name}: contact latitude on the roller (from its equator)`,
      latex: `\\varphi = \\arcsin\\left(\\frac{y_R \\cdot a_R}{\\lVert y_R \\rVert}\\right),\\; y_R = ${column(c.rollerPointLocal)} \\;\\Rightarrow\\; \\varphi = ${formatLatexNumber(c.latitude)},\\; \\lambda = ${formatLatexNumber(c.longitude)}`,
      value: [c.latitude, c.longitude],
      unit: 'rad',
    });
  }
  for (let k = 0; k < n; k++) {
    const jk = [full.jacobian.data[k], full.jacobian.data[n + k], full.jacobian.data[2 * n + k]];
    entries.push({
      id: `${id}.jacobian.${k}`,
      label: `${f.name}: Jacobian column of joint ${f.jointNames[k]}`,
      latex: `J_{${k + 1}} = \\omega_{${k + 1}} \\times (y - r_{${k + 1}}) = ${column(f.jointAxes, 3 * k)} \\times \\left(${column(c.rollerPoint)} - ${column(f.jointPoints, 3 * k)}\\right) = ${column(jk)}`,
      value: jk,
      unit: 'm/rad',
    });
  }
  const lambda = doc.solver.damping;
  entries.push({
    id: `${id}.full.rates`,
    label: `${f.name}: joint rates, damped least squares`,
    latex: `\\dot\\theta = J^T (J J^T + \\lambda^2 I)^{-1} v_o, \\quad J = ${matrix(full.jacobian.data, full.rows, n)},\\; v_o = ${column(full.target, 0, full.rows)},\\; \\lambda = ${formatLatexNumber(lambda)} \\;\\Rightarrow\\; \\dot\\theta = ${column(full.rates, 0, n)}`,
    value: list(full.rates),
    unit: 'rad/s',
  });
  entries.push({
    id: `${id}.full.residual`,
    label: `${f.name}: residual (slip no joint rate removes)`,
    latex: `\\lVert v_o - J\\dot\\theta \\rVert = \\left\\lVert ${column(full.target)} - ${column(full.achieved)} \\right\\rVert = ${formatLatexNumber(full.residualNorm)}`,
    value: full.residualNorm,
    unit: 'm/s',
  });
  const sv = full.singularValues;
  entries.push({
    id: `${id}.full.singularValues`,
    label: `${f.name}: singular values of the contact Jacobian`,
    latex: `\\sigma_i = \\sqrt{\\lambda_i(J J^T)} = ${column(sv)}`,
    value: list(sv),
    unit: 'm/rad',
  });
  const rankScale = `\\max(3, ${n})\\,\\varepsilon \\sum_k \\left(\\lVert y \\rVert_1 + \\lVert r_k \\rVert_1\\right)`;
  entries.push({
    id: `${id}.full.rank`,
    label: `${f.name}: numerical rank of the contact Jacobian`,
    latex: `\\operatorname{rank} J = \\#\\{\\sigma_i > \\tau\\},\\; \\tau = ${rankScale} = ${formatLatexNumber(full.rankTolerance)},\\; \\sigma = ${column(sv)} \\;\\Rightarrow\\; ${full.rank}`,
    value: full.rank,
    unit: '1',
  });
  entries.push({
    id: `${id}.full.conditionNumber`,
    label: `${f.name}: condition number of the contact Jacobian`,
    latex: full.rank < 3
      ? `\\kappa = \\infty \\quad (\\operatorname{rank} J = ${full.rank} < 3:\\; \\sigma_{\\min} = ${formatLatexNumber(sv[2])} \\le \\tau = ${formatLatexNumber(full.rankTolerance)})`
      : `\\kappa = \\sigma_{\\max} / \\sigma_{\\min} = ${formatLatexNumber(sv[0])} / ${formatLatexNumber(sv[2])} = ${formatLatexNumber(full.conditionNumber)}`,
    value: full.conditionNumber,
    unit: '1',
  });
  entries.push({
    id: `${id}.full.manipulability`,
    label: `${f.name}: manipulability (Yoshikawa)`,
    latex: `\\mu = \\sqrt{\\det(J J^T)} = \\sigma_1 \\sigma_2 \\sigma_3 = ${formatLatexNumber(sv[0])} \\cdot ${formatLatexNumber(sv[1])} \\cdot ${formatLatexNumber(sv[2])} = ${formatLatexNumber(full.manipulability)}`,
    value: full.manipulability,
    unit: 'm^3/rad^3',
  });
  if (!s.available) {
    entries.push({
      id: `${id}.rankRatio`,
      label: `${f.name}: rank judged on the full Jacobian (no steer and roll)`,
      latex: `\\frac{\\sigma_{\\min}}{\\sigma_{\\max}} = \\frac{${formatLatexNumber(sv[2])}}{${formatLatexNumber(sv[0])}} = ${formatLatexNumber(f.rankRatio)} \\quad (\\text{limit } ${formatLatexNumber(doc.solver.singularRatio)})`,
      value: f.rankRatio,
      unit: '1',
    });
    return;
  }
  const bases = s.baseJoints.map((b, j) => ({ rate: s.baseRates[j], gain: s.normalGains[j], jb: [full.jacobian.data[b], full.jacobian.data[n + b], full.jacobian.data[2 * n + b]] }));
  const normalSpeed = formatLatexNumber(c.normalSpeed);
  // One base joint: the plain quotient. Several: the minimum-norm share, the pseudo-inverse of the row of normal gains.
  const baseLatex = bases.length === 1
    ? `\\dot\\theta_b = \\frac{n \\cdot v_o}{n \\cdot (\\omega_b \\times (y - r_b))} = \\frac{${normalSpeed}}{${column(c.normal)} \\cdot ${column(bases[0].jb)}} = \\frac{${normalSpeed}}{${formatLatexNumber(bases[0].gain)}} = ${formatLatexNumber(bases[0].rate)}`
    : `\\dot\\theta_b = a^{+} (n \\cdot v_o) = \\frac{a \\, (n \\cdot v_o)}{\\lVert a \\rVert^2},\\; a_k = n \\cdot (\\omega_k \\times (y - r_k)) \\;\\Rightarrow\\; \\dot\\theta_b = \\frac{${column(s.normalGains, 0, bases.length)} \\cdot ${normalSpeed}}{${formatLatexNumber(s.normalGain * s.normalGain)}} = ${column(s.baseRates, 0, bases.length)}`;
  entries.push({
    id: `${id}.steer.baseRates`,
    label: bases.length === 1 ? `${f.name}: base rate (steer and roll)` : `${f.name}: base rates (steer and roll, minimum-norm share of the normal velocity)`,
    latex: baseLatex,
    value: list(s.baseRates),
    unit: 'rad/s',
  });
  const baseTerms = bases.map((base) => ` - ${formatLatexNumber(base.rate)} ${column(base.jb)}`).join('');
  entries.push({
    id: `${id}.steer.remainder`,
    label: `${f.name}: velocity left to the roller`,
    latex: `u = v_o - \\sum_b \\dot\\theta_b J_b = ${column(c.objectVelocity)}${baseTerms} = ${column(s.remainder)}`,
    value: list(s.remainder),
    unit: 'm/s',
  });
  entries.push({
    id: `${id}.steer.pivotAngle`,
    label: `${f.name}: steered pivot angle`,
    latex: `\\theta_p' = \\theta_p + \\Delta = ${formatLatexNumber(f.jointAngles[input.joints.findIndex((j) => j.role === 'pivot')])} + ${formatLatexNumber(s.pivotChange)} = ${formatLatexNumber(s.pivotAngle)} \\quad (\\text{roll direction } \\omega_r' \\times (y - r_r') \\parallel u)`,
    value: s.pivotAngle,
    unit: 'rad',
  });
  entries.push({
    id: `${id}.steer.rollRate`,
    label: `${f.name}: roll rate`,
    latex: `\\dot\\theta_r = \\pm\\frac{\\lVert u \\rVert}{d_r} = \\frac{u \\cdot d}{\\lVert d \\rVert^2},\\; \\lVert u \\rVert = ${formatLatexNumber(s.remainderNorm)},\\; d_r = ${formatLatexNumber(s.rollDistance)} \\;\\Rightarrow\\; \\dot\\theta_r = ${formatLatexNumber(s.rollRate)}`,
    value: s.rollRate,
    unit: 'rad/s',
  });
  entries.push({
    id: `${id}.steer.residual`,
    label: `${f.name}: slip left by steer and roll`,
    latex: `\\lVert v_o - J' \\dot\\theta_{sr} \\rVert = \\left\\lVert ${column(c.objectVelocity)} - ${column(s.achieved)} \\right\\rVert = ${formatLatexNumber(s.residualNorm)}`,
    value: s.residualNorm,
    unit: 'm/s',
  });
  entries.push({
    id: `${id}.steer.rateDifference`,
    label: `${f.name}: steer-and-roll minus full rates`,
    latex: `\\lVert \\dot\\theta_{sr} - \\dot\\theta \\rVert = \\left\\lVert ${column(s.rates, 0, n)} - ${column(full.rates, 0, n)} \\right\\rVert = ${formatLatexNumber(s.rateDifferenceNorm)}`,
    value: s.rateDifferenceNorm,
    unit: 'rad/s',
  });
  entries.push({
    id: `${id}.steer.conditionAfter`,
    label: `${f.name}: condition number after steering`,
    latex: `\\kappa' = \\sigma'_{\\max} / \\sigma'_{\\min} = ${formatLatexNumber(s.singularValuesAfter[0])} / ${formatLatexNumber(s.singularValuesAfter[2])} = ${formatLatexNumber(s.conditionAfter)}`,
    value: s.conditionAfter,
    unit: '1',
  });
  const pivot = input.joints.findIndex((j) => j.role === 'pivot');
  const driveJoints = f.jointNames.map((_, k) => k).filter((k) => s.pivotDrives || k !== pivot);
  const drive = [0, 1, 2].flatMap((row) => driveJoints.map((k) => s.jacobianAfter.data[row * n + k]));
  const dsv = s.driveSingularValues;
  entries.push({
    id: `${id}.rankRatio`,
    label: `${f.name}: rank judged after steering, on the drive columns (${driveJoints.map((k) => f.jointNames[k]).join(', ')})`,
    latex: `\\frac{\\sigma'_2}{\\sigma'_1}\\left(J'_{\\text{drive}}\\right),\\; J'_{\\text{drive}} = ${matrix(drive, 3, driveJoints.length)},\\; \\sigma' = ${column(dsv)} \\;\\Rightarrow\\; ${formatLatexNumber(f.rankRatio)} \\quad (\\text{limit } ${formatLatexNumber(doc.solver.singularRatio)})`,
    value: f.rankRatio,
    unit: '1',
  });
  entries.push({
    id: `${id}.driveRank`,
    label: `${f.name}: numerical rank of the drive columns after steering`,
    latex: `\\operatorname{rank} J'_{\\text{drive}} = \\#\\{\\sigma'_i > \\tau\\},\\; \\tau = ${formatLatexNumber(full.rankTolerance)},\\; \\sigma' = ${column(dsv)} \\;\\Rightarrow\\; ${f.driveRank}`,
    value: f.driveRank,
    unit: '1',
  });
}

/** Derivation entries for every reported number of a solved sheet (units as listed per entry). */
export function deriveSheet(doc: SheetDocument, result: SheetResult): DerivationEntry[] {
  const entries: DerivationEntry[] = [];
  twistEntries(doc, entries);
  result.fingers.forEach((f, i) => fingerEntries(doc, result, i, f, entries));
  commandedEntries(doc, result, entries);
  result.fingers.forEach((f, i) => accelerationEntries(doc, result, i, f, entries));
  entries.push(...curvatureEntries(doc, result));
  const g = result.grasp;
  const rows = g.contactMap.rows;
  entries.push({
    id: 'grasp.rank',
    label: 'Rank of the grasp (contact map of all contacts), cut at the singular-ratio setting',
    latex: `\\operatorname{rank} \\begin{pmatrix} I & -[x_i - p]_\\times \\end{pmatrix}_{i} = \\#\\{\\sigma_j > ${formatLatexNumber(doc.solver.singularRatio)}\\,\\sigma_1\\},\\; \\sigma = ${column(g.singularValues, 0, Math.min(6, rows))} \\;\\Rightarrow\\; ${g.rank}`,
    value: g.rank,
    unit: '1',
  });
  deriveGraspQuality(doc, result, entries);
  return entries;
}
