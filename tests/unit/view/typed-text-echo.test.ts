import { describe, expect, it } from 'vitest';
import { TypedTextEcho } from '../../../src/lib/view/typed-text-echo';

describe('TypedTextEcho', () => {
  it('does not let a late echo of typing overwrite keystrokes the editor already shows', () => {
    const echo = new TypedTextEcho('');
    echo.send('f');
    echo.send('fu');
    // The page re-renders (say, for a new evaluation) still holding "f" while the editor shows "fu".
    expect(echo.replaces('f', 'fu')).toBe(false);
    expect(echo.replaces('f', 'fu')).toBe(false);
    expect(echo.replaces('fu', 'fu')).toBe(false);
  });

  it('takes a text set elsewhere, even one the editor had sent earlier and that has since been settled', () => {
    const echo = new TypedTextEcho('');
    echo.send('a');
    echo.send('');
    echo.send('b');
    expect(echo.replaces('b', 'b')).toBe(false);
    // Discarding the edits sets the text back to the revision's, which the editor once sent on its way.
    expect(echo.replaces('', 'b')).toBe(true);
    expect(echo.replaces('', '')).toBe(false);
  });

  it('takes a restored draft that arrives before anything was typed', () => {
    const echo = new TypedTextEcho('x = 1 mm');
    expect(echo.replaces('x = 1 mm', 'x = 1 mm')).toBe(false);
    expect(echo.replaces('x = 2 mm', 'x = 1 mm')).toBe(true);
  });

  it('skips echoes the page never rendered: a later one settles the earlier ones', () => {
    const echo = new TypedTextEcho('');
    for (const text of ['r', 'ro', 'rol', 'roll']) echo.send(text);
    expect(echo.replaces('rol', 'roll')).toBe(false);
    // "r" was settled by "rol"; the page coming back to it now is a change made elsewhere.
    expect(echo.replaces('r', 'roll')).toBe(true);
  });
});
