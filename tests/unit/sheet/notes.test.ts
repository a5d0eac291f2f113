import { describe, expect, it } from 'vitest';
import { renderNotes } from '../../../src/lib/sheet/notes';

describe('renderNotes', () => {
  it('renders Markdown with inline and display math through KaTeX', () => {
    const html = renderNotes('# Check\n\nRoll rate $\\dot\\theta = v / r$ here.\n\n$$v = \\omega \\times r$$\n');
    expect(html).toContain('<h1');
    expect(html).toContain('class="katex"');
    expect(html).toContain('katex-display');
  });

  it('shows raw HTML as text and drops unsafe links', () => {
    const html = renderNotes('<img src=x onerror=alert(1)> [x](javascript:alert(1)) [ok](https://slipless.example/a)');
    expect(html).not.toContain('<img');
    expect(html).toContain('&lt;img');
    expect(html).not.toContain('javascript:');
    expect(html).toContain('href="https://slipless.example/a"');
  });
});
