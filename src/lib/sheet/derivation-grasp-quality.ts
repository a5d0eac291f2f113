/**
 * Derivations of the grasp-quality outputs (Ferrari & Canny 1992): the torque length, each
 * contact's linearised cone, force closure, Q_L1, Q_Linf and the weakest external wrench, each as
 * its formula and then the numbers put in. Built on demand from a finished result.
 */
import { computeSheetGraspQuality, DEFAULT_FRICTION, FORCE_CLOSURE_TOLERANCE, MAX_FACE_COMBINATIONS, type SheetResult } from '../kinematics';
import { formatLatexNumber, type DerivationEntry } from './derivation';
import type { SheetDocument } from './types';

function column(v: ArrayLike<number>): string {
  return `\\begin{pmatrix} ${Array.from(v, formatLatexNumber).join(' \\\\ ')} \\end{pmatrix}`;
}

/** Derivation entries of the grasp quality, computed here when the result does not carry it yet (units as listed per entry). */
export function deriveGraspQuality(doc: SheetDocument, result: SheetResult, entries: DerivationEntry[]): void {
  const quality = result.graspQuality ?? computeSheetGraspQuality(doc, result);
  const p = result.object.position;
  const used = result.fingers.filter((f) => f.contact.state !== 'separated');
  const distances = used.map((f) => Math.hypot(f.contact.objectPoint[0] - p[0], f.contact.objectPoint[1] - p[1], f.contact.objectPoint[2] - p[2]));
  entries.push({
    id: 'graspQuality.torqueLength',
    label: 'Grasp quality: characteristic length L that divides every torque',
    latex: doc.graspQuality?.torqueLength !== undefined
      ? `L = ${formatLatexNumber(quality.torqueLength)}\\ \\text{m (stated in the sheet)}`
      : `L = \\max_i \\lVert x_i - p \\rVert = \\max(${distances.map(formatLatexNumber).join(', ')}) = ${formatLatexNumber(quality.torqueLength)}\\ \\text{m}`,
    value: quality.torqueLength,
    unit: 'm',
  });
  const m = quality.coneEdges;
  result.fingers.forEach((f, i) => {
    if (f.contact.state === 'separated') return;
    const mu = doc.hand.fingers[i].friction ?? DEFAULT_FRICTION;
    entries.push({
      id: `finger.${i}.graspQuality.cone`,
      label: `${f.name}: friction cone linearised by ${m} inscribed edges, unit normal push`,
      latex: `f_{k} = -n + \\mu \\left(\\cos\\tfrac{2\\pi k}{${m}}\\, t_1 + \\sin\\tfrac{2\\pi k}{${m}}\\, t_2\\right),\\; n = ${column(f.contact.normal)},\\; \\mu = ${formatLatexNumber(mu)};\\; w_k = \\begin{pmatrix} f_k \\\\ (x - p) \\times f_k / L \\end{pmatrix},\\; \\text{reach between edges } \\cos\\tfrac{\\pi}{${m}} = ${formatLatexNumber(Math.cos(Math.PI / m))}`,
      value: mu,
      unit: '1',
    });
  });
  entries.push({
    id: 'graspQuality.sumQuality',
    label: `Grasp quality Q_L1 (Ferrari-Canny): ${quality.forceClosure ? 'force closure' : 'not force closure'}`,
    latex: `Q_{L_1} = \\min_{\\text{facets } u \\cdot w \\le c \\text{ of } \\operatorname{conv}\\{w_{ik}\\}} c = ${formatLatexNumber(quality.sumQuality)} \\quad (\\text{force closure when } > ${formatLatexNumber(FORCE_CLOSURE_TOLERANCE)} \\max \\lVert w_{ik} \\rVert)`,
    value: quality.sumQuality,
    unit: '1',
  });
  if (quality.maxQuality !== null) {
    entries.push({
      id: 'graspQuality.maxQuality',
      label: 'Grasp quality Q_Linf (Ferrari-Canny): each normal force at most 1',
      latex: `Q_{L_\\infty} = \\min_{\\text{facets } u \\text{ of } \\bigoplus_i \\operatorname{conv}\\{0, w_{i1}, \\dots, w_{i${m}}\\}} \\sum_i \\max\\bigl(0, \\max_k u \\cdot w_{ik}\\bigr) = ${formatLatexNumber(quality.maxQuality)} \\quad (\\text{${quality.maxQualityCombinations} face combinations})`,
      value: quality.maxQuality,
      unit: '1',
    });
  } else {
    entries.push({
      id: 'graspQuality.maxQuality',
      label: `Grasp quality Q_Linf not computed: ${quality.maxQualityCombinations} face combinations, more than ${MAX_FACE_COMBINATIONS}`,
      latex: `\\text{face combinations} = ${quality.maxQualityCombinations} > ${MAX_FACE_COMBINATIONS}`,
      value: quality.maxQualityCombinations,
      unit: '1',
    });
  }
  entries.push({
    id: 'graspQuality.weakestWrench',
    label: `Weakest external wrench: ${quality.weakestWords}`,
    latex: `-u_{\\text{nearest facet}} = ${column(quality.weakestWrench)} \\quad [f;\\ \\tau / L]`,
    value: Array.from(quality.weakestWrench),
    unit: '1',
  });
}
