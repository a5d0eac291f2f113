import { useMemo, useState } from 'react';
import { readVariableEntries, withVariables } from '../../lib/examples/variables';
import type { CalculatorOutput, ExampleReply } from '../../workers/example-protocol';
import SceneFallback from '../sheet/SceneFallback';
import { SafetyCaution } from '../sheet/SafetyCaution';
import { fieldInput, SEVERITY_CLASS, smallLabel } from '../sheet/sheet-styles';
import { useCompute } from '../sheet/useCompute';

export interface CalculatorInput {
  /** A variable of the sheet's variables text. */
  name: string;
  label: string;
}

function createExampleWorker(): Worker {
  return new Worker(new URL('../../workers/example.worker.ts', import.meta.url), { type: 'module' });
}

/**
 * A live calculator in a worked example: a few of the sheet's variables as text fields; every
 * change re-solves the sheet in a worker (evaluate.ts, the editor's own pipeline, through
 * example-protocol.ts) and the chosen results, the warnings and a small drawing follow.
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
  const extra = useMemo(() => ({ outputs }), [outputs]);
  const { reply, lastGood, pending } = useCompute<Extract<ExampleReply, { type: 'computed' }>>(changed, { create: createExampleWorker, extra });
  const good = reply?.ok ? reply : lastGood;
  const warnings = good?.warnings ?? [];

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
                    {good ? good.outputs[i] : '…'}
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
        {good && <SceneFallback model={good.scene} />}
      </div>
    </figure>
  );
}
