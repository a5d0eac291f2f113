import { useRef, useState, type ChangeEvent } from 'react';
import { FormError, labelClass, primaryButton, secondaryButton } from '../form-parts';
import { downloadText } from '../../lib/client/download';
import { useZodForm } from '../../lib/client/use-zod-form';
import { ANGLE_UNITS, LENGTH_UNITS, logMappingSchema, RATE_UNITS, TIME_UNITS } from '../../lib/logs/mapping';
import type { JointDraft, MappingDraft } from '../../lib/view/log-mapping-draft';

const select = 'mt-1 border-2 border-ink bg-paper px-2 py-1 font-mono text-xs';
const NONE = '';

function ColumnSelect({ label, header, value, onChange }: { label: string; header: readonly string[]; value: string; onChange: (column: string) => void }) {
  return (
    <label className="text-xs">
      <span className="block text-graphite">{label}</span>
      <select className={select} aria-label={label} value={value} onChange={(e) => onChange(e.target.value)}>
        <option value={NONE}>—</option>
        {header.map((name) => (
          <option key={name} value={name}>
            {name}
          </option>
        ))}
      </select>
    </label>
  );
}

function UnitSelect<U extends string>({ label, units, value, onChange }: { label: string; units: readonly U[]; value: U; onChange: (unit: U) => void }) {
  return (
    <label className="text-xs">
      <span className="block text-graphite">{label}</span>
      <select className={select} aria-label={label} value={value} onChange={(e) => onChange(e.target.value as U)}>
        {units.map((unit) => (
          <option key={unit} value={unit}>
            {unit}
          </option>
        ))}
      </select>
    </label>
  );
}

const angleUnits = Object.keys(ANGLE_UNITS) as ('rad' | 'deg')[];
const rateUnits = Object.keys(RATE_UNITS) as ('rad/s' | 'deg/s' | 'rpm')[];
const timeUnits = Object.keys(TIME_UNITS) as ('s' | 'ms' | 'us')[];
const lengthUnits = Object.keys(LENGTH_UNITS) as ('m' | 'mm')[];

/** The draft with one joint's entry replaced; an entry left with no column is dropped, since the schema wants at least one. */
function withJoint(draft: MappingDraft, joint: string, change: (entry: JointDraft) => JointDraft): MappingDraft {
  const current = draft.joints.find((j) => j.joint === joint) ?? { joint };
  const next = change(current);
  const others = draft.joints.filter((j) => j.joint !== joint);
  const kept = next.angle || next.commandedRate || next.measuredRate ? [...others, next] : others;
  return { ...draft, joints: kept };
}

function JointRow({ joint, header, draft, setDraft }: { joint: string; header: readonly string[]; draft: MappingDraft; setDraft: (d: MappingDraft) => void }) {
  const entry = draft.joints.find((j) => j.joint === joint) ?? { joint };
  const column = <K extends 'angle' | 'commandedRate' | 'measuredRate'>(key: K, unit: NonNullable<JointDraft[K]>['unit']) => (name: string) =>
    setDraft(withJoint(draft, joint, (e) => {
      const { [key]: _dropped, ...rest } = e;
      return name ? { ...rest, joint, [key]: { column: name, unit: e[key]?.unit ?? unit } } : { ...rest, joint };
    }));
  const unit = <K extends 'angle' | 'commandedRate' | 'measuredRate'>(key: K) => (value: string) =>
    setDraft(withJoint(draft, joint, (e) => (e[key] ? { ...e, [key]: { ...e[key], unit: value } } : e)));
  return (
    <tr className="align-bottom" data-joint-row={joint}>
      <th scope="row" className="pr-2 text-left font-mono text-xs">{joint}</th>
      <td><ColumnSelect label={`${joint} angle column`} header={header} value={entry.angle?.column ?? NONE} onChange={column('angle', 'rad')} /></td>
      <td><UnitSelect label={`${joint} angle unit`} units={angleUnits} value={entry.angle?.unit ?? 'rad'} onChange={unit('angle')} /></td>
      <td><ColumnSelect label={`${joint} commanded rate column`} header={header} value={entry.commandedRate?.column ?? NONE} onChange={column('commandedRate', 'rad/s')} /></td>
      <td><UnitSelect label={`${joint} commanded rate unit`} units={rateUnits} value={entry.commandedRate?.unit ?? 'rad/s'} onChange={unit('commandedRate')} /></td>
      <td><ColumnSelect label={`${joint} measured rate column`} header={header} value={entry.measuredRate?.column ?? NONE} onChange={column('measuredRate', 'rad/s')} /></td>
      <td><UnitSelect label={`${joint} measured rate unit`} units={rateUnits} value={entry.measuredRate?.unit ?? 'rad/s'} onChange={unit('measuredRate')} /></td>
    </tr>
  );
}

interface LogMappingFormProps {
  /** The log's column names. */
  header: readonly string[];
  /** The sheet's joint names, in order, one mapping row each. */
  jointNames: string[];
  initial: MappingDraft;
  /** The role may run comparisons; without it the form only edits, downloads and loads mappings. */
  canRun: boolean;
  /** Runs the comparison with the validated mapping; a rejection's `issues` (each with a message) are listed under the form. */
  onCompare: (mapping: MappingDraft) => Promise<void>;
  /** Shown while the comparison runs. */
  runningText: string;
}

