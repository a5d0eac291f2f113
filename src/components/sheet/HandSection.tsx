import { lazy, memo, Suspense, useState } from 'react';
import { getAt, type DocumentPath } from '../../lib/sheet/document-path';
import { createHandFromTemplate, HAND_TEMPLATES } from '../../lib/sheet/templates';
import type { SheetDocument } from '../../lib/sheet/types';
import { useCurrentDocument, useDocumentAt, useDocumentSelect, useIssueAt, useSheetFields } from './editor-context';
import ConfirmDialog from './ConfirmDialog';
import { Choice, DirectionVector, PlainNumber, Quantity, QuantityVector, TextField } from './fields';
import { GraspQualityFields } from './GraspQualityFields';
import UrdfOpenButton from './UrdfOpenButton';
import { button, selectInput } from './sheet-styles';

// The URDF reader and its preview worker load when the import is first asked for.
const UrdfImportDialog = lazy(() => import('./UrdfImportDialog'));

function UrdfImport() {
  const { readOnly } = useSheetFields();
  const [asked, setAsked] = useState(false);
  const opener = <UrdfOpenButton disabled={readOnly} onOpen={() => setAsked(true)} />;
  return asked ? (
    <Suspense fallback={opener}>
      <UrdfImportDialog openOnMount />
    </Suspense>
  ) : (
    opener
  );
}

const ROLES = ['base', 'pivot', 'roll', 'other'] as const;

const AXES = ['x', 'y', 'z'] as const;

/** The issue the sheet reader found with a whole vector (not with one of its parts). */
function VectorIssue({ path }: { path: DocumentPath }) {
  const issue = useIssueAt(path);
  return issue ? <span className="block text-[11px] leading-tight text-sienna" role="alert">{issue}</span> : null;
}

/** The length of the list at path as written (0 when there is none). */
function useListLength(path: DocumentPath): number {
  return useDocumentSelect((document) => {
    const list = getAt(document, path);
    return Array.isArray(list) ? list.length : 0;
  });
}

/** One joint as a row of the finger's table; every input keeps its full name for assistive technology and tests. */
const JointRow = memo(function JointRow({ finger, joint }: { finger: number; joint: number }) {
  const { update, readOnly } = useSheetFields();
  const base = ['hand', 'fingers', finger, 'joints', joint];
  const name = String(useDocumentAt([...base, 'name']) ?? '') || `joint ${joint + 1}`;
  const limits = useDocumentAt([...base, 'limits']);
  const rateLimit = useDocumentAt([...base, 'rateLimit']);
  return (
    <tr className="border-b border-rule/60 align-top" data-joint={`${finger}.${joint}`}>
      <td className="py-1 pr-2">
        <TextField path={[...base, 'name']} label={`joint ${joint + 1} name`} />
      </td>
      <td className="py-1 pr-2">
        <Choice path={[...base, 'role']} label={`${name} role`} options={ROLES} />
      </td>
      <td className="py-1 pr-2">
        <div className="grid grid-cols-3 gap-1">
          {AXES.map((axis, index) => (
            <PlainNumber key={axis} path={[...base, 'axis', index]} label={`${name} axis at home ${axis}`} />
          ))}
        </div>
        <VectorIssue path={[...base, 'axis']} />
      </td>
      <td className="py-1 pr-2">
        <div className="grid grid-cols-3 gap-1">
          {AXES.map((axis, index) => (
            <Quantity key={axis} path={[...base, 'point', index]} label={`${name} point on the axis ${axis}`} kind="length" />
          ))}
        </div>
        <VectorIssue path={[...base, 'point']} />
      </td>
      <td className="py-1 pr-2">
        <Quantity path={[...base, 'angle']} label={`${name} angle`} kind="angle" placeholder="0 deg" />
      </td>
      <td className="py-1 pr-2">
        {limits ? (
          <>
            <div className="grid grid-cols-2 gap-1">
              <Quantity path={[...base, 'limits', 'min']} label={`${name} lower limit`} kind="angle" />
              <Quantity path={[...base, 'limits', 'max']} label={`${name} upper limit`} kind="angle" />
            </div>
            {!readOnly && (
              <button type="button" className="text-[11px] underline text-graphite" aria-label={`Remove the joint limits of ${name}`} onClick={() => update([...base, 'limits'], undefined)}>
                remove
              </button>
            )}
          </>
        ) : (
          // Empty fields, required until filled: a made-up limit would drive the limit checks unnoticed.
          <button type="button" className={`${button} w-full text-xs`} disabled={readOnly} aria-label={`Add joint limits to ${name}`} onClick={() => update([...base, 'limits'], { min: '', max: '' })}>
            Add
          </button>
        )}
      </td>
      <td className="py-1">
        {rateLimit !== undefined ? (
          <>
            <Quantity path={[...base, 'rateLimit']} label={`${name} rate limit`} kind="angularSpeed" />
            {!readOnly && (
              <button type="button" className="text-[11px] underline text-graphite" aria-label={`Remove the rate limit of ${name}`} onClick={() => update([...base, 'rateLimit'], undefined)}>
                remove
              </button>
            )}
          </>
        ) : (
          <button type="button" className={`${button} w-full text-xs`} disabled={readOnly} aria-label={`Add rate limit to ${name}`} onClick={() => update([...base, 'rateLimit'], '')}>
            Add
          </button>
        )}
      </td>
    </tr>
  );
});

