import { useEffect, useId, useMemo, useRef, useState } from 'react';
import { parseQuantity } from '../../lib/sheet/units';
import type { JointRole } from '../../lib/sheet/types';
import {
  chainInPalmFrame,
  handFromUrdf,
  listUrdfChains,
  parseUrdf,
  suggestedPalm,
  suggestedRoles,
  type UrdfFingerChoice,
  type UrdfIssue,
  type UrdfLocation,
  type UrdfRobot,
} from '../../lib/sheet/urdf';
import { Excerpt } from '../sheets/ImportDialog';
import { useDocumentSelect, useSheetFields } from './editor-context';
import SceneView from './SceneView';
import { button, fieldInput, primaryButton, selectInput, smallLabel } from './sheet-styles';
import { useCompute } from './useCompute';
import UrdfOpenButton from './UrdfOpenButton';

const ROLES: readonly JointRole[] = ['base', 'pivot', 'roll', 'other'];

/** What the author set for one chain; the tip link names it. */
interface ChainDraft {
  use: boolean;
  name: string;
  roles: JointRole[];
  /** Roller radius as typed (a bare number is metres), for a tip link without a sphere or cylinder. */
  radius: string;
}

const where = (at: UrdfLocation) => (at.line ? `line ${at.line}${at.column ? `, column ${at.column}` : ''} · ${at.path}` : at.path);

function IssueList({ issues, text }: { issues: UrdfIssue[]; text: string }) {
  return (
    <ul role="alert" className="space-y-2 border-l-4 border-sienna pl-3 text-sm text-sienna" data-testid="urdf-errors">
      {issues.map((issue, i) => (
        <li key={i}>
          <span className="num text-xs">{where(issue)}</span>: {issue.message}
          {issue.line !== undefined && <Excerpt text={text} line={issue.line} column={issue.column} />}
        </li>
      ))}
    </ul>
  );
}

const mm = (v: number) => (v * 1000).toFixed(2);

/** The sheet with the imported hand, solved in its own worker against the sheet's object, drawn in the sheet's 3D view. */
function Preview({ document, onRefused }: { document: Record<string, unknown>; onRefused: (refused: boolean) => void }) {
  const { reply, lastGood, pending } = useCompute(document);
  const current = reply?.ok ? lastGood : null;
  const refused = !pending && reply !== null && !reply.ok;
  useEffect(() => onRefused(refused), [refused, onRefused]);
  return (
    <div className="space-y-2" data-testid="urdf-preview" data-state={pending ? 'pending' : reply?.ok ? 'solved' : 'refused'}>
      {reply && !reply.ok && (
        <ul role="alert" className="border-l-4 border-sienna pl-3 text-sm text-sienna">
          <li className="font-semibold">The sheet would refuse this hand; correct the file or the roles before accepting:</li>
          {reply.issues.slice(0, 8).map((issue) => (
            <li key={issue.path + issue.message}>
              <span className="num text-xs">{issue.path}</span>: {issue.message}
            </li>
          ))}
        </ul>
      )}
      {current && (
        <>
          <p className="text-xs text-graphite" data-testid="urdf-preview-summary">
            Solved against this sheet&apos;s object and motion: <span className="num">{current.result.fingers.length}</span> finger
            {current.result.fingers.length === 1 ? '' : 's'}, <span className="num">{current.result.warnings.length}</span> warning
            {current.result.warnings.length === 1 ? '' : 's'}
            {current.result.warnings.length > 0 && <> ({[...new Set(current.result.warnings.map((w) => w.code.toLowerCase().replaceAll('_', ' ')))].join(', ')})</>}.
          </p>
          <SceneView document={current.document} result={current.result} />
        </>
      )}
      {!reply && <p className="text-sm text-graphite">Solving the preview…</p>}
    </div>
  );
}