/** The mapping of a log's columns to the sheet (time, pose, joints, tolerances), with download and load of the mapping JSON. */
export default function LogMappingForm({ header, jointNames, initial, canRun, onCompare, runningText }: LogMappingFormProps) {
  const [draft, setDraft] = useState<MappingDraft>(initial);
  const [issues, setIssues] = useState<string[]>([]);
  const fileInput = useRef<HTMLInputElement>(null);
  const form = useZodForm({
    schema: logMappingSchema,
    fields: ['mapping'],
    read: () => draft,
    submit: async () => {
      setIssues([]);
      try {
        await onCompare(draft);
      } catch (error) {
        const listed = (error as { issues?: { message: string }[] }).issues ?? [];
        setIssues(listed.map((issue) => issue.message));
        throw error;
      }
    },
  });

  function download() {
    downloadText(`${JSON.stringify(draft, null, 2)}\n`, 'log-mapping.json', 'application/json');
  }

  async function load(event: ChangeEvent<HTMLInputElement>) {
    const file = event.target.files?.[0];
    event.target.value = '';
    if (!file) return;
    try {
      const raw: unknown = JSON.parse(await file.text());
      const read = logMappingSchema.safeParse(raw);
      if (!read.success) {
        setIssues(read.error.issues.slice(0, 10).map((issue) => `${issue.path.join('.')}: ${issue.message}`));
        return;
      }
      setIssues([]);
      setDraft(raw as MappingDraft);
    } catch {
      setIssues([`${file.name} is not JSON.`]);
    }
  }

  const position = draft.pose.position;
  const quaternion = draft.pose.orientation.quaternion;
  const setPositionColumn = (k: 0 | 1 | 2) => (name: string) => {
    const columns = [...position.columns] as [string, string, string];
    columns[k] = name;
    setDraft({ ...draft, pose: { ...draft.pose, position: { ...position, columns } } });
  };
  const setPart = (p: 'w' | 'x' | 'y' | 'z') => (name: string) => setDraft({ ...draft, pose: { ...draft.pose, orientation: { quaternion: { ...quaternion, [p]: name } } } });
  const errorText = Object.entries(form.errors).map(([field, message]) => (field === 'form' || field === 'mapping' ? message : `${field}: ${message}`)).join(' ');

  return (
    <form noValidate onSubmit={form.onSubmit} className="mt-3 space-y-3" aria-label="Log mapping" data-mapping-form>
      <fieldset className="flex flex-wrap gap-3">
        <legend className={labelClass}>Time</legend>
        <ColumnSelect label="Time column" header={header} value={draft.time.column} onChange={(column) => setDraft({ ...draft, time: { ...draft.time, column } })} />
        <UnitSelect label="Time unit" units={timeUnits} value={draft.time.unit} onChange={(unit) => setDraft({ ...draft, time: { ...draft.time, unit } })} />
      </fieldset>
      <fieldset className="flex flex-wrap gap-3">
        <legend className={labelClass}>Object position</legend>
        {(['x', 'y', 'z'] as const).map((a, k) => (
          <ColumnSelect key={a} label={`Position ${a} column`} header={header} value={position.columns[k]} onChange={setPositionColumn(k as 0 | 1 | 2)} />
        ))}
        <UnitSelect label="Position unit" units={lengthUnits} value={position.unit} onChange={(unit) => setDraft({ ...draft, pose: { ...draft.pose, position: { ...position, unit } } })} />
      </fieldset>
      <fieldset className="flex flex-wrap gap-3">
        <legend className={labelClass}>Object orientation (quaternion)</legend>
        {(['w', 'x', 'y', 'z'] as const).map((p) => (
          <ColumnSelect key={p} label={`Quaternion ${p} column`} header={header} value={quaternion[p]} onChange={setPart(p)} />
        ))}
      </fieldset>
      <fieldset className="min-w-0">
        <legend className={labelClass}>Joints of the sheet</legend>
        <div className="overflow-x-auto">
          <table className="text-xs">
            <tbody>
              {jointNames.map((joint) => (
                <JointRow key={joint} joint={joint} header={header} draft={draft} setDraft={setDraft} />
              ))}
            </tbody>
          </table>
        </div>
      </fieldset>
      <fieldset className="flex flex-wrap gap-3">
        <legend className={labelClass}>Tolerances</legend>
        <label className="text-xs">
          <span className="block text-graphite">Joint rate</span>
          <input className={select} value={draft.tolerances.rate} onChange={(e) => setDraft({ ...draft, tolerances: { ...draft.tolerances, rate: e.target.value } })} data-rate-tolerance />
        </label>
        <label className="text-xs">
          <span className="block text-graphite">Slip speed</span>
          <input className={select} value={draft.tolerances.slip} onChange={(e) => setDraft({ ...draft, tolerances: { ...draft.tolerances, slip: e.target.value } })} data-slip-tolerance />
        </label>
      </fieldset>
      <FormError message={errorText || undefined} />
      {issues.length > 0 && (
        <ul className="list-disc pl-5 text-xs text-sienna" data-comparison-issues>
          {issues.map((issue) => (
            <li key={issue}>{issue}</li>
          ))}
        </ul>
      )}
      <div className="flex flex-wrap gap-2">
        {canRun && (
          <button type="submit" className={primaryButton} disabled={form.submitting} data-run-comparison>
            {form.submitting ? 'Comparing…' : 'Compare'}
          </button>
        )}
        <button type="button" className={secondaryButton} onClick={download}>
          Download mapping
        </button>
        <input ref={fileInput} type="file" accept=".json,application/json" className="sr-only" aria-label="Mapping file" onChange={load} />
        <button type="button" className={secondaryButton} onClick={() => fileInput.current?.click()}>
          Load mapping
        </button>
      </div>
      {form.submitting && <p className="text-xs text-graphite" role="status">{runningText}</p>}
    </form>
  );
}

