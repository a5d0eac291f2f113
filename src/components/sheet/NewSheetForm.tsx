import { useState } from 'react';
import { requestJson } from '../../lib/client/api';
import { useZodForm } from '../../lib/client/use-zod-form';
import type { CreatedSheet, Wire } from '../../lib/contract';
import { createSheetFromTemplate, HAND_TEMPLATES } from '../../lib/sheet/templates';
import type { ObjectShape } from '../../lib/sheet/types';
import { createSheetBody } from '../../lib/validation/sheets';
import { fieldInput, primaryButton, selectInput } from './sheet-styles';

/** Starting dimensions of each shape, SI (m): a part of the size the templates were laid out for. */
const STARTING_SHAPES: Record<string, ObjectShape> = {
  sphere: { kind: 'sphere', radius: 0.03 },
  box: { kind: 'box', halfExtents: [0.02, 0.02, 0.02], filletRadius: 0.002 },
  cylinder: { kind: 'cylinder', radius: 0.012, halfLength: 0.025 },
  capsule: { kind: 'capsule', radius: 0.012, halfLength: 0.025 },
  ellipsoid: { kind: 'ellipsoid', semiAxes: [0.03, 0.024, 0.02] },
};
const SHAPES = Object.keys(STARTING_SHAPES);

/** New sheet: a hand template and an object shape, placed in contact. */
export default function NewSheetForm({ teamId }: { teamId: string }) {
  const [template, setTemplate] = useState(HAND_TEMPLATES[1].id);
  const [shapeKind, setShapeKind] = useState<string>('sphere');
  const [title, setTitle] = useState('');
  const shape = STARTING_SHAPES[shapeKind];

  const create = useZodForm({
    schema: createSheetBody,
    fields: ['title'],
    read: () => {
      const document = createSheetFromTemplate(template, shape);
      if (title.trim()) document.title = title.trim();
      return { teamId, title: document.title, tags: document.tags, document, message: 'Created from a hand template' };
    },
    submit: async (body) => {
      const { sheetId } = await requestJson<Wire<CreatedSheet>>('/api/sheets', { method: 'POST', body });
      window.location.assign(`/sheets/${sheetId}`);
    },
  });
  const error = Object.values(create.errors)[0];

  const chosen = HAND_TEMPLATES.find((t) => t.id === template);
  return (
    <form onSubmit={create.onSubmit} className="space-y-4">
      <label className="block text-sm font-semibold">
        Hand template
        <select name="template" className={`${selectInput} mt-1 block w-full`} value={template} onChange={(event) => setTemplate(event.target.value)}>
          {HAND_TEMPLATES.map((t) => (
            <option key={t.id} value={t.id}>
              {t.name} · {t.fingers.length} fingers
            </option>
          ))}
        </select>
        <span className="mt-1 block text-xs font-normal text-graphite">{chosen?.description}</span>
      </label>
      <label className="block text-sm font-semibold">
        Object shape
        <select name="shape" className={`${selectInput} mt-1 block w-full`} value={shapeKind} onChange={(event) => setShapeKind(event.target.value)}>
          {SHAPES.map((s) => (
            <option key={s}>{s}</option>
          ))}
        </select>
        <span className="mt-1 block text-xs font-normal text-graphite">Dimensions start at typical values; change them on the sheet.</span>
      </label>
      <label className="block text-sm font-semibold">
        Title (optional)
        <input name="title" className={`${fieldInput} mt-1 font-sans`} maxLength={120} value={title} onChange={(event) => setTitle(event.target.value)} placeholder={`${chosen?.name} on a ${shapeKind}`} />
      </label>
      {error && <p role="alert" className="text-sm text-sienna">{error}</p>}
      <button type="submit" className={primaryButton} disabled={create.submitting || !shape}>
        {create.submitting ? 'Creating…' : 'Create sheet'}
      </button>
    </form>
  );
}
