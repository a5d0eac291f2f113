import { defaultKeymap, historyKeymap } from '@codemirror/commands';
import { describe, expect, it } from 'vitest';
import { SHORTCUTS, shortcutOf, withShortcut } from '../../../src/lib/view/shortcuts';

const press = (code: string, modifiers: { alt?: boolean; shift?: boolean; ctrl?: boolean; meta?: boolean }) => ({
  code,
  altKey: !!modifiers.alt,
  shiftKey: !!modifiers.shift,
  ctrlKey: !!modifiers.ctrl,
  metaKey: !!modifiers.meta,
});

describe('shortcutOf', () => {
  // Physical key names from the W3C UI Events KeyboardEvent code values ("KeyS" is the key labelled S on a US layout).
  it('maps Alt+Shift with S, R and W to save, run and sweep', () => {
    expect(shortcutOf(press('KeyS', { alt: true, shift: true }))).toBe('save');
    expect(shortcutOf(press('KeyR', { alt: true, shift: true }))).toBe('run');
    expect(shortcutOf(press('KeyW', { alt: true, shift: true }))).toBe('sweep');
  });

  it('ignores the letters alone, with one modifier, or with Ctrl or Meta added (the browsers own those: Ctrl+S saves the page, common practice)', () => {
    expect(shortcutOf(press('KeyS', {}))).toBeNull();
    expect(shortcutOf(press('KeyS', { ctrl: true }))).toBeNull();
    expect(shortcutOf(press('KeyS', { alt: true }))).toBeNull();
    expect(shortcutOf(press('KeyS', { alt: true, shift: true, ctrl: true }))).toBeNull();
    expect(shortcutOf(press('KeyR', { alt: true, shift: true, meta: true }))).toBeNull();
    expect(shortcutOf(press('KeyQ', { alt: true, shift: true }))).toBeNull();
  });

  it('takes no key that the variables editor (CodeMirror default and history keymaps) binds', () => {
    const bound = [...defaultKeymap, ...historyKeymap].flatMap((binding) => [binding.key, binding.mac, binding.win, binding.linux]).filter((key): key is string => !!key);
    // CodeMirror writes Shift with a letter either as "Shift-" or as the upper-case letter ("Alt-A").
    const normalise = (key: string) => {
      const parts = key.split('-');
      const last = parts.pop()!;
      const shifted = /^[A-Z]$/.test(last) && !parts.includes('Shift') ? ['Shift'] : [];
      return [...parts, ...shifted, last].map((part) => part.toLowerCase()).sort().join('-');
    };
    const ours = Object.values(SHORTCUTS).map(({ code }) => normalise(`Alt-Shift-${code.slice(3)}`));
    expect(bound.length).toBeGreaterThan(20);
    for (const key of ours) expect(bound.map(normalise)).not.toContain(key);
    // The check itself finds a binding CodeMirror does have: Alt+Shift+A toggles a block comment.
    expect(bound.map(normalise)).toContain(normalise('Alt-Shift-a'));
  });

  it('writes the shortcut into a button title', () => {
    expect(withShortcut('Run toward the target pose', 'run')).toBe('Run toward the target pose (Alt+Shift+R)');
  });
});
