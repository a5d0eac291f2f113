import katex from 'katex';
import { memo, useMemo, useState } from 'react';
import type { DerivationEntry } from '../../lib/sheet/derivation';
import { DEFAULT_DISPLAY_UNITS, type DisplayUnits } from '../../lib/sheet/display-units';
import { formatShownQuantity } from '../../lib/sheet/outputs';
import { selectInput } from './sheet-styles';

function renderLatex(latex: string): string {
  return katex.renderToString(latex, { displayMode: true, throwOnError: false, output: 'html' });
}

/** Pick a contact (or the grasp) and an output; see each step with the numbers put in. */
function DerivationSection({ entries, fingerNames, units = DEFAULT_DISPLAY_UNITS }: { entries: DerivationEntry[]; fingerNames: string[]; units?: DisplayUnits }) {
  const [chosen, setScope] = useState('finger.0');
  const [output, setOutput] = useState('all');
  // The object's own steps (a twist written about a point or a contact, converted) belong to no contact; once the twist
  // is written about the origin again they are gone, and the first contact is shown.
  const objectSteps = entries.some((e) => e.id.startsWith('object.'));
  const scope = chosen === 'object' && !objectSteps ? 'finger.0' : chosen;
  const inScope = useMemo(() => entries.filter((e) => e.id.startsWith(`${scope}.`)), [entries, scope]);
  const rendered = useMemo(
    () => (output === 'all' ? inScope : inScope.filter((e) => e.id === output)).map((e) => ({ ...e, html: renderLatex(e.latex) })),
    [inScope, output],
  );
  return (
    <div className="space-y-3">
      <div className="flex flex-wrap gap-3 text-[11px] uppercase tracking-wide text-graphite">
        <label>
          contact
          <select className={`${selectInput} block`} value={scope} data-testid="derivation-scope" onChange={(event) => { setScope(event.target.value); setOutput('all'); }}>
            {fingerNames.map((name, i) => (
              <option key={i} value={`finger.${i}`}>{`${i + 1}: ${name}`}</option>
            ))}
            <option value="grasp">grasp</option>
            {objectSteps && <option value="object">object twist</option>}
          </select>
        </label>
        <label>
          output
          <select className={`${selectInput} block`} value={output} onChange={(event) => setOutput(event.target.value)}>
            <option value="all">every step</option>
            {inScope.map((e) => (
              <option key={e.id} value={e.id}>{e.label}</option>
            ))}
          </select>
        </label>
      </div>
      <ol className="space-y-2">
        {rendered.map((e) => (
          <li key={e.id} className="border-l-2 border-verdigris pl-3" data-derivation={e.id}>
            <p className="text-xs font-semibold text-graphite">
              {e.label}: <span className="num text-ink" data-derivation-value>{formatShownQuantity(e.value, e.unit, units)}</span>{' '}
              <span className="font-normal">(formula in SI, {e.unit})</span>
            </p>
            <div className="overflow-x-auto" dangerouslySetInnerHTML={{ __html: e.html }} />
          </li>
        ))}
      </ol>
    </div>
  );
}

export default memo(DerivationSection);
