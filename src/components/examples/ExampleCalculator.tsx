import { useMemo, useState } from 'react';
import type { PlainSheetResult } from '../../lib/kinematics';
import { readOutput, type OutputAddress } from '../../lib/examples/read-output';
import { readVariableEntries, withVariables } from '../../lib/examples/variables';
import { formatShownNumber } from '../../lib/sheet/outputs';
import { describeWarning } from '../../lib/sheet/warning-notes';
import { unitFactor } from '../../lib/sheet/units';
import { buildSceneModel } from '../../lib/view/scene-model';
import SceneFallback from '../sheet/SceneFallback';
import { SafetyCaution } from '../sheet/SafetyCaution';
import { fieldInput, SEVERITY_CLASS, smallLabel } from '../sheet/sheet-styles';
import { useCompute } from '../sheet/useCompute';

export interface CalculatorInput {
  /** A variable of the sheet's variables text. */
  name: string;
  label: string;
}

export interface CalculatorOutput extends OutputAddress {
  label: string;
  /** The unit to show (mathjs conversion from SI); the editor's display unit when absent. */
  unit?: string;
}

/** One output of the latest result as text in its unit, or "—" when it cannot be read. */
function outputText(result: PlainSheetResult, output: CalculatorOutput): string {
  try {
    const read = readOutput(result, output);
    if (typeof read.value === 'string') return read.value;
    const unit = output.unit ?? read.shownUnit;
    const plain = read.unit === '' || read.unit === '1' || unit === read.unit;
    const number = formatShownNumber(plain ? read.value : read.value * unitFactor(read.unit, unit), 4);
    return unit === '' || unit === '1' ? number : `${number} ${unit}`;
  } catch {
    return '—';
  }
}

/**
 * A live calculator in a worked example: a few of the sheet's variables as text fields; every
 * change re-solves the sheet in the compute worker (the editor's own pipeline) and the chosen
 * results, the warnings and a small drawing follow.
 */
export default function ExampleCalculator({
  document,
  inputs,
  outputs,
  caption,
}: {
  document: Record<string, unknown>;
  inputs: CalculatorInput[];
  outputs: CalculatorOutput[];
  caption?: string;
}) {
  const written = useMemo(() => readVariableEntries(document), [document]);
  const [values, setValues] = useState<Record<string, string>>(() => Object.fromEntries(inputs.map((i) => [i.name, written.get(i.name) ?? ''])));
  const changed = useMemo(() => withVariables(document, values), [document, values]);
  const { reply, lastGood, pending } = useCompute(changed);
  const good = reply?.ok ? reply : lastGood;
  const model = useMemo(() => (good ? buildSceneModel(good.document, good.result) : null), [good]);
  const fingers = good?.result.fingers ?? [];
  const warnings = good ? good.result.warnings.map((w) => describeWarning(w, fingers)) : [];

  return (
    <figure className="not-prose my-6 border-2 border-ink bg-paper p-4 shadow-[4px_4px_0_0_var(--color-ink)]" data-testid="example-calculator" data-pending={pending}>
      {caption && <figcaption className="mb-3 text-sm font-semibold">{caption}</figcaption>}
      <div className="space-y-4">
        <div className="space-y-3">
          <div className="grid gap-3 sm:grid-cols-2">
            {inputs.map((input) => (
              <label key={input.name} className="block">
                <span className={smallLabel}>
                  {input.label} <span className="num normal-case">({input.name})</span>
                </span>
                <input
                  className={fieldInput}
                  value={values[input.name] ?? ''}
                  onChange={(event) => setValues((current) => ({ ...current, [input.name]: event.target.value }))}
                  data-testid={`calculator-input-${input.name}`}
                  spellCheck={false}
                />
              </label>
            ))}
          </div>
          {reply && !reply.ok && (
            <ul className="border-l-4 border-sienna pl-3 text-sm text-sienna" data-testid="calculator-issues">
              {reply.issues.slice(0, 3).map((issue, i) => (
                <li key={i}>
                  <span className="num">{issue.path}</span>: {issue.message}
                </li>
              ))}
            </ul>
          )}
          <table className="w-full text-sm">
            <tbody>
              {outputs.map((output, i) => (
                <tr key={i} className="border-b border-rule">
                  <th scope="row" className="py-1 pr-3 text-left font-normal text-graphite">
                    {output.label}
                  </th>
                  <td className="num py-1 text-right" data-testid={`calculator-output-${i}`}>
                    {good ? outputText(good.result, output) : '…'}
                  </td>
                </tr>
              ))}
            </tbody>
          </table>
          <ul className="space-y-1 text-xs" data-testid="calculator-warnings" aria-label="Warnings">
            {warnings.length === 0 && good && <li className="text-graphite">No warnings.</li>}
            {warnings.map((w, i) => (
              <li key={i} className={`border-l-4 pl-2 ${SEVERITY_CLASS[w.severity]}`} data-code={w.code}>
                <span className="font-semibold">{w.title}</span> · {w.where} · <span className="num">{w.value}</span> (threshold <span className="num">{w.threshold}</span>)
              </li>
            ))}
          </ul>
          <SafetyCaution />
        </div>
        {model && <SceneFallback model={model} />}
      </div>
    </figure>
  );
}
