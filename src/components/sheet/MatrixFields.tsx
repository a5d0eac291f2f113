import { memo, useId, useState } from 'react';
import { getAt, type DocumentPath } from '../../lib/sheet/document-path';
import { ROTATION_METRIC_KEYS } from '../../lib/sheet/sheet-constants';
import ConfirmDialog from './ConfirmDialog';
import { useCurrentDocument, useDocumentAt, useDocumentSelect, useIssueAt, useSheetFields } from './editor-context';
import { Choice, HIDDEN_LABELS, PlainNumber, Quantity } from './fields';
import { OrientationFields } from './ObjectSection';
import { button, fieldInput, smallLabel } from './sheet-styles';

const MATRIX: DocumentPath = ['matrix'];
const TARGETS: DocumentPath = ['matrix', 'targets'];
const STARTS: DocumentPath = ['matrix', 'starts'];
const GENERATORS: DocumentPath = ['matrix', 'generators'];
const GENERATOR_KINDS = ['spread-axes', 'random'] as const;

/** The list at path as written, or none. */
function listAt(document: unknown, path: DocumentPath): unknown[] {
  const value = getAt(document, path);
  return Array.isArray(value) ? value : [];
}

/** An optional label: clearing it removes the key, since the sheet reader refuses an empty label. */
function OptionalText({ path, label }: { path: DocumentPath; label: string }) {
  const { update, readOnly } = useSheetFields();
  const id = useId();
  const issue = useIssueAt(path);
  const value = useDocumentAt(path);
  return (
    <div className="min-w-0">
      <label htmlFor={id} className={smallLabel}>{label}</label>
      <input
        id={id}
        className={`${fieldInput} font-sans`}
        disabled={readOnly}
        value={typeof value === 'string' ? value : ''}
        aria-invalid={issue ? true : undefined}
        onChange={(event) => update(path, event.target.value === '' ? undefined : event.target.value)}
      />
      {issue && <span className="block text-[11px] text-sienna" role="alert">{issue}</span>}
    </div>
  );
}

/** The issue the sheet reader gives for a whole list or entry (its fields show their own). */
function WholeIssue({ path }: { path: DocumentPath }) {
  const issue = useIssueAt(path);
  return issue ? <p className="text-[11px] text-sienna" role="alert">{issue}</p> : null;
}

function RemoveButton({ list, index, what }: { list: DocumentPath; index: number; what: string }) {
  const { update, readOnly } = useSheetFields();
  const current = useCurrentDocument();
  if (readOnly) return null;
  return (
    <button type="button" className="px-1 text-sm text-sienna hover:underline" aria-label={`Remove ${what} ${index + 1}`} onClick={() => update(list, listAt(current(), list).filter((_, i) => i !== index))}>
      remove
    </button>
  );
}

function AddButton({ list, entry, children }: { list: DocumentPath; entry: unknown; children: string }) {
  const { update, readOnly } = useSheetFields();
  const current = useCurrentDocument();
  if (readOnly) return null;
  return (
    <button type="button" className={button} onClick={() => update(list, [...listAt(current(), list), entry])}>
      {children}
    </button>
  );
}

/** One listed target: axis and angle in a row, or the four quaternion components when written so. */
const TargetRow = memo(function TargetRow({ index }: { index: number }) {
  const at = [...TARGETS, index];
  const axisAngle = useDocumentSelect((document) => {
    const orientation = getAt(document, [...at, 'orientation']);
    return orientation !== null && typeof orientation === 'object' && 'axis' in orientation;
  });
  return (
    <tr className={`border-b border-rule align-top ${HIDDEN_LABELS}`} data-testid="matrix-target-row">
      <td className="num py-1 pr-2 text-xs">{index + 1}</td>
      {axisAngle ? (
        <>
          {(['x', 'y', 'z'] as const).map((axis, k) => (
            <td key={axis} className="pr-2">
              <PlainNumber path={[...at, 'orientation', 'axis', k]} label={`target ${index + 1} axis ${axis}`} />
            </td>
          ))}
          <td className="pr-2">
            <Quantity path={[...at, 'orientation', 'angle']} label={`target ${index + 1} angle`} kind="angle" />
          </td>
        </>
      ) : (
        <td colSpan={4} className="pr-2">
          <div className="grid grid-cols-4 gap-2">
            {(['w', 'x', 'y', 'z'] as const).map((c) => (
              <PlainNumber key={c} path={[...at, 'orientation', c]} label={`target ${index + 1} quaternion ${c}`} />
            ))}
          </div>
        </td>
      )}
      <td className="pr-2">
        <OptionalText path={[...at, 'group']} label={`target ${index + 1} group`} />
        <WholeIssue path={[...at, 'orientation']} />
      </td>
      <td>
        <RemoveButton list={TARGETS} index={index} what="target" />
      </td>
    </tr>
  );
});

