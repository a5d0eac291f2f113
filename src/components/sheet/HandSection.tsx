import { useState } from 'react';
import { getAt } from '../../lib/sheet/document-path';
import { createHandFromTemplate, HAND_TEMPLATES } from '../../lib/sheet/templates';
import type { SheetDocument } from '../../lib/sheet/types';
import { useSheetEditing } from './editor-context';
import { Choice, DirectionVector, PlainNumber, Quantity, QuantityVector, TextField } from './fields';
import { GraspQualityFields } from './GraspQualityFields';
import UrdfImportDialog from './UrdfImportDialog';
import { button, selectInput } from './sheet-styles';

const ROLES = ['base', 'pivot', 'roll', 'other'] as const;

function JointFields({ finger, joint }: { finger: number; joint: number }) {
  const { document, update, readOnly } = useSheetEditing();
  const base = ['hand', 'fingers', finger, 'joints', joint];
  const limits = getAt(document, [...base, 'limits']);
  const rateLimit = getAt(document, [...base, 'rateLimit']);
  return (
    <div className="border-t border-dashed border-rule py-3" data-joint={`${finger}.${joint}`}>
      <div className="grid grid-cols-[1fr_7rem_1fr] items-end gap-3">
        <TextField path={[...base, 'name']} label="joint" />
        <Choice path={[...base, 'role']} label="role" options={ROLES} />
        <Quantity path={[...base, 'angle']} label="angle" kind="angle" placeholder="0 deg" />
      </div>
      <div className="mt-2 grid gap-3 md:grid-cols-2">
        <DirectionVector path={[...base, 'axis']} label="axis at home" />
        <QuantityVector path={[...base, 'point']} label="point on the axis" kind="length" />
      </div>
      <div className="mt-2 grid grid-cols-3 items-end gap-3">
        {limits ? (
          <>
            <Quantity path={[...base, 'limits', 'min']} label="limit min" kind="angle" />
            <Quantity path={[...base, 'limits', 'max']} label="limit max" kind="angle" />
          </>
        ) : (
          // Empty fields, required until filled: a made-up limit would drive the limit checks unnoticed.
          <button type="button" className={`${button} col-span-2 text-xs`} disabled={readOnly} onClick={() => update([...base, 'limits'], { min: '', max: '' })}>
            Add joint limits
          </button>
        )}
        {rateLimit !== undefined ? (
          <Quantity path={[...base, 'rateLimit']} label="rate limit" kind="angularSpeed" />
        ) : (
          <button type="button" className={`${button} text-xs`} disabled={readOnly} onClick={() => update([...base, 'rateLimit'], '')}>
            Add rate limit
          </button>
        )}
      </div>
      {!readOnly && (limits || rateLimit !== undefined) ? (
        <div className="mt-1 flex gap-3 text-[11px]">
          {limits ? (
            <button type="button" className="underline text-graphite" onClick={() => update([...base, 'limits'], undefined)}>
              remove joint limits
            </button>
          ) : null}
          {rateLimit !== undefined ? (
            <button type="button" className="underline text-graphite" onClick={() => update([...base, 'rateLimit'], undefined)}>
              remove rate limit
            </button>
          ) : null}
        </div>
      ) : null}
    </div>
  );
}

function RollerFields({ finger }: { finger: number }) {
  const { document, update } = useSheetEditing();
  const base = ['hand', 'fingers', finger, 'roller'];
  const roller = (getAt(document, base) ?? {}) as Record<string, unknown>;
  return (
    <div className="space-y-2 bg-paper-deep/40 p-2">
      <div className="grid grid-cols-[8rem_1fr_1fr] items-end gap-3">
        <Choice
          path={[...base, 'kind']}
          label="roller"
          options={['sphere', 'cylinder']}
          onChoose={(kind) =>
            update(
              base,
              kind === 'cylinder'
                ? { kind, radius: roller.radius, center: roller.center, halfWidth: '6 mm', axis: [0, 0, 1] }
                : { kind, radius: roller.radius, center: roller.center },
            )
          }
        />
        <Quantity path={[...base, 'radius']} label="roller radius" kind="length" plausible="roller" />
        {roller.kind === 'cylinder' && <Quantity path={[...base, 'halfWidth']} label="half width" kind="length" plausible="roller" />}
      </div>
      <div className="grid gap-3 md:grid-cols-2">
        <QuantityVector path={[...base, 'center']} label="roller centre at home" kind="length" />
        {roller.kind === 'cylinder' && <DirectionVector path={[...base, 'axis']} label="roller axis" />}
      </div>
    </div>
  );
}

/** Hand: from a template, or edited finger by finger and joint by joint. */
export default function HandSection({ parsed }: { parsed: SheetDocument | null }) {
  const { document, update, readOnly } = useSheetEditing();
  const [template, setTemplate] = useState(HAND_TEMPLATES[0].id);
  const fingers = (getAt(document, ['hand', 'fingers']) ?? []) as Record<string, unknown>[];
  return (
    <div className="space-y-3">
      <div className="flex flex-wrap items-end gap-3">
        <div className="w-64">
          <TextField path={['hand', 'name']} label="hand" />
        </div>
        {!readOnly && (
          <div className="flex items-end gap-2">
            <label className="text-[11px] uppercase tracking-wide text-graphite">
              template
              <select className={`${selectInput} block`} value={template} onChange={(event) => setTemplate(event.target.value)}>
                {HAND_TEMPLATES.map((t) => (
                  <option key={t.id} value={t.id}>
                    {t.name} ({t.fingers.length} fingers)
                  </option>
                ))}
              </select>
            </label>
            <button
              type="button"
              className={button}
              disabled={!parsed}
              title={parsed ? 'Replace every finger with the template, placed against the object' : 'Fix the object first'}
              onClick={() => parsed && update(['hand'], createHandFromTemplate(template, parsed.object.shape, parsed.object.pose.position))}
            >
              Replace hand
            </button>
            <UrdfImportDialog />
          </div>
        )}
      </div>
      {fingers.map((finger, i) => (
        <details key={i} open className="border border-rule bg-paper" data-finger={i}>
          <summary className="cursor-pointer px-3 py-2 text-sm font-semibold">
            Finger {i + 1}: {String(finger.name ?? '')}{' '}
            <span className="font-normal text-graphite">
              · {Array.isArray(finger.joints) ? finger.joints.length : 0} joints · {String((finger.roller as { kind?: string } | undefined)?.kind ?? '')} roller
            </span>
          </summary>
          <div className="space-y-2 px-3 pb-3">
            <div className="grid w-96 grid-cols-[2fr_1fr] gap-3">
              <TextField path={['hand', 'fingers', i, 'name']} label="finger" />
              <PlainNumber path={['hand', 'fingers', i, 'friction']} label="friction μ (empty = 0.5)" />
            </div>
            <RollerFields finger={i} />
            {(Array.isArray(finger.joints) ? finger.joints : []).map((_, j) => (
              <JointFields key={j} finger={i} joint={j} />
            ))}
          </div>
        </details>
      ))}
      <GraspQualityFields />
    </div>
  );
}
