import { memo, useMemo } from 'react';
import type { PlainSheetResult } from '../../lib/kinematics';
import { displayUnitsOf } from '../../lib/sheet/display-units';
import { displayNumber, displayUnit, findOutput } from '../../lib/sheet/outputs';
import type { SheetDocument } from '../../lib/sheet/types';
import { summariseResults, type SummaryWarning } from '../../lib/view/results-summary';
import { SafetyCaution } from './SafetyCaution';
import { SEVERITY_CLASS } from './sheet-styles';

const rateOutput = findOutput('steer.rates');
const pivotOutput = findOutput('steer.pivotAngle');

function Worst({ worst, test }: { worst: SummaryWarning | null; test: string }) {
  if (!worst) {
    return (
      <span className="text-[11px] text-verdigris-deep" data-summary-worst="none" data-test={test}>
        no warnings
      </span>
    );
  }
  return (
    <span className={`border-l-4 pl-1.5 text-[11px] ${SEVERITY_CLASS[worst.severity]}`} data-summary-worst={worst.severity} data-test={test}>
      <span className="font-semibold uppercase tracking-wide">{worst.severity}</span> {worst.title}
      {worst.count > 1 && <span className="text-graphite"> (+{worst.count - 1} more)</span>}
    </span>
  );
}

/** Per finger, its solution, worst warning and joint rates, then the grasp's worst warning; follows the result alone, never the stale mark. */
const SummaryFingers = memo(function SummaryFingers({ result, document }: { result: PlainSheetResult; document: SheetDocument }) {
  const summary = useMemo(() => summariseResults(result, document), [result, document]);
  const units = displayUnitsOf(document);
  return (
    <>
      {summary.fingers.map((finger, i) => (
        <div key={i} data-summary-finger={i}>
          <div className="flex flex-wrap items-baseline justify-between gap-x-2 border-b border-ink/40">
            <h3 className="text-xs font-semibold">
              Finger {i + 1}: {finger.name} <span className="font-normal text-graphite">· {finger.solution}</span>
            </h3>
            <Worst worst={finger.worst} test={`finger-${i}`} />
          </div>
          <table className="w-full text-xs">
            <tbody>
              {finger.joints.map((joint, k) => (
                <tr key={k} className="border-b border-rule/50">
                  <th scope="row" className="py-px pr-2 text-left font-normal">
                    {joint.name} <span className="text-[10px] text-graphite">{joint.role}</span>
                    {joint.role === 'pivot' && finger.pivotAngle !== null && (
                      <span className="text-[10px] text-graphite" data-summary-pivot={i}>
                        {' '}
                        steered to <span className="num text-ink">{displayNumber(pivotOutput, finger.pivotAngle, units)}</span> {displayUnit(pivotOutput, units)}
                      </span>
                    )}
                  </th>
                  <td className="num py-px text-right" data-summary-rate={`${i}.${k}`}>
                    {displayNumber(rateOutput, joint.rate, units)}
                  </td>
                  <td className="w-12 py-px pl-1 text-[10px] text-graphite">{displayUnit(rateOutput, units)}</td>
                </tr>
              ))}
            </tbody>
          </table>
        </div>
      ))}
      <div className="flex items-baseline justify-between gap-2 text-xs">
        <span className="font-semibold">Grasp</span>
        <Worst worst={summary.grasp} test="grasp" />
      </div>
    </>
  );
});

/**
 * The first thing the side column shows: per finger, the joint rates to command and the worst
 * warning, from the latest sheet that read cleanly; it stays in view while the pad scrolls.
 * Marking it stale while an edit computes re-renders only its wrapper.
 */
function ResultsSummary({ result, document, stale }: { result: PlainSheetResult | null; document: SheetDocument | null; stale: boolean }) {
  return (
    <section aria-labelledby="results-summary-title" className="border-2 border-ink bg-paper p-3 shadow-[0_2px_0_rgba(0,0,0,0.08)]" data-results-summary>
      <div className="flex items-baseline justify-between gap-2">
        <h2 id="results-summary-title" className="text-sm font-semibold">
          Commanded joint rates
        </h2>
        <a href="#results" className="text-[11px] text-graphite underline decoration-rule hover:text-verdigris-deep">
          all results
        </a>
      </div>
      {!result || !document ? (
        <p className="text-xs text-graphite">No results until the sheet reads without errors.</p>
      ) : (
        <div className={`mt-1 max-h-[45vh] space-y-2 overflow-y-auto transition-opacity ${stale ? 'opacity-60' : ''}`} aria-busy={stale}>
          <SummaryFingers result={result} document={document} />
        </div>
      )}
      <div className="mt-2">
        <SafetyCaution />
      </div>
    </section>
  );
}

export default memo(ResultsSummary);