function ChainEditor({
  robot,
  palm,
  tip,
  draft,
  onChange,
}: {
  robot: UrdfRobot;
  palm: string;
  tip: string;
  draft: ChainDraft;
  onChange: (draft: ChainDraft) => void;
}) {
  const id = useId();
  const chain = useMemo(() => listUrdfChains(robot, palm).find((c) => c.tip === tip)!, [robot, palm, tip]);
  const placed = useMemo(() => chainInPalmFrame(robot, chain), [robot, chain]);
  if (!placed.ok) {
    return (
      <li className="border border-rule p-2 text-sm" data-urdf-chain={tip} data-refused>
        <span className="font-semibold">{tip}</span> <span className="text-graphite">cannot be a finger:</span>{' '}
        <span className="text-sienna">
          {placed.issue.message} <span className="num text-xs">({where(placed.issue)})</span>
        </span>
      </li>
    );
  }
  const { joints, roller } = placed.chain;
  return (
    <li className="border border-rule p-2" data-urdf-chain={tip}>
      <div className="flex flex-wrap items-end gap-3">
        <label className="flex items-center gap-2 text-sm font-semibold">
          <input type="checkbox" checked={draft.use} onChange={(event) => onChange({ ...draft, use: event.target.checked })} />
          {tip}
        </label>
        <span className="text-xs text-graphite">
          {chain.joints.length} joints from {palm}, {joints.length} revolute ·{' '}
          {roller ? `${roller.kind} roller, radius ${mm(roller.radius)} mm` : 'no sphere or cylinder on the tip link'}
        </span>
      </div>
      {draft.use && (
        <div className="mt-2 space-y-2">
          <div className="grid grid-cols-[12rem_10rem] gap-3">
            <div>
              <label htmlFor={`${id}-name`} className={smallLabel}>
                finger
              </label>
              <input id={`${id}-name`} className={`${fieldInput} font-sans`} value={draft.name} onChange={(event) => onChange({ ...draft, name: event.target.value })} />
            </div>
            {!roller && (
              <div>
                <label htmlFor={`${id}-radius`} className={smallLabel}>
                  roller radius
                </label>
                <input
                  id={`${id}-radius`}
                  className={fieldInput}
                  placeholder="e.g. 12 mm"
                  value={draft.radius}
                  onChange={(event) => onChange({ ...draft, radius: event.target.value })}
                  data-urdf-radius
                />
              </div>
            )}
          </div>
          <table className="w-full text-xs">
            <caption className="sr-only">Joints of the chain to {tip}, palm frame at home</caption>
            <thead>
              <tr className="text-left text-graphite">
                <th className="py-1 pr-2 font-normal">joint</th>
                <th className="py-1 pr-2 font-normal">role</th>
                <th className="py-1 pr-2 font-normal">axis (palm frame)</th>
                <th className="py-1 pr-2 font-normal">point on the axis (palm frame, mm)</th>
                <th className="py-1 font-normal">limits (rad) · rate (rad/s)</th>
              </tr>
            </thead>
            <tbody>
              {joints.map((joint, j) => (
                <tr key={joint.name} className="border-t border-dashed border-rule" data-urdf-joint={joint.name}>
                  <td className="py-1 pr-2 font-semibold">{joint.name}</td>
                  <td className="py-1 pr-2">
                    <select
                      className={selectInput}
                      aria-label={`role of ${joint.name}`}
                      value={draft.roles[j]}
                      onChange={(event) => onChange({ ...draft, roles: draft.roles.map((r, k) => (k === j ? (event.target.value as JointRole) : r)) })}
                    >
                      {ROLES.map((role) => (
                        <option key={role}>{role}</option>
                      ))}
                    </select>
                  </td>
                  <td className="num py-1 pr-2">{joint.axis.map((v) => v.toFixed(3)).join(', ')}</td>
                  <td className="num py-1 pr-2">{joint.point.map(mm).join(', ')}</td>
                  <td className="num py-1">
                    {joint.limits ? `${joint.limits.min} … ${joint.limits.max}` : 'none'} · {joint.rateLimit ?? 'none'}
                  </td>
                </tr>
              ))}
            </tbody>
          </table>
        </div>
      )}
    </li>
  );
}

interface Loaded {
  text: string;
  fileName: string;
  robot?: UrdfRobot;
  issues: UrdfIssue[];
}

function draftsFor(robot: UrdfRobot, palm: string): Record<string, ChainDraft> {
  const drafts: Record<string, ChainDraft> = {};
  for (const chain of listUrdfChains(robot, palm)) {
    const placed = chainInPalmFrame(robot, chain);
    const count = placed.ok ? placed.chain.joints.length : 0;
    drafts[chain.tip] = { use: placed.ok, name: chain.tip, roles: suggestedRoles(count), radius: '' };
  }
  return drafts;
}

/**
 * "Import from URDF": reads a robot description, lets the author pick the palm link and the chains (one finger
 * per chain to a tip link), assign each joint's role, and see the hand solved in the 3D view before it replaces
 * the sheet's hand through the ordinary edit (so it is saved, or discarded, like any other change).
 */
