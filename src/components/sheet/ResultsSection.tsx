import { memo } from 'react';
import type { PlainSheetResult } from '../../lib/kinematics';
import { SafetyCaution } from './SafetyCaution';

const fmt = (x: number, digits = 4) => {
  if (Number.isNaN(x)) return '—';
  if (!Number.isFinite(x)) return x > 0 ? '∞' : '−∞';
  const rounded = Number(x.toPrecision(digits));
  return String(Object.is(rounded, -0) ? 0 : rounded);
};
const mm = (x: number) => fmt(x * 1000);
const vectorMm = (v: number[]) => `(${v.map(mm).join(', ')})`;
const vector = (v: number[]) => `(${v.map((x) => fmt(x, 3)).join(', ')})`;
const deg = (x: number) => fmt((x * 180) / Math.PI);

function Row({ label, value, unit, test }: { label: string; value: string; unit: string; test?: string }) {
  return (
    <tr className="border-b border-rule/60">
      <th scope="row" className="py-0.5 pr-3 text-left font-normal text-graphite">{label}</th>
      <td className="num py-0.5 pr-2 text-right" data-result={test}>{value}</td>
      <td className="py-0.5 text-xs text-graphite">{unit}</td>
    </tr>
  );
}

/** One table per contact and one for the grasp; the full solution beside steer-and-roll. */
function ResultsSection({ result, stale }: { result: PlainSheetResult | null; stale: boolean }) {
  if (!result) return <p className="text-sm text-graphite">No results until the sheet reads without errors.</p>;
  return (
    <div className={`space-y-5 transition-opacity ${stale ? 'opacity-60' : ''}`} aria-busy={stale}>
      {result.fingers.map((f, i) => {
        const c = f.contact;
        return (
          <div key={i} className="border border-rule bg-paper p-3" data-contact={i}>
            <h3 className="mb-2 text-sm font-semibold">
              Contact {i + 1}: {f.name} <span className="ml-2 text-xs font-normal text-graphite">{c.state}</span>
            </h3>
            <div className="grid gap-x-6 md:grid-cols-2">
              <table className="w-full text-sm">
                <tbody>
                  <Row label="contact point x" value={vectorMm(c.objectPoint)} unit="mm" test={`${i}.contact.objectPoint`} />
                  <Row label="normal n" value={vector(c.normal)} unit="1" />
                  <Row label="gap" value={mm(c.gap)} unit="mm" test={`${i}.contact.gap`} />
                  <Row label="normal velocity" value={mm(c.normalSpeed)} unit="mm/s" />
                  <Row label="tangential velocity" value={vectorMm(c.tangentialVelocity)} unit="mm/s" />
                  <Row label="tangential speed" value={mm(c.tangentialSpeed)} unit="mm/s" />
                </tbody>
              </table>
              <table className="w-full text-sm">
                <tbody>
                  <Row label="steer: base rate" value={fmt(f.steer.baseRate)} unit="rad/s" test={`${i}.steer.baseRate`} />
                  <Row label="steer: pivot angle" value={deg(f.steer.pivotAngle)} unit="deg" test={`${i}.steer.pivotAngle`} />
                  <Row label="steer: roll rate" value={fmt(f.steer.rollRate)} unit="rad/s" test={`${i}.steer.rollRate`} />
                  <Row label="steer − full, |Δ rates|" value={fmt(f.steer.rateDifferenceNorm)} unit="rad/s" />
                  <Row label="condition before / after steering" value={`${fmt(f.steer.conditionBefore, 3)} / ${fmt(f.steer.conditionAfter, 3)}`} unit="1" />
                  <Row label="full: slip residual" value={mm(f.full.residualNorm)} unit="mm/s" />
                </tbody>
              </table>
            </div>
            <table className="mt-3 w-full text-sm">
              <caption className="text-left text-[11px] uppercase tracking-wide text-graphite">joint rates, rad/s: full solution beside steer-and-roll</caption>
              <thead>
                <tr className="border-b border-ink text-left text-xs text-graphite">
                  <th className="py-1 font-normal">joint</th>
                  <th className="py-1 text-right font-normal">angle, deg</th>
                  <th className="py-1 text-right font-normal">full</th>
                  <th className="py-1 text-right font-normal">steer-and-roll</th>
                  <th className="py-1 text-right font-normal">difference</th>
                </tr>
              </thead>
              <tbody>
                {f.jointNames.map((name, k) => (
                  <tr key={name} className="border-b border-rule/60">
                    <td className="py-0.5">{name}</td>
                    <td className="num text-right">{deg(f.jointAngles[k])}</td>
                    <td className="num text-right" data-result={`${i}.full.rates.${k}`}>{fmt(f.full.rates[k])}</td>
                    <td className="num text-right">{fmt(f.steer.rates[k])}</td>
                    <td className="num text-right">{fmt(f.steer.rateDifference[k])}</td>
                  </tr>
                ))}
              </tbody>
            </table>
            <p className="mt-1 text-xs text-graphite">
              full solution: σ = <span className="num">{f.full.singularValues.map((s) => fmt(s, 3)).join(', ')}</span> m/rad, condition{' '}
              <span className="num">{fmt(f.full.conditionNumber, 3)}</span>, manipulability <span className="num">{fmt(f.full.manipulability, 3)}</span>
            </p>
          </div>
        );
      })}
      <div className="border border-rule bg-paper p-3" data-grasp>
        <h3 className="mb-2 text-sm font-semibold">Grasp</h3>
        <table className="text-sm">
          <tbody>
            <Row label="contacts" value={String(result.grasp.contactCount)} unit="" />
            <Row label="rank of the contact map" value={String(result.grasp.rank)} unit="of 6" test="grasp.rank" />
            <Row label="undrivable directions" value={String(result.grasp.undrivableCount)} unit="" />
          </tbody>
        </table>
        {result.grasp.undrivableCount > 0 && (
          <ul className="mt-2 text-xs text-graphite">
            {Array.from({ length: result.grasp.undrivableCount }, (_, k) => (
              <li key={k} className="num">
                v = ({result.grasp.undrivable.slice(6 * k, 6 * k + 3).map((x) => fmt(x, 3)).join(', ')}), ω = (
                {result.grasp.undrivable.slice(6 * k + 3, 6 * k + 6).map((x) => fmt(x, 3)).join(', ')})
              </li>
            ))}
          </ul>
        )}
      </div>
      <SafetyCaution />
    </div>
  );
}

export default memo(ResultsSection);
