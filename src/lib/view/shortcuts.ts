/**
 * Keyboard shortcuts of the sheet editor. Alt+Shift with a letter: the browsers' own commands and
 * the variables editor's keymap (CodeMirror's default keymap binds Alt+Shift only to A and the
 * arrows) leave S, R and W free. Matched on the physical key, since on a Mac Option+Shift turns the
 * letter into another character.
 */
export type ShortcutAction = 'save' | 'run' | 'sweep';

export const SHORTCUTS: Record<ShortcutAction, { code: string; keys: string }> = {
  save: { code: 'KeyS', keys: 'Alt+Shift+S' },
  run: { code: 'KeyR', keys: 'Alt+Shift+R' },
  sweep: { code: 'KeyW', keys: 'Alt+Shift+W' },
};

/** The action a key press asks for, or null. */
export function shortcutOf(event: Pick<KeyboardEvent, 'code' | 'altKey' | 'shiftKey' | 'ctrlKey' | 'metaKey'>): ShortcutAction | null {
  if (!event.altKey || !event.shiftKey || event.ctrlKey || event.metaKey) return null;
  for (const action of Object.keys(SHORTCUTS) as ShortcutAction[]) if (SHORTCUTS[action].code === event.code) return action;
  return null;
}

/** A button's title with its shortcut: "Save revision (Alt+Shift+S)". */
export const withShortcut = (title: string, action: ShortcutAction) => `${title} (${SHORTCUTS[action].keys})`;