/** The URDF import dialog; `openOnMount` opens it as it loads (it loads when its button is first pressed). */
export default function UrdfImportDialog({ openOnMount = false }: { openOnMount?: boolean }) {
  const { update, readOnly } = useSheetFields();
  // The candidate hand goes into the whole document as it is now.
  const document = useDocumentSelect((whole) => whole);
  const dialog = useRef<HTMLDialogElement>(null);
  const [loaded, setLoaded] = useState<Loaded | null>(null);
  const [palm, setPalm] = useState('');
  const [drafts, setDrafts] = useState<Record<string, ChainDraft>>({});
  // The preview's worker runs only while the dialog is open.
  const [open, setOpen] = useState(false);
  const [previewRefused, setPreviewRefused] = useState(false);
  const show = () => {
    dialog.current?.showModal();
    setOpen(true);
  };
  useEffect(() => {
    if (openOnMount) show();
    // Only as it loads: later renders leave the dialog as the person left it.
  }, []);

  async function read(file: File) {
    const text = await file.text();
    const parsed = parseUrdf(text);
    if (!parsed.ok) {
      setLoaded({ text, fileName: file.name, issues: parsed.issues });
      return;
    }
    const chosenPalm = suggestedPalm(parsed.robot);
    setLoaded({ text, fileName: file.name, robot: parsed.robot, issues: [] });
    setPalm(chosenPalm);
    setDrafts(draftsFor(parsed.robot, chosenPalm));
  }

  const robot = loaded?.robot;
  const built = useMemo(() => {
    if (!robot) return null;
    const choices: UrdfFingerChoice[] = [];
    for (const [tip, draft] of Object.entries(drafts)) {
      if (!draft.use) continue;
      const radius = draft.radius.trim() === '' ? undefined : parseQuantity(draft.radius, 'length');
      if (radius && !radius.ok) return { ok: false as const, issue: { path: `finger ${draft.name}`, message: `roller radius: ${radius.message}` } };
      choices.push({ tip, name: draft.name.trim() || tip, roles: draft.roles, ...(radius?.ok ? { rollerRadius: radius.value } : {}) });
    }
    return handFromUrdf(robot, palm, choices);
  }, [robot, palm, drafts]);
  const candidate = useMemo(() => (built?.ok ? { ...document, hand: built.hand } : null), [built, document]);

  return (
    <>
      <UrdfOpenButton disabled={readOnly} onOpen={show} />
      <dialog
        ref={dialog}
        className="m-auto max-h-[calc(100vh-2rem)] w-[min(64rem,calc(100vw-2rem))] overflow-y-auto border-2 border-ink bg-paper p-0 text-ink shadow-[6px_6px_0_0_var(--color-ink)] backdrop:bg-ink/40"
        aria-labelledby="urdf-title"
        data-testid="urdf-dialog"
        onClose={() => setOpen(false)}
      >
        <div className="space-y-4 p-5">
          <header className="flex items-start justify-between gap-4">
            <div>
              <h2 id="urdf-title" className="text-lg font-semibold">
                Import the hand from a URDF file
              </h2>
              <p className="text-sm text-graphite">
                Joint axes and origins are composed from the palm link you choose, at every joint value 0, into the palm frame (metres,
                radians). Revolute and continuous joints become the finger&apos;s joints; fixed joints only place the frames.
              </p>
            </div>
            <button type="button" className="text-xl leading-none text-graphite hover:text-ink" aria-label="Close" onClick={() => dialog.current?.close()}>
              ×
            </button>
          </header>
          <label className="block text-sm font-semibold">
            URDF file
            <input
              type="file"
              accept=".urdf,.xml,application/xml,text/xml"
              className="mt-1 block text-sm"
              data-testid="urdf-file"
              onChange={(event) => {
                const file = event.target.files?.[0];
                if (file) void read(file);
              }}
            />
          </label>
          {loaded && loaded.issues.length > 0 && <IssueList issues={loaded.issues} text={loaded.text} />}
          {robot && (
            <>
              <div className="flex flex-wrap items-end gap-4">
                <p className="text-sm">
                  <span className="font-semibold">{robot.name}</span>{' '}
                  <span className="text-graphite">
                    from {loaded.fileName}: {robot.links.length} links, {robot.joints.length} joints
                  </span>
                </p>
                <label className={smallLabel}>
                  palm link
                  <select
                    className={`${selectInput} block`}
                    value={palm}
                    onChange={(event) => {
                      setPalm(event.target.value);
                      setDrafts(draftsFor(robot, event.target.value));
                    }}
                    data-testid="urdf-palm"
                  >
                    {robot.links.map((link) => (
                      <option key={link.name}>{link.name}</option>
                    ))}
                  </select>
                </label>
              </div>
              <ul className="space-y-2">
                {Object.keys(drafts).map((tip) => (
                  <ChainEditor key={`${palm}/${tip}`} robot={robot} palm={palm} tip={tip} draft={drafts[tip]} onChange={(draft) => setDrafts((all) => ({ ...all, [tip]: draft }))} />
                ))}
                {Object.keys(drafts).length === 0 && <li className="text-sm text-graphite">No joint hangs below {palm}; choose another palm link.</li>}
              </ul>
              {built && !built.ok && <IssueList issues={[built.issue]} text={loaded.text} />}
              {open && candidate && <Preview document={candidate} onRefused={setPreviewRefused} />}
            </>
          )}
          <footer className="flex justify-end gap-3 border-t-2 border-ink pt-3">
            <button type="button" className={button} onClick={() => dialog.current?.close()}>
              Cancel
            </button>
            <button
              type="button"
              className={primaryButton}
              disabled={!built?.ok || previewRefused}
              title={previewRefused ? 'The preview lists what the sheet would refuse in this hand' : undefined}
              data-testid="urdf-accept"
              onClick={() => {
                if (!built?.ok) return;
                update(['hand'], built.hand);
                dialog.current?.close();
                setLoaded(null);
                setDrafts({});
              }}
            >
              Replace the hand with these fingers
            </button>
          </footer>
        </div>
      </dialog>
    </>
  );
}