/** One generator: its kind, count, and the spread angle or the random seed. */
const GeneratorRow = memo(function GeneratorRow({ index }: { index: number }) {
  const { update } = useSheetFields();
  const current = useCurrentDocument();
  const at = [...GENERATORS, index];
  const kind = useDocumentAt([...at, 'kind']);
  // Changing the kind keeps the count and group and starts the kind's own field afresh (spread angle or seed).
  const choose = (next: string) => {
    const document = current();
    const group = getAt(document, [...at, 'group']);
    update(at, { kind: next, count: getAt(document, [...at, 'count']), ...(next === 'spread-axes' ? { angle: getAt(document, [...at, 'angle']) ?? '60 deg' } : { seed: getAt(document, [...at, 'seed']) ?? 1 }), ...(group === undefined ? {} : { group }) });
  };
  return (
    <div className="grid grid-cols-[9rem_6rem_1fr_1fr_auto] items-start gap-2" data-testid="matrix-generator-row">
      <Choice path={[...at, 'kind']} label={`generator ${index + 1} kind`} options={GENERATOR_KINDS} onChoose={choose} />
      <PlainNumber path={[...at, 'count']} label="count" integer />
      {kind === 'random' ? <PlainNumber path={[...at, 'seed']} label="seed" integer /> : <Quantity path={[...at, 'angle']} label="turn about each axis" kind="angle" />}
      <OptionalText path={[...at, 'group']} label="group" />
      <div className="pt-4">
        <RemoveButton list={GENERATORS} index={index} what="generator" />
      </div>
      <div className="col-span-5">
        <WholeIssue path={at} />
      </div>
    </div>
  );
});

/**
 * The sheet's test matrix as written: listed targets, start poses, generators and the error metric.
 * Absent until asked for; an empty one reads as an issue at its targets until a target or generator is added.
 */
export default function MatrixFields() {
  const { update, readOnly, units } = useSheetFields();
  const [confirming, setConfirming] = useState(false);
  const matrix = useDocumentAt(MATRIX);
  if (matrix === undefined) {
    return (
      <div className="space-y-2" data-testid="matrix-fields">
        <p className="text-xs text-graphite">No test matrix: a matrix runs a list of target rotations from one or more start poses and reports the error of each.</p>
        {!readOnly && (
          <button type="button" className={button} onClick={() => update(MATRIX, { targets: [] })}>
            Add a test matrix
          </button>
        )}
      </div>
    );
  }
  const targets = listAt(matrix, ['targets']);
  const starts = listAt(matrix, ['starts']);
  const generators = listAt(matrix, ['generators']);
  const zeroAngle = `0 ${units.angle}`;
  return (
    <div className="space-y-4" data-testid="matrix-fields">
      <WholeIssue path={MATRIX} />
      <fieldset className="min-w-0">
        <legend className="text-[11px] font-semibold text-ink">targets (rotations applied to the start orientation, palm frame)</legend>
        {targets.length > 0 && (
          <table className="w-full text-left text-xs" data-testid="matrix-targets">
            <thead>
              <tr className="border-b-2 border-ink text-[11px] uppercase tracking-wide text-graphite">
                <th className="py-1 pr-2">#</th>
                <th className="pr-2">axis x</th>
                <th className="pr-2">axis y</th>
                <th className="pr-2">axis z</th>
                <th className="pr-2">angle ({units.angle})</th>
                <th className="pr-2">group</th>
                <th />
              </tr>
            </thead>
            <tbody>
              {targets.map((_, index) => (
                <TargetRow key={index} index={index} />
              ))}
            </tbody>
          </table>
        )}
        <WholeIssue path={TARGETS} />
        <div className="mt-2">
          <AddButton list={TARGETS} entry={{ orientation: { axis: [0, 0, 1], angle: zeroAngle } }}>
            Add target
          </AddButton>
        </div>
      </fieldset>
      <fieldset className="min-w-0 space-y-3">
        <legend className="text-[11px] font-semibold text-ink">start poses (none = the object pose above)</legend>
        {starts.map((_, index) => (
          <div key={index} className="space-y-2 border-l-2 border-rule pl-3" data-testid="matrix-start">
            <div className="flex items-end gap-3">
              <span className="text-xs font-semibold">start {index + 1}</span>
              <OptionalText path={[...STARTS, index, 'label']} label="label" />
              <RemoveButton list={STARTS} index={index} what="start pose" />
            </div>
            <OrientationFields path={[...STARTS, index, 'orientation']} />
            <WholeIssue path={[...STARTS, index, 'orientation']} />
          </div>
        ))}
        <WholeIssue path={STARTS} />
        <AddButton list={STARTS} entry={{ orientation: { axis: [0, 0, 1], angle: zeroAngle } }}>
          Add start pose
        </AddButton>
      </fieldset>
      <fieldset className="min-w-0 space-y-2">
        <legend className="text-[11px] font-semibold text-ink">generated targets</legend>
        {generators.map((_, index) => (
          <GeneratorRow key={index} index={index} />
        ))}
        <WholeIssue path={GENERATORS} />
        <AddButton list={GENERATORS} entry={{ kind: 'spread-axes', count: 8, angle: '60 deg' }}>
          Add generator
        </AddButton>
      </fieldset>
      <div className="flex flex-wrap items-end justify-between gap-3">
        <Choice path={[...MATRIX, 'metric']} label="error metric (Huynh 2009)" options={ROTATION_METRIC_KEYS} fallback="phi6" test="matrix-metric" />
        {!readOnly && (
          <>
            <button type="button" className={button} onClick={() => setConfirming(true)}>
              Remove test matrix
            </button>
            <ConfirmDialog
              open={confirming}
              title="Remove the test matrix?"
              confirmLabel="Remove test matrix"
              onCancel={() => setConfirming(false)}
              onConfirm={() => {
                setConfirming(false);
                update(MATRIX, undefined);
              }}
            >
              <p>
                The {targets.length} listed target{targets.length === 1 ? '' : 's'}, {starts.length} start pose{starts.length === 1 ? '' : 's'} and {generators.length} generator
                {generators.length === 1 ? '' : 's'} leave the sheet. The last saved revision keeps them until you save a new one.
              </p>
            </ConfirmDialog>
          </>
        )}
      </div>
    </div>
  );
}
