import { defaultKeymap, history, historyKeymap } from '@codemirror/commands';
import { EditorState, RangeSetBuilder, StateEffect, StateField } from '@codemirror/state';
import { Decoration, EditorView, keymap, lineNumbers, WidgetType, type DecorationSet } from '@codemirror/view';
import { memo, useEffect, useRef } from 'react';
import type { VariableReadings } from '../../lib/sheet/readings';
import { TypedTextEcho } from '../../lib/view/typed-text-echo';

/** Text at the end of a line: the variable's SI value, or what is wrong with the line. */
class LineNote extends WidgetType {
  constructor(
    readonly text: string,
    readonly error: boolean,
  ) {
    super();
  }
  eq(other: LineNote) {
    return other.text === this.text && other.error === this.error;
  }
  toDOM() {
    const span = document.createElement('span');
    span.className = this.error ? 'cm-variable-error' : 'cm-variable-value';
    span.textContent = this.error ? `  ← ${this.text}` : `  = ${this.text}`;
    return span;
  }
}

const setReading = StateEffect.define<VariableReadings>();

function decorationsFor(state: EditorState, reading: VariableReadings): DecorationSet {
  const byLine = new Map<number, { error?: string; column?: number; value?: string }>();
  for (const issue of reading.issues) if (!byLine.has(issue.line)) byLine.set(issue.line, { error: issue.message, column: issue.column });
  for (const { line, value } of reading.values) byLine.set(line, { value });
  const builder = new RangeSetBuilder<Decoration>();
  for (let number = 1; number <= state.doc.lines; number++) {
    const note = byLine.get(number);
    if (!note) continue;
    const line = state.doc.line(number);
    if (note.error) {
      builder.add(line.from, line.from, Decoration.line({ class: 'cm-issue-line', attributes: { title: note.error } }));
      const at = note.column ? Math.min(line.from + note.column - 1, line.to) : line.from;
      if (at < line.to) builder.add(at, line.to, Decoration.mark({ class: 'cm-issue-mark' }));
      builder.add(line.to, line.to, Decoration.widget({ widget: new LineNote(note.error, true), side: 1 }));
    } else if (note.value) {
      builder.add(line.to, line.to, Decoration.widget({ widget: new LineNote(note.value, false), side: 1 }));
    }
  }
  return builder.finish();
}

const readingField = StateField.define<DecorationSet>({
  create: () => Decoration.none,
  update(decorations, transaction) {
    for (const effect of transaction.effects) if (effect.is(setReading)) return decorationsFor(transaction.state, effect.value);
    // The notes of the text before an edit would be wrong beside the new text; the reading of the new text follows within the keystroke.
    return transaction.docChanged ? Decoration.none : decorations;
  },
  provide: (field) => EditorView.decorations.from(field),
});

const theme = EditorView.theme({
  '&': { fontSize: '13px', backgroundColor: 'var(--color-paper)', border: '1px solid var(--color-rule)' },
  '&.cm-focused': { outline: '2px solid var(--color-verdigris)' },
  '.cm-content': { fontFamily: 'var(--font-mono)', minHeight: '7rem' },
  '.cm-gutters': { backgroundColor: 'var(--color-paper-deep)', color: 'var(--color-graphite)', border: 'none' },
  '.cm-issue-line': { backgroundColor: 'color-mix(in srgb, var(--color-sienna) 8%, transparent)' },
  '.cm-issue-mark': { textDecoration: 'underline wavy var(--color-sienna)' },
  '.cm-variable-value': { color: 'var(--color-verdigris-deep)', fontSize: '11px' },
  '.cm-variable-error': { color: 'var(--color-sienna)', fontSize: '11px', fontFamily: 'var(--font-sans)' },
});

/** The variables text in a code editor; each line shows its value or, inline, what is wrong with it (as the evaluation read this text). */
function VariablesEditor({
  text,
  reading,
  onChange,
  readOnly,
}: {
  text: string;
  reading: VariableReadings;
  onChange: (text: string) => void;
  readOnly: boolean;
}) {
  const host = useRef<HTMLDivElement>(null);
  const view = useRef<EditorView | null>(null);
  const changed = useRef(onChange);
  changed.current = onChange;
  const echo = useRef<TypedTextEcho | null>(null);
  echo.current ??= new TypedTextEcho(text);

  useEffect(() => {
    const editor = new EditorView({
      parent: host.current!,
      state: EditorState.create({
        doc: text,
        extensions: [
          lineNumbers(),
          history(),
          keymap.of([...defaultKeymap, ...historyKeymap]),
          readingField,
          theme,
          EditorView.lineWrapping,
          EditorState.readOnly.of(readOnly),
          EditorView.contentAttributes.of({ 'aria-label': 'Variables, one name = value per line', 'data-variables-editor': '' }),
          EditorView.updateListener.of((update) => {
            if (!update.docChanged) return;
            const typed = update.state.doc.toString();
            echo.current!.send(typed);
            changed.current(typed);
          }),
        ],
      }),
    });
    view.current = editor;
    return () => editor.destroy();
    // The editor is created once; later text changes from outside are applied below.
  }, [readOnly]);

  useEffect(() => {
    const editor = view.current;
    if (!editor) return;
    const current = editor.state.doc.toString();
    const fromElsewhere = echo.current!.replaces(text, current);
    const shown = fromElsewhere ? text : current;
    editor.dispatch({
      changes: fromElsewhere ? [{ from: 0, to: current.length, insert: text }] : [],
      effects: reading.text === shown ? setReading.of(reading) : [],
    });
  }, [text, reading]);

  return <div ref={host} />;
}

/** Redrawn only when its text, reading or access change, not on every edit elsewhere in the sheet. */
export default memo(VariablesEditor);
