import { useEffect, useRef } from 'react';
import { shortcutOf, type ShortcutAction } from '../../lib/view/shortcuts';

/**
 * Runs `handler` when the action's shortcut is pressed anywhere on the page, inside a field or the
 * variables editor too (listening in the capture phase, before any editor sees the key).
 */
export function useShortcut(action: ShortcutAction, handler: () => void): void {
  const latest = useRef(handler);
  latest.current = handler;
  useEffect(() => {
    const onKey = (event: KeyboardEvent) => {
      if (event.repeat || shortcutOf(event) !== action) return;
      event.preventDefault();
      latest.current();
    };
    window.addEventListener('keydown', onKey, { capture: true });
    return () => window.removeEventListener('keydown', onKey, { capture: true });
  }, [action]);
}
