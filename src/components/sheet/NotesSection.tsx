import { useDeferredValue, useId, useMemo } from 'react';
import { renderNotes } from '../../lib/sheet/notes';
import { useDocumentAt, useSheetFields } from './editor-context';
import { fieldInput } from './sheet-styles';

/** Notes in Markdown with math; the rendered page beside the text. */
export default function NotesSection() {
  const { update, readOnly } = useSheetFields();
  const id = useId();
  const notes = useDocumentAt(['notes']);
  const text = typeof notes === 'string' ? notes : '';
  const deferred = useDeferredValue(text);
  const html = useMemo(() => renderNotes(deferred), [deferred]);
  return (
    <div className={`grid gap-4 ${readOnly ? '' : 'md:grid-cols-2'}`}>
      {!readOnly && (
        <div>
          <label htmlFor={id} className="block text-[11px] uppercase tracking-wide text-graphite">Markdown, math between $ signs</label>
          <textarea
            id={id}
            className={`${fieldInput} h-48 resize-y`}
            value={text}
            placeholder={'Why these numbers: $v = \\omega \\times r$'}
            onChange={(event) => update(['notes'], event.target.value === '' ? undefined : event.target.value)}
          />
        </div>
      )}
      <div className="notes-body text-sm leading-relaxed [&_a]:underline [&_code]:font-mono [&_h1]:font-semibold [&_h2]:font-semibold [&_li]:ml-5 [&_li]:list-disc [&_p]:my-2" data-notes-rendered dangerouslySetInnerHTML={{ __html: html || '<p class="text-graphite">No notes.</p>' }} />
    </div>
  );
}