/** Column heads of the joint table; a vector's head names its x, y and z columns. */
function JointHead() {
  const vector = (title: string) => (
    <>
      {title}
      <span className="grid grid-cols-3 gap-1 font-normal normal-case" aria-hidden>
        {AXES.map((axis) => (
          <span key={axis}>{axis}</span>
        ))}
      </span>
    </>
  );
  return (
    <thead>
      <tr className="border-b border-ink text-left align-bottom text-[11px] uppercase tracking-wide text-graphite">
        <th className="w-[6.5rem] py-1 pr-2 font-normal">joint</th>
        <th className="w-[4.75rem] py-1 pr-2 font-normal">role</th>
        <th className="w-[8.5rem] py-1 pr-2 font-normal">{vector('axis at home (unit)')}</th>
        <th className="w-[11rem] py-1 pr-2 font-normal">{vector('point on the axis')}</th>
        <th className="w-[4.5rem] py-1 pr-2 font-normal">angle</th>
        <th className="w-[8.5rem] py-1 pr-2 font-normal">limits: lower, upper</th>
        <th className="w-[4.5rem] py-1 font-normal">rate limit</th>
      </tr>
    </thead>
  );
}

/**
 * Cells show the input alone: the column head says what it is (each input keeps its full label for
 * screen readers), and a quantity's reading in SI and in a chosen unit appears under the cell that
 * has the focus.
 */
const COMPACT_CELLS =
  '[&_label]:sr-only [&_input]:px-1 [&_input]:text-xs [&_button]:px-1 [&_select]:px-1 [&_select]:text-xs [&_td:not(:focus-within)_span:has(>[data-si])]:hidden';

const RollerFields = memo(function RollerFields({ finger }: { finger: number }) {
  const { update } = useSheetFields();
  const current = useCurrentDocument();
  const base = ['hand', 'fingers', finger, 'roller'];
  const kind = useDocumentAt([...base, 'kind']);
  const roller = () => (getAt(current(), base) ?? {}) as Record<string, unknown>;
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
                ? { kind, radius: roller().radius, center: roller().center, halfWidth: '6 mm', axis: [0, 0, 1] }
                : { kind, radius: roller().radius, center: roller().center },
            )
          }
        />
        <Quantity path={[...base, 'radius']} label="roller radius" kind="length" plausible="roller" />
        {kind === 'cylinder' && <Quantity path={[...base, 'halfWidth']} label="half width" kind="length" plausible="roller" />}
      </div>
      <div className="grid gap-3 md:grid-cols-2">
        <QuantityVector path={[...base, 'center']} label="roller centre at home" kind="length" />
        {kind === 'cylinder' && <DirectionVector path={[...base, 'axis']} label="roller axis" />}
      </div>
    </div>
  );
});

/** One finger: its name, friction, roller and the table of its joints. */
const FingerPanel = memo(function FingerPanel({ finger }: { finger: number }) {
  const base = ['hand', 'fingers', finger];
  const name = String(useDocumentAt([...base, 'name']) ?? '');
  const joints = useListLength([...base, 'joints']);
  const rollerKind = String(useDocumentAt([...base, 'roller', 'kind']) ?? '');
  return (
    <details open className="border border-rule bg-paper" data-finger={finger}>
      <summary className="cursor-pointer px-3 py-2 text-sm font-semibold">
        Finger {finger + 1}: {name}{' '}
        <span className="font-normal text-graphite">
          · {joints} joints · {rollerKind} roller
        </span>
      </summary>
      <div className="space-y-2 px-3 pb-3">
        <div className="grid w-[28rem] grid-cols-[3fr_2fr] gap-3">
          <TextField path={[...base, 'name']} label="finger name" />
          <PlainNumber path={[...base, 'friction']} label="friction coefficient (empty = 0.5)" />
        </div>
        <RollerFields finger={finger} />
        <div className="overflow-x-auto">
          <table className={`w-full min-w-[48rem] table-fixed text-sm ${COMPACT_CELLS}`} data-hand-table={finger} aria-label={`Joints of finger ${finger + 1}: ${name}`}>
            <JointHead />
            <tbody>
              {Array.from({ length: joints }, (_, j) => (
                <JointRow key={j} finger={finger} joint={j} />
              ))}
            </tbody>
          </table>
        </div>
      </div>
    </details>
  );
});

/** Hand: from a template, or edited finger by finger in a compact table of its joints. */
function HandSection({ parsed }: { parsed: SheetDocument | null }) {
  const { update, readOnly } = useSheetFields();
  const [template, setTemplate] = useState(HAND_TEMPLATES[0].id);
  const [confirming, setConfirming] = useState(false);
  const fingers = useListLength(['hand', 'fingers']);
  const chosen = HAND_TEMPLATES.find((t) => t.id === template) ?? HAND_TEMPLATES[0];
  return (
    <div className="space-y-3">
      <div className="flex flex-wrap items-end gap-3">
        <div className="w-64">
          <TextField path={['hand', 'name']} label="hand name" />
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
              title={parsed ? 'Replace every finger with the template, placed against the object (asks first)' : 'Fix the object first'}
              onClick={() => setConfirming(true)}
            >
              Replace hand…
            </button>
            <ConfirmDialog
              open={confirming}
              title="Replace the whole hand?"
              confirmLabel="Replace hand"
              onCancel={() => setConfirming(false)}
              onConfirm={() => {
                setConfirming(false);
                if (parsed) update(['hand'], createHandFromTemplate(template, parsed.object.shape, parsed.object.pose.position));
              }}
            >
              <p>
                All {fingers} fingers of this hand, with their joints, rollers and limits, give way to the template {chosen.name} ({chosen.fingers.length} fingers),
                placed against the object.
              </p>
              <p className="mt-2">The new hand stays an unsaved change until you save a revision; the last saved revision keeps the current one.</p>
            </ConfirmDialog>
            <UrdfImport />
          </div>
        )}
      </div>
      {Array.from({ length: fingers }, (_, i) => (
        <FingerPanel key={i} finger={i} />
      ))}
      <GraspQualityFields />
    </div>
  );
}

export default memo(HandSection);
